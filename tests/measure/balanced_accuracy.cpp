// Tests for heldout/measure/balanced_accuracy.hpp: the mean per-class recall.
#include <heldout/measure/balanced_accuracy.hpp>
#include <heldout/stream/serialize.hpp>

#include "support/measure_checks.hpp"
#include "support/reference.hpp"

#include <Eigen/Dense>
#include <doctest/doctest.h>

#include <cstdint>
#include <exception>
#include <span>
#include <string>
#include <vector>

using heldout::evaluate;
using heldout::measure::balanced_accuracy;

using heldout_test::check_bytes_round_trip;
using heldout_test::expand;
using heldout_test::expanded;
using heldout_test::message_of;

namespace {
// Label vectors that reproduce a confusion table of counts (rows = true class).
using heldout_test::row_major;
} // namespace

TEST_SUITE("measure/balanced_accuracy") {
    TEST_CASE("worked example: recalls 2/3 and 1/1, mean 5/6") {
        // class 0: 3 true, 2 found; class 1: 1 true, 1 found
        const std::vector<int> y{0, 0, 0, 1};
        const std::vector<int> f{0, 0, 1, 1};
        CHECK(evaluate(balanced_accuracy{}, y, f) == doctest::Approx(5.0 / 6).epsilon(1e-15));
        // weights 1, 1, 2, 4: class 0 recall (1+1)/(1+1+2) = 1/2, class 1 recall 4/4: mean 3/4
        const std::vector<double> w{1, 1, 2, 4};
        CHECK(evaluate(balanced_accuracy{}, y, f, w) == doctest::Approx(0.75).epsilon(1e-15));
        CHECK(balanced_accuracy{}.name() == "balanced accuracy");
        CHECK(balanced_accuracy::better == heldout::direction::higher_is_better);
        CHECK(heldout::outer_measure<balanced_accuracy>);
    }

    TEST_CASE("check values of Brodersen et al. 2010 (ICPR, binary (TPR + TNR)/2; multiclass mean recall)") {
        // TP = 20, FN = 10, FP = 5, TN = 65: (20/30 + 65/70) / 2 = 0.797619047619...
        // (value: self-written reference of the published formula, worked by hand from the published formula)
        Eigen::MatrixXd b(2, 2);
        b << 65, 5, //
            10, 20;
        CHECK(balanced_accuracy{}.from_table(b) == doctest::Approx(0.797619047619048).epsilon(1e-13));
        const auto e = expand(b);
        CHECK(evaluate(balanced_accuracy{}, e.truth, e.prediction) ==
              doctest::Approx(0.797619047619048).epsilon(1e-13));
        // [[10,2,3],[4,12,2],[1,1,15]]: recalls 10/15, 12/18, 15/17, mean 0.738562091503
        Eigen::MatrixXd m(3, 3);
        m << 10, 2, 3, //
            4, 12, 2,  //
            1, 1, 15;
        CHECK(balanced_accuracy{}.from_table(m) == doctest::Approx(0.738562091503268).epsilon(1e-13));
        const auto em = expand(m);
        CHECK(evaluate(balanced_accuracy{}, em.truth, em.prediction) ==
              doctest::Approx((10.0 / 15 + 12.0 / 18 + 15.0 / 17) / 3).epsilon(1e-15));
    }

    TEST_CASE("live reference: per-class recall mean evaluated in numpy on the numpy confusion table") {
        heldout_test::reference_table ref("ref_labels");
        const int cases = static_cast<int>(ref.scalar("cases"));
        for (int c = 0; c < cases; ++c) {
            const std::string p = "case" + std::to_string(c) + ".";
            const auto k = static_cast<std::size_t>(ref.scalar(p + "k"));
            const auto y = ref.get_as<std::uint8_t>(p + "truth");
            const auto f = ref.get_as<int>(p + "prediction");
            const auto w = ref.get(p + "weights");
            // formula of Brodersen et al. 2010 evaluated in numpy (ref_labels.py)
            CHECK(heldout_test::close(evaluate(balanced_accuracy{}, y, f), ref.scalar(p + "u.balanced_accuracy")));
            CHECK(heldout_test::close(evaluate(balanced_accuracy{.classes = k}, y, f, w),
                                      ref.scalar(p + "w.balanced_accuracy")));
            CHECK(heldout_test::close(balanced_accuracy{}.from_table(row_major(ref.get(p + "wtable"), k)),
                                      ref.scalar(p + "w.balanced_accuracy")));
        }
    }

    TEST_CASE("merge equals the whole; add_one equals a batch") {
        heldout_test::reference_table ref("ref_labels");
        const auto y = ref.get_as<int>("case4.truth");
        const auto f = ref.get_as<int>("case4.prediction");
        const auto w = ref.get("case4.weights");
        const double whole = evaluate(balanced_accuracy{}, y, f, w);
        auto a = balanced_accuracy{}.accumulator();
        auto b = balanced_accuracy{}.accumulator();
        a.add(std::span(y).first(100), std::span(f).first(100), std::span(w).first(100));
        b.add(std::span(y).subspan(100), std::span(f).subspan(100), std::span(w).subspan(100));
        a.merge(b);
        CHECK(a.value() == doctest::Approx(whole).epsilon(1e-14));
        auto c = balanced_accuracy{}.accumulator();
        for (std::size_t i = 0; i < y.size(); ++i)
            c.add_one(y[i], f[i], w[i]);
        CHECK(c.value() == doctest::Approx(whole).epsilon(1e-14));
        CHECK(c.confusion().classes() == 4);
    }

    TEST_CASE("undefined when a true class is absent; bad input") {
        const std::vector<int> y{0, 0, 1, 1};
        const std::vector<int> f{0, 2, 1, 1}; // class 2 predicted, never true
        CHECK_THROWS_WITH_AS(evaluate(balanced_accuracy{}, y, f),
                             "measure balanced accuracy: undefined: true class 2 is absent (its recall is 0/0); "
                             "balanced accuracy needs every class in the truth",
                             heldout::undefined_error);
        CHECK_THROWS_AS(evaluate(balanced_accuracy{.classes = 3}, y, y), heldout::undefined_error);
        CHECK_THROWS_WITH_AS(evaluate(balanced_accuracy{}, y, y, std::vector<double>{0, 0, 0, 0}),
                             "measure balanced accuracy: undefined: total weight is zero", heldout::undefined_error);
        CHECK_THROWS_WITH_AS((void)balanced_accuracy{}.accumulator().value(),
                             "measure balanced accuracy: undefined: no observations", heldout::undefined_error);
        CHECK_THROWS_WITH_AS(evaluate(balanced_accuracy{.classes = 2}, y, f),
                             "measure balanced accuracy: argument 'prediction': label 2 outside the classes 0..1 at "
                             "index 1",
                             heldout::input_error);
        Eigen::MatrixXd bad(2, 3);
        bad.setOnes();
        CHECK_THROWS_WITH_AS((void)balanced_accuracy{}.from_table(bad),
                             "measure balanced accuracy: argument 'table': must be square (rows = true class, columns "
                             "= predicted class), got 2 x 3",
                             heldout::input_error);
        Eigen::MatrixXd neg = Eigen::MatrixXd::Ones(2, 2);
        neg(1, 0) = -1;
        CHECK_THROWS_WITH_AS((void)balanced_accuracy{}.from_table(neg),
                             "measure balanced accuracy: argument 'table': negative cell -1 at row 1, column 0",
                             heldout::input_error);
    }

    TEST_CASE("serialize / deserialize keep the value and the classes") {
        // self-consistency: the same rows on the original and on its copy from bytes
        const std::vector<int> y{0, 1, 2, 2, 1, 0}, f{0, 2, 2, 1, 1, 0};
        const std::vector<int> y2{2, 0, 1}, f2{2, 1, 1};
        check_bytes_round_trip(balanced_accuracy{}, y, f, y2, f2, -1);
        // fixed k = 3: label 3 stays an input_error after the round trip
        check_bytes_round_trip(balanced_accuracy{.classes = 3}, y, f, y2, f2, 3);
        auto a = balanced_accuracy{.classes = 3}.accumulator();
        auto b = heldout::deserialize<decltype(a)>(heldout::serialize(a));
        CHECK(b.measure().classes == 3);
        CHECK(b.confusion().fixed_classes() == 3);
    }
}
