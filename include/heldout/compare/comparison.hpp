// heldout/compare/comparison.hpp — is model A better than model B, by how much, and how sure
// are we: paired comparisons that respect how the numbers were obtained.
//
//   // two aggregators filled on the same splits (same plan, same seed, same rows)
//   heldout::comparison c = heldout::compare(agg_a, agg_b, heldout::measure::mse{});
//   std::cout << c << '\n';
//   // MSE A - B = 0.0123 [-0.0021, 0.0267] 95%, corrected t (Bouckaert-Frank) 1.71, df 99,
//   //   p = 0.0903; 100 splits, n=5000
//   auto f = heldout::compare(agg_a, agg_b, mse, heldout::paired::five_by_two_f);   // 5x2cv plan
//   auto m = heldout::compare(error, truth, labels_a, labels_b, heldout::paired::mcnemar_exact);
//   auto d = heldout::compare(heldout::measure::auc{}, truth, scores_a, scores_b);   // DeLong
//   auto b = heldout::compare(m, truth, f_a, f_b, heldout::paired::bootstrap_bca(5000, 7));
//   auto all = heldout::compare_all_pairs(models, mse);   // names from aggregator::set_model
//   // (or pass them: compare_all_pairs(models, mse, paired::automatic, 0.95, {"ridge", "tree", "knn"}))
//   heldout::write_csv(std::cout, all);   // Holm-adjusted p-values in adjusted_p_value
//
// `difference` is always measure(A) - measure(B): with an error (lower is better) a positive
// difference favours B. A measure with an ideal value (direction::toward_ideal: the
// calibration slope, ideal 1) is compared by its distance from the ideal instead:
// difference = |A - ideal| - |B - ideal| (measure::distance_from_ideal, computed from the
// kept predictions), so a positive difference again favours B; the notes give both values. Methods, by their published
// names (heldout::paired):
//   corrected_t          several splits without replacement: corrected resampled t on the
//                        per-split differences, variance factor 1/J + n_test/n_train (Nadeau &
//                        Bengio 2003 for subsampling; Bouckaert & Frank 2004 for r x k-fold, where
//                        n_test/n_train = 1/(k-1)); n_train, n_test are the mean recorded sizes.
//                        The default for repeated splits.
//   naive_t              the paired t over splits, for contrast only: known to reject far too often
//   five_by_two_t        the 10 splits of heldout::five_by_two: Dietterich's (1998) 5x2cv t
//   five_by_two_f        the same splits: Alpaydin's (1999) combined 5x2cv F (no interval)
//   mcnemar_exact, mcnemar_mid_p, mcnemar_chi_squared, mcnemar_corrected
//                        one test set, a 0/1 measure (classification error, accuracy): McNemar's
//                        test (see mcnemar.hpp; no interval). mid-p is the one-split default.
//   delong               one test set, AUC: the paired DeLong test (DeLong et al. 1988)
//   bootstrap_percentile, bootstrap_bca
//                        one test set, any measure: the paired bootstrap (both models scored on
//                        the same resamples; estimate/bootstrap.hpp). The p-value is the
//                        two-sided Monte-Carlo p of the same replicates,
//                        min(1, 2 (1 + min(#{d* <= 0}, #{d* >= 0})) / (B + 1)) (Davison & Hinkley
//                        1997, section 4.2), never 0; se is the replicates' standard deviation.
//   automatic            several splits -> corrected_t; one split: a 0/1 label measure ->
//                        mcnemar_mid_p, AUC -> delong, anything else -> bootstrap_percentile.
// compare(agg_a, agg_b, ...) refuses aggregators whose splits differ (input_error naming the
// first mismatching split), one-test-set methods on several splits, and split methods on one
// test set. Splits on which the measure is undefined for either model are left out of the
// split methods (noted), except for 5x2cv, which needs all ten. From aggregators, McNemar
// and the bootstrap read the per-row losses of a tracked pointwise measure; DeLong and the
// bootstrap of a non-pointwise measure need the predictions: use the compare(measure, truth,
// prediction_a, prediction_b, ...) form on the test set.
// Several models: compare_all_pairs and compare_to_reference run the pairwise comparisons
// and Holm-adjust their p-values (holm.hpp) into adjusted_p_value.
#pragma once

