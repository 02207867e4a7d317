// Tests for heldout/detail/fast_log.hpp: the vectorisable log against long-double and
// library references on millions of points, subnormals, binade edges and specials.
#include <heldout/detail/fast_log.hpp>

#include <doctest/doctest.h>

#include <bit>
#include <cmath>
#include <cstdint>
#include <limits>
#include <random>
#include <vector>

using heldout::detail::fast_log;

namespace {
// Error in units of the last place of the correctly rounded result, against logl
// (64-bit mantissa: 11 bits more than double) — a general-purpose library reference.
double ulps(double got, double x) {
    const long double ref = std::log(static_cast<long double>(x));
    const double r = static_cast<double>(ref);
    const double a = std::fabs(r);
    const double ulp = a == 0 ? std::numeric_limits<double>::denorm_min()
                              : std::nextafter(a, std::numeric_limits<double>::infinity()) - a;
    return static_cast<double>(std::fabs(static_cast<long double>(got) - ref) / ulp);
}
double ulps_f(float got, float x) {
    const double ref = std::log(static_cast<double>(x)); // double is 29 bits past float
    const float r = static_cast<float>(ref);
    const float a = std::fabs(r);
    const float ulp = a == 0 ? std::numeric_limits<float>::denorm_min()
                             : std::nextafter(a, std::numeric_limits<float>::infinity()) - a;
    return std::fabs(static_cast<double>(got) - ref) / static_cast<double>(ulp);
}
} // namespace

