// examples/tool/csv.hpp — the CSV reader of the `heldout` prediction-file tool.
//
//   heldout_tool::csv_table t = heldout_tool::parse_csv(text);    // or read_csv_file(path), "-" = stdin
//   std::size_t y = t.column("failed");                          // csv_error if absent
//   double s = t.number(row, t.column("score"));                 // from_chars
//
// The format is RFC 4180: records end with CRLF or LF (the last one may end the file),
// fields are separated by commas, a field that starts with a double quote is quoted and
// may hold commas, line breaks and doubled quotes (""), and every record has as many
// fields as the header (the first record). Also: a UTF-8 byte-order mark at the start is
// skipped, completely empty lines are skipped, and numbers may carry spaces or tabs
// around them and a leading '+'. A quote inside an unquoted field, text after a closing
// quote, and an unterminated quote are errors.
//
// Every error is a csv_error naming the 1-based line (of the file, counting the line
// breaks inside quoted fields) and, where it applies, the 1-based column number and
// the column's name — "line 7, column 3 ('score_b'): 'n/a' is not a number".
#pragma once

#include <cerrno>
#include <charconv>
#include <clocale>
#include <cmath>
#include <cstddef>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <fstream>
#include <iterator>
#include <sstream>
#include <stdexcept>
#include <string>
#include <string_view>
#include <system_error>
#include <unordered_map>
#include <vector>

namespace heldout_tool {

namespace detail {
/// std::from_chars for a double (general format), the same grammar, result and errors, for
/// standard libraries without it: libc++ before LLVM 20 has no floating-point from_chars
/// (libstdc++ has it since GCC 11). The longest prefix that from_chars would read is found
/// here and its conversion is left to the C library's strtod_l in the "C" locale (correctly
/// rounded, and deaf to the process locale, as from_chars is). As in libstdc++, a value that
/// overflows or rounds to zero is result_out_of_range and leaves x alone; a subnormal is kept.
inline std::from_chars_result from_chars_by_strtod(const char* first, const char* last, double& x) {
    const char* p = first;
    const bool negative = p != last && *p == '-';
    p += negative;
    auto is_digit = [](char c) { return c >= '0' && c <= '9'; };
    auto word = [&](const char* at, std::string_view w) { // ASCII, case-insensitive
        if (static_cast<std::size_t>(last - at) < w.size())
            return false;
        for (std::size_t i = 0; i < w.size(); ++i)
            if ((at[i] | 0x20) != w[i])
                return false;
        return true;
    };
    if (word(p, "inf")) {
        x = negative ? -HUGE_VAL : HUGE_VAL;
        return {word(p, "infinity") ? p + 8 : p + 3, std::errc{}};
    }
    if (word(p, "nan")) {
        const char* end = p + 3;
        if (end != last && *end == '(') { // nan(n-char-sequence)
            const char* q = end + 1;
            while (q != last && (is_digit(*q) || ((*q | 0x20) >= 'a' && (*q | 0x20) <= 'z') || *q == '_'))
                ++q;
            if (q != last && *q == ')')
                end = q + 1;
        }
        x = negative ? -std::nan("") : std::nan("");
        return {end, std::errc{}};
    }
    auto digits = [&](const char* q) {
        while (q != last && is_digit(*q))
            ++q;
        return q;
    };
    const char* q = digits(p);
    bool any = q != p;
    if (q != last && *q == '.') {
        const char* after = digits(q + 1);
        any = any || after != q + 1;
        q = after;
    }
    if (!any)
        return {first, std::errc::invalid_argument};
    if (q != last && (*q == 'e' || *q == 'E')) {
        const char* e = q + 1;
        if (e != last && (*e == '+' || *e == '-'))
            ++e;
        if (digits(e) != e) // an exponent without digits is not part of the number
            q = digits(e);
    }
    static const locale_t c_locale = newlocale(LC_ALL_MASK, "C", locale_t{});
    const std::string text(first, q);
    errno = 0;
    const double v = strtod_l(text.c_str(), nullptr, c_locale);
    if (errno == ERANGE && (v == 0 || std::isinf(v)))
        return {q, std::errc::result_out_of_range};
    x = v;
    return {q, std::errc{}};
}
} // namespace detail

/// std::from_chars for a double where the standard library has it, else the same by strtod_l.
inline std::from_chars_result double_from_chars(const char* first, const char* last, double& x) {
#if defined(__cpp_lib_to_chars) && __cpp_lib_to_chars >= 201611L
    return std::from_chars(first, last, x);
#else
    return detail::from_chars_by_strtod(first, last, x);
#endif
}

/// A problem in the file's content, with its position (column 0: the line as a whole).
class csv_error : public std::runtime_error {
public:
    csv_error(std::size_t line, std::size_t column, const std::string& what)
        : std::runtime_error(what), line_(line), column_(column) {}
    std::size_t line() const noexcept { return line_; }
    std::size_t column() const noexcept { return column_; }

private:
    std::size_t line_, column_;
};

/// A parsed CSV file: the header, the cells row by row, and where each row starts.
class csv_table {
public:
    const std::vector<std::string>& header() const noexcept { return header_; }
    std::size_t columns() const noexcept { return header_.size(); }
    std::size_t rows() const noexcept { return lines_.size(); }
    /// The line of the file on which data row r (0-based) starts.
    std::size_t line_of(std::size_t r) const { return lines_.at(r); }
    const std::string& cell(std::size_t r, std::size_t c) const { return cells_.at(r * header_.size() + c); }

