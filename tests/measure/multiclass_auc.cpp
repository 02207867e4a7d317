// Tests for heldout/measure/multiclass_auc.hpp: Hand & Till M and prevalence-weighted one-vs-rest.
#include <heldout/measure/multiclass_auc.hpp>

#include "support/reference.hpp"

#include <Eigen/Dense>
#include <doctest/doctest.h>

#include <algorithm>
#include <span>
#include <vector>

using heldout::evaluate;
using heldout::measure::multiclass_auc;
using heldout::measure::multiclass_auc_method;

namespace {
// Hand & Till 2001, worked by hand rows (p(0), p(1), p(2)) -> class.
const std::vector<double> flat{.6, .3, .1, .5, .2, .3, .2, .5, .3, .3, .4, .3, .1, .7, .2,
                               .2, .3, .5, .4, .2, .4, .1, .2, .7, .3, .3, .4, .2, .6, .2};
const std::vector<int> cls{0, 0, 0, 1, 1, 1, 2, 2, 2, 2};
} // namespace

TEST_SUITE("measure/multiclass_auc") {
    TEST_CASE("Hand & Till 2001, worked by hand: M = 331/432 (Hand & Till 2001), prevalence-weighted one-vs-rest "
              "0.763095238095") {
        // worked by hand, checked with scipy rankdata/mannwhitneyu.
        const auto p = heldout::rows(flat, 3);
        CHECK(evaluate(multiclass_auc{}, cls, p) == doctest::Approx(331.0 / 432).epsilon(1e-14));
        CHECK(evaluate(multiclass_auc{multiclass_auc_method::one_vs_rest_weighted}, cls, p) ==
              doctest::Approx(0.763095238095).epsilon(1e-11));
        // The same rows as an Eigen matrix.
        Eigen::Matrix<double, 10, 3, Eigen::RowMajor> m =
            Eigen::Map<const Eigen::Matrix<double, 10, 3, Eigen::RowMajor>>(flat.data());
        Eigen::MatrixXd mc = m; // column-major: any strides are read through rows_of
        CHECK(evaluate(multiclass_auc{}, cls, mc) == doctest::Approx(331.0 / 432).epsilon(1e-14));
        // Two classes: M is the plain AUC of column 1 for class 1 (which equals column 0's for class 0
        // here since the rows sum to 1).
        const std::vector<double> two{.8, .2, .4, .6, .3, .7, .6, .4};
        const std::vector<int> y2{0, 1, 1, 0};
        // class 1 vs 0 on p(1): positives .6, .7; negatives .2, .4 -> AUC 1; then M = 1
        CHECK(evaluate(multiclass_auc{}, y2, heldout::rows(two, 2)) == 1.0);
    }
    TEST_CASE("numpy/scipy.stats.rankdata reference of the paper's formula (ref_multiclass_auc.py), with weights") {
        heldout_test::reference_table ref("ref_multiclass_auc");
        const int cases = static_cast<int>(ref.scalar("cases"));
        for (int c = 0; c < cases; ++c) {
            const std::string k = "case" + std::to_string(c) + ".";
            CAPTURE(c);
            const auto nc = static_cast<std::size_t>(ref.scalar(k + "classes"));
            const auto y = ref.get_as<int>(k + "truth");
            const auto p = ref.get(k + "probabilities");
            const auto w = ref.get(k + "weights");
            const auto rows = heldout::rows(p, nc);
            const multiclass_auc ovr{multiclass_auc_method::one_vs_rest_weighted};
            CHECK(heldout_test::close(evaluate(multiclass_auc{}, y, rows), ref.scalar(k + "hand_till")));
            CHECK(heldout_test::close(evaluate(ovr, y, rows), ref.scalar(k + "ovr")));
            CHECK(heldout_test::close(evaluate(multiclass_auc{}, y, rows, w), ref.scalar(k + "whand_till")));
            CHECK(heldout_test::close(evaluate(ovr, y, rows, w), ref.scalar(k + "wovr")));
            // merge of two shards = whole
            auto a = multiclass_auc{}.accumulator();
            auto b = multiclass_auc{}.accumulator();
            const std::size_t h = y.size() / 2;
            a.add(std::span(y).first(h), heldout::rows(std::span(p).first(h * nc), nc));
            b.add(std::span(y).subspan(h), heldout::rows(std::span(p).subspan(h * nc), nc));
            a.merge(b);
            CHECK(heldout_test::close(a.value(), ref.scalar(k + "hand_till")));
        }
    }
    TEST_CASE("merge into a fresh accumulator, weighted or not, and self-merge keep every row") {
        const auto p = heldout::rows(flat, 3);
        const std::vector<double> w{2, 1, 1, 3, 1, 1, 1, 2, 1, 1};
        std::vector<int> y2(cls);
        y2.insert(y2.end(), cls.begin(), cls.end());
        std::vector<double> p2(flat), w2(w);
        p2.insert(p2.end(), flat.begin(), flat.end());
        w2.insert(w2.end(), w.begin(), w.end());
        std::vector<double> w1(w);
        std::fill(w1.begin(), w1.begin() + 5, 1.0);
        for (const auto& m : {multiclass_auc{}, multiclass_auc{multiclass_auc_method::one_vs_rest_weighted}}) {
            const double plain = evaluate(m, cls, p), weighted = evaluate(m, cls, p, w);
            CHECK(weighted != plain); // the weights matter here, so a dropped weight shows
            auto full = m.accumulator();
            full.add(cls, p);
            auto fresh = m.accumulator();
            fresh.merge(full);
            CHECK(fresh.count() == cls.size());
            CHECK(fresh.value() == plain);
            auto wfull = m.accumulator();
            wfull.add(cls, p, w);
            auto wfresh = m.accumulator();
            wfresh.merge(wfull);
            CHECK(wfresh.count() == cls.size());
            CHECK(wfresh.value() == weighted);
            wfresh.merge(m.accumulator()); // an empty other changes nothing
            CHECK(wfresh.value() == weighted);
            // unweighted first half, weighted second half, both into a fresh accumulator
            auto h1 = m.accumulator();
            auto h2 = m.accumulator();
            h1.add(std::span(cls).first(5), heldout::rows(std::span(flat).first(15), 3));
            h2.add(std::span(cls).subspan(5), heldout::rows(std::span(flat).subspan(15), 3), std::span(w).subspan(5));
            auto mixed = m.accumulator();
            mixed.merge(h1);
            mixed.merge(h2);
            CHECK(mixed.value() == evaluate(m, cls, p, w1));
            // self-merge = every row twice
            full.merge(full);
            CHECK(full.count() == 2 * cls.size());
            CHECK(full.value() == evaluate(m, y2, heldout::rows(p2, 3)));
            wfull.merge(wfull);
            CHECK(wfull.count() == 2 * cls.size());
            CHECK(wfull.value() == evaluate(m, y2, heldout::rows(p2, 3), w2));
        }
    }
    TEST_CASE("absent class is undefined and named; bad rows") {
        const std::vector<int> no2{0, 0, 1, 1};
        const std::vector<double> p{.6, .3, .1, .5, .2, .3, .2, .5, .3, .3, .4, .3};
        CHECK_THROWS_WITH_AS(evaluate(multiclass_auc{}, no2, heldout::rows(p, 3)),
                             "measure multiclass AUC: undefined: class 2 is absent; every class needs observations",
                             heldout::undefined_error);
        const std::vector<int> bad{0, 3, 1, 2};
        CHECK_THROWS_WITH_AS(evaluate(multiclass_auc{}, bad, heldout::rows(p, 3)),
                             "measure multiclass AUC: argument 'truth': label 3 outside the classes 0..2 at index 1",
                             heldout::input_error);
        std::vector<double> q(p);
        q[4] = 0.9; // row 1 sums to 1.7
        const std::vector<int> ok{0, 1, 2, 2};
        CHECK_THROWS_AS(evaluate(multiclass_auc{}, ok, heldout::rows(q, 3)), heldout::input_error);
        auto a = multiclass_auc{}.accumulator();
        a.add(ok, heldout::rows(p, 3));
        const std::vector<double> p2{.5, .5};
        const std::vector<int> y1{0};
        CHECK_THROWS_WITH_AS(a.add(y1, heldout::rows(p2, 2)),
                             "measure multiclass AUC: argument 'probabilities': has 2 columns, earlier batches 3",
                             heldout::input_error);
    }
}
