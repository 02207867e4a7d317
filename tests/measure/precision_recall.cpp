// Tests for heldout/measure/precision_recall.hpp: precision, recall, specificity, F-beta.
#include <heldout/measure/precision_recall.hpp>
#include <heldout/measure/table_accumulator.hpp>
#include <heldout/stream/serialize.hpp>

#include "support/measure_checks.hpp"
#include "support/reference.hpp"

#include <Eigen/Dense>
#include <doctest/doctest.h>

#include <cstdint>
#include <exception>
#include <limits>
#include <span>
#include <string>
#include <vector>

using heldout::evaluate;
using heldout::measure::class_combination;
using heldout::measure::f_beta;
using heldout::measure::precision;
using heldout::measure::recall;
using heldout::measure::specificity;

using heldout_test::check_bytes_round_trip;
using heldout_test::expand;
using heldout_test::expanded;
using heldout_test::message_of;

namespace {
Eigen::MatrixXd binary_check_table() {
    // TP = 20, FN = 10, FP = 5, TN = 65 (class 1 positive; rows = true class)
    Eigen::MatrixXd b(2, 2);
    b << 65, 5, //
        10, 20;
    return b;
}
Eigen::MatrixXd multiclass_check_table() {
    Eigen::MatrixXd m(3, 3);
    m << 10, 2, 3, //
        4, 12, 2,  //
        1, 1, 15;
    return m;
}
} // namespace

