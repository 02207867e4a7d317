// heldout/detail/json.hpp — a minimal streaming JSON writer for heldout's exports.
// Internal: include the public headers instead (estimate/estimate.hpp uses it).
//
// Numbers are written in the shortest form that reads back to the same double
// (std::to_chars without a precision), so a JSON consumer recovers every bit; libstdc++ and
// libc++ (since LLVM 14) give the same text (tests/detail/json.cpp, strict.number_text). JSON has no
// NaN or infinity: a non-finite number is written as null, and callers decide beforehand
// whether that can happen (heldout's estimates hold finite numbers or absent values).
// Strings are written as valid JSON whatever their bytes (see json_quote).
#pragma once

#include <heldout/core/config.hpp>
#include <heldout/core/error.hpp>

#include <charconv>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <optional>
#include <ostream>
#include <string>
#include <string_view>
#include <system_error>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace detail {

/// The UTF-8 sequence at s[i]: its length, and whether it is well formed (Unicode 15.0,
/// Section 3.9, Table 3-7: no overlong forms, no surrogates, nothing above U+10FFFF). An
/// ill-formed one has the length of its maximal subpart (at least 1 byte), which a writer
/// replaces by one U+FFFD ("substitution of maximal subparts", Unicode 15.0 Section 3.9).
/// Hand-written because the standard library has no UTF-8 validator (codecvt is deprecated)
/// and the replacement policy must be this exact one for reproducible output.
struct utf8_sequence {
    std::size_t length = 1;
    bool valid = true;
};
inline utf8_sequence utf8_at(std::string_view s, std::size_t i) noexcept {
    const auto b = [&](std::size_t j) { return static_cast<unsigned char>(s[j]); };
    const unsigned char b0 = b(i);
    if (b0 < 0x80)
        return {1, true};
    std::size_t need = 0;               // continuation bytes
    unsigned char lo = 0x80, hi = 0xBF; // allowed range of the second byte
    if (b0 >= 0xC2 && b0 <= 0xDF)
        need = 1;
    else if (b0 >= 0xE0 && b0 <= 0xEF) {
        need = 2;
        lo = b0 == 0xE0 ? 0xA0 : 0x80; // E0: no overlong forms
        hi = b0 == 0xED ? 0x9F : 0xBF; // ED: no surrogates
    } else if (b0 >= 0xF0 && b0 <= 0xF4) {
        need = 3;
        lo = b0 == 0xF0 ? 0x90 : 0x80; // F0: no overlong forms
        hi = b0 == 0xF4 ? 0x8F : 0xBF; // F4: nothing above U+10FFFF
    } else
        return {1, false}; // 80..C1 and F5..FF never start a sequence
    for (std::size_t j = 1; j <= need; ++j) {
        if (i + j >= s.size())
            return {j, false};
        const unsigned char c = b(i + j);
        if (j == 1 ? (c < lo || c > hi) : (c < 0x80 || c > 0xBF))
            return {j, false};
    }
    return {need + 1, true};
}

inline constexpr std::string_view replacement_character = "\xEF\xBF\xBD"; // U+FFFD in UTF-8

/// Appends s to out as a JSON string literal (quotes and escapes included). The result is
/// valid JSON (RFC 8259) for any bytes: control characters are escaped (\n, \r, \t or
/// \u00XX), and each ill-formed UTF-8 sequence becomes one U+FFFD (written as UTF-8).
inline void json_quote(std::string& out, std::string_view s) {
    out.push_back('"');
    for (std::size_t i = 0; i < s.size();) {
        const char ch = s[i];
        const auto c = static_cast<unsigned char>(ch);
        if (c >= 0x80) {
            const utf8_sequence q = utf8_at(s, i);
            if (q.valid)
                out.append(s.substr(i, q.length));
            else
                out.append(replacement_character);
            i += q.length;
            continue;
        }
        ++i;
        switch (c) {
        case '"':
            out += "\\\"";
            break;
        case '\\':
            out += "\\\\";
            break;
        case '\n':
            out += "\\n";
            break;
        case '\r':
            out += "\\r";
            break;
        case '\t':
            out += "\\t";
            break;
        default:
            if (c < 0x20) {
                static constexpr char hex[] = "0123456789abcdef";
                out += "\\u00";
                out.push_back(hex[c >> 4]);
                out.push_back(hex[c & 15]);
            } else {
                out.push_back(ch);
            }
        }
    }
    out.push_back('"');
}

/// Builds one JSON text: objects, arrays, keys and scalar values, commas handled.
class json_writer {
public:
    json_writer& begin_object() {
        open('{');
        return *this;
    }
    json_writer& end_object() {
        close('}');
        return *this;
    }
    json_writer& begin_array() {
        open('[');
        return *this;
    }
    json_writer& end_array() {
        close(']');
        return *this;
    }
    /// The key of the next member of the current object.
    json_writer& key(std::string_view k) {
        comma();
        json_quote(out_, k);
        out_.push_back(':');
        after_key_ = true;
        return *this;
    }
    json_writer& value(std::string_view s) {
        comma();
        json_quote(out_, s);
        return *this;
    }
    json_writer& value(const char* s) { return value(std::string_view(s)); }
    json_writer& value(const std::string& s) { return value(std::string_view(s)); }
    json_writer& value(double x) {
        comma();
        if (std::isfinite(x))
            out_ += number_text(x);
        else
            out_ += "null";
        return *this;
    }
    json_writer& value(std::uint64_t x) {
        comma();
        out_ += std::to_string(x);
        return *this;
    }
    json_writer& value(bool b) {
        comma();
        out_ += b ? "true" : "false";
        return *this;
    }
    json_writer& value(const std::optional<double>& x) { return x ? value(*x) : null(); }
    json_writer& null() {
        comma();
        out_ += "null";
        return *this;
    }
    template <class T>
    json_writer& member(std::string_view k, const T& v) {
        key(k);
        return value(v);
    }

    const std::string& str() const noexcept { return out_; }

private:
    void comma() {
        if (after_key_) {
            after_key_ = false;
            return;
        }
        if (!first_.empty()) {
            if (!first_.back())
                out_.push_back(',');
            first_.back() = false;
        }
    }
    void open(char c) {
        comma();
        out_.push_back(c);
        first_.push_back(true);
    }
    void close(char c) {
        HELDOUT_ASSERT(!first_.empty());
        first_.pop_back();
        out_.push_back(c);
    }

    std::string out_;
    std::vector<bool> first_; // per open container: no element written yet
    bool after_key_ = false;
};

} // namespace detail
HELDOUT_NAMESPACE_END
