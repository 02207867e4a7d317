// Tests for heldout/measure/calibration_error.hpp: ECE / MCE with equal-width and
// equal-count bins, positive-class and top-label variants.
#include <heldout/measure/calibration_error.hpp>

#include "support/reference.hpp"

#include <Eigen/Dense>
#include <doctest/doctest.h>

#include <cmath>
#include <span>
#include <vector>

using heldout::evaluate;
using namespace heldout::measure;

namespace {
const std::vector<int> y6{1, 0, 1, 1, 0, 0, 1, 0, 1, 0};
const std::vector<double> p6{0.92, 0.18, 0.75, 0.62, 0.52, 0.08, 0.42, 0.03, 0.99, 0.71};
calibration_error maximum_of(calibration_error m) {
    m.statistic = calibration_statistic::maximum;
    return m;
}
} // namespace

TEST_SUITE("measure/calibration_error") {
    TEST_CASE("Naeini et al. 2015; Guo et al. 2017, worked by hand values (Naeini et al. 2015; Guo et al. 2017)") {
        // worked by hand (its author's implementation of the published
        // definitions). Variant (a), M = 5: bins [0, .2]: n = 3, conf .0966667, acc 0; (.4, .6]:
        // n = 2, conf .47, acc .5; (.6, .8]: n = 3, conf .693333, acc .666667; (.8, 1]: n = 2,
        // conf .955, acc 1. ECE = (0.29 + 0.06 + 0.08 + 0.09) / 10 = 0.052, MCE = 0.0966666667.
        const calibration_error a{.bins = 5};
        CHECK(evaluate(a, y6, p6) == doctest::Approx(0.052).epsilon(1e-13));
        CHECK(evaluate(maximum_of(a), y6, p6) == doctest::Approx(0.0966666667).epsilon(1e-9));
        // Variant (b), top-label with class 1 where p >= 0.5: M = 5 gives 0.156 (MCE 0.55), M = 10 0.232.
        const calibration_error b{.bins = 5, .variant = calibration_variant::top_label};
        CHECK(evaluate(b, y6, p6) == doctest::Approx(0.156).epsilon(1e-13));
        CHECK(evaluate(maximum_of(b), y6, p6) == doctest::Approx(0.55).epsilon(1e-13));
        CHECK(evaluate(calibration_error{.bins = 10, .variant = calibration_variant::top_label}, y6, p6) ==
              doctest::Approx(0.232).epsilon(1e-13));
    }
    TEST_CASE("bin edges: 0.07 with M = 100 lands in (0.06, 0.07], not in the next bin") {
        // 0.07 * 100 = 7.000000000000001: ceil() - 1 alone would give bin index 7 (floating-point edge, found by hand).
        const std::vector<int> y{1, 0};
        const std::vector<double> p{0.07, 0.065};
        auto acc = calibration_error{.bins = 100}.accumulator();
        acc.add(y, p);
        const auto s = acc.bin_summary(); // (weight, confidence, accuracy) per bin
        CHECK(s[3 * 6] == 2.0);           // both rows in bin index 6 = (0.06, 0.07]
        CHECK(s[3 * 7] == 0.0);
        // ECE = |1 - (0.07 + 0.065)| / 2 for the one non-empty bin.
        CHECK(acc.value() == doctest::Approx(std::abs(1 - 0.135) / 2).epsilon(1e-15));
        for (double c : {0.14, 0.28}) { // the other edges named in the pitfall, with M = 50
            auto a50 = calibration_error{.bins = 50}.accumulator();
            a50.add(std::vector<int>{1}, std::vector<double>{c});
            const auto s50 = a50.bin_summary();
            const std::size_t expect = static_cast<std::size_t>(std::lround(c * 50)) - 1;
            CHECK(s50[3 * expect] == 1.0);
        }
        auto a0 = calibration_error{.bins = 4}.accumulator(); // confidence 0 goes to the first bin
        a0.add(std::vector<int>{0}, std::vector<double>{0.0});
        CHECK(a0.bin_summary()[0] == 1.0);
    }
    TEST_CASE("equal-count bins: worked example and ties kept together") {
        // 4 bins on the 10 rows above; sorted confidences .03 .08 .18 | .42 .52 | .62 .71 | .75 .92 .99;
        // edges t_m at cumulative counts 2.5, 5, 7.5: t1 = .18 (3rd), t2 = .52 (5th), t3 = .75 (8th).
        // Bins: {.03 .08 .18} acc 0 conf .0966667 -> 0.29; {.42 .52} acc .5 conf .47 -> 0.06;
        // {.62 .71 .75} acc 2/3 conf .693333 -> 0.08; {.92 .99} acc 1 conf .955 -> 0.09. ECE = 0.052.
        const calibration_error m{.bins = 4, .binning = bin_rule::equal_count};
        CHECK(evaluate(m, y6, p6) == doctest::Approx(0.052).epsilon(1e-13));
        // Ties: 4 rows of the same confidence never split, whatever the order.
        const std::vector<int> y{1, 0, 1, 0, 1, 1};
        const std::vector<double> p{0.5, 0.5, 0.5, 0.5, 0.9, 0.1};
        const std::vector<int> yr{0, 1, 1, 1, 0, 1};
        const std::vector<double> pr{0.1, 0.5, 0.5, 0.9, 0.5, 0.5};
        const calibration_error m3{.bins = 3, .binning = bin_rule::equal_count};
        CHECK(evaluate(m3, y, p) == evaluate(m3, yr, pr));
    }
    TEST_CASE("live reference: scipy.stats.binned_statistic (equal width), numpy quantile edges (equal count)") {
        heldout_test::reference_table ref("ref_calibration_error");
        for (int c = 0; c < 5; ++c) {
            const std::string k = "case" + std::to_string(c) + ".";
            const auto y = ref.get_as<int>(k + "truth");
            const auto p = ref.get(k + "prediction"), w = ref.get(k + "weights");
            for (std::size_t M : {5, 10, 15, 100})
                for (auto v : {calibration_variant::positive_class, calibration_variant::top_label})
                    for (auto rule : {bin_rule::equal_width, bin_rule::equal_count})
                        for (bool weighted : {false, true}) {
                            const std::string key = k + (rule == bin_rule::equal_width ? "width." : "count.") +
                                                    (v == calibration_variant::top_label ? "top." : "pos.") +
                                                    (weighted ? "w." : "u.") + std::to_string(M);
                            const calibration_error m{.bins = M, .binning = rule, .variant = v};
                            const double ece = weighted ? evaluate(m, y, p, w) : evaluate(m, y, p);
                            const double mce =
                                weighted ? evaluate(maximum_of(m), y, p, w) : evaluate(maximum_of(m), y, p);
                            CHECK(heldout_test::close(ece, ref.get(key)[0]));
                            CHECK(heldout_test::close(mce, ref.get(key)[1]));
                        }
            const auto lab = ref.get_as<int>(k + "labels");
            const auto rows = ref.get(k + "rows");
            const auto kk = static_cast<std::size_t>(ref.scalar(k + "k"));
            for (std::size_t M : {10, 15})
                for (auto rule : {bin_rule::equal_width, bin_rule::equal_count}) {
                    const std::string key =
                        k + "multi." + (rule == bin_rule::equal_width ? "width." : "count.") + std::to_string(M);
                    multiclass_calibration_error m{.bins = M, .binning = rule};
                    CHECK(heldout_test::close(evaluate(m, lab, heldout::rows(rows, kk), w), ref.get(key)[0]));
                    m.statistic = calibration_statistic::maximum;
                    CHECK(heldout_test::close(evaluate(m, lab, heldout::rows(rows, kk), w), ref.get(key)[1]));
                }
        }
    }
    TEST_CASE("merge of two halves equals the whole, for both binnings; single rows") {
        heldout_test::reference_table ref("ref_calibration_error");
        const auto y = ref.get_as<int>("case1.truth");
        const auto p = ref.get("case1.prediction"), w = ref.get("case1.weights");
        const std::size_t h = y.size() / 2;
        for (auto rule : {bin_rule::equal_width, bin_rule::equal_count})
            for (std::size_t bins : {10, 40}) {
                const calibration_error m{.bins = bins, .binning = rule};
                auto a = m.accumulator(), b = m.accumulator(), c = m.accumulator();
                a.add(std::span(y).first(h), std::span(p).first(h), std::span(w).first(h));
                b.add(std::span(y).subspan(h), std::span(p).subspan(h), std::span(w).subspan(h));
                a.merge(b);
                CHECK(a.value() == doctest::Approx(evaluate(m, y, p, w)).epsilon(1e-14));
                for (std::size_t i = 0; i < y.size(); ++i)
                    c.add_one(y[i], p[i], w[i]);
                CHECK(c.value() == doctest::Approx(evaluate(m, y, p, w)).epsilon(1e-14));
            }
        auto x = calibration_error{.bins = 10}.accumulator();
        const auto other = calibration_error{.bins = 5}.accumulator();
        CHECK_THROWS_AS(x.merge(other), heldout::input_error);
    }
    TEST_CASE("float probabilities and Eigen inputs") {
        Eigen::VectorXf pf(3);
        pf << 0.9f, 0.2f, 0.6f;
        Eigen::VectorXi y(3);
        y << 1, 0, 0;
        // M = 2, positive class: bin [0, .5]: {0.2}, gap |0 - 0.2| = 0.2; bin (.5, 1]: {0.9, 0.6},
        // gap |1 - 1.5| = 0.5: ECE = 0.7 / 3.
        CHECK(evaluate(calibration_error{.bins = 2}, y, pf) == doctest::Approx(0.7 / 3).epsilon(1e-7));
        CHECK(calibration_error{.bins = 2}.name() == "ECE (2 equal-width bins, positive class)");
    }
    TEST_CASE("bad input and the undefined cases") {
        const std::vector<int> y{0, 1, 3};
        const std::vector<double> p{0.2, 0.4, 0.6};
        CHECK_THROWS_WITH_AS(evaluate(calibration_error{}, y, p),
                             "measure calibration error: argument 'truth': label 3 outside the classes 0..1 at index 2",
                             heldout::input_error);
        const std::vector<int> ok{0, 1, 1};
        const std::vector<double> bad{0.2, 1.4, 0.6};
        CHECK_THROWS_WITH_AS(evaluate(calibration_error{}, ok, bad),
                             "measure calibration error: argument 'prediction': probability 1.4 outside "
                             "[0, 1] at index 1",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS((void)calibration_error{.bins = 0}.accumulator(),
                             "measure calibration error: argument 'bins': the number of bins must be positive",
                             heldout::input_error);
        const std::vector<double> w0{0, 0, 0};
        CHECK_THROWS_WITH_AS(evaluate(calibration_error{}, ok, p, w0),
                             "measure calibration error: undefined: total weight is zero", heldout::undefined_error);
        CHECK_THROWS_WITH_AS((void)calibration_error{}.accumulator().value(),
                             "measure calibration error: undefined: no observations", heldout::undefined_error);
        const std::vector<double> rows{0.5, 0.6, 0.2, 0.8};
        const std::vector<int> lab{0, 1};
        CHECK_THROWS_AS(evaluate(multiclass_calibration_error{}, lab, heldout::rows(rows, 2)), heldout::input_error);
    }
}
