// Tests for heldout/measure/mcc.hpp: Matthews correlation, binary and Gorodkin's R_K.
#include <heldout/measure/mcc.hpp>
#include <heldout/stream/serialize.hpp>

#include "support/measure_checks.hpp"
#include "support/reference.hpp"

#include <Eigen/Dense>
#include <doctest/doctest.h>

#include <cmath>
#include <cstdint>
#include <exception>
#include <span>
#include <string>
#include <vector>

using heldout::evaluate;
using heldout::measure::mcc;

using heldout_test::check_bytes_round_trip;
using heldout_test::expand;
using heldout_test::expanded;
using heldout_test::message_of;

TEST_SUITE("measure/mcc") {
    TEST_CASE("worked example: TP = 1, FN = 1, FP = 1, TN = 2 gives 1/6") {
        // (1*2 - 1*1) / sqrt((1+1)(1+1)(2+1)(2+1)) = 1 / 6
        const std::vector<int> y{1, 1, 0, 0, 0};
        const std::vector<int> f{1, 0, 0, 0, 1};
        CHECK(evaluate(mcc{}, y, f) == doctest::Approx(1.0 / 6).epsilon(1e-15));
        // weight 2 on the TP: (2*2 - 1*1) / sqrt(3 * 3 * 3 * 3) = 3 / 9
        const std::vector<double> w{2, 1, 1, 1, 1};
        CHECK(evaluate(mcc{}, y, f, w) == doctest::Approx(1.0 / 3).epsilon(1e-15));
        CHECK(evaluate(mcc{}, y, y) == 1.0);
        const std::vector<int> flipped{0, 0, 1, 1, 1};
        CHECK(evaluate(mcc{}, y, flipped) == doctest::Approx(-1.0).epsilon(1e-15));
        CHECK(mcc{}.name() == "MCC");
        CHECK(mcc::better == heldout::direction::higher_is_better);
        CHECK(heldout::outer_measure<mcc>);
    }

    TEST_CASE("check values: Matthews 1975 binary, Gorodkin 2004 multiclass R_K") {
        // TP = 20, FN = 10, FP = 5, TN = 65: 1250 / sqrt(3937500) = 0.629940788349
        // (worked by hand from the published formula: self-written reference, cross-checked with scipy.stats.pearsonr)
        Eigen::MatrixXd b(2, 2);
        b << 65, 5, //
            10, 20;
        CHECK(mcc{}.from_table(b) == doctest::Approx(1250 / std::sqrt(3937500.0)).epsilon(1e-15));
        CHECK(mcc{}.from_table(b) == doctest::Approx(0.629940788349).epsilon(1e-11));
        const auto e = expand(b);
        CHECK(evaluate(mcc{}, e.truth, e.prediction) == doctest::Approx(0.629940788348712).epsilon(1e-13));
        // [[10,2,3],[4,12,2],[1,1,15]]: c = 37, s = 50, t = (15, 18, 17), p = (15, 15, 20):
        // (37*50 - (225 + 270 + 340)) / sqrt((2500 - 850)(2500 - 838)) = 1015 / sqrt(1650 * 1662)
        // = 0.612926728423 (Gorodkin 2004; worked by hand from the published formula, self-written reference)
        Eigen::MatrixXd m(3, 3);
        m << 10, 2, 3, //
            4, 12, 2,  //
            1, 1, 15;
        CHECK(mcc{}.from_table(m) == doctest::Approx(1015 / std::sqrt(1650.0 * 1662.0)).epsilon(1e-15));
        CHECK(mcc{}.from_table(m) == doctest::Approx(0.612926728423).epsilon(1e-11));
        const auto em = expand(m);
        CHECK(evaluate(mcc{}, em.truth, em.prediction) == doctest::Approx(0.612926728423257).epsilon(1e-13));
    }

    TEST_CASE("R_K at k = 2 is the binary MCC (an empty third class changes nothing)") {
        Eigen::MatrixXd b(2, 2);
        b << 65, 5, //
            10, 20;
        Eigen::MatrixXd b3 = Eigen::MatrixXd::Zero(3, 3);
        b3.topLeftCorner(2, 2) = b;
        CHECK(mcc{}.from_table(b3) == doctest::Approx(mcc{}.from_table(b)).epsilon(1e-15));
    }

    TEST_CASE("no overflow: counts of 1e12 each (products ~1e48 as doubles)") {
        // MCC is invariant under scaling the table; 64-bit integer products would overflow here.
        Eigen::MatrixXd b(2, 2);
        b << 65, 5, //
            10, 20;
        const double whole = mcc{}.from_table(b);
        CHECK(mcc{}.from_table(b * 1e12) == doctest::Approx(whole).epsilon(1e-14));
        Eigen::MatrixXd m(3, 3);
        m << 10, 2, 3, //
            4, 12, 2,  //
            1, 1, 15;
        CHECK(mcc{}.from_table(m * 1e12) == doctest::Approx(mcc{}.from_table(m)).epsilon(1e-14));
        // through the accumulator: weights 1e11 on 1e5 observations
        const auto e = expand(b);
        const std::vector<double> w(e.truth.size(), 1e11);
        CHECK(evaluate(mcc{}, e.truth, e.prediction, w) == doctest::Approx(whole).epsilon(1e-14));
    }

    TEST_CASE("live reference: scipy.stats.pearsonr (binary), Gorodkin's covariance form via numpy.cov (multiclass)") {
        heldout_test::reference_table ref("ref_labels");
        const int cases = static_cast<int>(ref.scalar("cases"));
        for (int c = 0; c < cases; ++c) {
            const std::string p = "case" + std::to_string(c) + ".";
            const auto y = ref.get_as<std::uint8_t>(p + "truth");
            const auto f = ref.get_as<int>(p + "prediction");
            const auto w = ref.get(p + "weights");
            // binary: scipy.stats.pearsonr on the 0/1 vectors (weighted: rows repeated w times);
            // multiclass: sum_k cov(X_k, Y_k) / sqrt(...) of one-hot matrices with numpy.cov
            CHECK(heldout_test::close(evaluate(mcc{}, y, f), ref.scalar(p + "u.mcc")));
            CHECK(heldout_test::close(evaluate(mcc{}, y, f, w), ref.scalar(p + "w.mcc")));
        }
    }

    TEST_CASE("merge equals the whole") {
        heldout_test::reference_table ref("ref_labels");
        const auto y = ref.get_as<int>("case5.truth");
        const auto f = ref.get_as<int>("case5.prediction");
        const auto w = ref.get("case5.weights");
        const double whole = evaluate(mcc{}, y, f, w);
        auto a = mcc{}.accumulator();
        auto b = mcc{}.accumulator();
        a.add(std::span(y).first(777), std::span(f).first(777), std::span(w).first(777));
        b.add(std::span(y).subspan(777), std::span(f).subspan(777), std::span(w).subspan(777));
        a.merge(b);
        CHECK(a.value() == doctest::Approx(whole).epsilon(1e-14));
    }

    TEST_CASE("an empty margin leaves MCC undefined") {
        using heldout::undefined_error;
        const std::vector<int> y{0, 1, 0, 1};
        const std::vector<int> zeros{0, 0, 0, 0};
        const std::vector<int> ones{1, 1, 1, 1};
        CHECK_THROWS_WITH_AS(evaluate(mcc{}, y, zeros),
                             "measure MCC: undefined: empty margin: no predicted positive (TP + FP = 0)",
                             undefined_error);
        CHECK_THROWS_WITH_AS(evaluate(mcc{}, y, ones),
                             "measure MCC: undefined: empty margin: no predicted negative (TN + FN = 0)",
                             undefined_error);
        CHECK_THROWS_WITH_AS(evaluate(mcc{}, zeros, y),
                             "measure MCC: undefined: empty margin: no true positive in the data (TP + FN = 0)",
                             undefined_error);
        CHECK_THROWS_WITH_AS(evaluate(mcc{}, ones, y),
                             "measure MCC: undefined: empty margin: no true negative in the data (TN + FP = 0)",
                             undefined_error);
        const std::vector<int> y3{0, 1, 2, 2};
        const std::vector<int> twos{2, 2, 2, 2};
        CHECK_THROWS_WITH_AS(evaluate(mcc{}, y3, twos),
                             "measure MCC: undefined: empty margin: every prediction is one class (s^2 - sum p_k^2 "
                             "= 0)",
                             undefined_error);
        CHECK_THROWS_WITH_AS(evaluate(mcc{}, twos, y3),
                             "measure MCC: undefined: empty margin: every true label is one class (s^2 - sum t_k^2 "
                             "= 0)",
                             undefined_error);
        CHECK_THROWS_AS(evaluate(mcc{}, zeros, zeros), undefined_error); // k = 1
        CHECK_THROWS_WITH_AS(evaluate(mcc{}, y, y, std::vector<double>{0, 0, 0, 0}),
                             "measure MCC: undefined: total weight is zero", undefined_error);
        CHECK_THROWS_WITH_AS(evaluate(mcc{.classes = 2}, y3, y3),
                             "measure MCC: argument 'truth': label 2 outside the classes 0..1 at index 2",
                             heldout::input_error);
    }

    TEST_CASE("serialize / deserialize keep the value and the classes") {
        // self-consistency: the same rows on the original and on its copy from bytes
        const std::vector<int> y{1, 1, 0, 0, 0, 1}, f{1, 0, 0, 0, 1, 1};
        const std::vector<int> y2{0, 1, 1}, f2{0, 1, 0};
        check_bytes_round_trip(mcc{}, y, f, y2, f2, -1);
        check_bytes_round_trip(mcc{.classes = 2}, y, f, y2, f2, 2);
        const std::vector<int> y3{0, 1, 2, 2, 1}, f3{0, 2, 2, 1, 1};
        check_bytes_round_trip(mcc{.classes = 3}, y3, f3, y, f, 3);
    }
}
