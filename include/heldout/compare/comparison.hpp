// heldout/compare/comparison.hpp — is model A better than model B, by how much, and how sure
// are we: paired comparisons that respect how the numbers were obtained.
//
//   // two aggregators filled on the same splits (same plan, same seed, same rows)
//   heldout::comparison c = heldout::compare(agg_a, agg_b, heldout::measure::mse{});
//   std::cout << c << '\n';
//   // MSE A - B = 0.0123 [-0.0021, 0.0267] 95%, corrected t (Bouckaert-Frank) 1.71, df 99, p = 0.0903; 100 splits,
//   n=5000 auto f = heldout::compare(agg_a, agg_b, mse, heldout::paired::five_by_two_f);    // 5x2cv plan auto m =
//   heldout::compare(error, truth, labels_a, labels_b, heldout::paired::mcnemar_exact); auto d =
//   heldout::compare(heldout::measure::auc{}, truth, scores_a, scores_b);  // DeLong auto b = heldout::compare(m,
//   truth, f_a, f_b, heldout::paired::bootstrap_bca(5000, 7)); auto all = heldout::compare_all_pairs(models, mse,
//   heldout::paired::automatic, 0.95, {"ridge", "tree", "knn"}); heldout::write_csv(std::cout, all);   // Holm-adjusted
//   p-values in adjusted_p_value
//
// `difference` is always measure(A) - measure(B): with an error (lower is better) a positive
// difference favours B. Methods, by their published names (heldout::paired):
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
#include <heldout/estimate/aggregator.hpp>
#include <heldout/estimate/bootstrap.hpp>
#include <heldout/estimate/corrected_t.hpp>
#include <heldout/estimate/delong.hpp>
#include <heldout/estimate/estimate.hpp>
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
namespace paired {

/// Which paired method.
enum class method_id : unsigned char {
    automatic,
    corrected_t,
    naive_t,
    five_by_two_t,
    five_by_two_f,
    mcnemar_exact,
    mcnemar_mid_p,
    mcnemar_chi_squared,
    mcnemar_corrected,
    delong,
    bootstrap_percentile,
    bootstrap_bca
};

/// A paired method and its settings (bootstrap replicates and seed; ignored by the others).
struct method {
    method_id id = method_id::automatic;
    std::size_t replicates = 2000;
    std::uint64_t seed = 0;

    /// The same bootstrap method with B replicates and a seed: `paired::bootstrap_bca(5000, 7)`.
    constexpr method operator()(std::size_t b, std::uint64_t s = 0) const {
        if (id != method_id::bootstrap_percentile && id != method_id::bootstrap_bca)
            detail::fail("heldout::paired::method", "replicates",
                         "only paired::bootstrap_percentile and paired::bootstrap_bca take replicates and a seed");
        if (b < 2)
            detail::fail("heldout::paired::method", "replicates", "at least 2 bootstrap replicates are needed");
        return method{id, b, s};
    }
    friend constexpr bool operator==(const method&, const method&) = default;
};

inline constexpr method automatic{method_id::automatic};
inline constexpr method corrected_t{method_id::corrected_t};
inline constexpr method naive_t{method_id::naive_t};
inline constexpr method five_by_two_t{method_id::five_by_two_t};
inline constexpr method five_by_two_f{method_id::five_by_two_f};
inline constexpr method mcnemar_exact{method_id::mcnemar_exact};
inline constexpr method mcnemar_mid_p{method_id::mcnemar_mid_p};
inline constexpr method mcnemar_chi_squared{method_id::mcnemar_chi_squared};
inline constexpr method mcnemar_corrected{method_id::mcnemar_corrected};
inline constexpr method delong{method_id::delong};
inline constexpr method bootstrap_percentile{method_id::bootstrap_percentile};
inline constexpr method bootstrap_bca{method_id::bootstrap_bca};

/// The identifier used in exports ("corrected_t").
constexpr std::string_view id_text(method_id m) noexcept {
    switch (m) {
    case method_id::automatic:
        return "automatic";
    case method_id::corrected_t:
        return "corrected_t";
    case method_id::naive_t:
        return "naive_t";
    case method_id::five_by_two_t:
        return "five_by_two_t";
    case method_id::five_by_two_f:
        return "five_by_two_f";
    case method_id::mcnemar_exact:
        return "mcnemar_exact";
    case method_id::mcnemar_mid_p:
        return "mcnemar_mid_p";
    case method_id::mcnemar_chi_squared:
        return "mcnemar_chi_squared";
    case method_id::mcnemar_corrected:
        return "mcnemar_corrected";
    case method_id::delong:
        return "delong";
    case method_id::bootstrap_percentile:
        return "bootstrap_percentile";
    case method_id::bootstrap_bca:
        return "bootstrap_bca";
    }
    return "?";
}

/// The printed name ("5x2cv t (Dietterich)").
constexpr std::string_view label(method_id m) noexcept {
    switch (m) {
    case method_id::automatic:
        return "automatic";
    case method_id::corrected_t:
        return "corrected t";
    case method_id::naive_t:
        return "naive paired t over splits (rejects too often)";
    case method_id::five_by_two_t:
        return "5x2cv t (Dietterich)";
    case method_id::five_by_two_f:
        return "5x2cv F (Alpaydin)";
    case method_id::mcnemar_exact:
        return "McNemar exact";
    case method_id::mcnemar_mid_p:
        return "McNemar mid-p";
    case method_id::mcnemar_chi_squared:
        return "McNemar chi-squared";
    case method_id::mcnemar_corrected:
        return "McNemar chi-squared, continuity-corrected";
    case method_id::delong:
        return "paired DeLong";
    case method_id::bootstrap_percentile:
        return "paired percentile bootstrap";
    case method_id::bootstrap_bca:
        return "paired BCa bootstrap";
    }
    return "?";
}

} // namespace paired

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
    std::vector<std::string> notes;                          ///< what the reader must know

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
    "splits,observations,notes";

