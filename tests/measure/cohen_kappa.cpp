// Tests for heldout/measure/cohen_kappa.hpp: Cohen's kappa, unweighted and weighted.
#include <heldout/measure/cohen_kappa.hpp>
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
using heldout::measure::cohen_kappa;
using heldout::measure::kappa_weighting;

using heldout_test::check_bytes_round_trip;
using heldout_test::expand;
using heldout_test::expanded;
using heldout_test::message_of;

namespace {
Eigen::MatrixXd multiclass_check_table() {
    Eigen::MatrixXd m(3, 3);
    m << 10, 2, 3, //
        4, 12, 2,  //
        1, 1, 15;
    return m;
}
} // namespace

TEST_SUITE("measure/cohen_kappa") {
    TEST_CASE("worked example: p_o = 3/4, p_e = 1/2, kappa = 1/2") {
        // table [[1,1],[0,2]]: rows 2, 2; columns 1, 3; p_e = (2*1 + 2*3) / 16 = 1/2
        const std::vector<int> y{0, 0, 1, 1};
        const std::vector<int> f{0, 1, 1, 1};
        CHECK(evaluate(cohen_kappa{}, y, f) == doctest::Approx(0.5).epsilon(1e-15)); // (3/4 - 1/2) / (1 - 1/2)
        // weight 3 on the first row: [[3,1],[0,2]]: N = 6, p_o = 5/6, p_e = (4*3 + 2*3)/36 = 1/2 -> 2/3
        const std::vector<double> w{3, 1, 1, 1};
        CHECK(evaluate(cohen_kappa{}, y, f, w) == doctest::Approx(2.0 / 3).epsilon(1e-15));
        CHECK(cohen_kappa{}.name() == "Cohen's kappa");
        CHECK(cohen_kappa{kappa_weighting::linear}.name() == "linear-weighted kappa");
        CHECK(cohen_kappa{kappa_weighting::quadratic}.name() == "quadratic-weighted kappa");
        CHECK(cohen_kappa::better == heldout::direction::higher_is_better);
        CHECK(heldout::outer_measure<cohen_kappa>);
    }

    TEST_CASE("check values: Cohen 1960 kappa, Cohen 1968 weighted kappa") {
        // Binary TP 20, FN 10, FP 5, TN 65: p_o = 0.85, p_e = (70*75 + 30*25)/1e4 = 0.6, kappa 0.625
        // (worked by hand from the published formula, self-written reference of the published formula)
        Eigen::MatrixXd b(2, 2);
        b << 65, 5, //
            10, 20;
        CHECK(cohen_kappa{}.from_table(b) == doctest::Approx(0.625).epsilon(1e-15));
        // with k = 2 both weightings reduce to unweighted kappa (w = 1 off the diagonal)
        CHECK(cohen_kappa{kappa_weighting::linear}.from_table(b) == doctest::Approx(0.625).epsilon(1e-15));
        CHECK(cohen_kappa{kappa_weighting::quadratic}.from_table(b) == doctest::Approx(0.625).epsilon(1e-15));
        // [[10,2,3],[4,12,2],[1,1,15]]: p_o = 0.74, p_e = (15*15 + 18*15 + 17*20)/2500 = 0.334
        const Eigen::MatrixXd m = multiclass_check_table();
        CHECK(cohen_kappa{}.from_table(m) == doctest::Approx((0.74 - 0.334) / (1 - 0.334)).epsilon(1e-14));
        CHECK(cohen_kappa{}.from_table(m) == doctest::Approx(0.609609609610).epsilon(1e-11));
        CHECK(cohen_kappa{kappa_weighting::linear}.from_table(m) == doctest::Approx(0.617117117117).epsilon(1e-11));
        CHECK(cohen_kappa{kappa_weighting::quadratic}.from_table(m) == doctest::Approx(0.624624624625).epsilon(1e-11));
        const auto e = expand(m);
        CHECK(evaluate(cohen_kappa{kappa_weighting::quadratic}, e.truth, e.prediction) ==
              doctest::Approx(0.624624624624625).epsilon(1e-13));
    }

    TEST_CASE("live reference: Cohen 1960/1968 formulas evaluated in numpy on the numpy confusion table") {
        heldout_test::reference_table ref("ref_labels");
        const int cases = static_cast<int>(ref.scalar("cases"));
        for (int c = 0; c < cases; ++c) {
            const std::string p = "case" + std::to_string(c) + ".";
            const auto k = static_cast<std::size_t>(ref.scalar(p + "k"));
            const auto y = ref.get_as<int>(p + "truth");
            const auto f = ref.get_as<std::uint8_t>(p + "prediction");
            const auto w = ref.get(p + "weights");
            const std::pair<kappa_weighting, const char*> kinds[] = {{kappa_weighting::unweighted, "none"},
                                                                     {kappa_weighting::linear, "linear"},
                                                                     {kappa_weighting::quadratic, "quadratic"}};
            for (const auto& [kind, key] : kinds) {
                CHECK(heldout_test::close(evaluate(cohen_kappa{kind}, y, f), ref.scalar(p + "u.kappa." + key)));
                CHECK(heldout_test::close(evaluate(cohen_kappa{kind, k}, y, f, w), ref.scalar(p + "w.kappa." + key)));
            }
        }
    }

    TEST_CASE("merge equals the whole; trailing empty classes do not change weighted kappa") {
        heldout_test::reference_table ref("ref_labels");
        const auto y = ref.get_as<int>("case4.truth");
        const auto f = ref.get_as<int>("case4.prediction");
        const auto w = ref.get("case4.weights");
        const cohen_kappa m{kappa_weighting::linear};
        const double whole = evaluate(m, y, f, w);
        auto a = m.accumulator();
        auto b = m.accumulator();
        a.add(std::span(y).first(50), std::span(f).first(50), std::span(w).first(50));
        b.add(std::span(y).subspan(50), std::span(f).subspan(50), std::span(w).subspan(50));
        a.merge(b);
        CHECK(a.value() == doctest::Approx(whole).epsilon(1e-14));
        CHECK(evaluate(cohen_kappa{kappa_weighting::linear, 9}, y, f, w) == doctest::Approx(whole).epsilon(1e-14));
    }

    TEST_CASE("p_e = 1 leaves kappa undefined") {
        using heldout::undefined_error;
        const std::vector<int> same{2, 2, 2};
        for (auto kind : {kappa_weighting::unweighted, kappa_weighting::linear, kappa_weighting::quadratic}) {
            CHECK_THROWS_AS(evaluate(cohen_kappa{kind}, same, same), undefined_error);
            CHECK_THROWS_AS(evaluate(cohen_kappa{kind, 4}, same, same), undefined_error);
        }
        CHECK_THROWS_WITH_AS(evaluate(cohen_kappa{}, same, same),
                             "measure Cohen's kappa: undefined: chance disagreement is zero (p_e = 1: both sides put "
                             "every observation in one and the same class)",
                             undefined_error);
        // one side constant but not the other: p_e < 1, kappa = 0 is defined
        const std::vector<int> y{0, 1, 2};
        CHECK(evaluate(cohen_kappa{}, y, same) == doctest::Approx(0.0));
        CHECK_THROWS_WITH_AS(evaluate(cohen_kappa{}, y, y, std::vector<double>{0, 0, 0}),
                             "measure Cohen's kappa: undefined: total weight is zero", undefined_error);
        CHECK_THROWS_WITH_AS(evaluate(cohen_kappa{kappa_weighting::quadratic, 2}, y, y),
                             "measure quadratic-weighted kappa: argument 'truth': label 2 outside the classes 0..1 at "
                             "index 2",
                             heldout::input_error);
    }

    TEST_CASE("serialize / deserialize keep the value, the weighting and the classes") {
        // self-consistency: the same rows on the original and on its copy from bytes
        const std::vector<int> y{0, 1, 2, 2, 1, 0, 3}, f{0, 2, 2, 1, 1, 0, 1};
        const std::vector<int> y2{2, 0, 1}, f2{3, 1, 1};
        check_bytes_round_trip(cohen_kappa{}, y, f, y2, f2, -1);
        check_bytes_round_trip(cohen_kappa{heldout::measure::kappa_weighting::linear}, y, f, y2, f2, -1);
        check_bytes_round_trip(cohen_kappa{heldout::measure::kappa_weighting::quadratic, 4}, y, f, y2, f2, 4);
        auto a = cohen_kappa{heldout::measure::kappa_weighting::quadratic}.accumulator();
        a.add(y, f);
        const auto b = heldout::deserialize<decltype(a)>(heldout::serialize(a));
        CHECK(b.measure().weighting == heldout::measure::kappa_weighting::quadratic);
        // the weighting matters here: the unweighted value differs
        CHECK(b.value() != evaluate(cohen_kappa{}, y, f));
    }
}