#include <heldout/compare/five_by_two.hpp>
#include <heldout/compare/holm.hpp>
#include <heldout/compare/mcnemar.hpp>
#include <heldout/compare/paired.hpp>
#include <heldout/estimate/aggregator.hpp>
#include <heldout/estimate/bootstrap.hpp>
#include <heldout/estimate/corrected_t.hpp>
#include <heldout/estimate/delong.hpp>
#include <heldout/estimate/estimate.hpp>
#include <heldout/measure/distance_from_ideal.hpp>
#include <heldout/measure/mean_loss.hpp>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <initializer_list>
#include <optional>
#include <ostream>
#include <span>
#include <string>
#include <string_view>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// The comparison of two models on one measure: measure(A) - measure(B) with its uncertainty.
struct comparison {
    std::string measure;       ///< the measure's name()
    std::string model_a = "A"; ///< names used in printing and export
    std::string model_b = "B";
    double difference = 0;         ///< measure(A) - measure(B) (mean over splits for split methods)
    std::optional<double> se{};    ///< standard error behind the interval (absent: McNemar, 5x2cv F)
    std::optional<double> lower{}; ///< interval of the difference (absent where the method has none)
    std::optional<double> upper{};
    double statistic = 0;                     ///< t, z, F, chi-squared, or McNemar's b (see method)
    std::optional<double> df{};               ///< degrees of freedom (absent for normal / exact tests)
    std::optional<double> df2{};              ///< second degrees of freedom of an F statistic
    double p_value = 1;                       ///< two-sided (F and chi-squared: upper tail)
    std::optional<double> adjusted_p_value{}; ///< Holm-adjusted, within compare_all_pairs / compare_to_reference
    double level = 0.95;
    paired::method_id method = paired::method_id::automatic; ///< the method actually computed
    std::string method_label;                                ///< its printed name
    std::size_t splits = 0;                                  ///< splits behind the comparison
    std::size_t observations = 0;                            ///< test rows behind it (repeats counted each time)
    std::vector<std::string> notes;                          ///< how it was made
    std::vector<std::string> cautions;                       ///< why the test may not keep its level

    bool has_interval() const noexcept { return lower.has_value() && upper.has_value(); }
};

/// One line: "MSE A - B = 0.0123 [-0.0021, 0.0267] 95%, corrected t (...) 1.71, df 99, p = 0.0903; 100 splits, n=5000".
inline std::ostream& operator<<(std::ostream& os, const comparison& c) {
    using detail::readable_number;
    std::string s = c.measure + " " + c.model_a + " - " + c.model_b + " = " + readable_number(c.difference);
    if (c.has_interval())
        s += " [" + readable_number(*c.lower) + ", " + readable_number(*c.upper) + "] " + detail::level_text(c.level);
    s += ", " + c.method_label + " " + readable_number(c.statistic);
    if (c.df) {
        s += ", df " + readable_number(*c.df);
        if (c.df2)
            s += " and " + readable_number(*c.df2);
    }
    s += ", p = " + readable_number(c.p_value);
    if (c.adjusted_p_value)
        s += " (Holm " + readable_number(*c.adjusted_p_value) + ")";
    s += "; " + std::to_string(c.splits) + (c.splits == 1 ? " split" : " splits") +
         ", n=" + std::to_string(c.observations);
    for (const auto& k : c.cautions)
        s += "; caution: " + k;
    return os << s;
}

namespace detail::cmp {

inline void write_comparison_json(json_writer& w, const comparison& c) {
    w.begin_object();
    w.member("measure", c.measure);
    w.member("model_a", c.model_a);
    w.member("model_b", c.model_b);
    w.member("method", paired::id_text(c.method));
    w.member("method_label", c.method_label);
    w.member("level", c.level);
    w.member("difference", c.difference);
    w.member("se", c.se);
    w.member("lower", c.lower);
    w.member("upper", c.upper);
    w.member("statistic", c.statistic);
    w.member("df", c.df);
    w.member("df2", c.df2);
    w.member("p_value", c.p_value);
    w.member("adjusted_p_value", c.adjusted_p_value);
    w.member("splits", static_cast<std::uint64_t>(c.splits));
    w.member("observations", static_cast<std::uint64_t>(c.observations));
    w.key("notes").begin_array();
    for (const auto& n : c.notes)
        w.value(n);
    w.end_array();
    w.key("cautions").begin_array();
    for (const auto& k : c.cautions)
        w.value(k);
    w.end_array();
    w.end_object();
}

} // namespace detail::cmp

