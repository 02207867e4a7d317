// Tests for detail::number_text (core/error.hpp: messages, JSON and CSV exports) and of
// estimate/estimate.hpp (readable_number): the same text on libstdc++ and libc++. The
// reference is the C++20 rule for std::to_chars without a precision ([charconv.to.chars]
// p2 and p7: the fewest characters that read back exactly, the closest such text on a tie of
// length, "%f" style preferred to "%e" style on a tie), rebuilt here from the C library's
// correctly rounded printf("%.*e") and strtod, one digit count at a time; readable_number
// against printf("%.4g") (to_chars with a precision is defined as that printf).
#include <heldout/detail/json.hpp>
#include <heldout/estimate/estimate.hpp>

#include <doctest/doctest.h>

#include <bit>
#include <clocale>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <limits>
#include <string>
#include <vector>

using heldout::detail::number_text;

namespace {

// printf and strtod in the "C" locale for the length of a test (another test may have
// switched LC_NUMERIC to a decimal comma and back; make sure).
struct c_numeric {
    std::string before = std::setlocale(LC_NUMERIC, nullptr);
    c_numeric() { std::setlocale(LC_NUMERIC, "C"); }
    ~c_numeric() { std::setlocale(LC_NUMERIC, before.c_str()); }
};

bool reads_back(const std::string& text, double x) { return std::strtod(text.c_str(), nullptr) == x; }

// The text of |x| > 0 with n significant digits: digits D (n of them, as an integer) times
// 10^(e - n + 1), written in scientific style.
std::string sci(std::uint64_t digits, int n, int e) {
    std::string d = std::to_string(digits);
    if (static_cast<int>(d.size()) > n) { // 99..9 + 1: one digit more, next power of ten
        d.pop_back();
        ++e;
    }
    return d.substr(0, 1) + (d.size() > 1 ? "." + d.substr(1) : "") + "e" + std::to_string(e);
}

// The reference shortest text of a finite double, by the rule of the standard.
std::string reference_shortest(double x) {
    if (x == 0)
        return std::signbit(x) ? "-0" : "0";
    const std::string sign = x < 0 ? "-" : "";
    const double a = std::fabs(x);
    std::string digits; // shortest significant digits, no trailing zero
    int e = 0;          // decimal exponent of the first digit
    for (int n = 1; n <= 17 && digits.empty(); ++n) {
        char buf[64];
        std::snprintf(buf, sizeof buf, "%.*e", n - 1, a); // the closest n-digit decimal
        std::string s = buf;
        const auto epos = s.find('e');
        const int e0 = std::atoi(s.c_str() + epos + 1);
        std::string m = s.substr(0, epos);
        if (m.find('.') != std::string::npos)
            m.erase(m.find('.'), 1);
        const std::uint64_t d0 = std::stoull(m);
        // The closest n-digit decimal first; where it falls outside the rounding interval (a
        // power of two: the interval below is half as wide), a neighbour may still fall inside.
        for (const std::uint64_t d : {d0, d0 - 1, d0 + 1}) {
            if (d == 0)
                continue;
            const std::string t = sci(d, n, e0);
            if (reads_back(t, a)) {
                const auto tp = t.find('e');
                digits = t.substr(0, tp);
                if (digits.find('.') != std::string::npos)
                    digits.erase(digits.find('.'), 1);
                while (digits.size() > 1 && digits.back() == '0')
                    digits.pop_back();
                e = std::atoi(t.c_str() + tp + 1);
                break;
            }
        }
    }
    REQUIRE(!digits.empty());
    const int n = static_cast<int>(digits.size());
    // "%e" style: d[.ddd]e±XX, at least two exponent digits.
    char ebuf[16];
    std::snprintf(ebuf, sizeof ebuf, "e%c%02d", e < 0 ? '-' : '+', std::abs(e));
    const std::string scientific = digits.substr(0, 1) + (n > 1 ? "." + digits.substr(1) : "") + ebuf;
    // "%f" style with the same digits; a whole number is written with its exact digits (the
    // closest of the texts of that length: every double of 2^53 and more is an integer).
    std::string fixed;
    if (e >= n - 1) {
        char buf[400];
        std::snprintf(buf, sizeof buf, "%.0f", a);
        fixed = buf;
    } else if (e >= 0) {
        fixed =
            digits.substr(0, static_cast<std::size_t>(e + 1)) + "." + digits.substr(static_cast<std::size_t>(e + 1));
    } else {
        fixed = "0." + std::string(static_cast<std::size_t>(-e - 1), '0') + digits;
    }
    return sign + (fixed.size() <= scientific.size() ? fixed : scientific);
}

// Doubles to check: named ones, powers of two and ten over the whole range, subnormals,
// integers, k/10^j, and fixed pseudo-random bit patterns (xorshift64).
std::vector<double> sample() {
    using lim = std::numeric_limits<double>;
    std::vector<double> v = {0.0,
                             -0.0,
                             1.0,
                             -1.0,
                             0.1,
                             0.2,
                             0.3,
                             1.0 / 3.0,
                             2.0 / 3.0,
                             1e-300,
                             1e21,
                             1e22,
                             1e23,
                             123456789.125,
                             -2.5e17,
                             0.35000000000000003,
                             9007199254740992.0,
                             9007199254740993.0,
                             123456789012345677877.0,
                             lim::max(),
                             -lim::max(),
                             lim::min(),
                             lim::denorm_min(),
                             -lim::denorm_min(),
                             lim::epsilon(),
                             2.2250738585072009e-308};
    for (int i = -1074; i <= 1023; ++i)
        v.push_back(std::ldexp(1.0, i));
    for (int i = -323; i <= 308; ++i)
        v.push_back(std::strtod(("1e" + std::to_string(i)).c_str(), nullptr));
    for (int i = 0; i < 3000; ++i) {
        v.push_back(i);
        v.push_back(-7.0 * i);
        v.push_back(i / 10.0);
        v.push_back(i / 1000.0);
        v.push_back(i * 1e-7);
    }
    std::uint64_t s = 88172645463325252ull;
    for (int i = 0; i < 30000; ++i) {
        s ^= s << 13, s ^= s >> 7, s ^= s << 17;
        const double x = std::bit_cast<double>(s);
        if (std::isfinite(x))
            v.push_back(x);
        v.push_back(std::bit_cast<double>(s & 0x000fffffffffffffull)); // subnormal
        v.push_back(static_cast<double>(s >> 11) * 0x1p-53);           // in [0, 1)
    }
    return v;
}

} // namespace