/// CSV with a header line and one row per comparison (RFC 4180 quoting, round-trip numbers).
inline void write_csv(std::ostream& os, std::span<const comparison> cs) {
    os << comparison_csv_header << '\n';
    for (const auto& c : cs) {
        std::string notes;
        for (const auto& n : c.notes)
            notes += (notes.empty() ? "" : "; ") + n;
        os << detail::csv_field(c.measure) << ',' << detail::csv_field(c.model_a) << ',' << detail::csv_field(c.model_b)
           << ',' << paired::id_text(c.method) << ',' << detail::shortest_text(c.level) << ','
           << detail::shortest_text(c.difference) << ',' << detail::csv_number(c.se) << ','
           << detail::csv_number(c.lower) << ',' << detail::csv_number(c.upper) << ','
           << detail::shortest_text(c.statistic) << ',' << detail::csv_number(c.df) << ',' << detail::csv_number(c.df2)
           << ',' << detail::shortest_text(c.p_value) << ',' << detail::csv_number(c.adjusted_p_value) << ','
           << c.splits << ',' << c.observations << ',' << detail::csv_field(notes) << '\n';
    }
}

namespace detail::cmp {

inline constexpr std::string_view who = "heldout::compare";

/// The loss "value(y, f) = f": mean_loss of it over per-row losses is their mean, so the paired
/// bootstrap of a pointwise measure runs on the recorded per-row losses.
struct row_value {
    static constexpr std::string_view name = "per-row value";
    double value(double, double f) const noexcept { return f; }
};

inline bool is_mcnemar(paired::method_id id) {
    return id == paired::method_id::mcnemar_exact || id == paired::method_id::mcnemar_mid_p ||
           id == paired::method_id::mcnemar_chi_squared || id == paired::method_id::mcnemar_corrected;
}
inline bool is_bootstrap(paired::method_id id) {
    return id == paired::method_id::bootstrap_percentile || id == paired::method_id::bootstrap_bca;
}
inline bool is_split_method(paired::method_id id) {
    return id == paired::method_id::corrected_t || id == paired::method_id::naive_t ||
           id == paired::method_id::five_by_two_t || id == paired::method_id::five_by_two_f;
}
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

inline std::string method_name(paired::method_id id) { return "paired::" + std::string(paired::id_text(id)); }

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
inline void bootstrap_fill(comparison& c, paired::method_id id, double theta, bootstrap_replicate_set& set,
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
        note += "; z0 " + number_text(r.z0) + ", acceleration " + number_text(r.acceleration);
    c.notes.push_back(note);
    if (set.undefined > 0)
        c.notes.push_back(std::to_string(set.undefined) + " of " + std::to_string(replicates) +
                          " replicates undefined and left out");
}

/// McNemar fields from the two discordant counts.
inline void mcnemar_fill(comparison& c, paired::method_id id, std::uint64_t only_a, std::uint64_t only_b) {
    const auto r = mcnemar_test(only_a, only_b, mcnemar_variant(id));
    c.statistic = r.statistic;
    c.p_value = r.p_value;
    if (id == paired::method_id::mcnemar_chi_squared || id == paired::method_id::mcnemar_corrected)
        c.df = 1.0;
    c.notes.push_back("A right and B wrong on " + std::to_string(only_a) + " rows, A wrong and B right on " +
                      std::to_string(only_b) +
                      (only_a + only_b == 0 ? " (no discordant rows: p = 1, statistic 0 by convention)" : ""));
}

template <class M>
constexpr bool zero_one_label_measure() {
    return enable_pointwise_losses<M> && M::kind == prediction_kind::label;
}

template <class M>
paired::method_id resolve_one_set(paired::method_id id) {
    if (id != paired::method_id::automatic)
        return id;
    if constexpr (zero_one_label_measure<M>())
        return paired::method_id::mcnemar_mid_p;
    else if constexpr (enable_delong<M>)
        return paired::method_id::delong;
    else
        return paired::method_id::bootstrap_percentile;
}

} // namespace detail::cmp

