// Unit tests of the heldout tool's CSV reader (examples/tool/csv.hpp), against RFC 4180
// (Shafranovich 2005, "Common Format and MIME Type for Comma-Separated Values (CSV) Files",
// section 2, rules 1-7) and the reader's documented additions.
#define DOCTEST_CONFIG_IMPLEMENT_WITH_MAIN
#include "csv.hpp"

#include <doctest/doctest.h>

#include <charconv>
#include <cmath>
#include <cstdint>
#include <cstring>
#include <string>
#include <string_view>
#include <system_error>
#include <vector>

using heldout_tool::csv_error;
using heldout_tool::parse_csv;

namespace {
struct parsed {
    std::errc ec;
    long used;
    std::uint64_t bits; // of x, which starts as -99 (untouched on an error)
};
template <class F>
parsed read_with(F from_chars, std::string_view s) {
    double x = -99;
    const auto r = from_chars(s.data(), s.data() + s.size(), x);
    std::uint64_t b = 0;
    std::memcpy(&b, &x, sizeof b);
    if (std::isnan(x))
        b = std::signbit(x) ? 1 : 2; // NaN payloads are not specified
    return {r.ec, static_cast<long>(r.ptr - s.data()), b};
}
parsed fallback(std::string_view s) {
    return read_with(
        [](const char* f, const char* l, double& x) { return heldout_tool::detail::from_chars_by_strtod(f, l, x); }, s);
}
double value(std::string_view s) {
    double x = -99;
    heldout_tool::detail::from_chars_by_strtod(s.data(), s.data() + s.size(), x);
    return x;
}
} // namespace

