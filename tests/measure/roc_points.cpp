// Tests for heldout/measure/roc_points.hpp: ROC and precision-recall points.
#include <heldout/measure/roc_points.hpp>

#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <limits>
#include <vector>

TEST_SUITE("measure/roc_points") {
    TEST_CASE("Davis & Goadrich 2006, worked by hand Check B: grouped PR points; ROC points with the (0,0) start") {
        const std::vector<int> y{1, 1, 0, 1, 0, 0, 1, 0, 0, 1};
        const std::vector<double> s{0.9, 0.8, 0.8, 0.7, 0.7, 0.7, 0.5, 0.4, 0.4, 0.2};
        // (R, P) points (1/5, 1), (2/5, 2/3), (3/5, 1/2), (4/5, 4/7), (4/5, 4/9), (1, 1/2) worked by hand
        const auto pr = heldout::pr_points(y, s);
        const double R[] = {0.2, 0.4, 0.6, 0.8, 0.8, 1.0};
        const double P[] = {1.0, 2.0 / 3, 0.5, 4.0 / 7, 4.0 / 9, 0.5};
        const double T[] = {0.9, 0.8, 0.7, 0.5, 0.4, 0.2};
        REQUIRE(pr.size() == 6);
        for (std::size_t i = 0; i < 6; ++i) {
            CHECK(pr[i].recall == doctest::Approx(R[i]).epsilon(1e-15));
            CHECK(pr[i].precision == doctest::Approx(P[i]).epsilon(1e-15));
            CHECK(pr[i].threshold == T[i]);
        }
        // ROC by hand: thresholds +inf, .9, .8, .7, .5, .4, .2; TP 0,1,2,3,4,4,5; FP 0,0,1,3,3,5,5.
        const auto roc = heldout::roc_points(y, s);
        REQUIRE(roc.size() == 7);
        CHECK(std::isinf(roc[0].threshold));
        const double tp[] = {0, 1, 2, 3, 4, 4, 5}, fp[] = {0, 0, 1, 3, 3, 5, 5};
        double area = 0;
        for (std::size_t i = 0; i < 7; ++i) {
            CHECK(roc[i].true_positive_rate == doctest::Approx(tp[i] / 5).epsilon(1e-15));
            CHECK(roc[i].false_positive_rate == doctest::Approx(fp[i] / 5).epsilon(1e-15));
            if (i)
                area += (roc[i].false_positive_rate - roc[i - 1].false_positive_rate) *
                        (roc[i].true_positive_rate + roc[i - 1].true_positive_rate) / 2;
        }
        CHECK(area == doctest::Approx(0.58).epsilon(1e-15)); // Davis & Goadrich 2006, worked by hand: ROC AUC = 0.58
    }
    TEST_CASE("scripted numpy reference (ref_roc_points.py): rates by broadcast comparison, weighted too") {
        heldout_test::reference_table ref("ref_roc_points");
        const int cases = static_cast<int>(ref.scalar("cases"));
        for (int c = 0; c < cases; ++c) {
            const std::string k = "case" + std::to_string(c) + ".";
            CAPTURE(c);
            const auto y = ref.get_as<int>(k + "truth");
            const auto s = ref.get_as<float>(k + "scores"); // float scores: thresholds come back as floats
            const auto sd = ref.get(k + "scores");
            const auto w = ref.get(k + "weights");
            const auto th = ref.get(k + "threshold");
            const auto tpr = ref.get(k + "tpr"), fpr = ref.get(k + "fpr");
            const auto wtpr = ref.get(k + "wtpr"), wfpr = ref.get(k + "wfpr");
            const auto r = heldout::roc_points(y, sd);
            const auto rw = heldout::roc_points(y, sd, w);
            const auto rf = heldout::roc_points(y, s);
            REQUIRE(r.size() == tpr.size());
            REQUIRE(rw.size() == tpr.size());
            REQUIRE(rf.size() == tpr.size());
            for (std::size_t i = 0; i < r.size(); ++i) {
                CHECK(heldout_test::close(r[i].true_positive_rate, tpr[i], 1e-14, 1e-300));
                CHECK(heldout_test::close(r[i].false_positive_rate, fpr[i], 1e-14, 1e-300));
                CHECK(heldout_test::close(rw[i].true_positive_rate, wtpr[i], 1e-14, 1e-300));
                CHECK(heldout_test::close(rw[i].false_positive_rate, wfpr[i], 1e-14, 1e-300));
                if (i) {
                    CHECK(r[i].threshold == th[i - 1]);
                    CHECK(rf[i].threshold == static_cast<double>(static_cast<float>(th[i - 1])));
                }
            }
        }
    }
    TEST_CASE("undefined cases and bad input") {
        const std::vector<int> none{0, 0};
        const std::vector<double> s{0.1, 0.2};
        CHECK_THROWS_WITH_AS(heldout::roc_points(none, s),
                             "heldout::roc_points: undefined: class 1 (positives) is absent; it needs both classes",
                             heldout::undefined_error);
        CHECK_THROWS_AS(heldout::pr_points(none, s), heldout::undefined_error);
        const std::vector<int> all{1, 1};
        CHECK(heldout::pr_points(all, s).size() == 2); // no negatives: precision 1 everywhere
        CHECK_THROWS_AS(heldout::roc_points(all, s), heldout::undefined_error);
        const std::vector<int> y{1, 0};
        const std::vector<double> w{1, -2};
        CHECK_THROWS_WITH_AS(heldout::roc_points(y, s, w),
                             "heldout::roc_points: argument 'weights': negative weight -2 at index 1",
                             heldout::input_error);
        const std::vector<double> inf{0.1, std::numeric_limits<double>::infinity()};
        CHECK_THROWS_WITH_AS(heldout::pr_points(y, inf),
                             "heldout::pr_points: argument 'scores': not finite (inf) at index 1",
                             heldout::input_error);
        // weighted: a leading score with zero weight gives no PR point
        const std::vector<int> y3{0, 1, 0};
        const std::vector<double> s3{0.9, 0.5, 0.1};
        const std::vector<double> w3{0, 1, 1};
        const auto pw = heldout::pr_points(y3, s3, w3);
        REQUIRE(pw.size() == 2);
        CHECK(pw[0].threshold == 0.5);
        CHECK(pw[0].precision == 1.0);
    }
}
