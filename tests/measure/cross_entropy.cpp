// Tests for heldout/measure/cross_entropy.hpp: binary and multiclass log loss, clipping policy.
#include <heldout/measure/cross_entropy.hpp>

#include "support/reference.hpp"

#include <Eigen/Dense>
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <limits>
#include <random>
#include <span>
#include <string>
#include <vector>

using heldout::evaluate;
using heldout::measure::cross_entropy;
using heldout::measure::multiclass_cross_entropy;

TEST_SUITE("measure/cross_entropy") {
    TEST_CASE_TEMPLATE("worked example: -(log 0.8 + log(1 - 0.4) + log 0.5) / 3", T, float, double) {
        const std::vector<std::uint8_t> y{1, 0, 1};
        const std::vector<T> p{T(0.8), T(0.4), T(0.5)};
        const double expect = -(std::log(0.8) + std::log(0.6) + std::log(0.5)) / 3; // 0.4627...
        CHECK(evaluate(cross_entropy{}, y, p) == doctest::Approx(expect).epsilon(sizeof(T) == 4 ? 1e-7 : 1e-15));
        const std::vector<T> w{0, 1, 3}; // -(log 0.6 + 3 log 0.5) / 4
        CHECK(evaluate(cross_entropy{}, y, p, w) ==
              doctest::Approx(-(std::log(0.6) + 3 * std::log(0.5)) / 4).epsilon(sizeof(T) == 4 ? 1e-7 : 1e-15));
    }
    TEST_CASE("Naeini et al. 2015; Guo et al. 2017, worked by hand values, and the clipping policy") {
        // worked by hand (its author's implementation of Good 1952): log loss
        // 0.401078567212; with p[6] = 0: eps = 1e-15 gives 3.76820614993, eps = 1e-7 gives 1.92613807554.
        const std::vector<int> y{1, 0, 1, 1, 0, 0, 1, 0, 1, 0};
        std::vector<double> p{0.92, 0.18, 0.75, 0.62, 0.52, 0.08, 0.42, 0.03, 0.99, 0.71};
        CHECK(evaluate(cross_entropy{}, y, p) == doctest::Approx(0.401078567212).epsilon(1e-12));
        p[6] = 0.0;
        CHECK(evaluate(cross_entropy{1e-15}, y, p) == doctest::Approx(3.76820614993).epsilon(1e-11));
        CHECK(evaluate(cross_entropy{1e-7}, y, p) == doctest::Approx(1.92613807554).epsilon(1e-11));
        // The default (eps = 0) does not clip: the row's loss would be infinite, so the
        // measure refuses it, naming the row and the clipping option (no +inf, no NaN).
        const std::string refused =
            "measure cross-entropy: argument 'prediction': probability 0 leaves the true class probability 0, so its "
            "log loss is infinite; to score hard 0/1 probabilities knowingly, set the clipping option eps (common "
            "practice: eps = 1e-15, clipping to [1e-15, 1 - 1e-15]) at index 6";
        CHECK_THROWS_WITH_AS(evaluate(cross_entropy{}, y, p), refused.c_str(), heldout::input_error);
        // ...whatever the row's weight: a hard 0 needs an explicit eps, as a bad probability
        // needs fixing even in a row of weight 0.
        std::vector<double> w(10, 1.0);
        w[6] = 0;
        CHECK_THROWS_WITH_AS(evaluate(cross_entropy{}, y, p, w), refused.c_str(), heldout::input_error);
        // Multiclass: worked by hand: 0.766200336056.
        Eigen::Matrix<double, 6, 3, Eigen::RowMajor> P;
        P << .7, .2, .1, .1, .8, .1, .3, .3, .4, .25, .5, .25, .6, .1, .3, .2, .2, .6;
        const std::vector<int> lab{0, 1, 2, 0, 2, 2};
        CHECK(evaluate(multiclass_cross_entropy{}, lab, P) == doctest::Approx(0.766200336056).epsilon(1e-12));
        P(1, 1) = 0.0;
        P(1, 0) = 0.9;
        CHECK_THROWS_WITH_AS(evaluate(multiclass_cross_entropy{}, lab, P),
                             "measure multiclass cross-entropy: argument 'prediction': probability 0 leaves the true "
                             "class probability 0, so its log loss is infinite; to score hard 0/1 probabilities "
                             "knowingly, set the clipping option eps (common practice: eps = 1e-15, clipping to "
                             "[1e-15, 1 - 1e-15]) at index 1",
                             heldout::input_error);
        CHECK(std::isfinite(evaluate(multiclass_cross_entropy{1e-12}, lab, P)));
    }
    TEST_CASE_TEMPLATE("a hard 0 or 1 for the wrong class: input_error at its row, from every route", T, float,
                       double) {
        // p = 1 with truth 0 leaves probability 0 to the true class as well. The row sits past
        // the first chunk of the pass (512 rows), after rows that are fine.
        std::vector<std::uint8_t> y(1500);
        std::vector<T> p(1500);
        for (std::size_t i = 0; i < y.size(); ++i) {
            y[i] = static_cast<std::uint8_t>(i % 3 == 0);
            p[i] = y[i] ? T(0.75) : T(0.25);
        }
        p[1234] = T(1); // 1234 = 3 * 411 + 1: truth 0, so p = 1 is the wrong hard value
        const auto msg = [](const std::string& who, const std::string& prob, std::size_t i) {
            return who + ": argument 'prediction': probability " + prob +
                   " leaves the true class probability 0, so its log loss is infinite; to score hard 0/1 "
                   "probabilities knowingly, set the clipping option eps (common practice: eps = 1e-15, clipping "
                   "to [1e-15, 1 - 1e-15]) at index " +
                   std::to_string(i);
        };
        CHECK_THROWS_WITH_AS(evaluate(cross_entropy{}, y, p), msg("measure cross-entropy", "1", 1234).c_str(),
                             heldout::input_error);
        auto acc = cross_entropy{}.accumulator();
        acc.add(std::span(y).first(1000), std::span(p).first(1000));
        const double before = acc.value();
        CHECK_THROWS_WITH_AS(acc.add(y, p), msg("measure cross-entropy", "1", 1234).c_str(), heldout::input_error);
        CHECK(acc.value() == before); // the refused batch left the state as it was
        for (auto which : {heldout::detail::isa::baseline, heldout::detail::isa::avx2, heldout::detail::isa::avx512})
            if (heldout::detail::isa_supported(which))
                CHECK_THROWS_WITH_AS(acc.add_with(which, y, p), msg("measure cross-entropy", "1", 1234).c_str(),
                                     heldout::input_error);
        CHECK_THROWS_WITH_AS(acc.add_one(1, 0.0), msg("measure cross-entropy", "0", 0).c_str(), heldout::input_error);
        CHECK_THROWS_WITH_AS(acc.add_one(0, 1.0, 2.0), msg("measure cross-entropy", "1", 0).c_str(),
                             heldout::input_error);
        CHECK(acc.value() == before);
        // Clipped, the same rows are scored: the hard 1 (truth 0) becomes the double 1 - 1e-15,
        // which costs -log(1 - (1 - 1e-15)) = 34.43 (1 - 1e-15 is not exact in binary).
        y.resize(3);
        p.resize(3);
        p[1] = T(1); // truth 0
        const double clipped = evaluate(cross_entropy{1e-15}, y, p);
        const double hard = -std::log1p(-(1.0 - 1e-15));
        CHECK(clipped == doctest::Approx((-std::log(0.75) + hard - std::log(0.75)) / 3).epsilon(1e-6));
        // Right-class hard values are fine without eps: log 1 = 0.
        p[1] = T(0);
        CHECK(evaluate(cross_entropy{}, y, p) == doctest::Approx(-2 * std::log(0.75) / 3).epsilon(1e-6));
    }
    TEST_CASE("live reference: scipy.special.xlogy / xlog1py with numpy.average and numpy.clip") {
        heldout_test::reference_table ref("ref_cross_entropy");
        for (int c = 0; c < 5; ++c) {
            const std::string k = "case" + std::to_string(c) + ".";
            const auto y = ref.get_as<std::uint8_t>(k + "truth");
            const auto p = ref.get(k + "prediction"), w = ref.get(k + "weights");
            CHECK(heldout_test::close(evaluate(cross_entropy{}, y, p), ref.scalar(k + "ce")));
            CHECK(heldout_test::close(evaluate(cross_entropy{}, y, p, w), ref.scalar(k + "wce")));
            const auto q = ref.get(k + "edge_prediction"); // exact 0 and 1, clipped at 1e-7
            CHECK(heldout_test::close(evaluate(cross_entropy{1e-7}, y, q), ref.scalar(k + "ce_eps")));
            CHECK(heldout_test::close(evaluate(cross_entropy{1e-7}, y, q, w), ref.scalar(k + "wce_eps")));
            const auto lab = ref.get_as<int>(k + "labels");
            const auto rows = ref.get(k + "rows");
            const auto kk = static_cast<std::size_t>(ref.scalar(k + "k"));
            CHECK(heldout_test::close(evaluate(multiclass_cross_entropy{}, lab, heldout::rows(rows, kk)),
                                      ref.scalar(k + "multi")));
            CHECK(heldout_test::close(evaluate(multiclass_cross_entropy{}, lab, heldout::rows(rows, kk), w),
                                      ref.scalar(k + "wmulti")));
        }
    }
    TEST_CASE("float probabilities: the log in float (< 1 float ulp), the sum in double") {
        std::mt19937_64 g(5);
        std::uniform_real_distribution<float> u(0.0f, 1.0f);
        std::vector<float> pf(100000);
        std::vector<std::uint8_t> y(pf.size());
        for (std::size_t i = 0; i < pf.size(); ++i) {
            pf[i] = u(g);
            y[i] = static_cast<std::uint8_t>(g() & 1);
        }
        const std::vector<double> pd(pf.begin(), pf.end()); // the same values in double
        CHECK(evaluate(cross_entropy{}, y, pf) == doctest::Approx(evaluate(cross_entropy{}, y, pd)).epsilon(2e-7));
    }
    TEST_CASE("tails: log(1 - p) keeps log1p's accuracy for tiny p") {
        const std::vector<int> y{0, 1};
        const std::vector<double> p{1e-12, 1 - 1e-9};
        const double expect = -(std::log1p(-1e-12) + std::log(1 - 1e-9)) / 2;
        CHECK(evaluate(cross_entropy{}, y, p) == doctest::Approx(expect).epsilon(1e-15));
    }
    TEST_CASE("merge of two halves equals the whole; clones agree bit for bit") {
        heldout_test::reference_table ref("ref_cross_entropy");
        const auto y = ref.get_as<int>("case3.truth");
        const auto p = ref.get("case3.prediction");
        const std::size_t h = y.size() / 2;
        auto a = cross_entropy{}.accumulator(), b = a, c = a, d = a;
        a.add(std::span(y).first(h), std::span(p).first(h));
        b.add(std::span(y).subspan(h), std::span(p).subspan(h));
        a.merge(b);
        CHECK(heldout_test::close(a.value(), ref.scalar("case3.ce"), 1e-13));
        using heldout::detail::isa;
        c.add_with(isa::baseline, y, p);
        std::vector<float> pf(p.begin(), p.end());
        auto cf = cross_entropy{}.accumulator();
        cf.add_with(isa::baseline, y, pf);
        for (isa clone : {isa::avx2, isa::avx512}) {
            if (!heldout::detail::isa_supported(clone))
                continue;
            const std::string clone_name = heldout::detail::isa_name(clone);
            CAPTURE(clone_name);
            auto dc = cross_entropy{}.accumulator(), df = dc;
            dc.add_with(clone, y, p);
            df.add_with(clone, y, pf);
            if (clone == isa::avx2) { // the same arithmetic, more rows an instruction
                CHECK(c.value() == dc.value());
                CHECK(cf.value() == df.value());
            } else { // fused multiply-adds: a few ulp per term
                CHECK(heldout_test::close(dc.value(), c.value(), 1e-15, 0));
                CHECK(heldout_test::close(df.value(), cf.value(), 1e-15, 0));
            }
        }
        d.add_with(heldout::detail::best_isa(), y, p);
        CHECK(heldout_test::close(d.value(), c.value(), 1e-15, 0));
        auto e = cross_entropy{}.accumulator();
        for (std::size_t i = 0; i < y.size(); ++i)
            e.add_one(y[i], p[i]);
        CHECK(heldout_test::close(e.value(), ref.scalar("case3.ce"), 1e-13));
    }
    TEST_CASE("every clone's term is within 1 ulp of -log p or -log(1 - p) (long double log / log1p)") {
        // One row per pass, so the pass's value is the term itself; float predictions are
        // compared with the reference rounded to float (their log is taken in float).
        using heldout::detail::isa;
        std::mt19937_64 g(77);
        auto term_error = [](isa clone, int y, auto p) {
            using P = decltype(p);
            const long double pl = static_cast<long double>(p);
            const long double ref = y ? -std::log(pl) : -std::log1p(-pl);
            const std::vector<int> yy{y};
            const std::vector<P> pp{p};
            auto a = cross_entropy{}.accumulator();
            a.add_with(clone, yy, pp);
            const P r = static_cast<P>(ref);
            const P ulp = std::nextafter(r, 2 * r + 1) - r;
            return static_cast<double>(std::fabs(static_cast<long double>(a.value()) - ref) / ulp);
        };
        for (isa clone : {isa::baseline, isa::avx2, isa::avx512}) {
            if (!heldout::detail::isa_supported(clone))
                continue;
            double worst = 0, worst_f = 0;
            for (int i = 0; i < 4000; ++i) {
                // p spread over many binades, both labels
                const double p =
                    std::ldexp(0.5 + 0.5 * static_cast<double>(g() >> 11) * 0x1p-53, -static_cast<int>(g() % 40));
                const int y = static_cast<int>(g() % 2);
                worst = std::max(worst, term_error(clone, y, p));
                worst_f = std::max(worst_f, term_error(clone, y, static_cast<float>(p)));
            }
            const std::string clone_name = heldout::detail::isa_name(clone);
            CAPTURE(clone_name);
            MESSAGE(clone_name << ": max term error " << worst << " ulp (double), " << worst_f << " ulp (float)");
            CHECK(worst < 1.0);
            CHECK(worst_f < 1.0);
        }
    }
    TEST_CASE("bad input names the measure, the argument and the index; bad eps") {
        std::vector<int> y(600, 0);
        std::vector<float> p(600, 0.25f);
        p[599] = -0.25f;
        CHECK_THROWS_WITH_AS(evaluate(cross_entropy{}, y, p),
                             "measure cross-entropy: argument 'prediction': probability -0.25 outside [0, 1] at index "
                             "599",
                             heldout::input_error);
        p[599] = 0.25f;
        y[3] = 5;
        CHECK_THROWS_WITH_AS(evaluate(cross_entropy{}, y, p),
                             "measure cross-entropy: argument 'truth': label 5 outside the classes 0..1 at index 3",
                             heldout::input_error);
        y[3] = 1;
        const std::vector<float> shorter(599, 0.5f);
        CHECK_THROWS_WITH_AS(evaluate(cross_entropy{}, y, shorter),
                             "measure cross-entropy: argument 'prediction': size 599 differs from size 600 of 'truth'",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS((void)cross_entropy{0.5}.accumulator(),
                             "measure cross-entropy: argument 'eps': clipping must lie in [0, 0.5), got 0.5",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS((void)cross_entropy{}.accumulator().value(),
                             "measure cross-entropy: undefined: no observations", heldout::undefined_error);
        const std::vector<double> rows{0.5, 0.5, 1.2, -0.2};
        const std::vector<int> lab{0, 1};
        CHECK_THROWS_WITH_AS(evaluate(multiclass_cross_entropy{}, lab, heldout::rows(rows, 2)),
                             "measure multiclass cross-entropy: argument 'prediction': probability 1.2 outside [0, 1] "
                             "in column 0 at index 1",
                             heldout::input_error);
        CHECK_THROWS_AS((void)multiclass_cross_entropy{}.accumulator().value(), heldout::undefined_error);
    }
}