TEST_SUITE("detail/fast_log") {
    TEST_CASE("double: under 1 ulp on 2^21 random bit patterns, near 1 and around binade edges") {
        std::mt19937_64 g(20261201); // test data only
        double worst = 0;
        std::size_t same = 0, n = 0;
        for (int i = 0; i < (1 << 21); ++i) {
            // All positive finite doubles by bit pattern (subnormals included), and [0.5, 2) densely.
            double x = std::bit_cast<double>(g() & 0x7fffffffffffffffULL);
            if (!std::isfinite(x) || x == 0)
                continue;
            if (i & 1)
                x = 0.5 + std::ldexp(static_cast<double>(g() >> 11), -53) * 1.5;
            const double r = fast_log(x);
            worst = std::fmax(worst, ulps(r, x));
            same += r == std::log(x);
            ++n;
        }
        for (int e = -1074; e <= 1023; ++e) { // every power of two and its neighbours
            const double x = std::ldexp(1.0, e);
            for (double v :
                 {x, std::nextafter(x, 0.0), std::nextafter(x, 4.0), x * 0.70710678118654752, x * 1.4142135623730951})
                if (v > 0 && std::isfinite(v))
                    worst = std::fmax(worst, ulps(fast_log(v), v));
        }
        MESSAGE("double: max error " << worst << " ulp; equal to std::log on " << same << " of " << n);
        CHECK(worst < 1.0);
        CHECK(same > n * 9 / 10); // almost always the same double as glibc's log
    }
    TEST_CASE("float: under 1 float ulp on 2^21 random bit patterns and every binade edge") {
        std::mt19937 g(7);
        double worst = 0;
        for (int i = 0; i < (1 << 21); ++i) {
            const float x = std::bit_cast<float>(static_cast<std::uint32_t>(g() & 0x7fffffffu));
            if (!std::isfinite(x) || x == 0)
                continue;
            worst = std::fmax(worst, ulps_f(fast_log(x), x));
        }
        for (int e = -149; e <= 127; ++e) {
            const float x = std::ldexp(1.0f, e);
            for (float v : {x, std::nextafter(x, 0.0f), std::nextafter(x, 4.0f)})
                if (v > 0 && std::isfinite(v))
                    worst = std::fmax(worst, ulps_f(fast_log(v), v));
        }
        MESSAGE("float: max error " << worst << " ulp");
        CHECK(worst < 1.0);
    }
    TEST_CASE("special values follow std::log") {
        const double inf = std::numeric_limits<double>::infinity();
        CHECK(fast_log(0.0) == -inf);
        CHECK(fast_log(-0.0) == -inf);
        CHECK(fast_log(inf) == inf);
        CHECK(std::isnan(fast_log(-1.0)));
        CHECK(std::isnan(fast_log(-inf)));
        CHECK(std::isnan(fast_log(std::numeric_limits<double>::quiet_NaN())));
        CHECK(fast_log(1.0) == 0.0);
        CHECK(fast_log(std::numeric_limits<double>::denorm_min()) ==
              std::log(std::numeric_limits<double>::denorm_min()));
        CHECK(fast_log(0.0f) == -std::numeric_limits<float>::infinity());
        CHECK(std::isnan(fast_log(-2.0f)));
        CHECK(fast_log(std::numeric_limits<float>::infinity()) == std::numeric_limits<float>::infinity());
        CHECK(fast_log(1.0f) == 0.0f);
    }
    TEST_CASE("fast_log_normal is fast_log on positive normal inputs, bit for bit") {
        std::mt19937_64 g(3);
        for (int i = 0; i < 100000; ++i) {
            const double x = std::ldexp(0.5 + 0.5 * std::ldexp(static_cast<double>(g() >> 11), -53),
                                        static_cast<int>(g() % 2000) - 1000);
            CHECK_UNARY(heldout::detail::fast_log_normal(x) == fast_log(x));
            const float xf = std::ldexp(static_cast<float>(0.5 + 0.5 * std::ldexp(static_cast<double>(g() >> 40), -24)),
                                        static_cast<int>(g() % 250) - 125);
            CHECK_UNARY(heldout::detail::fast_log_normal(xf) == fast_log(xf));
        }
    }
    TEST_CASE("fast_log_normal(1 - p, rounding error) is log(1 - p) within 1 ulp, against log1pl") {
        std::mt19937_64 g(9);
        double worst = 0, worst_f = 0;
        for (int i = 0; i < (1 << 20); ++i) {
            // p over many scales, so 1 - p rounds in every way
            const double p =
                std::ldexp(static_cast<double>(g() >> 11), -53) * std::ldexp(1.0, -static_cast<int>(g() % 60));
            if (!(p > 0 && p < 1))
                continue;
            const double u = 1 - p, err = (1 - u) - p;
            const long double ref = std::log1p(-static_cast<long double>(p));
            const double r = static_cast<double>(ref), a = std::fabs(r);
            const double ulp = std::nextafter(a, 2 * a + 1) - a;
            worst = std::fmax(
                worst, static_cast<double>(
                           std::fabs(static_cast<long double>(heldout::detail::fast_log_normal(u, err)) - ref) / ulp));
            const float pf = static_cast<float>(p), uf = 1 - pf, ef = (1 - uf) - pf;
            if (!(uf > 0))
                continue;
            const double reff = std::log1p(-static_cast<double>(pf));
            const float rf = static_cast<float>(reff), af = std::fabs(rf);
            const float ulpf = std::nextafter(af, 2 * af + 1) - af;
            worst_f = std::fmax(worst_f, std::fabs(heldout::detail::fast_log_normal(uf, ef) - reff) / ulpf);
        }
        MESSAGE("log(1 - p): max error " << worst << " ulp (double), " << worst_f << " ulp (float)");
        CHECK(worst < 1.0);
        CHECK(worst_f < 1.0);
    }
    TEST_CASE("log_one_minus and log_of_chosen keep log1p's accuracy") {
        for (double p : {0.0, 1e-300, 1e-17, 1e-12, 3e-8, 0.001, 0.3, 0.4999999, 0.5, 0.75, 0.999999}) {
            const long double ref = std::log1p(-static_cast<long double>(p));
            CHECK(heldout::detail::log_one_minus(p) == doctest::Approx(static_cast<double>(ref)).epsilon(3e-16));
            CHECK(heldout::detail::log_of_chosen(0.0, p) == heldout::detail::log_one_minus(p));
        }
        CHECK(heldout::detail::log_one_minus(1.0) == -std::numeric_limits<double>::infinity());
        CHECK(heldout::detail::log_of_chosen(1.0, 0.25) == fast_log(0.25));
        CHECK(heldout::detail::log_one_minus(1e-10f) == doctest::Approx(-1e-10).epsilon(1e-7));
    }
    TEST_CASE("integer range flags: the top bit of the word is set outside [lo, hi]") {
        using heldout::detail::flag_set;
        using heldout::detail::outside_bits;
        CHECK_FALSE(flag_set(outside_bits(0.5, 0.0, 1.0)));
        CHECK_FALSE(flag_set(outside_bits(1.0, 0.0, 1.0)));
        CHECK_FALSE(flag_set(outside_bits(0.0, 0.0, 1.0)));
        CHECK(flag_set(outside_bits(1.0000001, 0.0, 1.0)));
        CHECK(flag_set(outside_bits(-0.5, 0.0, 1.0)));
        CHECK(flag_set(outside_bits(-0.0, 0.0, 1.0))); // flagged; exact paths accept it
        CHECK(flag_set(outside_bits(-1e300, 0.0, 1.0)));
        CHECK(flag_set(outside_bits(std::numeric_limits<double>::quiet_NaN(), 0.0, 1.0)));
        CHECK(flag_set(outside_bits(-std::numeric_limits<double>::quiet_NaN(), 0.0, 1.0)));
        CHECK(flag_set(outside_bits(std::numeric_limits<double>::infinity(), 0.0, 1.0)));
        CHECK(flag_set(outside_bits(1e-9f, 1e-8f, 1.0f)));
        CHECK_FALSE(flag_set(outside_bits(0.25f, 1e-8f, 0.75f)));
        CHECK(flag_set(outside_bits(0.76f, 1e-8f, 0.75f)));
        // flag_as keeps the top bit across widths
        CHECK(flag_set(heldout::detail::flag_as<std::uint32_t>(std::uint64_t{1} << 63)));
        CHECK(flag_set(heldout::detail::flag_as<std::uint64_t>(std::uint32_t{1} << 31)));
        CHECK_FALSE(flag_set(heldout::detail::flag_as<std::uint32_t>(std::uint64_t{1} << 62)));
    }
}