/// Compares models A and B evaluated on the same splits (see the header comment).
template <outer_measure M>
comparison compare(const aggregator& agg_a, const aggregator& agg_b, const M& m,
                   paired::method method = paired::automatic, double level = 0.95) {
    using namespace detail::cmp;
    detail::check_level(who, level);
    check_same_splits(agg_a, agg_b);
    const auto va = agg_a.split_values(m);
    const auto vb = agg_b.split_values(m);
    const auto& recs = agg_a.splits();
    const bool bootstrap_plan = std::any_of(recs.begin(), recs.end(), [](const auto& s) { return s.bootstrap; });

    comparison c;
    c.measure = m.name();
    c.level = level;
    paired::method_id id = method.id;
    if (id == paired::method_id::automatic)
        id = recs.size() > 1 ? paired::method_id::corrected_t : resolve_one_set<M>(id);
    c.method = id;
    c.method_label = std::string(paired::label(id));
    const std::string mname = method_name(id);

    if (is_split_method(id)) {
        if (recs.size() < 2)
            detail::fail(who, "method",
                         mname + " works over several splits; one test set was recorded: use paired::mcnemar_mid_p "
                                 "(0/1 measures), paired::delong (AUC) or paired::bootstrap_percentile");
        if (bootstrap_plan)
            detail::fail(who, "method",
                         mname + " is for splits drawn without replacement (k-fold, repeated k-fold, subsampling, "
                                 "5x2cv); the recorded splits are bootstrap samples");
        std::vector<double> d;
        double train_sum = 0, test_sum = 0;
        std::size_t left_out = 0, max_fold = 0;
        for (std::size_t i = 0; i < recs.size(); ++i) {
            max_fold = std::max(max_fold, recs[i].fold);
            if (!va[i].value || !vb[i].value) {
                ++left_out;
                continue;
            }
            d.push_back(*va[i].value - *vb[i].value);
            train_sum += static_cast<double>(recs[i].train_size);
            test_sum += static_cast<double>(recs[i].test_size);
            c.observations += recs[i].test_size;
        }
        c.splits = d.size();
        if (left_out > 0)
            c.notes.push_back(std::to_string(left_out) + " of " + detail::count_text(recs.size(), "split") +
                              " left out: the measure is undefined there for A or B");
        if (id == paired::method_id::five_by_two_t || id == paired::method_id::five_by_two_f) {
            bool shaped = recs.size() == 10;
            for (std::size_t i = 0; shaped && i < recs.size(); ++i)
                shaped = recs[i].repeat == i / 2 && recs[i].fold == i % 2;
            if (!shaped)
                detail::fail(who, "method",
                             mname + " needs the 10 splits of heldout::five_by_two (5 repeats of 2-fold, in order); " +
                                 detail::count_text(recs.size(), "split") + " were recorded");
            if (left_out > 0)
                detail::fail_undefined(who, mname + " needs all 10 splits, and the measure is undefined on " +
                                                detail::count_text(left_out, "split"));
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
                                  detail::number_text(r.first_difference) +
                                  ", and the interval (which inverts the t test) is centred on it");
            } else {
                c.statistic = r.f_statistic;
                c.df = 10.0;
                c.df2 = 5.0;
                c.p_value = r.f_p_value;
                c.notes.push_back("difference is the mean of the 10 fold differences; the combined F test has no "
                                  "interval");
            }
            return c;
        }
        if (d.size() < 2)
            detail::fail_undefined(who, mname + " needs two or more splits where the measure is defined for both");
        c.difference = detail::mean_of(d);
        resampled_t_result r;
        if (id == paired::method_id::corrected_t) {
            const double n_train = train_sum / static_cast<double>(d.size());
            const double n_test = test_sum / static_cast<double>(d.size());
            r = corrected_resampled_t(d, n_train, n_test, level);
            const bool kfold = max_fold > 0;
            c.method_label += kfold ? " (Bouckaert-Frank)" : " (Nadeau-Bengio)";
            c.notes.push_back(std::string(kfold ? "repeated k-fold form (Bouckaert & Frank 2004)"
                                                : "subsampling form (Nadeau & Bengio 2003)") +
                              ": variance factor 1/J + n_test/n_train with n_train " + detail::number_text(n_train) +
                              ", n_test " + detail::number_text(n_test) + " (mean recorded sizes)");
        } else {
            r = naive_resampled_t(d, level);
            c.notes.push_back("the naive paired t treats overlapping splits as independent and is known to reject "
                              "far too often (Dietterich 1998; Nadeau & Bengio 2003): use paired::corrected_t");
        }
        c.se = r.se;
        c.lower = r.lower;
        c.upper = r.upper;
        c.statistic = r.statistic;
        c.df = r.df;
        c.p_value = r.p_value;
        return c;
    }

    // One test set.
    if (recs.size() > 1)
        detail::fail(who, "method",
                     mname + " compares two models on one test set of independent rows, but " +
                         detail::count_text(recs.size(), "split") +
                         " were recorded: use paired::corrected_t (the default here)");
    c.splits = 1;
    c.observations = recs[0].test_size;
    if (!va[0].value || !vb[0].value)
        detail::fail_undefined(who,
                               "measure " + c.measure + " is undefined on the test set for model " +
                                   (va[0].value ? "B: " + vb[0].undefined_reason : "A: " + va[0].undefined_reason));
    c.difference = *va[0].value - *vb[0].value;
    if (id == paired::method_id::delong) {
        if constexpr (enable_delong<M>) {
            if (!agg_a.keeps_predictions() || !agg_b.keeps_predictions())
                detail::fail(who, "method",
                             "paired::delong needs the recorded scores: call keep_predictions(true) on both "
                             "aggregators before recording (evaluate_splits keeps them by default), or use "
                             "heldout::compare(measure, truth, scores_a, scores_b, paired::delong)");
            const auto truth = agg_a.truth_of(0);
            const auto pa = agg_a.predictions_of(0);
            const auto pb = agg_b.predictions_of(0);
            if (!truth.integral() || pa.integral() || pb.integral() || pa.cols != 1 || pb.cols != 1)
                detail::fail(who, "method", "paired::delong needs 0/1 truth and one real score column per model");
            const auto r = delong_test(truth.labels, pa.values, pb.values, level);
            c.difference = r.difference;
            c.se = r.se;
            c.lower = r.lower;
            c.upper = r.upper;
            c.statistic = r.z;
            c.p_value = r.p_value;
            c.notes.push_back("z statistic, normal reference; Wald interval of the AUC difference");
            return c;
        } else {
            detail::fail(who, "method", "paired::delong compares ROC AUCs; measure " + c.measure + " is not an AUC");
        }
    }
    if constexpr (enable_pointwise_losses<M>) {
        const auto la = agg_a.losses(m, 0);
        const auto lb = agg_b.losses(m, 0);
        if (is_mcnemar(id)) {
            std::uint64_t only_a = 0, only_b = 0;
            // A row is right when its 0/1 loss is the better value: 0 for an error, 1 for accuracy.
            const double right = M::better == direction::lower_is_better ? 0.0 : 1.0;
            for (std::size_t i = 0; i < la.losses.size(); ++i) {
                for (const auto* l : {&la, &lb})
                    if (l->losses[i] != 0.0 && l->losses[i] != 1.0)
                        detail::fail(who, "method",
                                     mname + " needs 0/1 per-row values (classification error, accuracy); measure " +
                                         c.measure + " has " + detail::number_text(l->losses[i]) + " at row " +
                                         std::to_string(l->rows[i]) + " for model " + (l == &la ? "A" : "B"));
                const bool ra = la.losses[i] == right, rb = lb.losses[i] == right;
                only_a += ra && !rb ? 1 : 0;
                only_b += rb && !ra ? 1 : 0;
            }
            mcnemar_fill(c, id, only_a, only_b);
            return c;
        }
        if (is_bootstrap(id)) {
            const measure::mean_loss<row_value> mean_of_rows{};
            const std::vector<double> zeros(la.losses.size(), 0.0);
            const bootstrap_options o{method.replicates, method.seed, level};
            auto set = paired_bootstrap_replicates(mean_of_rows, zeros, la.losses, lb.losses, o);
            std::vector<double> jack;
            if (id == paired::method_id::bootstrap_bca) {
                jack = jackknife_values(mean_of_rows, zeros, la.losses);
                const auto jb = jackknife_values(mean_of_rows, zeros, lb.losses);
                for (std::size_t i = 0; i < jack.size(); ++i)
                    jack[i] -= jb[i];
            }
            bootstrap_fill(c, id, c.difference, set, jack, method.replicates, method.seed, level);
            c.notes.push_back("resampled the per-row losses of the " + detail::count_text(c.observations, "test row"));
            return c;
        }
    }
    if (is_mcnemar(id))
        detail::fail(who, "method",
                     mname + " needs a tracked 0/1 pointwise measure (classification error, accuracy); measure " +
                         c.measure + " is not a mean of per-row values");
    detail::fail(who, "method",
                 mname + " of measure " + c.measure +
                     " (not a mean of per-row values) needs the predictions: use heldout::compare(measure, truth, "
                     "prediction_a, prediction_b, method) on the test set");
}

