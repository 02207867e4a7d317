// libFuzzer harness for the CSV reader of the heldout tool (examples/tool/csv.hpp).
// Built and run by tests/fuzz/run_smoke.sh (clang++-14 -fsanitize=fuzzer,address,undefined).
//
// Besides "no crash, no sanitizer report", it checks two properties on every input that
// parses: the table is rectangular with a line number per row, and writing the table back
// as RFC 4180 text (every field quoted) and parsing that gives the same cells; numbers are
// read from every cell, and each failure must be a csv_error naming a line.
#include "csv.hpp"

#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string>
#include <string_view>

namespace {
[[noreturn]] void broken(const char* what) {
    __builtin_printf("csv_fuzz: property violated: %s\n", what);
    std::abort();
}

std::string write_back(const heldout_tool::csv_table& t) {
    std::string out;
    auto field = [&](const std::string& f) {
        out += '"';
        for (char c : f) {
            if (c == '"')
                out += '"';
            out += c;
        }
        out += '"';
    };
    for (std::size_t c = 0; c < t.columns(); ++c) {
        if (c)
            out += ',';
        field(t.header()[c]);
    }
    out += "\r\n";
    for (std::size_t r = 0; r < t.rows(); ++r) {
        for (std::size_t c = 0; c < t.columns(); ++c) {
            if (c)
                out += ',';
            field(t.cell(r, c));
        }
        out += '\n';
    }
    return out;
}
} // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string_view text(reinterpret_cast<const char*>(data), size);
    heldout_tool::csv_table t;
    try {
        t = heldout_tool::parse_csv(text);
    } catch (const heldout_tool::csv_error& e) {
        if (e.line() == 0 || std::string_view(e.what()).substr(0, 5) != "line ")
            broken("a parse error without a line");
        return 0;
    }
    if (t.columns() == 0)
        broken("a header with no column");
    std::size_t last = 0;
    for (std::size_t r = 0; r < t.rows(); ++r) {
        if (t.line_of(r) <= last)
            broken("row lines not increasing");
        last = t.line_of(r);
        for (std::size_t c = 0; c < t.columns(); ++c) {
            try {
                (void)t.number(r, c);
            } catch (const heldout_tool::csv_error& e) {
                if (e.line() != t.line_of(r) || e.column() != c + 1)
                    broken("a number error naming the wrong cell");
            }
        }
    }
    const std::string again = write_back(t);
    heldout_tool::csv_table u;
    try {
        u = heldout_tool::parse_csv(again);
    } catch (const heldout_tool::csv_error&) {
        // A table whose only content is one empty header field writes back as `""`, which
        // parses; every other table must parse too.
        broken("the written-back table does not parse");
    }
    if (u.header() != t.header() || u.rows() != t.rows())
        broken("round trip changed the shape");
    for (std::size_t r = 0; r < t.rows(); ++r)
        for (std::size_t c = 0; c < t.columns(); ++c)
            if (u.cell(r, c) != t.cell(r, c))
                broken("round trip changed a cell");
    try {
        (void)t.column("truth");
    } catch (const heldout_tool::csv_error& e) {
        if (e.line() != 1)
            broken("a missing column not reported on line 1");
    }
    return 0;
}