/// The comparison as one JSON object (shortest round-trip numbers, absent values null).
inline std::string to_json(const comparison& c) {
    detail::json_writer w;
    detail::cmp::write_comparison_json(w, c);
    return w.str();
}

/// A JSON array of comparisons.
inline void write_json(std::ostream& os, std::span<const comparison> cs) {
    detail::json_writer w;
    w.begin_array();
    for (const auto& c : cs)
        detail::cmp::write_comparison_json(w, c);
    w.end_array();
    os << w.str() << '\n';
}

/// The CSV header written by write_csv for comparisons.
inline constexpr std::string_view comparison_csv_header =
    "measure,model_a,model_b,method,level,difference,se,lower,upper,statistic,df,df2,p_value,adjusted_p_value,"
    "splits,observations,notes,cautions";

/// CSV with a header line and one row per comparison (RFC 4180 quoting, round-trip numbers).
inline void write_csv(std::ostream& os, std::span<const comparison> cs) {
    os << comparison_csv_header << '\n';
    for (const auto& c : cs) {
        std::string notes, cautions;
        for (const auto& n : c.notes)
            notes += (notes.empty() ? "" : "; ") + n;
        for (const auto& k : c.cautions)
            cautions += (cautions.empty() ? "" : "; ") + k;
        os << detail::csv_field(c.measure) << ',' << detail::csv_field(c.model_a) << ',' << detail::csv_field(c.model_b)
           << ',' << paired::id_text(c.method) << ',' << detail::number_text(c.level) << ','
           << detail::number_text(c.difference) << ',' << detail::csv_number(c.se) << ',' << detail::csv_number(c.lower)
           << ',' << detail::csv_number(c.upper) << ',' << detail::number_text(c.statistic) << ','
           << detail::csv_number(c.df) << ',' << detail::csv_number(c.df2) << ',' << detail::number_text(c.p_value)
           << ',' << detail::csv_number(c.adjusted_p_value) << ',' << c.splits << ',' << c.observations << ','
           << detail::csv_field(notes) << ',' << detail::csv_field(cautions) << '\n';
    }
}