    /// The index of the column with this name; csv_error (line 1) listing the columns if none.
    std::size_t column(std::string_view name) const {
        for (std::size_t c = 0; c < header_.size(); ++c)
            if (header_[c] == name)
                return c;
        std::string known;
        for (std::size_t c = 0; c < header_.size(); ++c)
            known += (c ? ", '" : "'") + header_[c] + "'";
        throw csv_error(1, 0, "line 1: no column named '" + std::string(name) + "' (the columns are " + known + ")");
    }

    /// "line L, column C ('name')" for messages about one cell.
    std::string where(std::size_t r, std::size_t c) const {
        return "line " + std::to_string(line_of(r)) + ", column " + std::to_string(c + 1) + " ('" + header_.at(c) +
               "')";
    }

    /// The cell as a finite double (std::from_chars, double_from_chars); csv_error naming line and column otherwise.
    double number(std::size_t r, std::size_t c) const {
        std::string_view s = cell(r, c);
        while (!s.empty() && (s.front() == ' ' || s.front() == '\t'))
            s.remove_prefix(1);
        while (!s.empty() && (s.back() == ' ' || s.back() == '\t'))
            s.remove_suffix(1);
        if (s.empty())
            throw csv_error(line_of(r), c + 1, where(r, c) + ": empty cell where a number is needed");
        std::string_view digits = s;
        if (digits.size() > 1 && digits.front() == '+' && digits[1] != '-')
            digits.remove_prefix(1);
        double x = 0;
        const auto res = double_from_chars(digits.data(), digits.data() + digits.size(), x);
        if (res.ec == std::errc::result_out_of_range)
            throw csv_error(line_of(r), c + 1,
                            where(r, c) + ": '" + printable(s) + "' is out of the range of a double");
        if (res.ec != std::errc{} || res.ptr != digits.data() + digits.size())
            throw csv_error(line_of(r), c + 1, where(r, c) + ": '" + printable(s) + "' is not a number");
        if (!std::isfinite(x))
            throw csv_error(line_of(r), c + 1, where(r, c) + ": '" + printable(s) + "' is not a finite number");
        return x;
    }

