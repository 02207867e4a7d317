// Unit tests of the heldout tool's CSV reader (examples/tool/csv.hpp), against RFC 4180
// (Shafranovich 2005, "Common Format and MIME Type for Comma-Separated Values (CSV) Files",
// section 2, rules 1-7) and the reader's documented additions.
#define DOCTEST_CONFIG_IMPLEMENT_WITH_MAIN
#include "csv.hpp"

#include <doctest/doctest.h>

#include <string>

using heldout_tool::csv_error;
using heldout_tool::parse_csv;

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
