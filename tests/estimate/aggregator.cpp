// Tests for heldout/estimate/aggregator.hpp: recording splits, per-split values, pooled
// values, undefined splits, the method dispatch and its refusals.
#include <heldout/estimate/aggregator.hpp>

#include "support/reference.hpp"

#include <heldout/loss/absolute.hpp>
#include <heldout/measure/auc.hpp>
#include <heldout/measure/classification_error.hpp>

#include <Eigen/Dense>
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <numeric>
#include <sstream>
#include <string>
#include <vector>

using heldout::aggregator;
using heldout::split;
namespace ci = heldout::ci;
namespace measure = heldout::measure;

namespace {

// A user's measure that is not a mean of per-row values: the largest absolute error, which
// the test declares undefined on a test set whose truth is constant (so a reason is kept).
struct max_error_accumulator {
    double worst = 0;
    double first = 0;
    bool varied = false;
    std::size_t n = 0;
    template <heldout::value_range T, heldout::real_range P>
    void add(const T& truth, const P& prediction) {
        auto t = heldout::values_of(truth);
        auto p = heldout::values_of(prediction);
        for (std::size_t i = 0; i < t.size(); ++i) {
            const double y = static_cast<double>(t[i]);
            if (n == 0 && i == 0)
                first = y;
            varied = varied || y != first;
            worst = std::max(worst, std::abs(y - static_cast<double>(p[i])));
        }
        n += t.size();
    }
    // Frequency weights (the bootstrap's counts): rows of weight 0 are left out.
    template <heldout::value_range T, heldout::real_range P, heldout::weight_range W>
    void add(const T& truth, const P& prediction, const W& weights) {
        auto t = heldout::values_of(truth);
        auto p = heldout::values_of(prediction);
        auto w = heldout::values_of(weights);
        for (std::size_t i = 0; i < t.size(); ++i)
            if (w[i] > 0)
                add(t.subspan(i, 1), p.subspan(i, 1));
    }
    void merge(const max_error_accumulator& o) {
        worst = std::max(worst, o.worst);
        varied = varied || o.varied || (n > 0 && o.n > 0 && o.first != first);
        if (n == 0)
            first = o.first;
        n += o.n;
    }
    double value() const {
        if (!varied)
            heldout::detail::fail_undefined("measure max error", "constant truth in the test set");
        return worst;
    }
    void reset() { *this = {}; }
};
struct max_error {
    static constexpr heldout::direction better = heldout::direction::lower_is_better;
    static constexpr heldout::prediction_kind kind = heldout::prediction_kind::real;
    std::string name() const { return "max error"; }
    max_error_accumulator accumulator() const { return {}; }
};

// Hand-made splits over n rows: test = the given rows, train = the others.
struct hand_split {
    std::vector<std::size_t> train, test;
    std::vector<std::uint32_t> counts;
    split view(std::size_t index, std::size_t repeat = 0, std::size_t fold = 0) const {
        return {train, test, repeat, fold, index, counts};
    }
};
hand_split complement(std::size_t n, std::vector<std::size_t> test) {
    hand_split h;
    h.test = std::move(test);
    for (std::size_t i = 0; i < n; ++i)
        if (std::find(h.test.begin(), h.test.end(), i) == h.test.end())
            h.train.push_back(i);
    return h;
}
template <class T>
std::vector<T> gather(const std::vector<T>& v, std::span<const std::size_t> rows) {
    std::vector<T> out;
    for (auto r : rows)
        out.push_back(v[r]);
    return out;
}

} // namespace

