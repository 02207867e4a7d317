// Tests for heldout/measure/cost_weighted_error.hpp: mean cost under a k x k cost matrix.
#include <heldout/measure/cost_weighted_error.hpp>
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
using heldout::measure::cost_weighted_error;

using heldout_test::check_bytes_round_trip;
using heldout_test::message_of;

namespace {
using heldout_test::row_major;
} // namespace

TEST_SUITE("measure/cost_weighted_error") {
    TEST_CASE("worked example: costs by cell, averaged over the observations") {
        Eigen::MatrixXd costs(3, 3);
        costs << 0, 1, 2, //
            3, 0, 4,      //
            5, 6, 0;
        // cells hit: (0,0) 0, (1,2) 4, (2,2) 0, (1,1) 0, (2,0) 5: total 9 over 5
        const std::vector<int> y{0, 1, 2, 1, 2};
        const std::vector<std::uint8_t> f{0, 2, 2, 1, 0};
        CHECK(evaluate(cost_weighted_error{costs}, y, f) == doctest::Approx(9.0 / 5).epsilon(1e-15));
        // weights 1..5: (0*1 + 4*2 + 0*3 + 0*4 + 5*5) / 15 = 33/15
        const std::vector<double> w{1, 2, 3, 4, 5};
        CHECK(evaluate(cost_weighted_error{costs}, y, f, w) == doctest::Approx(33.0 / 15).epsilon(1e-15));
        const cost_weighted_error m{costs};
        CHECK(m.name() == "cost-weighted error (costs [0 1 2; 3 0 4; 5 6 0])"); // the costs are its identity
        CHECK(m.message_name() == "cost-weighted error");
        CHECK(m.costs() == costs);
        CHECK(cost_weighted_error::better == heldout::direction::lower_is_better);
        CHECK(heldout::outer_measure<cost_weighted_error>);
        // 0/1 costs give the classification error: 2 mismatches out of 5
        const Eigen::MatrixXd zero_one = Eigen::MatrixXd::Ones(3, 3) - Eigen::MatrixXd::Identity(3, 3);
        CHECK(evaluate(cost_weighted_error{zero_one}, y, f) == doctest::Approx(0.4).epsilon(1e-15));
    }

    TEST_CASE("check value after Elkan 2001 (IJCAI): c_FN = 5, c_FP = 1 on TP 20, FN 10, FP 5, TN 65") {
        // (5 * 10 + 1 * 5) / 100 = 0.55 (self-written reference of the formula, worked by hand from the published
        // formula)
        Eigen::MatrixXd costs(2, 2);
        costs << 0, 1, //
            5, 0;
        Eigen::MatrixXd table(2, 2);
        table << 65, 5, //
            10, 20;
        CHECK(cost_weighted_error{costs}.from_table(table) == doctest::Approx(0.55).epsilon(1e-15));
    }

    TEST_CASE("live reference: sum(costs * C) / sum(C) evaluated in numpy on the numpy confusion table") {
        heldout_test::reference_table ref("ref_labels");
        const int cases = static_cast<int>(ref.scalar("cases"));
        for (int c = 0; c < cases; ++c) {
            const std::string p = "case" + std::to_string(c) + ".";
            const auto k = static_cast<std::size_t>(ref.scalar(p + "k"));
            const auto y = ref.get_as<int>(p + "truth");
            const auto f = ref.get_as<std::uint8_t>(p + "prediction");
            const auto w = ref.get(p + "weights");
            const cost_weighted_error m{row_major(ref.get(p + "u.costs"), k)};
            // Elkan 2001 formula evaluated in numpy (ref_labels.py)
            CHECK(heldout_test::close(evaluate(m, y, f), ref.scalar(p + "u.cost_error")));
            CHECK(heldout_test::close(evaluate(m, y, f, w), ref.scalar(p + "w.cost_error")));
            auto a = m.accumulator();
            auto b = m.accumulator();
            a.add(std::span(y).first(10), std::span(f).first(10), std::span(w).first(10));
            b.add(std::span(y).subspan(10), std::span(f).subspan(10), std::span(w).subspan(10));
            a.merge(b);
            CHECK(heldout_test::close(a.value(), ref.scalar(p + "w.cost_error"), 1e-13));
        }
    }

    TEST_CASE("the cost matrix is checked when the measure is made; labels must fit its size") {
        using heldout::input_error;
        CHECK_THROWS_WITH_AS(cost_weighted_error{Eigen::MatrixXd(2, 3)},
                             "measure cost-weighted error: argument 'costs': must be square (rows = true class, "
                             "columns = predicted class), got 2 x 3",
                             input_error);
        CHECK_THROWS_WITH_AS(cost_weighted_error{Eigen::MatrixXd()},
                             "measure cost-weighted error: argument 'costs': empty cost matrix", input_error);
        Eigen::MatrixXd neg = Eigen::MatrixXd::Zero(2, 2);
        neg(0, 1) = -0.5;
        CHECK_THROWS_WITH_AS(cost_weighted_error{neg},
                             "measure cost-weighted error: argument 'costs': negative cost -0.5 at row 0, column 1",
                             input_error);
        Eigen::MatrixXd inf = Eigen::MatrixXd::Zero(2, 2);
        inf(1, 0) = std::numeric_limits<double>::infinity();
        CHECK_THROWS_WITH_AS(cost_weighted_error{inf},
                             "measure cost-weighted error: argument 'costs': cost not finite at row 1, column 0",
                             input_error);
        const cost_weighted_error m{Eigen::MatrixXd::Ones(2, 2)};
        const std::vector<int> y{0, 1, 2};
        CHECK_THROWS_WITH_AS(evaluate(m, y, y),
                             "measure cost-weighted error: argument 'truth': label 2 outside the classes 0..1 at "
                             "index 2",
                             input_error);
        CHECK_THROWS_WITH_AS((void)m.from_table(Eigen::MatrixXd::Ones(3, 3)),
                             "measure cost-weighted error: argument 'table': 3 classes, but the cost matrix has 2",
                             input_error);
        const std::vector<int> ok{0, 1, 1};
        CHECK_THROWS_WITH_AS(evaluate(m, ok, ok, std::vector<double>{0, 0, 0}),
                             "measure cost-weighted error: undefined: total weight is zero", heldout::undefined_error);
        CHECK_THROWS_WITH_AS(evaluate(m, ok, ok, std::vector<double>{0, -1, 0}),
                             "measure cost-weighted error: argument 'weights': negative weight -1 at index 1",
                             input_error);
    }

    TEST_CASE("serialize / deserialize keep the value and the cost matrix") {
        // self-consistency: the same rows on the original and on its copy from bytes
        const Eigen::MatrixXd costs = row_major({0, 1, 2, 3, 0, 4, 5, 6, 0}, 3);
        const std::vector<int> y{0, 1, 2, 1, 2}, f{0, 2, 2, 1, 0};
        const std::vector<int> y2{2, 2, 0}, f2{1, 0, 2};
        check_bytes_round_trip(cost_weighted_error{costs}, y, f, y2, f2, 3);
        auto a = cost_weighted_error{costs}.accumulator();
        a.add(y, f);
        const auto b = heldout::deserialize<decltype(a)>(heldout::serialize(a));
        CHECK(b.measure().costs() == costs);
        CHECK(b.confusion().fixed_classes() == 3);
    }

    TEST_CASE("a default cost_weighted_error has no costs and refuses to score") {
        using heldout::input_error;
        const std::vector<int> y{0, 1}, f{0, 0};
        const cost_weighted_error none{};
        CHECK(none.costs().size() == 0);
        auto acc = none.accumulator();
        CHECK_THROWS_WITH_AS(acc.add(y, f),
                             "measure cost-weighted error: argument 'costs': empty cost matrix (a default "
                             "cost_weighted_error has no costs: give the k x k costs)",
                             input_error);
        CHECK_THROWS_AS(acc.add_one(0, 1), input_error);
        CHECK_THROWS_AS((void)acc.value(), input_error);
        CHECK_THROWS_AS(evaluate(none, y, f), input_error);
        CHECK_THROWS_AS((void)none.from_table(Eigen::MatrixXd::Zero(2, 2)), input_error);
        // the default accumulator (what deserialize() fills) is the same refusing one
        heldout::measure::table_accumulator<cost_weighted_error> d;
        CHECK_THROWS_AS(d.add(y, f), input_error);
        const auto back = heldout::deserialize<decltype(d)>(heldout::serialize(d));
        CHECK_THROWS_AS((void)back.value(), input_error);
    }
}