namespace detail::cmp {

inline constexpr std::string_view who = "heldout::compare";

/// The loss "value(y, f) = f": mean_loss of it over per-row values is their mean, so the
/// paired bootstrap of a measure with per-row values runs on the recorded values.
struct row_value {
    static constexpr std::string_view name = "per-row value";
    double value(double, double f) const noexcept { return f; }
};

inline mcnemar mcnemar_variant(paired::method_id id) {
    switch (id) {
    case paired::method_id::mcnemar_exact:
        return mcnemar::exact;
    case paired::method_id::mcnemar_chi_squared:
        return mcnemar::chi_squared;
    case paired::method_id::mcnemar_corrected:
        return mcnemar::corrected;
    default:
        return mcnemar::mid_p;
    }
}

/// Two aggregators describe the same splits: same count, and per split the same index,
/// repeat, fold, sizes and test rows. The first difference is named.
inline void check_same_splits(const aggregator& a, const aggregator& b) {
    if (a.empty())
        fail(who, "agg_a", "no splits recorded");
    if (a.size() != b.size())
        fail(who, "agg_b",
             std::to_string(b.size()) + " splits recorded, agg_a has " + std::to_string(a.size()) +
                 ": the models must be evaluated on the same splits");
    for (std::size_t i = 0; i < a.size(); ++i) {
        const auto& x = a.splits()[i];
        const auto& y = b.splits()[i];
        const std::string where = "split " + std::to_string(i) + " (repeat " + std::to_string(x.repeat) + ", fold " +
                                  std::to_string(x.fold) + ") differs from agg_a's: ";
        if (x.index != y.index || x.repeat != y.repeat || x.fold != y.fold)
            fail(who, "agg_b",
                 where + "it is split " + std::to_string(y.index) + " (repeat " + std::to_string(y.repeat) + ", fold " +
                     std::to_string(y.fold) + ") of its plan");
        if (x.train_size != y.train_size)
            fail(who, "agg_b",
                 where + "train size " + std::to_string(y.train_size) + " vs " + std::to_string(x.train_size));
        if (x.test_size != y.test_size)
            fail(who, "agg_b",
                 where + "test size " + std::to_string(y.test_size) + " vs " + std::to_string(x.test_size));
        const auto ra = a.test_rows(i), rb = b.test_rows(i);
        for (std::size_t j = 0; j < ra.size(); ++j)
            if (ra[j] != rb[j])
                fail(who, "agg_b",
                     where + "test row " + std::to_string(rb[j]) + " vs " + std::to_string(ra[j]) + " at position " +
                         std::to_string(j));
    }
}

/// Two-sided Monte-Carlo p-value of "difference = 0" from bootstrap replicates (never 0).
inline double bootstrap_p_value(std::span<const double> reps) {
    std::size_t le = 0, ge = 0;
    for (double x : reps) {
        le += x <= 0 ? 1 : 0;
        ge += x >= 0 ? 1 : 0;
    }
    const double B = static_cast<double>(reps.size());
    return std::min(1.0, 2.0 * (1.0 + static_cast<double>(std::min(le, ge))) / (B + 1.0));
}

/// Fills c from paired bootstrap replicates of the difference (theta = difference on all rows).
template <class = void>
void bootstrap_fill(comparison& c, paired::method_id id, double theta, bootstrap_replicate_set& set,
                    std::span<const double> jackknife_difference, std::size_t replicates, std::uint64_t seed,
                    double level) {
    if (set.values.size() < 2)
        fail_undefined(who, std::to_string(set.undefined) + " of " + std::to_string(replicates) +
                                " bootstrap replicates are undefined; fewer than 2 remain");
    const bootstrap_result r = id == paired::method_id::bootstrap_bca
                                   ? bca_interval(theta, set.values, jackknife_difference, level)
                                   : percentile_interval(theta, set.values, level);
    c.difference = theta;
    c.se = sd_of(set.values);
    c.lower = r.lower;
    c.upper = r.upper;
    c.statistic = theta / *c.se;
    c.p_value = bootstrap_p_value(set.values);
    std::string note = std::to_string(set.values.size()) + " paired replicates, seed " + std::to_string(seed) +
                       "; statistic = difference / se; p-value from the replicates (Davison & Hinkley 1997)";
    if (id == paired::method_id::bootstrap_bca)
        note += "; z0 " + note_number(r.z0) + ", acceleration " + note_number(r.acceleration);
    c.notes.push_back(note);
    if (set.undefined > 0)
        c.notes.push_back(std::to_string(set.undefined) + " of " + std::to_string(replicates) +
                          " replicates undefined and left out");
}

/// McNemar fields from the two discordant counts.
template <class = void>
void mcnemar_fill(comparison& c, paired::method_id id, std::uint64_t only_a, std::uint64_t only_b) {
    const auto r = mcnemar_test(only_a, only_b, mcnemar_variant(id));
    c.statistic = r.statistic;
    c.p_value = r.p_value;
    if (id == paired::method_id::mcnemar_chi_squared || id == paired::method_id::mcnemar_corrected)
        c.df = 1.0;
    c.notes.push_back("A right and B wrong on " + std::to_string(only_a) + " rows, A wrong and B right on " +
                      std::to_string(only_b) +
                      (only_a + only_b == 0 ? " (no discordant rows: p = 1, statistic 0 by convention)" : ""));
}

/// The split methods: corrected t, naive t, 5x2cv t and F over the per-split differences.
template <class = void>
void split_methods(comparison& c, paired::method_id id, std::span<const split_record> recs, const track_base& ta,
                   const track_base& tb, double level) {
    std::vector<double> d;
    double train_sum = 0, test_sum = 0;
    std::size_t left_out = 0, max_fold = 0;
    for (std::size_t i = 0; i < recs.size(); ++i) {
        max_fold = std::max(max_fold, recs[i].fold);
        if (!ta.values[i] || !tb.values[i]) {
            ++left_out;
            continue;
        }
        d.push_back(*ta.values[i] - *tb.values[i]);
        train_sum += static_cast<double>(recs[i].train_size);
        test_sum += static_cast<double>(recs[i].test_size);
        c.observations += recs[i].test_size;
    }
    c.splits = d.size();
    if (left_out > 0)
        c.notes.push_back(std::to_string(left_out) + " of " + count_text(recs.size(), "split") +
                          " left out: the measure is undefined there for A or B");
    const std::string mname = method_text(id);
    if (id == paired::method_id::five_by_two_t || id == paired::method_id::five_by_two_f) {
        if (left_out > 0)
            fail_undefined(who, mname + " needs all 10 splits, and the measure is undefined on " +
                                    count_text(left_out, "split"));
        const auto r = five_by_two_test(d, level);
        c.difference = r.mean_difference;
        if (id == paired::method_id::five_by_two_t) {
            c.se = r.se;
            c.lower = r.lower;
            c.upper = r.upper;
            c.statistic = r.t_statistic;
            c.df = 5.0;
            c.p_value = r.t_p_value;
            c.notes.push_back("difference is the mean of the 10 fold differences; t uses the first, " +
                              note_number(r.first_difference) +
                              ", and the interval (which inverts the t test) is centred on it");
        } else {
            c.statistic = r.f_statistic;
            c.df = 10.0;
            c.df2 = 5.0;
            c.p_value = r.f_p_value;
            c.notes.push_back("difference is the mean of the 10 fold differences; the combined F test has no "
                              "interval");
        }
        return;
    }
    if (d.size() < 2)
        fail_undefined(who, mname + " needs two or more splits where the measure is defined for both");
    c.difference = mean_of(d);
    resampled_t_result r;
    if (id == paired::method_id::corrected_t) {
        const double n_train = train_sum / static_cast<double>(d.size());
        const double n_test = test_sum / static_cast<double>(d.size());
        r = corrected_resampled_t(d, n_train, n_test, level);
        const bool kfold = max_fold > 0;
        c.method_label += kfold ? " (Bouckaert-Frank)" : " (Nadeau-Bengio)";
        c.notes.push_back(std::string(kfold ? "repeated k-fold form (Bouckaert & Frank 2004)"
                                            : "subsampling form (Nadeau & Bengio 2003)") +
                          ": variance factor 1/J + n_test/n_train with n_train " + note_number(n_train) + ", n_test " +
                          note_number(n_test) + " (mean recorded sizes)");
    } else {
        r = naive_resampled_t(d, level);
        c.notes.push_back("the naive paired t treats overlapping splits as independent and is known to reject "
                          "far too often (Dietterich 1998; Nadeau & Bengio 2003): use paired::corrected_t");
        c.cautions.push_back("naive paired t over overlapping splits: known to reject a true null far more often "
                             "than its level (docs/compare.md, coverage study); for contrast only");
    }
    c.se = r.se;
    c.lower = r.lower;
    c.upper = r.upper;
    c.statistic = r.statistic;
    c.df = r.df;
    c.p_value = r.p_value;
}

template <class M>
comparison compare_by_distance(const aggregator& agg_a, const aggregator& agg_b, const M& m, paired::method method,
                               double level);

} // namespace detail::cmp

