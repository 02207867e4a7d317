// Tests for heldout/measure/brier_score.hpp: binary and multi-category Brier (1950) scores.
#include <heldout/measure/brier_score.hpp>

#include "support/reference.hpp"

#include <Eigen/Dense>
#include <doctest/doctest.h>

#include <cmath>
#include <cstdint>
#include <span>
#include <vector>

using heldout::evaluate;
using heldout::measure::brier_score;
using heldout::measure::multiclass_brier_score;

TEST_SUITE("measure/brier_score") {
    TEST_CASE_TEMPLATE("worked example: ((0.9 - 1)^2 + (0.2 - 0)^2 + (0.4 - 1)^2) / 3", T, float, double) {
        const std::vector<std::uint8_t> y{1, 0, 1};
        const std::vector<T> p{T(0.9), T(0.2), T(0.4)};
        // (0.01 + 0.04 + 0.36) / 3 = 0.136666...
        CHECK(evaluate(brier_score{}, y, p) == doctest::Approx(0.41 / 3).epsilon(sizeof(T) == 4 ? 1e-7 : 1e-15));
        const std::vector<T> w{2, 1, 0}; // (2 * 0.01 + 0.04) / 3 = 0.02
        CHECK(evaluate(brier_score{}, y, p, w) == doctest::Approx(0.02).epsilon(sizeof(T) == 4 ? 1e-6 : 1e-15));
    }
    TEST_CASE("Naeini et al. 2015; Guo et al. 2017, worked by hand values") {
        // worked by hand (its author's implementation of Brier 1950):
        // binary Brier = 0.1364; multiclass original form = 0.4525.
        const std::vector<int> y{1, 0, 1, 1, 0, 0, 1, 0, 1, 0};
        const std::vector<double> p{0.92, 0.18, 0.75, 0.62, 0.52, 0.08, 0.42, 0.03, 0.99, 0.71};
        CHECK(evaluate(brier_score{}, y, p) == doctest::Approx(0.1364).epsilon(1e-14));
        Eigen::Matrix<double, 6, 3, Eigen::RowMajor> P;
        P << .7, .2, .1, .1, .8, .1, .3, .3, .4, .25, .5, .25, .6, .1, .3, .2, .2, .6;
        const std::vector<int> lab{0, 1, 2, 0, 2, 2};
        CHECK(evaluate(multiclass_brier_score{}, lab, P) == doctest::Approx(0.4525).epsilon(1e-14));
    }
    TEST_CASE("the binary form is half the original two-class form") {
        const std::vector<int> y{1, 0, 1, 1, 0};
        const std::vector<double> p{0.9, 0.3, 0.6, 0.2, 0.1};
        std::vector<double> rows;
        for (double q : p) {
            rows.push_back(1 - q);
            rows.push_back(q);
        }
        CHECK(evaluate(brier_score{}, y, p) ==
              doctest::Approx(evaluate(multiclass_brier_score{}, y, heldout::rows(rows, 2)) / 2).epsilon(1e-15));
    }
    TEST_CASE("live reference: numpy.average((p - y)**2) and of sum_k (p_k - o_k)**2") {
        heldout_test::reference_table ref("ref_brier_score");
        for (int c = 0; c < 5; ++c) {
            const std::string k = "case" + std::to_string(c) + ".";
            const auto y = ref.get_as<int>(k + "truth");
            const auto p = ref.get(k + "prediction"), w = ref.get(k + "weights");
            CHECK(heldout_test::close(evaluate(brier_score{}, y, p), ref.scalar(k + "brier")));
            CHECK(heldout_test::close(evaluate(brier_score{}, y, p, w), ref.scalar(k + "wbrier")));
            const auto lab = ref.get_as<int>(k + "labels");
            const auto rows = ref.get(k + "rows");
            const auto kk = static_cast<std::size_t>(ref.scalar(k + "k"));
            CHECK(heldout_test::close(evaluate(multiclass_brier_score{}, lab, heldout::rows(rows, kk)),
                                      ref.scalar(k + "multi")));
            CHECK(heldout_test::close(evaluate(multiclass_brier_score{}, lab, heldout::rows(rows, kk), w),
                                      ref.scalar(k + "wmulti")));
        }
    }
    TEST_CASE("merge of two halves equals the whole; clones agree bit for bit; single rows") {
        heldout_test::reference_table ref("ref_brier_score");
        const auto y = ref.get_as<int>("case0.truth");
        const auto p = ref.get("case0.prediction");
        const std::size_t h = y.size() / 2;
        auto a = brier_score{}.accumulator(), b = a, c = a, d = a;
        a.add(std::span(y).first(h), std::span(p).first(h));
        b.add(std::span(y).subspan(h), std::span(p).subspan(h));
        a.merge(b);
        CHECK(heldout_test::close(a.value(), ref.scalar("case0.brier"), 1e-14));
        c.add_with(heldout::detail::isa::baseline, y, p);
        d.add_with(heldout::detail::best_isa(), y, p);
        CHECK(c.value() == d.value());
        auto e = brier_score{}.accumulator();
        for (std::size_t i = 0; i < y.size(); ++i)
            e.add_one(y[i], p[i]);
        CHECK(heldout_test::close(e.value(), ref.scalar("case0.brier"), 1e-14));
    }
    TEST_CASE("truth may be bool, uint8, int or floating 0/1; Eigen vectors") {
        const std::vector<double> p{0.5, 0.25};
        const std::vector<bool> yb{true, false};
        const bool ba[2] = {true, false};
        CHECK(evaluate(brier_score{}, ba, p) == doctest::Approx((0.25 + 0.0625) / 2));
        const std::vector<double> yd{1.0, 0.0};
        CHECK(evaluate(brier_score{}, yd, p) == doctest::Approx((0.25 + 0.0625) / 2));
        Eigen::VectorXi ye(2);
        ye << 1, 0;
        Eigen::VectorXf pe(2);
        pe << 0.5f, 0.25f;
        CHECK(evaluate(brier_score{}, ye, pe) == doctest::Approx((0.25 + 0.0625) / 2));
        (void)yb;
    }
    TEST_CASE("bad input names the measure, the argument and the index") {
        std::vector<int> y(1000, 1);
        std::vector<double> p(1000, 0.5);
        p[700] = 1.5;
        CHECK_THROWS_WITH_AS(evaluate(brier_score{}, y, p),
                             "measure Brier score: argument 'prediction': probability 1.5 outside [0, 1] at index 700",
                             heldout::input_error);
        p[700] = NAN;
        CHECK_THROWS_WITH_AS(evaluate(brier_score{}, y, p),
                             "measure Brier score: argument 'prediction': not finite (nan) at index 700",
                             heldout::input_error);
        p[700] = 0.5;
        y[513] = 2;
        CHECK_THROWS_WITH_AS(evaluate(brier_score{}, y, p),
                             "measure Brier score: argument 'truth': label 2 outside the classes 0..1 at index 513",
                             heldout::input_error);
        y[513] = -1;
        CHECK_THROWS_WITH_AS(evaluate(brier_score{}, y, p),
                             "measure Brier score: argument 'truth': label -1 outside the classes 0..1 at index 513",
                             heldout::input_error);
        y[513] = 1;
        std::vector<double> w(1000, 1.0);
        w[999] = -0.5;
        CHECK_THROWS_WITH_AS(evaluate(brier_score{}, y, p, w),
                             "measure Brier score: argument 'weights': negative weight -0.5 at index 999",
                             heldout::input_error);
        std::vector<double> w0(1000, 0.0);
        CHECK_THROWS_WITH_AS(evaluate(brier_score{}, y, p, w0), "measure Brier score: undefined: total weight is zero",
                             heldout::undefined_error);
        const std::vector<double> bad_rows{0.5, 0.4, 0.2, 0.8};
        const std::vector<int> lab{0, 1};
        CHECK_THROWS_WITH_AS(evaluate(multiclass_brier_score{}, lab, heldout::rows(bad_rows, 2)),
                             "measure multiclass Brier score: argument 'prediction': row sums to 0.9, not 1 "
                             "(tolerance 1e-06) at index 0",
                             heldout::input_error);
        const std::vector<double> ok_rows{0.5, 0.5, 0.2, 0.8};
        const std::vector<int> lab3{0, 2};
        CHECK_THROWS_WITH_AS(evaluate(multiclass_brier_score{}, lab3, heldout::rows(ok_rows, 2)),
                             "measure multiclass Brier score: argument 'truth': label 2 outside the classes 0..1 at "
                             "index 1",
                             heldout::input_error);
        CHECK_THROWS_AS((void)multiclass_brier_score{}.accumulator().value(), heldout::undefined_error);
        CHECK_THROWS_AS((void)brier_score{}.accumulator().value(), heldout::undefined_error);
    }
}