TEST_SUITE("measure/precision_recall") {
    TEST_CASE("worked example: TP = 2, FP = 1, FN = 1, TN = 2") {
        const std::vector<int> y{1, 1, 1, 0, 0, 0};
        const std::vector<int> f{1, 1, 0, 1, 0, 0};
        CHECK(evaluate(precision{}, y, f) == doctest::Approx(2.0 / 3).epsilon(1e-15));   // 2 / (2 + 1)
        CHECK(evaluate(recall{}, y, f) == doctest::Approx(2.0 / 3).epsilon(1e-15));      // 2 / (2 + 1)
        CHECK(evaluate(specificity{}, y, f) == doctest::Approx(2.0 / 3).epsilon(1e-15)); // 2 / (2 + 1)
        CHECK(evaluate(f_beta{1.0}, y, f) == doctest::Approx(4.0 / 6).epsilon(1e-15));   // 2*2 / (2*2 + 1 + 1)
        // beta = 2: 5*2 / (5*2 + 4*1 + 1) = 10/15
        CHECK(evaluate(f_beta{2.0}, y, f) == doctest::Approx(10.0 / 15).epsilon(1e-15));
        // weights 3,1,1,1,1,1: TP = 4, FN = 1, FP = 1, TN = 2
        const std::vector<double> w{3, 1, 1, 1, 1, 1};
        CHECK(evaluate(precision{}, y, f, w) == doctest::Approx(0.8).epsilon(1e-15)); // 4 / 5
        CHECK(evaluate(recall{}, y, f, w) == doctest::Approx(0.8).epsilon(1e-15));    // 4 / 5
        CHECK(evaluate(specificity{}, y, f, w) == doctest::Approx(2.0 / 3).epsilon(1e-15));
        // positive class 0: TP = 2 (true 0 predicted 0), FP = 1, FN = 1
        CHECK(evaluate(precision{.positive = 0}, y, f, w) == doctest::Approx(2.0 / 3).epsilon(1e-15));
        CHECK(evaluate(specificity{.positive = 0}, y, f, w) == doctest::Approx(0.8).epsilon(1e-15));
    }

    TEST_CASE("names, directions and kinds") {
        CHECK(precision{}.name() == "precision");
        CHECK(recall{.positive = 0}.name() == "recall (positive class 0)");
        CHECK(specificity{.combination = class_combination::one_vs_rest, .positive = 3}.name() ==
              "specificity of class 3");
        CHECK(f_beta{1.0}.name() == "F1");
        CHECK(f_beta{0.5, class_combination::mean}.name() == "mean F0.5 over classes");
        CHECK(precision{.combination = class_combination::pooled}.name() == "pooled precision");
        CHECK(recall{.combination = class_combination::prevalence_weighted}.name() == "prevalence-weighted recall");
        CHECK(f_beta::better == heldout::direction::higher_is_better);
        CHECK(precision::kind == heldout::prediction_kind::label);
        CHECK(heldout::outer_measure<precision>);
        CHECK(heldout::outer_measure<recall>);
        CHECK(heldout::outer_measure<specificity>);
        CHECK(heldout::outer_measure<f_beta>);
    }

    TEST_CASE("binary check values: van Rijsbergen 1979 F-beta (count form) on TP 20, FN 10, FP 5, TN 65") {
        // Values: self-written reference of the published formulas (worked by hand from the published formula).
        const Eigen::MatrixXd b = binary_check_table();
        CHECK(precision{}.from_table(b) == doctest::Approx(0.8).epsilon(1e-15));                 // 20 / 25
        CHECK(recall{}.from_table(b) == doctest::Approx(0.666666666666667).epsilon(1e-14));      // 20 / 30
        CHECK(specificity{}.from_table(b) == doctest::Approx(0.928571428571429).epsilon(1e-14)); // 65 / 70
        CHECK(f_beta{1.0}.from_table(b) == doctest::Approx(40.0 / 55).epsilon(1e-15));           // 0.727272727273
        CHECK(f_beta{2.0}.from_table(b) == doctest::Approx(100.0 / 145).epsilon(1e-15));         // 0.689655172414
        CHECK(f_beta{0.5}.from_table(b) == doctest::Approx(25.0 / 32.5).epsilon(1e-15));         // 0.769230769231
        // the same through labels
        const auto e = expand(b);
        CHECK(evaluate(f_beta{1.0}, e.truth, e.prediction) == doctest::Approx(0.727272727272727).epsilon(1e-13));
        // F = (1 + b^2) P R / (b^2 P + R), the ratio form, agrees
        const double p = 0.8, r = 2.0 / 3;
        CHECK(f_beta{2.0}.from_table(b) == doctest::Approx(5 * p * r / (4 * p + r)).epsilon(1e-14));
    }

    TEST_CASE("multiclass check values: macro-F1 0.734916734917, micro-F1 = accuracy 0.74") {
        // [[10,2,3],[4,12,2],[1,1,15]]: per-class F1 20/30, 24/33, 30/37 (self-written reference of
        // van Rijsbergen's formula, worked by hand from the published formula)
        const Eigen::MatrixXd m = multiclass_check_table();
        CHECK(f_beta{1.0, class_combination::mean}.from_table(m) == doctest::Approx(0.734916734916735).epsilon(1e-13));
        CHECK(f_beta{1.0, class_combination::pooled}.from_table(m) == doctest::Approx(0.74).epsilon(1e-15));
        CHECK(precision{.combination = class_combination::pooled}.from_table(m) ==
              doctest::Approx(0.74).epsilon(1e-15));
        CHECK(recall{.combination = class_combination::pooled}.from_table(m) == doctest::Approx(0.74).epsilon(1e-15));
        // per class, visible: class 2 precision 15 / (3 + 2 + 15), recall 15 / 17
        CHECK(precision{.combination = class_combination::one_vs_rest, .positive = 2}.from_table(m) ==
              doctest::Approx(0.75).epsilon(1e-15));
        CHECK(recall{.combination = class_combination::one_vs_rest, .positive = 2}.from_table(m) ==
              doctest::Approx(15.0 / 17).epsilon(1e-15));
        // prevalence-weighted recall is accuracy: sum_c (n_c / N) TP_c / n_c = trace / N
        CHECK(recall{.combination = class_combination::prevalence_weighted}.from_table(m) ==
              doctest::Approx(0.74).epsilon(1e-15));
        // specificity of class 0: TN = 12 + 2 + 1 + 15 = 30, FP = 4 + 1 = 5
        CHECK(specificity{.combination = class_combination::one_vs_rest, .positive = 0}.from_table(m) ==
              doctest::Approx(30.0 / 35).epsilon(1e-15));
        const auto e = expand(m);
        CHECK(evaluate(f_beta{1.0, class_combination::mean}, e.truth, e.prediction) ==
              doctest::Approx((20.0 / 30 + 24.0 / 33 + 30.0 / 37) / 3).epsilon(1e-15));
    }

    TEST_CASE("live reference: per-class formulas evaluated in numpy on the numpy confusion table") {
        heldout_test::reference_table ref("ref_labels");
        const int cases = static_cast<int>(ref.scalar("cases"));
        for (int c = 0; c < cases; ++c) {
            const std::string p = "case" + std::to_string(c) + ".";
            const auto k = static_cast<std::size_t>(ref.scalar(p + "k"));
            const auto y = ref.get_as<std::uint8_t>(p + "truth");
            const auto f = ref.get_as<std::uint8_t>(p + "prediction");
            const auto yi = ref.get_as<int>(p + "truth");
            const auto w = ref.get(p + "weights");
            const double beta = k == 2 ? 2.0 : 0.5; // as in ref_labels.py
            for (const char* u : {"u.", "w."}) {
                const bool weighted = u[0] == 'w';
                auto run = [&](auto m) { return weighted ? evaluate(m, y, f, w) : evaluate(m, yi, f); };
                auto expect = [&](const std::string& what) { return ref.scalar(p + u + what); };
                // van Rijsbergen 1979 / standard rates, evaluated in numpy (ref_labels.py)
                const std::vector<double> pc = ref.get(p + u + "precision.per_class");
                const std::vector<double> rc = ref.get(p + u + "recall.per_class");
                const std::vector<double> sc = ref.get(p + u + "specificity.per_class");
                const std::vector<double> fc = ref.get(p + u + "f.per_class");
                for (std::size_t cls = 0; cls < k; ++cls) {
                    const auto how = k == 2 ? class_combination::binary : class_combination::one_vs_rest;
                    CHECK(heldout_test::close(run(precision{how, cls}), pc[cls]));
                    CHECK(heldout_test::close(run(recall{how, cls}), rc[cls]));
                    CHECK(heldout_test::close(run(specificity{how, cls}), sc[cls]));
                    CHECK(heldout_test::close(run(f_beta{beta, how, cls}), fc[cls]));
                }
                const std::pair<class_combination, const char*> ways[] = {
                    {class_combination::mean, ".mean"},
                    {class_combination::pooled, ".pooled"},
                    {class_combination::prevalence_weighted, ".prevalence"}};
                for (const auto& [how, key] : ways) {
                    CHECK(heldout_test::close(run(precision{how}), expect(std::string("precision") + key)));
                    CHECK(heldout_test::close(run(recall{how}), expect(std::string("recall") + key)));
                    CHECK(heldout_test::close(run(specificity{how}), expect(std::string("specificity") + key)));
                    CHECK(heldout_test::close(run(f_beta{beta, how}), expect(std::string("f") + key)));
                }
            }
        }
    }

    TEST_CASE("merge equals the whole; add_one equals a batch") {
        heldout_test::reference_table ref("ref_labels");
        const auto y = ref.get_as<int>("case2.truth");
        const auto f = ref.get_as<int>("case2.prediction");
        const auto w = ref.get("case2.weights");
        const f_beta m{1.0};
        const double whole = evaluate(m, y, f, w);
        auto a = m.accumulator();
        auto b = m.accumulator();
        a.add(std::span(y).first(300), std::span(f).first(300), std::span(w).first(300));
        b.add(std::span(y).subspan(300), std::span(f).subspan(300), std::span(w).subspan(300));
        a.merge(b);
        CHECK(a.value() == doctest::Approx(whole).epsilon(1e-14));
        auto c = m.accumulator();
        for (std::size_t i = 0; i < y.size(); ++i)
            c.add_one(y[i], f[i], w[i]);
        CHECK(c.value() == doctest::Approx(whole).epsilon(1e-14));
        c.reset();
        CHECK_THROWS_WITH_AS((void)c.value(), "measure F1: undefined: no observations", heldout::undefined_error);
    }

    TEST_CASE("every undefined case throws undefined_error naming the measure and the 0/0") {
        using heldout::undefined_error;
        const std::vector<int> y{0, 0, 1, 1};
        const std::vector<int> none{0, 0, 0, 0};
        const std::vector<int> all{1, 1, 1, 1};
        CHECK_THROWS_WITH_AS(evaluate(precision{}, y, none),
                             "measure precision: undefined: no predicted positive (TP + FP = 0) for class 1",
                             undefined_error);
        CHECK_THROWS_WITH_AS(evaluate(recall{}, none, y),
                             "measure recall: undefined: no true positive in the data (TP + FN = 0) for class 1",
                             undefined_error);
        CHECK_THROWS_WITH_AS(evaluate(specificity{}, all, y),
                             "measure specificity: undefined: no true negative in the data (TN + FP = 0) for class 1",
                             undefined_error);
        CHECK_THROWS_WITH_AS(evaluate(f_beta{1.0}, none, none), "measure F1: undefined: TP + FP + FN = 0 for class 1",
                             undefined_error);
        // but F is defined when only one of precision / recall is 0/0: TP = 0, FN = 2 -> F = 0
        CHECK(evaluate(f_beta{1.0}, y, none) == 0.0);
        // one undefined class makes the mean undefined
        const std::vector<int> y3{0, 1, 2, 2};
        const std::vector<int> f3{0, 1, 1, 1};
        CHECK_THROWS_WITH_AS(evaluate(precision{.combination = class_combination::mean}, y3, f3),
                             "measure mean precision over classes: undefined: no predicted positive (TP + FP = 0) for "
                             "class 2",
                             undefined_error);
        // a class absent from both sides has prevalence 0: skipped by the weighted mean
        CHECK(evaluate(recall{.combination = class_combination::prevalence_weighted, .classes = 4}, y3, f3) ==
              doctest::Approx(0.5));
        CHECK_THROWS_AS(evaluate(recall{.combination = class_combination::mean, .classes = 4}, y3, f3),
                        undefined_error);
        // one class only: pooled specificity has TN + FP = 0
        CHECK_THROWS_WITH_AS(evaluate(specificity{.combination = class_combination::pooled}, none, none),
                             "measure pooled specificity: undefined: no true negative in the data (TN + FP = 0) in "
                             "the counts pooled over the classes",
                             undefined_error);
        // one_vs_rest for a class never seen: 0/0
        CHECK_THROWS_AS(evaluate(precision{.combination = class_combination::one_vs_rest, .positive = 7}, y3, f3),
                        undefined_error);
        CHECK_THROWS_WITH_AS(evaluate(precision{}, y, y, std::vector<double>{0, 0, 0, 0}),
                             "measure precision: undefined: total weight is zero", undefined_error);
    }

    TEST_CASE("bad input and bad parameters") {
        using heldout::input_error;
        const std::vector<int> y{0, 1, 2};
        const std::vector<int> b{0, 1, 1};
        CHECK_THROWS_WITH_AS(evaluate(precision{}, y, b),
                             "measure precision: argument 'truth': label 2 outside the classes 0..1 at index 2",
                             input_error);
        CHECK_THROWS_WITH_AS(evaluate(recall{.positive = 2}, b, b),
                             "measure recall (positive class 2): argument 'positive': binary positive class must be "
                             "0 or 1, got 2",
                             input_error);
        CHECK_THROWS_WITH_AS(evaluate(recall{.classes = 3}, b, b),
                             "measure recall: argument 'classes': binary combination needs the classes 0 and 1, got "
                             "classes = 3; choose another class_combination for multiclass labels",
                             input_error);
        CHECK_THROWS_WITH_AS(
            evaluate(recall{.combination = class_combination::one_vs_rest, .positive = 3, .classes = 3}, y, y),
            "measure recall of class 3: argument 'positive': class 3 outside the classes 0..2", input_error);
        CHECK_THROWS_WITH_AS(evaluate(f_beta{0.0}, b, b),
                             "measure F0: argument 'beta': must be finite and positive, got 0", input_error);
        CHECK_THROWS_AS(evaluate(f_beta{std::numeric_limits<double>::quiet_NaN()}, b, b), input_error);
        CHECK_THROWS_WITH_AS(evaluate(f_beta{1.0}, b, b, std::vector<double>{1, -1, 1}),
                             "measure F1: argument 'weights': negative weight -1 at index 1", input_error);
        CHECK_THROWS_WITH_AS((void)precision{}.from_table(Eigen::MatrixXd::Ones(3, 3)),
                             "measure precision: argument 'table': binary combination needs a 2 x 2 table, got 3 "
                             "classes",
                             input_error);
        const std::vector<std::int8_t> neg{0, -1, 1};
        CHECK_THROWS_WITH_AS(evaluate(specificity{}, b, neg),
                             "measure specificity: argument 'prediction': label -1 is negative at index 1",
                             input_error);
    }

    TEST_CASE("serialize / deserialize keep the value, the combination, the positive class and beta") {
        // self-consistency: the same rows on the original and on its copy from bytes
        const std::vector<int> y{0, 1, 1, 0, 1, 0}, f{0, 1, 0, 1, 1, 0};
        const std::vector<int> y2{1, 1, 0}, f2{1, 0, 0};
        check_bytes_round_trip(precision{}, y, f, y2, f2, 2);
        check_bytes_round_trip(recall{.positive = 0}, y, f, y2, f2, 2);
        check_bytes_round_trip(specificity{}, y, f, y2, f2, 2);
        check_bytes_round_trip(f_beta{.beta = 2.0}, y, f, y2, f2, 2);
        const std::vector<int> y3{0, 1, 2, 2, 1, 0}, f3{0, 2, 2, 1, 1, 0};
        const std::vector<int> y4{2, 0, 1}, f4{2, 1, 1};
        check_bytes_round_trip(precision{.combination = class_combination::mean}, y3, f3, y4, f4, -1);
        check_bytes_round_trip(recall{.combination = class_combination::pooled, .classes = 3}, y3, f3, y4, f4, 3);
        check_bytes_round_trip(specificity{.combination = class_combination::one_vs_rest, .positive = 2}, y3, f3, y4,
                               f4, -1);
        check_bytes_round_trip(f_beta{.beta = 0.5, .combination = class_combination::prevalence_weighted, .classes = 3},
                               y3, f3, y4, f4, 3);
        auto a = f_beta{.beta = 0.5, .combination = class_combination::one_vs_rest, .positive = 2}.accumulator();
        a.add(y3, f3);
        const auto b = heldout::deserialize<decltype(a)>(heldout::serialize(a));
        CHECK(b.measure().beta == 0.5);
        CHECK(b.measure().combination == class_combination::one_vs_rest);
        CHECK(b.measure().positive == 2);
    }

    TEST_CASE("bytes of one measure are not read as another of the same layout") {
        auto p = precision{}.accumulator();
        p.add(std::vector<int>{0, 1, 1}, std::vector<int>{1, 1, 0});
        const auto bytes = heldout::serialize(p);
        CHECK_THROWS_WITH_AS(
            (void)heldout::deserialize<heldout::measure::table_accumulator<recall>>(bytes),
            "heldout::deserialize: argument 'bytes': the bytes hold the state of 'precision', not of 'recall'",
            heldout::input_error);
        // a default accumulator is that of the default measure
        heldout::measure::table_accumulator<precision> d;
        d.add(std::vector<int>{0, 1, 1}, std::vector<int>{1, 1, 0});
        CHECK(d.value() == p.value());
        CHECK(heldout::serialize(d) == bytes);
    }
}