/// Compares models A and B evaluated on the same splits (see the header comment).
template <outer_measure M>
comparison compare(const aggregator& agg_a, const aggregator& agg_b, const M& m,
                   paired::method method = paired::automatic, double level = 0.95) {
    using namespace detail::cmp;
    using detail::aggregator_access;
    static_assert(check_measure<M>());
    if constexpr (has_ideal_v<M>)
        return compare_by_distance(agg_a, agg_b, m, method, level);
    detail::check_level(who, level);
    check_same_splits(agg_a, agg_b);
    const auto& ta = aggregator_access::track(agg_a, m, who);
    const auto& tb = aggregator_access::track(agg_b, m, who);
    const auto& recs = agg_a.splits();

    comparison c;
    c.measure = ta.name;
    c.level = level;
    if (!agg_a.model().empty()) // named models (aggregator::set_model) name A and B
        c.model_a = agg_a.model();
    if (!agg_b.model().empty())
        c.model_b = agg_b.model();
    record_shape rs = agg_a.method_shape();
    rs.kept_predictions = agg_a.keeps_predictions() && agg_b.keeps_predictions();
    measure_facts f = detail::facts_of(ta);
    const measure_facts fb = detail::facts_of(tb);
    f.zero_one_losses = f.zero_one_losses && fb.zero_one_losses;
    f.weighted_add = f.weighted_add && fb.weighted_add;
    const paired::method_id id = detail::resolve_method(method.id, rs, f, c.measure, who);
    c.method = id;
    c.method_label = std::string(paired::label(id));

    if (rs.splits > 1) {
        split_methods(c, id, recs, ta, tb, level);
        return c;
    }

    // One test set.
    c.splits = 1;
    c.observations = recs[0].test_size;
    if (!ta.values[0] || !tb.values[0])
        detail::fail_undefined(who, "measure " + c.measure + " is undefined on the test set for model " +
                                        (ta.values[0] ? "B: " + tb.reasons[0] : "A: " + ta.reasons[0]));
    c.difference = *ta.values[0] - *tb.values[0];
    const std::size_t n = recs[0].test_size;
    switch (id) {
    case paired::method_id::mcnemar_exact:
    case paired::method_id::mcnemar_mid_p:
    case paired::method_id::mcnemar_chi_squared:
    case paired::method_id::mcnemar_corrected: {
        std::uint64_t only_a = 0, only_b = 0;
        // A row is right when its 0/1 value is the better one: 0 for an error, 1 for accuracy.
        const double right = M::better == direction::lower_is_better ? 0.0 : 1.0;
        for (std::size_t i = 0; i < n; ++i) {
            const bool ra = ta.losses[i] == right, rb = tb.losses[i] == right;
            only_a += ra && !rb ? 1 : 0;
            only_b += rb && !ra ? 1 : 0;
        }
        mcnemar_fill(c, id, only_a, only_b);
        return c;
    }
    case paired::method_id::delong: {
        const auto* t = aggregator_access::truth(agg_a);
        const auto ca = ta.components(*t, *aggregator_access::predictions(agg_a), 0, n);
        const auto cb = tb.components(*aggregator_access::truth(agg_b), *aggregator_access::predictions(agg_b), 0, n);
        const auto r = delong_components_test(ca, cb, level);
        c.difference = r.difference;
        c.se = r.se;
        c.lower = r.lower;
        c.upper = r.upper;
        c.statistic = r.z;
        c.p_value = r.p_value;
        c.notes.push_back("z statistic, normal reference; Wald interval of the difference");
        if (auto k = detail::small_class_caution(ca.cases.size(), ca.controls.size(), "the paired DeLong test"))
            c.cautions.push_back(*k);
        return c;
    }
    case paired::method_id::bootstrap_percentile:
    case paired::method_id::bootstrap_bca: {
        const bootstrap_options o{method.replicates, method.seed, level};
        bootstrap_replicate_set set;
        std::vector<double> jack;
        const bool bca = id == paired::method_id::bootstrap_bca;
        if (f.row_losses) {
            const measure::mean_loss<row_value> mean_of_rows{};
            const std::vector<double> zeros(n, 0.0);
            const std::span<const double> la(ta.losses), lb(tb.losses);
            set = paired_bootstrap_replicates(mean_of_rows, zeros, la, lb, o);
            if (bca) {
                jack = jackknife_values(mean_of_rows, zeros, la);
                const auto jb = jackknife_values(mean_of_rows, zeros, lb);
                for (std::size_t i = 0; i < jack.size(); ++i)
                    jack[i] -= jb[i];
            }
            bootstrap_fill(c, id, c.difference, set, jack, method.replicates, method.seed, level);
            c.notes.push_back("resampled the per-row values of the " + detail::count_text(n, "test row"));
        } else {
            set = ta.paired_replicates(*aggregator_access::truth(agg_a), *aggregator_access::predictions(agg_a),
                                       *aggregator_access::predictions(agg_b), 0, n, o, bca ? &jack : nullptr);
            bootstrap_fill(c, id, c.difference, set, jack, method.replicates, method.seed, level);
            c.notes.push_back("resampled the " + detail::count_text(n, "test row") +
                              " with both models' predictions fixed");
        }
        return c;
    }
    default:
        break;
    }
    HELDOUT_ASSERT(false);
    return c;
}