    /// Text for a message: at most 40 bytes, control bytes shown as '?'.
    static std::string printable(std::string_view s) {
        std::string out;
        for (char ch : s.substr(0, 40))
            out += static_cast<unsigned char>(ch) < 0x20 ? '?' : ch;
        if (s.size() > 40)
            out += "...";
        return out;
    }

private:
    friend csv_table parse_csv(std::string_view text);
    std::vector<std::string> header_;
    std::vector<std::string> cells_; // row-major, columns() per row
    std::vector<std::size_t> lines_; // first line of each data row
};

/// Parses CSV text (see the header comment for the accepted format).
inline csv_table parse_csv(std::string_view text) {
    if (text.substr(0, 3) == "\xEF\xBB\xBF")
        text.remove_prefix(3);
    csv_table t;
    std::size_t i = 0, line = 1;
    std::vector<std::string> record;
    bool have_header = false;
    while (i < text.size()) {
        // skip completely empty lines
        if (text[i] == '\n' || (text[i] == '\r' && i + 1 < text.size() && text[i + 1] == '\n')) {
            i += text[i] == '\r' ? 2 : 1;
            ++line;
            continue;
        }
        const std::size_t record_line = line;
        record.clear();
        for (;;) { // one field
            std::string field;
            const std::size_t column = record.size() + 1;
            if (i < text.size() && text[i] == '"') {
                const std::size_t quote_line = line;
                ++i;
                for (;;) {
                    if (i >= text.size())
                        throw csv_error(quote_line, column,
                                        "line " + std::to_string(quote_line) + ", column " + std::to_string(column) +
                                            ": quoted field not closed before the end of the file");
                    const char ch = text[i];
                    if (ch == '"') {
                        if (i + 1 < text.size() && text[i + 1] == '"') {
                            field += '"';
                            i += 2;
                            continue;
                        }
                        ++i;
                        break;
                    }
                    if (ch == '\n')
                        ++line;
                    field += ch;
                    ++i;
                }
                if (i < text.size() && text[i] != ',' && text[i] != '\n' &&
                    !(text[i] == '\r' && i + 1 < text.size() && text[i + 1] == '\n'))
                    throw csv_error(line, column,
                                    "line " + std::to_string(line) + ", column " + std::to_string(column) +
                                        ": text after the closing quote of a quoted field");
            } else {
                while (i < text.size() && text[i] != ',' && text[i] != '\n' &&
                       !(text[i] == '\r' && i + 1 < text.size() && text[i + 1] == '\n')) {
                    if (text[i] == '"')
                        throw csv_error(line, column,
                                        "line " + std::to_string(line) + ", column " + std::to_string(column) +
                                            ": a double quote inside an unquoted field (quote the whole field and "
                                            "double the quote)");
                    field += text[i];
                    ++i;
                }
            }
            record.push_back(std::move(field));
            if (i < text.size() && text[i] == ',') {
                ++i;
                continue; // a comma at the very end of the text still opens one (empty) field
            }
            break;
        }
        // end of record: line break or end of text
        if (i < text.size()) {
            i += text[i] == '\r' ? 2 : 1;
            ++line;
        }
        if (!have_header) {
            std::unordered_map<std::string, std::size_t> seen;
            for (std::size_t c = 0; c < record.size(); ++c) {
                auto [it, fresh] = seen.emplace(record[c], c);
                if (!fresh)
                    throw csv_error(record_line, c + 1,
                                    "line " + std::to_string(record_line) + ", column " + std::to_string(c + 1) +
                                        ": column name '" + csv_table::printable(record[c]) + "' repeats column " +
                                        std::to_string(it->second + 1));
            }
            t.header_ = record;
            have_header = true;
            continue;
        }
        if (record.size() != t.header_.size())
            throw csv_error(record_line, 0,
                            "line " + std::to_string(record_line) + ": " + std::to_string(record.size()) +
                                (record.size() == 1 ? " field" : " fields") + " where the header has " +
                                std::to_string(t.header_.size()));
        for (auto& f : record)
            t.cells_.push_back(std::move(f));
        t.lines_.push_back(record_line);
    }
    if (!have_header)
        throw csv_error(1, 0, "line 1: the file is empty (a header line is needed)");
    return t;
}

/// A file that cannot be read or written (the tool's exit code 3), with the reason.
class io_error : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

/// The whole content of a file, or of standard input for "-"; io_error naming the file and
/// the system's reason when it cannot be opened or read (a directory, a missing file, a read
/// error), so that no read failure passes for an empty or truncated file.
inline std::string read_text(const std::string& path) {
    const bool stdin_ = path == "-";
    const std::string name = stdin_ ? std::string("standard input") : "'" + path + "'";
    std::FILE* f = stdin_ ? stdin : std::fopen(path.c_str(), "rb");
    if (!f)
        throw io_error("cannot open " + name + " for reading: " + std::strerror(errno));
    // fopen accepts a directory on POSIX; reading it then fails with EISDIR, handled below.
    std::string text;
    char buf[65536];
    std::size_t got = 0;
    errno = 0;
    while ((got = std::fread(buf, 1, sizeof buf, f)) > 0)
        text.append(buf, got);
    const bool failed = std::ferror(f) != 0;
    const int err = errno;
    if (!stdin_)
        std::fclose(f);
    if (failed)
        throw io_error("reading " + name + " failed: " + std::strerror(err != 0 ? err : EIO));
    return text;
}

/// Reads and parses a file ("-": standard input); io_error when it cannot be read, csv_error
/// for its content.
inline csv_table read_csv_file(const std::string& path) { return parse_csv(read_text(path)); }

} // namespace heldout_tool