TEST_SUITE("detail/number_text") {
    TEST_CASE("number_text: the fewest digits that read back, as the standard defines it") {
        const c_numeric c;
        // Worked examples (the rule applied by hand).
        CHECK(number_text(0.1) == "0.1");
        CHECK(number_text(-0.0) == "-0");
        CHECK(number_text(1e-300) == "1e-300");
        CHECK(number_text(5e-324) == "5e-324");
        CHECK(number_text(1e21) == "1e+21");
        CHECK(number_text(123456.0) == "123456");
        CHECK(number_text(0.0001) == "1e-04"); // "0.0001" is one character longer
        CHECK(number_text(0.001) == "0.001");  // "1e-03": a tie of length goes to %f
        CHECK(number_text(0.35000000000000003) == "0.35000000000000003");
        CHECK(number_text(1.7976931348623157e308) == "1.7976931348623157e+308");
        std::size_t checked = 0;
        for (const double x : sample()) {
            const std::string got = number_text(x);
            CAPTURE(got);
            REQUIRE(std::bit_cast<std::uint64_t>(std::strtod(got.c_str(), nullptr)) ==
                    std::bit_cast<std::uint64_t>(x)); // round trip, to the bit
            REQUIRE(got == reference_shortest(x));
            ++checked;
        }
        CHECK(checked > 100000);
    }

    TEST_CASE("readable_number: four significant digits, as printf(\"%.4g\")") {
        const c_numeric c;
        for (const double x : sample()) {
            char buf[64];
            std::snprintf(buf, sizeof buf, "%.4g", x);
            REQUIRE(heldout::detail::readable_number(x) == buf);
        }
    }
}