TEST_SUITE("tool/csv") {
    TEST_CASE("records, fields, header; CRLF and LF; the last line break optional (RFC 4180 rules 1-3)") {
        const auto t = parse_csv("a,b,c\r\n1,2,3\r\n4,5,6");
        REQUIRE(t.columns() == 3);
        REQUIRE(t.rows() == 2);
        CHECK(t.header()[2] == "c");
        CHECK(t.cell(1, 2) == "6");
        CHECK(t.line_of(0) == 2);
        CHECK(t.line_of(1) == 3);
        const auto u = parse_csv("a,b\n1,2\n");
        CHECK(u.rows() == 1);
        CHECK(u.cell(0, 1) == "2");
    }

    TEST_CASE("quoted fields hold commas, line breaks and doubled quotes (rules 5-7)") {
        const auto t = parse_csv("name,note\n\"a, b\",\"say \"\"hi\"\"\"\n\"multi\nline\",x\nlast,\"\"\n");
        REQUIRE(t.rows() == 3);
        CHECK(t.cell(0, 0) == "a, b");
        CHECK(t.cell(0, 1) == "say \"hi\"");
        CHECK(t.cell(1, 0) == "multi\nline");
        CHECK(t.cell(2, 1).empty());
        CHECK(t.line_of(1) == 3);
        CHECK(t.line_of(2) == 5); // the quoted line break counts as a line of the file
    }

    TEST_CASE("a byte-order mark and empty lines are skipped; empty fields are kept") {
        const auto t = parse_csv("\xEF\xBB\xBFx,y\n\n1,\n\r\n,2\n");
        REQUIRE(t.rows() == 2);
        CHECK(t.header()[0] == "x");
        CHECK(t.cell(0, 1).empty());
        CHECK(t.line_of(1) == 5);
    }

    TEST_CASE("numbers through std::from_chars, with spaces and a leading '+'") {
        const auto t = parse_csv("v\n0.25\n +1e-3 \n-7\n1e999\nnan\ninf\n0x10\n\n 12abc\n--1\n+-1\n");
        CHECK(t.number(0, 0) == 0.25);
        CHECK(t.number(1, 0) == 0.001);
        CHECK(t.number(2, 0) == -7);
        CHECK_THROWS_WITH_AS(t.number(3, 0), "line 5, column 1 ('v'): '1e999' is out of the range of a double",
                             csv_error);
        CHECK_THROWS_WITH_AS(t.number(4, 0), "line 6, column 1 ('v'): 'nan' is not a finite number", csv_error);
        CHECK_THROWS_WITH_AS(t.number(5, 0), "line 7, column 1 ('v'): 'inf' is not a finite number", csv_error);
        CHECK_THROWS_WITH_AS(t.number(6, 0), "line 8, column 1 ('v'): '0x10' is not a number", csv_error);
        CHECK_THROWS_WITH_AS(t.number(7, 0), "line 10, column 1 ('v'): '12abc' is not a number", csv_error);
        CHECK_THROWS_AS(t.number(8, 0), csv_error);
        CHECK_THROWS_AS(t.number(9, 0), csv_error);
        try {
            (void)t.number(6, 0);
        } catch (const csv_error& e) {
            CHECK(e.line() == 8);
            CHECK(e.column() == 1);
        }
        const auto e = parse_csv("a,b\n1,\n");
        CHECK_THROWS_WITH_AS(e.number(0, 1), "line 2, column 2 ('b'): empty cell where a number is needed", csv_error);
    }

    TEST_CASE("errors name the line and the column") {
        CHECK_THROWS_WITH_AS(parse_csv("a,b\n1,\"open\n2,3\n"),
                             "line 2, column 2: quoted field not closed before the end of the file", csv_error);
        CHECK_THROWS_WITH_AS(parse_csv("a,b\n1,\"x\"y\n"),
                             "line 2, column 2: text after the closing quote of a quoted field", csv_error);
        CHECK_THROWS_WITH_AS(parse_csv("a,b\n1,x\"y\n"),
                             "line 2, column 2: a double quote inside an unquoted field (quote the whole field and "
                             "double the quote)",
                             csv_error);
        CHECK_THROWS_WITH_AS(parse_csv("a,b\n1,2\n3\n"), "line 3: 1 field where the header has 2", csv_error);
        CHECK_THROWS_WITH_AS(parse_csv("a,b,a\n"), "line 1, column 3: column name 'a' repeats column 1", csv_error);
        CHECK_THROWS_WITH_AS(parse_csv(""), "line 1: the file is empty (a header line is needed)", csv_error);
        const auto t = parse_csv("x,y\n1,2\n");
        CHECK_THROWS_WITH_AS(t.column("z"), "line 1: no column named 'z' (the columns are 'x', 'y')", csv_error);
        CHECK(t.column("y") == 1);
    }

    TEST_CASE("the strtod_l fallback reads a double as std::from_chars does (C++20 [charconv.from.chars])") {
        // The grammar is strtod's without leading space, '+' or hex (general format): the
        // parse stops where the pattern ends and reports how far it read.
        CHECK(fallback("0x10").used == 1);
        CHECK(fallback("1e").used == 1);
        CHECK(fallback("1e+").used == 1);
        CHECK(fallback("1e-5x").used == 4);
        CHECK(fallback(".5").used == 2);
        CHECK(fallback("5.").used == 2);
        CHECK(fallback("infin").used == 3);
        CHECK(fallback("-Infinity").used == 9);
        CHECK(fallback("nan(12_ab)").used == 10);
        CHECK(fallback("nan(").used == 3);
        for (std::string_view bad : {"+5", " 5", "-", ".", "-.e1", "", "e5"}) {
            CHECK(fallback(bad).ec == std::errc::invalid_argument);
            CHECK(fallback(bad).used == 0);
        }
        // out of range: overflow and underflow to zero leave x alone; a subnormal is a value
        for (std::string_view big : {"1e999", "-1e999", "1.7976931348623159e308", "1e-400", "2.4703282292062327e-324"})
            CHECK(fallback(big).ec == std::errc::result_out_of_range);
        CHECK(value("1e999") == -99);
        CHECK(value("2.4703282292062328e-324") == 4.9406564584124654e-324); // rounds up to the least subnormal
        CHECK(value("1.7976931348623158e308") == 1.7976931348623157e308);
        CHECK(value("0.1") == 0.1);
        CHECK(std::isinf(value("-inf")));
        CHECK(std::isnan(value("NaN")));

        // Every double printed by std::to_chars (shortest, scientific with 17 digits, fixed with 20
        // decimals from 1 up)
        // reads back to the same bits. Doubles from a fixed xorshift sequence of bit patterns.
        std::uint64_t state = 88172645463325252ull;
        char buf[400];
        for (int i = 0; i < 20000; ++i) {
            state ^= state << 13, state ^= state >> 7, state ^= state << 17;
            double x = 0;
            std::memcpy(&x, &state, sizeof x);
            if (!std::isfinite(x))
                continue;
            for (int form = 0; form < 3; ++form) {
                const auto r = form == 0   ? std::to_chars(buf, buf + sizeof buf, x)
                               : form == 1 ? std::to_chars(buf, buf + sizeof buf, x, std::chars_format::scientific, 16)
                                           : std::to_chars(buf, buf + sizeof buf, x, std::chars_format::fixed, 20);
                if (r.ec != std::errc{})
                    continue; // fixed: too long for the buffer
                const std::string_view s(buf, static_cast<std::size_t>(r.ptr - buf));
                const auto p = fallback(s);
                std::uint64_t want = 0;
                std::memcpy(&want, &x, sizeof want);
                if (form == 2 && std::abs(x) < 1)
                    continue; // 20 decimals hold 17 significant digits only from 1 up
                REQUIRE(p.ec == std::errc{});
                REQUIRE(p.used == static_cast<long>(s.size()));
                REQUIRE(p.bits == want);
            }
        }
#if defined(__cpp_lib_to_chars) && __cpp_lib_to_chars >= 201611L
        // Where the standard library has from_chars for double (libstdc++), the two agree on
        // result, length read and value, edge cases included.
        std::vector<std::string> cases = {"0",   "-0",     "0e-400",          "1e-310", "4.9e-324", "1e308", "00012",
                                          "1E5", "1.5e+3", "nan(abc)",        "-nan",   "INF",      "12abc", " 1",
                                          "\t1", "1,5",    "1e-4000000000000"};
        for (std::string_view s : {"0x10",
                                   "1e",
                                   "1e+",
                                   "1e-5x",
                                   ".5",
                                   "5.",
                                   "infin",
                                   "-Infinity",
                                   "nan(12_ab)",
                                   "nan(",
                                   "+5",
                                   "-",
                                   ".",
                                   "-.e1",
                                   "",
                                   "e5",
                                   "1e999",
                                   "1e-400",
                                   "2.4703282292062327e-324",
                                   "2.4703282292062328e-324",
                                   "1.7976931348623159e308",
                                   "1.7976931348623158e308"})
            cases.emplace_back(s);
        // and on random strings over the characters that matter (fixed xorshift sequence)
        const std::string_view alphabet = "0123456789.eE+-infatyINFATY()x_ 9";
        for (int i = 0; i < 200000; ++i) {
            state ^= state << 13, state ^= state >> 7, state ^= state << 17;
            std::string t;
            for (std::uint64_t r = state, len = state % 14; len > 0; --len, r /= alphabet.size())
                t += alphabet[r % alphabet.size()];
            cases.push_back(t);
        }
        for (const auto& s : cases) {
            CAPTURE(s);
            const parsed a = fallback(s);
            const parsed b =
                read_with([](const char* f, const char* l, double& x) { return std::from_chars(f, l, x); }, s);
            CHECK(a.ec == b.ec);
            CHECK(a.used == b.used);
            CHECK(a.bits == b.bits);
        }
#endif
    }

    TEST_CASE("a file that cannot be read is a runtime_error, not a csv_error") {
        CHECK_THROWS_AS(heldout_tool::read_csv_file("/nonexistent/dir/file.csv"), std::runtime_error);
    }
    TEST_CASE("read_text: a directory, a missing file: io_error with the system's reason") {
        CHECK_THROWS_WITH_AS(heldout_tool::read_text("/"), "reading '/' failed: Is a directory",
                             heldout_tool::io_error);
        CHECK_THROWS_WITH_AS(heldout_tool::read_text("/nonexistent/x.csv"),
                             "cannot open '/nonexistent/x.csv' for reading: No such file or directory",
                             heldout_tool::io_error);
    }
}