/// Compares models A and B on one test set from their predictions (see the header comment):
/// the same as recording the test set as one split for each model and comparing those.
template <outer_measure M, class T, class P>
comparison compare(const M& m, const T& truth, const P& prediction_a, const P& prediction_b,
                   paired::method method = paired::automatic, double level = 0.95) {
    detail::check_prediction_type<M, P>();
    static_assert(scores<M, T, P>, "heldout: this measure cannot score this truth/prediction pairing");
    const std::size_t n = detail::input_rows(truth);
    std::vector<std::size_t> rows(n);
    for (std::size_t i = 0; i < n; ++i)
        rows[i] = i;
    const split s{{}, rows, 0, 0, 0, {}, split_design::random};
    aggregator a(m), b(m);
    a.record(s, truth, prediction_a);
    b.record(s, truth, prediction_b);
    return compare(a, b, m, method, level);
}

namespace detail::cmp {

/// A measure with an ideal value: the comparison of |A - ideal| and |B - ideal|, tracked on
/// copies of the aggregators from their kept predictions.
template <class M>
comparison compare_by_distance(const aggregator& agg_a, const aggregator& agg_b, const M& m, paired::method method,
                               double level) {
    const measure::distance_from_ideal<M> d{m};
    for (const aggregator* g : {&agg_a, &agg_b})
        if (!g->keeps_predictions())
            fail(who, g == &agg_a ? "agg_a" : "agg_b",
                 "measure " + m.name() + " has an ideal value (" + number_text(ideal_value_v<M>) +
                     ") and is compared by the distance from it, computed from the kept predictions; this "
                     "aggregator did not keep them");
    aggregator a = agg_a, b = agg_b;
    if (!a.tracks(d))
        a.add_measure(d);
    if (!b.tracks(d))
        b.add_measure(d);
    comparison c = compare(a, b, d, method, level);
    std::string values;
    const auto va = agg_a.split_values(m), vb = agg_b.split_values(m);
    if (va.size() == 1 && va[0].value && vb[0].value)
        values = ": A " + number_text(*va[0].value) + ", B " + number_text(*vb[0].value);
    c.notes.insert(c.notes.begin(), "measure " + m.name() + " has the ideal value " + number_text(ideal_value_v<M>) +
                                        "; difference = |A - ideal| - |B - ideal|, positive favours B" + values);
    return c;
}

/// The names of k models: those given; else the aggregators' own (aggregator::set_model)
/// when every one is named; else "model 1", "model 2", ...
inline std::vector<std::string> model_names(std::span<const aggregator> models, std::vector<std::string> names) {
    const std::size_t k = models.size();
    const bool all_named =
        std::all_of(models.begin(), models.end(), [](const aggregator& a) { return !a.model().empty(); });
    if (names.empty())
        for (std::size_t j = 0; j < k; ++j)
            names.push_back(all_named ? models[j].model() : "model " + std::to_string(j + 1));
    if (names.size() != k)
        fail(who, "names", std::to_string(names.size()) + " names for " + std::to_string(k) + " models");
    return names;
}

inline void holm_fill(std::vector<comparison>& cs) {
    std::vector<double> p;
    for (const auto& c : cs)
        p.push_back(c.p_value);
    const auto adj = holm_adjust(p);
    for (std::size_t i = 0; i < cs.size(); ++i) {
        cs[i].adjusted_p_value = adj[i];
        cs[i].notes.push_back("Holm adjustment over " + std::to_string(cs.size()) + " comparisons");
    }
}

} // namespace detail::cmp

