// Tests for heldout/report/svg.hpp: numbers, escaping, nice ticks, the document and the figure.
// Well-formedness is checked by the small XML parser in tests/report/xml_check.hpp
// (self-written; its own refusals are tested first, so a broken checker fails here).
#include <heldout/report/svg.hpp>

#include "report/xml_check.hpp"
#include "support/parse.hpp"

#include <doctest/doctest.h>

#include <charconv>
#include <clocale>
#include <cmath>
#include <limits>
#include <random>
#include <string>
#include <vector>

using heldout::report::figure;
using heldout::report::nice_ticks;
using heldout::report::number;
using heldout::report::svg;
using heldout::report::xml_escape;
using heldout_test::xml_problem;

namespace {
std::size_t count_of(const std::string& s, const std::string& what) {
    std::size_t n = 0;
    for (auto p = s.find(what); p != std::string::npos; p = s.find(what, p + 1))
        ++n;
    return n;
}
} // namespace

TEST_SUITE("report/svg") {
    TEST_CASE("the XML checker itself refuses what is not well-formed") {
        CHECK(xml_problem("<a/>").empty());
        CHECK(xml_problem("<?xml version=\"1.0\"?>\n<a x=\"1\" y='2'><b>t &amp; &#38; &#x26;</b><!-- c --></a>\n")
                  .empty());
        CHECK(!xml_problem("<a><b></a>").empty());           // bad nesting
        CHECK(!xml_problem("<a x=1/>").empty());             // unquoted attribute
        CHECK(!xml_problem("<a x=\"1\" x=\"2\"/>").empty()); // repeated attribute
        CHECK(!xml_problem("<a>&</a>").empty());             // raw ampersand
        CHECK(!xml_problem("<a>&nbsp;</a>").empty());        // entity XML does not define
        CHECK(!xml_problem("<a>x < y</a>").empty());         // raw '<'
        CHECK(!xml_problem("<a x=\"<\"/>").empty());         // '<' in an attribute
        CHECK(!xml_problem("<a></a><b/>").empty());          // two roots
        CHECK(!xml_problem("<a>\x01</a>").empty());          // control character
        CHECK(!xml_problem("<a>").empty());                  // unclosed
        CHECK(xml_problem("<a>Gr\xC3\xB6\xC3\x9F\xE2\x82\xAC\xF0\x9F\x98\x80</a>")
                  .empty());                                    // U+00F6 U+00DF U+20AC U+1F600
        CHECK(!xml_problem("<a>\xFF</a>").empty());             // byte that never occurs in UTF-8
        CHECK(!xml_problem("<a>\xC3</a>").empty());             // truncated sequence
        CHECK(!xml_problem("<a>\xC0\x80</a>").empty());         // overlong U+0000
        CHECK(!xml_problem("<a>\xED\xA0\x80</a>").empty());     // surrogate U+D800
        CHECK(!xml_problem("<a>\xF4\x90\x80\x80</a>").empty()); // above U+10FFFF
        CHECK(!xml_problem("<a>\xEF\xBF\xBF</a>").empty());     // U+FFFF, not an XML character
    }

    TEST_CASE("numbers: shortest round trip, fixed decimals, no negative zero, refusals") {
        for (double x : {0.1, 1.0 / 3.0, 1e-300, 123456789.125, -2.5e17, 5e-324}) {
            const std::string s = number(x);
            double back = 0;
            heldout_test::double_from_chars(s.data(), s.data() + s.size(), back);
            CHECK(back == x);
        }
        CHECK(number(0.25) == "0.25");
        CHECK(number(-0.0) == "0");
        CHECK(number(3.14159, 2) == "3.14");
        CHECK(number(-0.001, 2) == "0.00");
        CHECK(number(-1.5, 0) == "-2"); // round half to even of the binary value, as to_chars does
        CHECK(number(2.5, 1) == "2.5");
        CHECK_THROWS_WITH_AS(number(std::numeric_limits<double>::quiet_NaN()),
                             "heldout::report::number: argument 'x': not finite (nan)", heldout::input_error);
        CHECK_THROWS_AS(number(1.0, 18), heldout::input_error);
    }

    TEST_CASE("numbers do not follow the C locale (std::to_chars)") {
        // A locale with a decimal comma, when the machine has one; printf would follow it.
        const char* names[] = {"de_DE.UTF-8", "de_DE.utf8", "fr_FR.UTF-8", "C.UTF-8"};
        for (const char* n : names) {
            if (std::setlocale(LC_NUMERIC, n) == nullptr)
                continue;
            CHECK(number(0.5) == "0.5");
            CHECK(number(1234.5, 1) == "1234.5");
            std::setlocale(LC_NUMERIC, "C");
        }
        CHECK(number(0.5) == "0.5");
    }

    TEST_CASE("escaping: the five XML specials and control characters") {
        CHECK(xml_escape("a<b & c>d \"e\" 'f'") == "a&lt;b &amp; c&gt;d &quot;e&quot; &apos;f&apos;");
        CHECK(xml_escape("tab\there") == "tab\there");
        CHECK(xml_escape(std::string("x\x01y")) == "x\xEF\xBF\xBDy");
        CHECK(xml_escape("Größe µ") == "Größe µ"); // UTF-8 passes through
        svg doc(100, 50);
        doc.text(10, 20, "<script>&\"'").title("a & b").line(0, 0, 1, 1, {.stroke = "\"/><evil x=\""});
        const std::string s = doc.str();
        CHECK(xml_problem(s).empty());
        CHECK(s.find("<script>") == std::string::npos);
        CHECK(s.find("<evil") == std::string::npos);
        CHECK(s.find("&lt;script&gt;&amp;&quot;&apos;") != std::string::npos);
    }

    TEST_CASE("escaping: every control character and ill-formed UTF-8 give well-formed XML") {
        const std::string fffd = "\xEF\xBF\xBD"; // U+FFFD
        for (int c = 1; c < 0x20; ++c) {
            const std::string in(1, static_cast<char>(c));
            const bool allowed = c == '\t' || c == '\n' || c == '\r'; // the XML 1.0 Char production
            CHECK(xml_escape(in) == (allowed ? in : fffd));
        }
        CHECK(xml_escape(std::string("a\0b", 3)) == "a" + fffd + "b");
        // Substitution of maximal subparts: Unicode 15.0 Section 3.9, Table 3-8 (example from memory;
        // CPython's bytes.decode("utf-8", "replace") gives the same ten characters, run when this test
        // was written): 61 F1 80 80 E1 80 C2 62 80 63 80 BF 64 -> a FFFD FFFD FFFD b FFFD c FFFD FFFD d.
        CHECK(xml_escape("\x61\xF1\x80\x80\xE1\x80\xC2\x62\x80\x63\x80\xBF\x64") ==
              "a" + fffd + fffd + fffd + "b" + fffd + "c" + fffd + fffd + "d");
        CHECK(xml_escape("\xC0\x80") == fffd + fffd);                        // overlong: C0 never starts a sequence
        CHECK(xml_escape("\xED\xA0\x80") == fffd + fffd + fffd);             // surrogate U+D800
        CHECK(xml_escape("\xF4\x90\x80\x80") == fffd + fffd + fffd + fffd);  // above U+10FFFF
        CHECK(xml_escape("x\xE2\x82") == "x" + fffd);                        // truncated at the end
        CHECK(xml_escape("\xEF\xBF\xBE|\xEF\xBF\xBF") == fffd + "|" + fffd); // U+FFFE, U+FFFF: not XML characters
        CHECK(xml_escape("\xF0\x9F\x98\x80 \xE2\x82\xAC") == "\xF0\x9F\x98\x80 \xE2\x82\xAC"); // U+1F600, U+20AC kept
        // Random bytes in a title, a text and a legend entry: the document stays well-formed.
        std::mt19937_64 gen(5);
        for (int trial = 0; trial < 300; ++trial) {
            std::string name(1 + gen() % 12, ' ');
            for (auto& ch : name)
                ch = static_cast<char>(gen() % 256);
            svg doc(100, 50);
            doc.text(10, 20, name).title(name);
            CHECK(xml_problem(doc.str()).empty());
            figure fig({.title = name, .x = {.label = name}, .y = {.label = name}});
            fig.line(name, std::vector<double>{0, 1}, std::vector<double>{0, 1});
            const std::string f = fig.str();
            CHECK_MESSAGE(xml_problem(f).empty(), xml_problem(f));
        }
    }

    TEST_CASE("nice ticks: worked examples") {
        // [0.03, 0.91], 5 intervals at most: raw step 0.176 -> 0.2; ticks inside the range.
        auto t = nice_ticks(0.03, 0.91, 5);
        CHECK(t.step == doctest::Approx(0.2));
        REQUIRE(t.values.size() == 4);
        CHECK(t.values[0] == doctest::Approx(0.2));
        CHECK(t.values[3] == doctest::Approx(0.8));
        CHECK(t.decimals == 1);
        // [0, 1]: 0, 0.2, ..., 1 — both ends are ticks.
        t = nice_ticks(0, 1, 5);
        CHECK(t.values.size() == 6);
        CHECK(t.values.front() == 0);
        CHECK(t.values.back() == doctest::Approx(1));
        // [0, 100] with 4 intervals: step 25, integers (no decimals).
        t = nice_ticks(0, 100, 4);
        CHECK(t.step == 25);
        CHECK(t.decimals == 0);
        // [0, 10] with 4 intervals: step 2.5 needs one decimal.
        t = nice_ticks(0, 10, 4);
        CHECK(t.step == 2.5);
        CHECK(t.decimals == 1);
        // A range across zero: -3.7..12.2 -> 0, 5, 10 (zero is exactly zero, not -0 or 1e-17).
        t = nice_ticks(-3.7, 12.2, 5);
        CHECK(t.step == 5);
        REQUIRE(t.values.size() == 3);
        CHECK(t.values[0] == 0);
        CHECK(!std::signbit(t.values[0]));
        // A constant range is widened: 7 -> [6, 8].
        t = nice_ticks(7, 7, 4);
        CHECK(t.values.front() == 6);
        CHECK(t.values.back() == 8);
        CHECK_THROWS_WITH_AS(nice_ticks(1, 0), "heldout::report::nice_ticks: argument 'hi': below lo (0 < 1)",
                             heldout::input_error);
        CHECK_THROWS_AS(nice_ticks(0, std::numeric_limits<double>::infinity()), heldout::input_error);
    }

    TEST_CASE("nice ticks: properties on random ranges (brute-force check of the step choice)") {
        std::mt19937_64 g(20261201); // test data only
        std::uniform_real_distribution<double> e(-8, 8), u(-1, 1);
        for (int rep = 0; rep < 2000; ++rep) {
            const double scale = std::pow(10.0, e(g));
            double lo = u(g) * scale, hi = u(g) * scale;
            if (hi < lo)
                std::swap(lo, hi);
            if (hi == lo)
                continue;
            const std::size_t target = 2 + static_cast<std::size_t>(rep % 9);
            const auto t = nice_ticks(lo, hi, target);
            CAPTURE(lo);
            CAPTURE(hi);
            CAPTURE(target);
            // the step is 1, 2, 2.5 or 5 times a power of ten
            const double mag = std::pow(10.0, std::floor(std::log10(t.step) + 1e-12));
            const double f = t.step / mag;
            CHECK((std::abs(f - 1) < 1e-9 || std::abs(f - 2) < 1e-9 || std::abs(f - 2.5) < 1e-9 ||
                   std::abs(f - 5) < 1e-9));
            // at most `target` intervals, and the next smaller candidate would give more
            CHECK((hi - lo) / t.step <= static_cast<double>(target) * (1 + 1e-9));
            auto near = [&](double c) { return std::abs(f - c) < 1e-9; };
            const double smaller = near(1) ? 0.5 * mag : near(2) ? mag : near(2.5) ? 2 * mag : 2.5 * mag;
            CHECK((hi - lo) / smaller > static_cast<double>(target) * (1 - 1e-9));
            // every tick is in range, a multiple of the step, evenly spaced, printable exactly
            REQUIRE(!t.values.empty());
            for (std::size_t i = 0; i < t.values.size(); ++i) {
                CHECK(t.values[i] >= lo - 1e-9 * t.step);
                CHECK(t.values[i] <= hi + 1e-9 * t.step);
                const double k = t.values[i] / t.step;
                CHECK(std::abs(k - std::round(k)) < 1e-6);
                if (i)
                    CHECK(t.values[i] - t.values[i - 1] == doctest::Approx(t.step).epsilon(1e-9));
                const std::string label = number(t.values[i], t.decimals);
                double back = 0;
                heldout_test::double_from_chars(label.data(), label.data() + label.size(), back);
                CHECK(std::abs(back - t.values[i]) <= 1e-6 * t.step);
            }
            // no tick is missing at either end
            CHECK(t.values.front() - t.step < lo + 1e-9 * t.step);
            CHECK(t.values.back() + t.step > hi - 1e-9 * t.step);
        }
    }

    TEST_CASE("the document: prolog, namespace, size, shapes, refusals") {
        svg doc(320, 200);
        const std::vector<double> xs{0, 10.5, 20}, ys{5, 6.25, 7};
        doc.polyline(xs, ys, {.stroke = "#0072B2", .stroke_width = 2, .dash = "4 2"})
            .circle(3, 4, 2, {.fill = "red"})
            .rect(1, 2, 3, 4, {.stroke = "black"});
        const std::string s = doc.str();
        CHECK(xml_problem(s).empty());
        CHECK(s.rfind("<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n<svg xmlns=\"http://www.w3.org/2000/svg\"", 0) == 0);
        CHECK(s.find("width=\"320.00\" height=\"200.00\" viewBox=\"0 0 320.00 200.00\"") != std::string::npos);
        CHECK(s.find("points=\"0.00,5.00 10.50,6.25 20.00,7.00\"") != std::string::npos);
        CHECK(s.find("stroke-dasharray=\"4 2\"") != std::string::npos);
        const std::vector<double> bad{0, std::numeric_limits<double>::quiet_NaN(), 1};
        CHECK_THROWS_WITH_AS(doc.polyline(xs, bad, {}),
                             "heldout::report::svg::polyline: argument 'y': not finite at index 1",
                             heldout::input_error);
        CHECK_THROWS_AS(svg(0, 10), heldout::input_error);
    }

    TEST_CASE("a figure: axes with nice ticks and labels, series, legend, title") {
        const std::vector<double> x{1, 2, 3, 4}, y{0.12, 0.31, 0.27, 0.45};
        figure fig({.title = "Errors & <friends>", .x = {.label = "fold"}, .y = {.label = "error rate"}});
        fig.line("model \"A\"", x, y).points("model B", x, y).reference_line(1, 0.1, 4, 0.4);
        const std::string s = fig.str();
        REQUIRE(xml_problem(s).empty());
        heldout_test::xml_checker c(s);
        c.check();
        std::size_t texts = 0;
        for (const auto& e : c.elements())
            texts += e == "text";
        // y from 0.12..0.45 with about 5 intervals: step 0.1, axis 0.1..0.5, labels "0.1".."0.5"
        for (const char* label : {">0.1<", ">0.2<", ">0.3<", ">0.4<", ">0.5<"})
            CHECK(s.find(label) != std::string::npos);
        CHECK(s.find(">fold<") != std::string::npos);
        CHECK(s.find(">error rate<") != std::string::npos);
        CHECK(s.find("rotate(-90.00") != std::string::npos); // the y label stands upright
        CHECK(s.find("Errors &amp; &lt;friends&gt;") != std::string::npos);
        CHECK(s.find("model &quot;A&quot;") != std::string::npos);
        CHECK(count_of(s, "<circle") == 4 + 1); // four points and one legend marker
        CHECK(texts >= 5 + 4 + 2 + 1 + 2);      // y ticks, x ticks, axis labels, title, legend
        // the same figure twice gives the same bytes
        CHECK(fig.str() == s);
    }

    TEST_CASE("a figure with a fixed range keeps it, categories replace numeric ticks") {
        const std::vector<double> x{0.5}, y{0.5};
        figure fixed({.x = {.lo = 0, .hi = 1, .fixed = true}, .y = {.lo = 0, .hi = 1, .fixed = true}});
        fixed.points("", x, y);
        const std::string s = fixed.str();
        CHECK(xml_problem(s).empty());
        CHECK(s.find(">1.0<") != std::string::npos);
        CHECK(s.find(">1.2<") == std::string::npos);
        figure cats({.x = {.categories = {{1, "logistic"}, {2, "k-NN <5>"}}}});
        const std::vector<double> cx{1, 2}, cy{3, 4};
        cats.points("", cx, cy);
        const std::string t = cats.str();
        CHECK(xml_problem(t).empty());
        CHECK(t.find(">logistic<") != std::string::npos);
        CHECK(t.find(">k-NN &lt;5&gt;<") != std::string::npos);
        const std::vector<double> inf{std::numeric_limits<double>::infinity()}, one{1.0};
        CHECK_THROWS_WITH_AS(cats.points("", inf, one), "heldout::report::figure: argument 'x': not finite at index 0",
                             heldout::input_error);
    }
}