TEST_SUITE("estimate/aggregator") {
    TEST_CASE("one test set: ci::t equals scipy.stats.t.interval on the per-row squared errors") {
        heldout_test::reference_table ref("ref_aggregator");
        const auto y = ref.get("one.truth");
        const auto f = ref.get("one.prediction");
        std::vector<std::size_t> rows(y.size());
        std::iota(rows.begin(), rows.end(), std::size_t{100}); // row numbers need not start at 0
        const split s{{}, rows, 0, 0, 0, {}};
        aggregator agg(measure::mse{});
        agg.record(s, y, f);
        for (const double lev : {0.95, 0.9}) {
            const std::string k = lev == 0.95 ? "one.L95" : "one.L90";
            const auto e = agg.estimate(measure::mse{}, ci::t, lev);
            CHECK(e.method == ci::method_id::t);
            CHECK(heldout_test::close(e.value, ref.scalar(k + ".mean"), 1e-13)); // numpy.mean
            CHECK(heldout_test::close(*e.se, ref.scalar(k + ".se"), 1e-12));     // numpy.var ddof=1
            // scipy.stats.t.interval; scipy 1.10.1 t.ppf is accurate to ~1e-9 only
            CHECK(heldout_test::close(*e.lower, ref.scalar(k + ".lower"), 1e-8));
            CHECK(heldout_test::close(*e.upper, ref.scalar(k + ".upper"), 1e-8));
            CHECK(e.splits == 1);
            CHECK(e.observations == y.size());
            CHECK(*e.pooled == e.value);
        }
        // ci::automatic on one test set with real losses is the t interval
        CHECK(agg.estimate(measure::mse{}).method == ci::method_id::t);
        // per-row losses keep their row numbers
        const auto l = agg.losses(measure::mse{}, 0);
        CHECK(l.rows[3] == 103);
        CHECK(l.losses[3] == (y[3] - f[3]) * (y[3] - f[3]));
    }

    TEST_CASE("one test set, 0/1 errors: Wilson, Clopper-Pearson, Agresti-Coull equal scipy binomtest") {
        heldout_test::reference_table ref("ref_aggregator");
        const auto yl = ref.get_as<int>("bin.truth");
        const auto fl = ref.get_as<int>("bin.prediction");
        std::vector<std::size_t> rows(yl.size());
        std::iota(rows.begin(), rows.end(), std::size_t{0});
        aggregator agg(measure::classification_error{}, measure::accuracy{});
        agg.record(split{{}, rows, 0, 0, 0, {}}, yl, fl);
        const double k = ref.scalar("bin.k"), n = static_cast<double>(yl.size());
        for (const double lev : {0.95, 0.8}) {
            const std::string key = lev == 0.95 ? "bin.L95" : "bin.L80";
            const auto w = agg.estimate(measure::classification_error{}, ci::wilson, lev);
            CHECK(w.value == doctest::Approx(k / n).epsilon(1e-15));
            // scipy.stats.binomtest(k, n).proportion_ci(method='wilson')
            CHECK(heldout_test::close(*w.lower, ref.get(key + ".wilson")[0], 1e-12));
            CHECK(heldout_test::close(*w.upper, ref.get(key + ".wilson")[1], 1e-12));
            CHECK(heldout_test::close(*w.se, std::sqrt(k / n * (1 - k / n) / n), 1e-14));
            const auto cp = agg.estimate(measure::classification_error{}, ci::clopper_pearson, lev);
            // scipy proportion_ci(method='exact') is found by root finding (~1e-12 absolute)
            CHECK(std::abs(*cp.lower - ref.get(key + ".exact")[0]) < 1e-10);
            CHECK(std::abs(*cp.upper - ref.get(key + ".exact")[1]) < 1e-10);
            const auto ac = agg.estimate(measure::classification_error{}, ci::agresti_coull, lev);
            // Agresti & Coull (1998) formula with scipy.stats.norm.ppf
            CHECK(heldout_test::close(*ac.lower, ref.get(key + ".ac")[0], 1e-12));
            CHECK(heldout_test::close(*ac.upper, ref.get(key + ".ac")[1], 1e-12));
            // accuracy has 0/1 per-row values too: its Wilson interval mirrors the error's
            const auto acc = agg.estimate(measure::accuracy{}, ci::wilson, lev);
            CHECK(acc.value == doctest::Approx(1 - k / n).epsilon(1e-15));
            CHECK(*acc.lower == doctest::Approx(1 - *w.upper).epsilon(1e-12));
        }
        CHECK(agg.estimate(measure::classification_error{}).method == ci::method_id::wilson); // the default
    }

    TEST_CASE("repeated splits: corrected t (default) and naive t equal the scipy formulas; pooled = numpy.mean") {
        heldout_test::reference_table ref("ref_aggregator");
        const auto y = ref.get("cv.truth");
        const auto f = ref.get("cv.prediction");
        const std::size_t J = 15;
        aggregator agg(measure::mse{});
        std::vector<hand_split> hs;
        for (std::size_t j = 0; j < J; ++j)
            hs.push_back(complement(y.size(), ref.get_as<std::size_t>("cv.split" + std::to_string(j) + ".test")));
        for (std::size_t j = 0; j < J; ++j)
            agg.record(hs[j].view(j, j), gather(y, hs[j].test), gather(f, hs[j].test));
        const auto vals = ref.get("cv.values");
        const auto sv = agg.split_values(measure::mse{});
        REQUIRE(sv.size() == J);
        for (std::size_t j = 0; j < J; ++j) {
            CHECK(heldout_test::close(*sv[j].value, vals[j], 1e-13)); // numpy.mean per split
            CHECK(sv[j].train_size == 90);
            CHECK(sv[j].test_size == 30);
        }
        for (const double lev : {0.95, 0.9}) {
            const std::string k = lev == 0.95 ? "cv.L95" : "cv.L90";
            const auto c = agg.estimate(measure::mse{}, ci::automatic, lev);
            CHECK(c.method == ci::method_id::corrected_t);
            CHECK(heldout_test::close(c.value, ref.scalar(k + ".mean"), 1e-13));
            // Nadeau & Bengio (2003) with scipy.stats.t.ppf (accurate to ~1e-9)
            CHECK(heldout_test::close(*c.se, ref.get(k + ".corrected")[0], 1e-12));
            CHECK(heldout_test::close(*c.lower, ref.get(k + ".corrected")[1], 1e-8));
            CHECK(heldout_test::close(*c.upper, ref.get(k + ".corrected")[2], 1e-8));
            const auto nt = agg.estimate(measure::mse{}, ci::naive_t, lev);
            CHECK(heldout_test::close(*nt.se, ref.get(k + ".naive")[0], 1e-12));
            CHECK(heldout_test::close(*nt.lower, ref.get(k + ".naive")[1], 1e-8));
            CHECK(heldout_test::close(*nt.upper, ref.get(k + ".naive")[2], 1e-8));
            CHECK(nt.method_label.find("undercovers") != std::string::npos);
            bool warned = false;
            for (const auto& note : nt.notes)
                warned = warned || note.find("known to undercover") != std::string::npos;
            CHECK(warned);
            CHECK(heldout_test::close(*c.pooled, ref.scalar("cv.pooled"), 1e-13)); // numpy.mean of all rows
            CHECK(c.splits == J);
            CHECK(c.observations == J * 30);
        }
    }

    TEST_CASE("refusals explain why a method does not fit what was run") {
        const std::vector<double> y{1, 2, 3, 4, 5, 6}, f{1.5, 2, 2.5, 4, 6, 6};
        const std::vector<int> yl{0, 1, 1, 0, 1, 0}, fl{0, 1, 0, 0, 1, 1};
        auto a = complement(6, {0, 1, 2}), b = complement(6, {3, 4, 5});
        aggregator cv(measure::classification_error{});
        cv.record(a.view(0, 0, 0), gather(yl, a.test), gather(fl, a.test));
        cv.record(b.view(1, 0, 1), gather(yl, b.test), gather(fl, b.test));
        CHECK_THROWS_WITH_AS(
            (void)cv.estimate(measure::classification_error{}, ci::wilson),
            "heldout::aggregator::estimate: argument 'method': ci::wilson (Wilson) does not apply to "
            "measure classification error: it needs one test set, and several splits were recorded "
            "(out-of-fold rows share fitted models and training rows, so they are not independent). Methods "
            "that apply here: ci::corrected_t (the default here), ci::naive_t",
            heldout::input_error);
        CHECK_THROWS_AS((void)cv.estimate(measure::classification_error{}, ci::t), heldout::input_error);
        CHECK_THROWS_AS((void)cv.estimate(measure::classification_error{}, ci::bca), heldout::input_error);
        CHECK_THROWS_WITH_AS(
            (void)cv.estimate(measure::classification_error{}, ci::bootstrap_632_plus),
            "heldout::aggregator::estimate: argument 'method': ci::bootstrap_632_plus (.632+ bootstrap) "
            "does not apply to measure classification error: it combines out-of-bag errors of bootstrap "
            "samples, and the splits are not bootstrap samples; it needs the apparent result "
            "(record_apparent: the model fit on all rows, scored on them). Methods that apply here: "
            "ci::corrected_t (the default here), ci::naive_t",
            heldout::input_error);

        aggregator one(measure::mse{}, max_error{});
        one.record(a.view(0), gather(y, a.test), gather(f, a.test));
        CHECK_THROWS_WITH_AS(
            (void)one.estimate(measure::mse{}, ci::corrected_t),
            "heldout::aggregator::estimate: argument 'method': ci::corrected_t (corrected t "
            "(Nadeau-Bengio)) does not apply to measure MSE: it works over several splits, and one test set "
            "was recorded. Methods that apply here: ci::t (the default here), ci::bootstrap_percentile, "
            "ci::bca",
            heldout::input_error);
        CHECK_THROWS_WITH_AS(
            (void)one.estimate(measure::mse{}, ci::wilson),
            "heldout::aggregator::estimate: argument 'method': ci::wilson (Wilson) does not apply to "
            "measure MSE: the per-row values are not all 0 or 1 (not an error rate or accuracy). Methods "
            "that apply here: ci::t (the default here), ci::bootstrap_percentile, ci::bca",
            heldout::input_error);
        CHECK_THROWS_WITH_AS(
            (void)one.estimate(max_error{}, ci::t),
            "heldout::aggregator::estimate: argument 'method': ci::t (Student t) does not apply to measure "
            "max error: the measure is not a mean of per-row values (it does not offer cap::row_losses). "
            "Methods that apply here: ci::bootstrap_percentile, ci::bca (the default here)",
            heldout::input_error);
        CHECK_THROWS_WITH_AS(
            (void)one.estimate(measure::mse{}, ci::delong),
            "heldout::aggregator::estimate: argument 'method': ci::delong (DeLong) does not apply to "
            "measure MSE: the measure has no DeLong components (it is not a two-sample U statistic like the "
            "ROC AUC). Methods that apply here: ci::t (the default here), ci::bootstrap_percentile, ci::bca",
            heldout::input_error);
        // a non-pointwise measure on one test set defaults to BCa
        aggregator six(max_error{});
        six.record(complement(6, {0, 1, 2, 3, 4, 5}).view(0), y, f);
        CHECK(six.estimate(max_error{}, ci::automatic).method == ci::method_id::bca);

        // without kept predictions, an untracked measure cannot be computed afterwards
        aggregator lean(measure::mse{});
        lean.keep_predictions(false);
        lean.record(a.view(0), gather(y, a.test), gather(f, a.test));
        CHECK(lean.estimate(measure::mse{}, ci::t).has_interval());
        CHECK_THROWS_WITH_AS((void)lean.estimate(heldout::measure::mean_loss<heldout::loss::absolute>{}),
                             "heldout::aggregator::estimate: argument 'measure': measure MAE is not tracked with these "
                             "parameters (tracked: MSE); add it with add_measure(m) before recording",
                             heldout::input_error);
        CHECK_THROWS_AS((void)lean.estimate(measure::mse{}, ci::bca), heldout::input_error);
    }

    TEST_CASE("bad records name the argument; a measure that cannot score the data is refused at record") {
        const std::vector<double> y{1, 2, 3}, f2{1, 2};
        const std::vector<std::size_t> test{0, 1, 2};
        aggregator agg(measure::mse{});
        CHECK_THROWS_WITH_AS(agg.record(split{{}, test, 0, 0, 0, {}}, y, f2),
                             "heldout::aggregator::record: argument 'predictions': size 2 differs from size 3 of "
                             "'split.test'",
                             heldout::input_error);
        const std::vector<double> bad{1, std::nan(""), 3};
        CHECK_THROWS_WITH_AS(agg.record(split{{}, test, 0, 0, 0, {}}, y, bad),
                             "measure MSE: argument 'prediction': not finite (nan) at index 1", heldout::input_error);
        CHECK(agg.size() == 0); // nothing recorded by a failed record
        aggregator labels(measure::classification_error{});
        const std::vector<int> yl{0, 1, 1};
        CHECK_THROWS_WITH_AS(
            labels.record(split{{}, test, 0, 0, 0, {}}, yl, y),
            "heldout::aggregator::record: argument 'predictions': measure classification error (needs class "
            "label predictions and class label truth) cannot score floating-point values against truth "
            "given as integral labels",
            heldout::input_error);
        agg.record(split{{}, test, 0, 0, 0, {}}, y, y);
        const std::vector<int> yi{1, 2, 3};
        CHECK_THROWS_WITH_AS(agg.record(split{{}, test, 0, 0, 1, {}}, yi, y),
                             "heldout::aggregator::record: argument 'truth': integral labels differ from the "
                             "floating-point values recorded before",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS((void)aggregator{}.estimate(measure::mse{}),
                             "heldout::aggregator::estimate: no splits recorded", heldout::input_error);
    }

    TEST_CASE("undefined splits are kept with their reason and noted; the estimate uses the others") {
        // Split 1 has constant truth: max error is undefined there (the test measure's rule).
        const std::vector<double> y{1, 2, 5, 5, 5, 3, 4, 1, 0}, f{1.5, 2, 3, 5, 6, 3, 4, 2, 0};
        aggregator agg(max_error{}, measure::mse{});
        std::vector<hand_split> hs{complement(9, {0, 1, 2}), complement(9, {3, 4}), complement(9, {5, 6, 7, 8})};
        for (std::size_t j = 0; j < hs.size(); ++j)
            agg.record(hs[j].view(j, 0, j), gather(y, hs[j].test), gather(f, hs[j].test));
        const auto e = agg.estimate(max_error{}, ci::naive_t);
        REQUIRE(e.per_split.size() == 3);
        CHECK(!e.per_split[1].value);
        CHECK(e.per_split[1].undefined_reason == "constant truth in the test set");
        CHECK(e.splits == 2);
        CHECK(e.observations == 7);
        CHECK(e.value == doctest::Approx((2.0 + 1.0) / 2)); // max |error| of splits 0 and 2
        REQUIRE(!e.notes.empty());
        CHECK(e.notes[0] == "1 of 3 splits undefined: constant truth in the test set");
        CHECK(*e.pooled == 2.0); // defined over all rows together
        // an untracked measure is refused by identity (not by printed name); once added it is
        // replayed from the kept predictions
        const heldout::measure::mean_loss<heldout::loss::absolute> mae_measure{};
        CHECK_THROWS_WITH_AS((void)agg.estimate(mae_measure, ci::naive_t),
                             "heldout::aggregator::estimate: argument 'measure': measure MAE is not tracked with "
                             "these parameters (tracked: max error, MSE); add it with add_measure(m) (it is "
                             "computed from the kept predictions)",
                             heldout::input_error);
        agg.add_measure(mae_measure);
        const auto mae = agg.estimate(mae_measure, ci::naive_t);
        CHECK(mae.splits == 3);

        // AUC with one class in a test set: undefined there, reason from the measure
        const std::vector<int> yl{1, 0, 1, 1, 1, 0, 1, 0, 0};
        const std::vector<double> sc{0.9, 0.2, 0.6, 0.8, 0.7, 0.4, 0.5, 0.6, 0.1};
        aggregator auc(measure::auc{});
        for (std::size_t j = 0; j < hs.size(); ++j)
            auc.record(hs[j].view(j, 0, j), gather(yl, hs[j].test), gather(sc, hs[j].test));
        const auto a = auc.estimate(measure::auc{}, ci::naive_t);
        CHECK(!a.per_split[1].value);
        CHECK(a.notes[0].rfind("1 of 3 splits undefined: ", 0) == 0);
        CHECK(a.splits == 2);
        // undefined everywhere: undefined_error
        aggregator none(max_error{});
        none.record(hs[1].view(0), gather(y, hs[1].test), gather(f, hs[1].test));
        CHECK_THROWS_WITH_AS((void)none.estimate(max_error{}),
                             "heldout::aggregator::estimate: undefined: measure max error is undefined on every split "
                             "(1 of 1 split undefined: constant truth in the test set)",
                             heldout::undefined_error);
    }

    TEST_CASE("one test set: BCa and percentile dispatch to the bootstrap functions with B and seed") {
        const std::vector<double> y{2.1, 3.4, 1.9, 5.6, 4.2, 3.3, 7.8, 2.8, 4.9, 3.0, 1.1, 6.2};
        const std::vector<double> f{2.0, 3.0, 2.5, 5.0, 4.0, 3.0, 6.0, 3.5, 4.0, 3.1, 1.8, 5.0};
        std::vector<std::size_t> rows(y.size());
        std::iota(rows.begin(), rows.end(), std::size_t{0});
        aggregator agg(measure::mse{});
        agg.record(split{{}, rows, 0, 0, 0, {}}, y, f);
        const auto b = agg.estimate(measure::mse{}, ci::bca(999, 11), 0.9);
        const auto direct = heldout::bootstrap_bca(measure::mse{}, y, f, {999, 11, 0.9});
        CHECK(*b.lower == direct.lower);
        CHECK(*b.upper == direct.upper);
        const auto p = agg.estimate(measure::mse{}, ci::bootstrap_percentile(500, 3));
        const auto pd = heldout::bootstrap_percentile(measure::mse{}, y, f, {500, 3, 0.95});
        CHECK(*p.lower == pd.lower);
        CHECK(*p.upper == pd.upper);
        // se = standard deviation of the same replicates
        const auto reps = heldout::bootstrap_replicates(measure::mse{}, y, f, {500, 3, 0.95});
        const auto mv = heldout::detail::two_pass_mean_variance(std::span<const double>(reps.values));
        CHECK(*p.se == doctest::Approx(std::sqrt(mv.variance)).epsilon(1e-14));
    }

    TEST_CASE("one test set, AUC: ci::delong is delong_auc on the recorded scores; 10 per class -> Newcombe default") {
        const std::vector<int> y{1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0};
        const std::vector<double> s{.90, .80, .80, .70, .65, .60, .55, .50, .40, .30,
                                    .70, .60, .45, .40, .35, .30, .20, .20, .10, .05};
        std::vector<std::size_t> rows(y.size());
        std::iota(rows.begin(), rows.end(), std::size_t{0});
        aggregator agg(measure::auc{});
        agg.record(split{{}, rows, 0, 0, 0, {}}, y, s);
        // 10 positives and 10 negatives: below delong_small_class, so the default is Newcombe's interval
        const auto auto_e = agg.estimate(measure::auc{});
        CHECK(auto_e.method == ci::method_id::newcombe);
        const auto nw = heldout::newcombe_auc_interval(y, s, 0.95);
        CHECK(*auto_e.lower == nw.lower);
        CHECK(*auto_e.upper == nw.upper);
        CHECK(auto_e.cautions.empty());
        const auto e = agg.estimate(measure::auc{}, ci::delong);
        CHECK(e.method == ci::method_id::delong);
        REQUIRE(e.cautions.size() == 1); // DeLong asked for by name: the small classes are named
        CHECK(e.cautions[0] == "only 10 positives (10 positive, 10 negative): the DeLong interval may cover less than "
                               "its level below 30 in a class (docs/intervals.md, coverage study)");
        CHECK(e.value == doctest::Approx(0.84).epsilon(1e-14));          // 21/25, DeLong et al. (1988) example data
        CHECK(*e.se == doctest::Approx(0.0899382504215).epsilon(1e-10)); // DeLong et al. 1988 (R)
        const auto d = heldout::delong_auc(y, s, 0.95);
        CHECK(*e.lower == d.lower);
        CHECK(*e.upper == d.upper);
        CHECK_THROWS_AS((void)agg.estimate(measure::auc{}, ci::t), heldout::input_error); // not pointwise
    }

    TEST_CASE(".632 and .632+ from hand-made bootstrap splits (Efron & Tibshirani 1997 formulas)") {
        // 10 rows, truth y and apparent predictions q of Efron & Tibshirani 1997, worked by hand: gamma = 0.48,
        // apparent error 0.2. Four bootstrap splits: rows 0-4 out of bag in splits 0 and 2,
        // rows 5-9 in splits 1 and 3. Rows 0-6 are wrong once in two, rows 7-9 never, so
        // Err(1) = 7 * 0.5 / 10 = 0.35.
        const std::vector<int> y{1, 1, 1, 0, 0, 0, 0, 0, 1, 0};
        const std::vector<int> q{1, 1, 0, 0, 0, 1, 0, 0, 1, 0};
        std::vector<std::uint32_t> c_low(10, 0), c_high(10, 0);
        for (std::size_t i = 0; i < 5; ++i) {
            c_low[i + 5] = 2; // rows 5..9 drawn: rows 0..4 out of bag
            c_high[i] = 2;
        }
        std::vector<std::size_t> first{0, 1, 2, 3, 4}, second{5, 6, 7, 8, 9};
        std::vector<std::size_t> draw_high{5, 5, 6, 6, 7, 7, 8, 8, 9, 9}, draw_low{0, 0, 1, 1, 2, 2, 3, 3, 4, 4};
        aggregator agg(measure::classification_error{});
        auto wrong_in = [&](std::span<const std::size_t> rows, std::vector<std::size_t> wrong) {
            std::vector<int> p;
            for (auto r : rows)
                p.push_back(std::find(wrong.begin(), wrong.end(), r) != wrong.end() ? 1 - y[r] : y[r]);
            return p;
        };
        agg.record(split{draw_high, first, 0, 0, 0, c_low}, gather(y, first), wrong_in(first, {0, 1, 2}));
        agg.record(split{draw_low, second, 1, 0, 1, c_high}, gather(y, second), wrong_in(second, {5, 6}));
        agg.record(split{draw_high, first, 2, 0, 2, c_low}, gather(y, first), wrong_in(first, {3, 4}));
        agg.record(split{draw_low, second, 3, 0, 3, c_high}, gather(y, second), gather(y, second));
        CHECK_THROWS_AS((void)agg.estimate(measure::classification_error{}), heldout::input_error); // no apparent yet
        agg.record_apparent(y, q);
        const auto p = agg.estimate(measure::classification_error{}); // default on bootstrap plans: .632+
        CHECK(p.method == ci::method_id::bootstrap_632_plus);
        CHECK(p.value ==
              doctest::Approx(0.318078291815).epsilon(1e-11)); // Efron & Tibshirani 1997, worked by hand [SELF]
        CHECK(!p.has_interval());
        const auto d = agg.estimate(measure::classification_error{}, ci::bootstrap_632);
        CHECK(d.value == doctest::Approx(0.2948).epsilon(1e-14)); // 0.368 * 0.2 + 0.632 * 0.35
        CHECK_THROWS_WITH_AS(
            (void)agg.estimate(measure::classification_error{}, ci::corrected_t),
            "heldout::aggregator::estimate: argument 'method': ci::corrected_t (corrected t "
            "(Nadeau-Bengio)) does not apply to measure classification error: it assumes random train/test "
            "splits drawn without replacement, and the splits are not (its variance correction has no "
            "justification there). Methods that apply here: ci::naive_t, ci::bootstrap_632, "
            "ci::bootstrap_632_plus (the default here)",
            heldout::input_error);
        CHECK_THROWS_AS((void)agg.estimate(measure::accuracy{}, ci::bootstrap_632), heldout::input_error);
        // squared error: gamma by the closed form, .632 by the same weights
        aggregator sq(measure::mse{});
        const std::vector<double> yr{1, 2, 3, 4, 5, 6, 7, 8, 9, 10};
        std::vector<double> fr(10);
        for (std::size_t i = 0; i < 10; ++i)
            fr[i] = yr[i] + (i % 2 ? 0.5 : -0.5);
        sq.record(split{draw_high, first, 0, 0, 0, c_low}, gather(yr, first), gather(fr, first));
        sq.record(split{draw_low, second, 1, 0, 1, c_high}, gather(yr, second), gather(fr, second));
        sq.record_apparent(yr, fr);
        const auto s632 = sq.estimate(measure::mse{}, ci::bootstrap_632);
        CHECK(s632.value == doctest::Approx(0.25).epsilon(1e-14)); // every loss is 0.25
    }

    TEST_CASE("class-probability rows and Eigen inputs are recorded as given") {
        Eigen::MatrixXd p(3, 2);
        p << 0.9, 0.1, 0.2, 0.8, 0.6, 0.4;
        const std::vector<int> y{0, 1, 1};
        std::vector<std::size_t> rows{0, 1, 2};
        aggregator agg;
        agg.record(split{{}, rows, 0, 0, 0, {}}, y, p);
        std::ostringstream os;
        agg.write_predictions_csv(os);
        CHECK(os.str() == "split,repeat,fold,row,truth,prediction_0,prediction_1\n0,0,0,0,0,0.9,0.1\n"
                          "0,0,0,1,1,0.2,0.8\n0,0,0,2,1,0.6,0.4\n");
        Eigen::VectorXd yv(3), fv(3);
        yv << 1, 2, 3;
        fv << 1, 2, 4;
        aggregator e(measure::mse{});
        e.record(split{{}, rows, 0, 0, 0, {}}, yv, fv);
        CHECK(e.estimate(measure::mse{}).value == doctest::Approx(1.0 / 3));
    }

    TEST_CASE("copies are independent; measures are identified by name") {
        const std::vector<double> y{1, 2, 3}, f{1, 2, 4};
        std::vector<std::size_t> rows{0, 1, 2};
        aggregator a(measure::mse{});
        a.record(split{{}, rows, 0, 0, 0, {}}, y, f);
        CHECK(a.predictions_of(0).values[2] == 4.0);
        CHECK(!a.truth_of(0).integral());
        aggregator b = a;
        b.record(split{{}, rows, 0, 0, 1, {}}, y, y);
        CHECK(a.size() == 1);
        CHECK(b.size() == 2);
        CHECK(b.measures() == std::vector<std::string>{"MSE"});
        CHECK_THROWS_AS(a.add_measure(measure::mse{}), heldout::input_error);
        // a measure added after recording is computed on the kept splits
        a.add_measure(heldout::measure::mean_loss<heldout::loss::absolute>{});
        CHECK(a.split_values(heldout::measure::mean_loss<heldout::loss::absolute>{})[0].value == 1.0 / 3);
        CHECK(a.losses(heldout::measure::mean_loss<heldout::loss::absolute>{}, 0).losses[2] == 1.0);
        CHECK_THROWS_WITH_AS(a.keep_predictions(false),
                             "heldout::aggregator::keep_predictions: argument 'keep': set before the first record (1 "
                             "splits recorded)",
                             heldout::input_error);
        const auto sh = b.shape();
        CHECK(sh.splits == 2);
        CHECK(sh.repeats == 1);
        CHECK(!sh.bootstrap);
    }
}