/// Compares models A and B on one test set from their predictions (see the header comment).
template <outer_measure M, class T, class P>
comparison compare(const M& m, const T& truth, const P& prediction_a, const P& prediction_b,
                   paired::method method = paired::automatic, double level = 0.95) {
    using namespace detail::cmp;
    detail::check_prediction_type<M, P>();
    static_assert(scores<M, T, P>, "heldout: this measure cannot score this truth/prediction pairing");
    detail::check_level(who, level);
    comparison c;
    c.measure = m.name();
    c.level = level;
    const paired::method_id id = resolve_one_set<M>(method.id);
    c.method = id;
    c.method_label = std::string(paired::label(id));
    const std::string mname = method_name(id);
    if (is_split_method(id))
        detail::fail(who, "method",
                     mname + " works over several splits: record them in two aggregators and use "
                             "heldout::compare(agg_a, agg_b, measure, method)");
    c.splits = 1;
    c.observations = detail::prediction_rows(prediction_a);
    c.difference = evaluate(m, truth, prediction_a) - evaluate(m, truth, prediction_b);
    if (is_mcnemar(id)) {
        if constexpr (zero_one_label_measure<M>() && label_range<T> && label_range<P>) {
            const auto r = mcnemar_test(truth, prediction_a, prediction_b, mcnemar_variant(id));
            mcnemar_fill(c, id, r.only_a_correct, r.only_b_correct);
            return c;
        } else {
            detail::fail(who, "method",
                         mname + " compares error rates from class labels; measure " + c.measure +
                             " is not a 0/1 label measure (classification error, accuracy)");
        }
    }
    if (id == paired::method_id::delong) {
        if constexpr (enable_delong<M> && label_range<T> && real_range<P>) {
            const auto r = delong_test(truth, prediction_a, prediction_b, level);
            c.difference = r.difference;
            c.se = r.se;
            c.lower = r.lower;
            c.upper = r.upper;
            c.statistic = r.z;
            c.p_value = r.p_value;
            c.notes.push_back("z statistic, normal reference; Wald interval of the AUC difference");
            return c;
        } else {
            detail::fail(who, "method", "paired::delong compares ROC AUCs; measure " + c.measure + " is not an AUC");
        }
    }
    if constexpr (scores_weighted<M, T, P, std::span<const std::uint32_t>>) {
        const bootstrap_options o{method.replicates, method.seed, level};
        auto set = paired_bootstrap_replicates(m, truth, prediction_a, prediction_b, o);
        std::vector<double> jack;
        if (id == paired::method_id::bootstrap_bca) {
            jack = jackknife_values(m, truth, prediction_a);
            const auto jb = jackknife_values(m, truth, prediction_b);
            for (std::size_t i = 0; i < jack.size(); ++i)
                jack[i] -= jb[i];
        }
        bootstrap_fill(c, id, c.difference, set, jack, method.replicates, method.seed, level);
        return c;
    } else {
        detail::fail(who, "method",
                     mname + " needs the weighted add of measure " + c.measure +
                         " (bootstrap counts as frequency weights)");
    }
}

namespace detail::cmp {

inline std::vector<std::string> model_names(std::size_t k, std::vector<std::string> names) {
    if (names.empty())
        for (std::size_t j = 0; j < k; ++j)
            names.push_back("model " + std::to_string(j + 1));
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
    names = detail::cmp::model_names(models.size(), std::move(names));
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
    names = detail::cmp::model_names(models.size(), std::move(names));
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
