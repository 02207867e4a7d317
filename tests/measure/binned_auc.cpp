// Tests for heldout/measure/binned_auc.hpp: fixed-memory AUC with a stated error bound.
#include <heldout/measure/auc.hpp>
#include <heldout/measure/binned_auc.hpp>

#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <random>
#include <vector>

using heldout::evaluate;
using heldout::measure::binned_auc;

TEST_SUITE("measure/binned_auc") {
    TEST_CASE("worked example: two bins on [0, 1]") {
        // Bins [0, .5) and [.5, 1]. Positives .9, .6, .4; negatives .7, .2.
        // Bin 1: P = 2, N = 1; bin 0: P = 1, N = 1.
        // A_bin = (1 * (0 + 1/2) + 2 * (1 + 1/2)) / 6 = 3.5 / 6; exact: pairs won 2 + 1.. = (.9>.7,.9>.2,.6>.2,.4>.2) =
        // 4 / 6.
        const std::vector<int> y{1, 1, 1, 0, 0};
        const std::vector<double> s{.9, .6, .4, .7, .2};
        auto acc = binned_auc{.bins = 2}.accumulator();
        acc.add(y, s);
        CHECK(acc.value() == doctest::Approx(3.5 / 6).epsilon(1e-15));
        // bound: (1*1 + 2*1) / (2 * 6) = 0.25 >= |3.5/6 - 4/6| = 1/12
        CHECK(acc.error_bound() == doctest::Approx(0.25).epsilon(1e-15));
        CHECK(std::abs(acc.value() - evaluate(heldout::measure::auc{}, y, s)) <= acc.error_bound());
    }
    TEST_CASE("the bound is attained when positives sit above the negatives inside one bin") {
        const std::vector<int> y{1, 0};
        const std::vector<double> s{0.3, 0.2};
        auto acc = binned_auc{.bins = 1}.accumulator();
        acc.add(y, s);
        CHECK(acc.value() == 0.5);       // exact AUC is 1
        CHECK(acc.error_bound() == 0.5); // = |0.5 - 1|
    }
    TEST_CASE("scipy.stats.mannwhitneyu on numpy bin indices (ref_binned_auc.py); |binned - exact| <= bound") {
        heldout_test::reference_table ref("ref_binned_auc");
        const int cases = static_cast<int>(ref.scalar("cases"));
        for (int c = 0; c < cases; ++c) {
            const std::string k = "case" + std::to_string(c) + ".";
            CAPTURE(c);
            const auto y = ref.get_as<int>(k + "truth");
            const auto s = ref.get(k + "scores");
            const auto bins = static_cast<std::size_t>(ref.scalar(k + "bins"));
            auto acc = binned_auc{.bins = bins}.accumulator();
            acc.add(y, s);
            CHECK(heldout_test::close(acc.value(), ref.scalar(k + "binned")));
            CHECK(heldout_test::close(acc.error_bound(), ref.scalar(k + "bound")));
            const double exact = ref.scalar(k + "exact");
            CHECK(std::abs(acc.value() - exact) <= acc.error_bound() + 1e-15);
        }
    }
    TEST_CASE("random data: error within the bound, the bound shrinks with the bins, merge is exact") {
        std::mt19937_64 g(17);
        std::normal_distribution<double> d;
        const std::size_t n = 20000;
        std::vector<int> y(n);
        std::vector<double> s(n);
        for (std::size_t i = 0; i < n; ++i) {
            y[i] = static_cast<int>(g() % 2);
            s[i] = 1 / (1 + std::exp(-(d(g) + y[i])));
        }
        const double exact = evaluate(heldout::measure::auc{}, y, s);
        double last = 1;
        for (std::size_t bins : {8u, 64u, 512u, 4096u}) {
            auto acc = binned_auc{.bins = bins}.accumulator();
            acc.add(y, s);
            CAPTURE(bins);
            CHECK(std::abs(acc.value() - exact) <= acc.error_bound());
            CHECK(acc.error_bound() < last);
            last = acc.error_bound();
        }
        CHECK(last < 1e-3); // 4096 bins: the bound is small for smooth scores
        auto a = binned_auc{}.accumulator();
        auto b = binned_auc{}.accumulator();
        auto whole = binned_auc{}.accumulator();
        a.add(std::span(y).first(7000), std::span(s).first(7000));
        b.add(std::span(y).subspan(7000), std::span(s).subspan(7000));
        whole.add(y, s);
        a.merge(b);
        CHECK(a.value() == whole.value());
        const std::vector<double> w(n, 2.0);
        auto aw = binned_auc{}.accumulator();
        aw.add(y, s, w);
        CHECK(aw.value() == doctest::Approx(whole.value()).epsilon(1e-15));
    }
    TEST_CASE("bad input") {
        const std::vector<int> y{1, 0};
        const std::vector<double> s{1.5, 0.2};
        auto acc = binned_auc{}.accumulator();
        CHECK_THROWS_WITH_AS(acc.add(y, s),
                             "measure binned AUC: argument 'scores': score 1.5 outside the bin range [0, 1] at index 0",
                             heldout::input_error);
        CHECK_THROWS_AS((binned_auc{.bins = 0}.accumulator()), heldout::input_error);
        CHECK_THROWS_AS((binned_auc{.bins = 4, .low = 1, .high = 1}.accumulator()), heldout::input_error);
        auto other = binned_auc{.bins = 8}.accumulator();
        CHECK_THROWS_AS(acc.merge(other), heldout::input_error);
        CHECK_THROWS_WITH_AS(
            (void)acc.value(),
            "measure binned AUC: undefined: class 1 (positives) is absent or has zero total weight; it "
            "needs both classes",
            heldout::undefined_error);
        CHECK(heldout::outer_measure<binned_auc>);
    }
    TEST_CASE("an absurd bin count is refused before it allocates; 2^24 bins is the limit") {
        // 1e12 bins would have asked for 16 TB (two doubles a bin).
        CHECK_THROWS_WITH_AS((binned_auc{.bins = 1000000000000u}.accumulator()),
                             "measure binned AUC: argument 'bins': 1000000000000 exceeds the limit of 16777216 "
                             "(2^24) bins",
                             heldout::input_error);
        CHECK_THROWS_AS((binned_auc{.bins = (std::size_t{1} << 24) + 1}.accumulator()), heldout::input_error);
        auto largest = binned_auc{.bins = std::size_t{1} << 24}.accumulator(); // 256 MiB: allowed
        CHECK(largest.bins() == std::size_t{1} << 24);
    }
    TEST_CASE("weights near the double range: the same value; a bin beyond it is refused") {
        // The value is a ratio of products of bin weights: formed in units of the largest bin
        // (a power of two), any common scale of the weights gives the same bits.
        const std::vector<int> y{1, 0, 1, 0, 1};
        const std::vector<double> s{0.9, 0.1, 0.4, 0.6, 0.55};
        const std::vector<double> w{1, 2, 3, 1, 2}, big{1e300, 2e300, 3e300, 1e300, 2e300};
        const auto m = binned_auc{.bins = 4};
        CHECK(evaluate(m, y, s, big) == doctest::Approx(evaluate(m, y, s, w)).epsilon(1e-15));
        auto acc = m.accumulator(), unit = m.accumulator();
        acc.add(y, s, big);
        unit.add(y, s, w);
        CHECK(acc.error_bound() == doctest::Approx(unit.error_bound()).epsilon(1e-15));
        // Two rows of weight 1e308 in one bin: its weight is no longer a double.
        acc.add_one(1, 0.9, 1e308);
        acc.add_one(1, 0.9, 1e308);
        CHECK_THROWS_WITH_AS((void)acc.value(),
                             "measure binned AUC: argument 'weights': the weight of a bin overflows double (beyond "
                             "1.8e308): scale the weights down",
                             heldout::input_error);
    }
}