/// Every pair (i < j) of models evaluated on the same splits, Holm-adjusted; model i is A.
template <outer_measure M>
std::vector<comparison> compare_all_pairs(std::span<const aggregator> models, const M& m,
                                          paired::method method = paired::automatic, double level = 0.95,
                                          std::vector<std::string> names = {}) {
    if (models.size() < 2)
        detail::fail(detail::cmp::who, "models", "need at least 2 models, got " + std::to_string(models.size()));
    names = detail::cmp::model_names(models, std::move(names));
    std::vector<comparison> out;
    for (std::size_t i = 0; i < models.size(); ++i)
        for (std::size_t j = i + 1; j < models.size(); ++j) {
            out.push_back(compare(models[i], models[j], m, method, level));
            out.back().model_a = names[i];
            out.back().model_b = names[j];
        }
    detail::cmp::holm_fill(out);
    return out;
}

/// Every model against the reference model (A = the other model, B = the reference), Holm-adjusted.
template <outer_measure M>
std::vector<comparison> compare_to_reference(std::span<const aggregator> models, std::size_t reference, const M& m,
                                             paired::method method = paired::automatic, double level = 0.95,
                                             std::vector<std::string> names = {}) {
    if (models.size() < 2)
        detail::fail(detail::cmp::who, "models", "need at least 2 models, got " + std::to_string(models.size()));
    if (reference >= models.size())
        detail::fail(detail::cmp::who, "reference",
                     "index " + std::to_string(reference) + " outside the " + std::to_string(models.size()) +
                         " models");
    names = detail::cmp::model_names(models, std::move(names));
    std::vector<comparison> out;
    for (std::size_t i = 0; i < models.size(); ++i) {
        if (i == reference)
            continue;
        out.push_back(compare(models[i], models[reference], m, method, level));
        out.back().model_a = names[i];
        out.back().model_b = names[reference];
    }
    detail::cmp::holm_fill(out);
    return out;
}

HELDOUT_NAMESPACE_END
