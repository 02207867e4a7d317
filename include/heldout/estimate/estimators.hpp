// heldout/estimate/estimators.hpp — each interval method of the table (estimate/methods.hpp)
// applied to what an aggregator recorded: it reads the record, calls the method's formula
// (the pure functions of t_interval.hpp, binomial_interval.hpp, corrected_t.hpp,
// bootstrap.hpp, delong.hpp, bootstrap_632.hpp) and writes the estimate with its notes.
// Internal to the aggregator; the formulas are the public API.
#pragma once

#include <heldout/core/split.hpp>
#include <heldout/detail/columns.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/detail/tracks.hpp>
#include <heldout/estimate/binomial_interval.hpp>
#include <heldout/estimate/bootstrap.hpp>
#include <heldout/estimate/bootstrap_632.hpp>
#include <heldout/estimate/ci.hpp>
#include <heldout/estimate/corrected_t.hpp>
#include <heldout/estimate/delong.hpp>
#include <heldout/estimate/estimate.hpp>
#include <heldout/estimate/methods.hpp>
#include <heldout/estimate/newcombe_auc.hpp>
#include <heldout/estimate/t_interval.hpp>

#include <cmath>
#include <cstddef>
#include <cstdint>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// Per-split bookkeeping: what the split was.
struct split_record {
    std::size_t index = 0;
    std::size_t repeat = 0;
    std::size_t fold = 0;
    std::size_t train_size = 0;
    std::size_t test_size = 0;
    bool bootstrap = false; ///< the split carried draw counts (a bootstrap plan)
    std::size_t rows = 0;   ///< bootstrap: n, the size of counts (rows of the data set)
    std::size_t offset = 0; ///< first position of this split's test rows in the recorded rows
    split_design design = split_design::random;
};

namespace detail {

/// "only 4 positives ..." when a class behind a DeLong variance is small (delong_small_class,
/// measured in the coverage study), else nothing. what: "the DeLong interval" / "the DeLong test".
inline std::optional<std::string> small_class_caution(std::size_t cases, std::size_t controls, std::string_view what) {
    if (cases >= delong_small_class && controls >= delong_small_class)
        return std::nullopt;
    const bool few_cases = cases <= controls;
    const std::size_t k = few_cases ? cases : controls;
    return "only " + std::to_string(k) + (few_cases ? " positive" : " negative") + (k == 1 ? "" : "s") + " (" +
           std::to_string(cases) + " positive, " + std::to_string(controls) + " negative): " + std::string(what) +
           " may cover less than its level below " + std::to_string(delong_small_class) +
           " in a class (docs/intervals.md, coverage study)";
}

inline double mean_of(std::span<const double> v) {
    compensated_sum s;
    for (double x : v)
        s.add(x);
    return s.value() / static_cast<double>(v.size());
}

inline double sd_of(std::span<const double> v) {
    return two_pass_mean_variance(v).root(1.0); // finite for values near +-1e308 too
}

/// What an interval method reads: the record and the measure's track.
struct interval_input {
    interval_input(const track_base& t, std::span<const split_record> s, std::span<const std::size_t> r)
        : track(t), splits(s), rows(r) {}
    const track_base& track;
    std::span<const split_record> splits;
    std::span<const std::size_t> rows; // test row numbers, in record order
    const column_base* truth = nullptr;
    const column_base* predictions = nullptr;
    const column_base* apparent_truth = nullptr;
    const column_base* apparent_predictions = nullptr;
    std::vector<double> values; // the defined per-split values
    double mean_train = 0;      // over the splits with a defined value
    double mean_test = 0;
    bool sizes_vary = false;
    ci::method method;
    double level = 0.95;
    std::string_view who = "heldout::aggregator::estimate";
};

template <class In>
void estimate_t(const In& in, estimate& e) {
    const auto r = t_interval(std::span<const double>(in.track.losses), in.level);
    e.se = r.se;
    e.lower = r.lower;
    e.upper = r.upper;
    e.notes.push_back("Student t interval on the " + count_text(r.n, "per-row value") + ", df " +
                      std::to_string(r.n - 1));
}

template <class In>
void estimate_proportion(const In& in, estimate& e, ci::method_id id) {
    std::uint64_t k = 0;
    for (double x : in.track.losses)
        k += x == 1.0 ? 1 : 0;
    const std::uint64_t n = in.track.losses.size();
    const proportion_interval r = id == ci::method_id::wilson            ? wilson_interval(k, n, in.level)
                                  : id == ci::method_id::clopper_pearson ? clopper_pearson_interval(k, n, in.level)
                                                                         : agresti_coull_interval(k, n, in.level);
    const double p = static_cast<double>(k) / static_cast<double>(n);
    e.se = std::sqrt(p * (1.0 - p) / static_cast<double>(n));
    e.lower = r.lower;
    e.upper = r.upper;
    e.notes.push_back(std::string(ci::info(id).label) + " interval for " + std::to_string(k) + " of " +
                      count_text(n, "row") + "; se is the binomial sqrt(p(1-p)/n)");
}

template <class In>
void estimate_bootstrap(const In& in, estimate& e, ci::method_id id) {
    const std::size_t n = in.splits[0].test_size;
    const bootstrap_options o{in.method.replicates, in.method.seed, in.level};
    std::vector<double> jack;
    auto set = in.track.replicates(*in.truth, *in.predictions, 0, n, o, id == ci::method_id::bca ? &jack : nullptr);
    if (set.values.size() < 2)
        fail_undefined(in.who, std::to_string(set.undefined) + " of " + std::to_string(o.replicates) +
                                   " bootstrap replicates are undefined; fewer than 2 remain");
    const double theta = *in.track.values[0];
    const bootstrap_result r = id == ci::method_id::bca ? bca_interval(theta, set.values, jack, in.level)
                                                        : percentile_interval(theta, set.values, in.level);
    e.se = sd_of(set.values);
    e.lower = r.lower;
    e.upper = r.upper;
    std::string note = std::string(ci::info(id).label) + " over the " + count_text(n, "test row") +
                       ", the model held fixed: " + std::to_string(set.values.size()) + " replicates, seed " +
                       std::to_string(in.method.seed) + "; se is the replicates' standard deviation";
    if (id == ci::method_id::bca)
        note += "; z0 " + note_number(r.z0) + ", acceleration " + note_number(r.acceleration);
    e.notes.push_back(note);
    if (set.undefined > 0)
        e.notes.push_back(std::to_string(set.undefined) + " of " + std::to_string(o.replicates) +
                          " bootstrap replicates undefined and left out");
}

template <class In>
void estimate_delong(const In& in, estimate& e) {
    const std::size_t n = in.splits[0].test_size;
    const auto c = in.track.components(*in.truth, *in.predictions, 0, n);
    const auto r = delong_interval(c, in.level);
    e.se = r.se;
    e.lower = r.lower;
    e.upper = r.upper;
    e.notes.push_back("DeLong (1988) standard error from the structural components of the " +
                      count_text(c.cases.size(), "case") + " and " + count_text(c.controls.size(), "control") +
                      "; interval on the logit scale, transformed back");
    if (auto c2 = small_class_caution(c.cases.size(), c.controls.size(), "the DeLong interval"))
        e.cautions.push_back(*c2);
}

template <class In>
void estimate_newcombe(const In& in, estimate& e) {
    const std::size_t n = in.splits[0].test_size;
    const auto c = in.track.components(*in.truth, *in.predictions, 0, n);
    const auto r = newcombe_auc_interval(c.value, c.cases.size(), c.controls.size(), in.level);
    e.se = r.se;
    e.lower = r.lower;
    e.upper = r.upper;
    e.notes.push_back("Newcombe (2006) score-type interval from the value and the " +
                      count_text(c.cases.size(), "case") + " and " + count_text(c.controls.size(), "control") +
                      " (Hanley-McNeil variance at the candidate value, N* = (m + n)/2 - 1)");
}

template <class In>
void estimate_wald(const In& in, estimate& e) {
    const std::size_t n = in.splits[0].test_size;
    const auto f = in.track.fitted(*in.truth, *in.predictions, 0, n);
    const double z = two_sided_z(in.level);
    e.se = f.se;
    e.lower = f.value - z * f.se;
    e.upper = f.value + z * f.se;
    e.notes.push_back("Wald interval value +- z se, se from the inverse Fisher information of the fit on the " +
                      count_text(n, "test row") + " (" + count_text(f.iterations, "Newton step") + ")");
}

template <class In>
void estimate_resampled_t(const In& in, estimate& e, ci::method_id id) {
    if (in.values.size() < 2)
        fail_undefined(in.who, "only one split has a defined value; " + method_text(id) + " needs two or more");
    if (id == ci::method_id::corrected_t) {
        const auto r = corrected_resampled_t(in.values, in.mean_train, in.mean_test, in.level);
        e.se = r.se;
        e.lower = r.lower;
        e.upper = r.upper;
        e.notes.push_back("Nadeau-Bengio corrected resampled t over " + count_text(in.values.size(), "split") +
                          ": variance factor 1/J + n_test/n_train with n_train " + note_number(in.mean_train) +
                          ", n_test " + note_number(in.mean_test) +
                          (in.sizes_vary ? " (mean sizes over the splits)" : "") + "; df " +
                          std::to_string(in.values.size() - 1));
    } else {
        const auto r = naive_resampled_t(in.values, in.level);
        e.se = r.se;
        e.lower = r.lower;
        e.upper = r.upper;
        e.notes.push_back("naive t over " + count_text(in.values.size(), "split") +
                          " treats them as independent; splits share training rows, so it is known to "
                          "undercover (Nadeau & Bengio 2003): use ci::corrected_t");
        e.cautions.push_back("naive t over overlapping splits: known to undercover (docs/intervals.md, coverage "
                             "study); for contrast only");
    }
}

template <class In>
void estimate_632(const In& in, estimate& e, ci::method_id id) {
    const std::size_t n = in.splits[0].rows;
    for (const auto& s : in.splits)
        if (s.rows != n)
            fail(in.who, "method", "bootstrap splits over different numbers of rows");
    if (in.apparent_truth->rows() != n)
        fail(in.who, "method",
             "the apparent result covers " + std::to_string(in.apparent_truth->rows()) +
                 " rows, the bootstrap splits " + std::to_string(n));
    out_of_bag_losses oob(n);
    for (const auto& s : in.splits)
        oob.add(in.rows.subspan(s.offset, s.test_size),
                std::span<const double>(in.track.losses).subspan(s.offset, s.test_size));
    const double err1 = oob.leave_one_out_error();
    const double gamma = in.track.no_information(*in.apparent_truth, *in.apparent_predictions);
    if (!in.track.apparent)
        fail_undefined(in.who, "the apparent error is undefined: " + in.track.apparent_reason);
    const auto r = bootstrap_632(*in.track.apparent, err1, gamma);
    e.value = id == ci::method_id::bootstrap_632 ? r.err_632 : r.err_632_plus;
    e.notes.push_back(
        "point estimate (no interval): apparent " + note_number(r.apparent) + ", leave-one-out bootstrap " +
        note_number(err1) + ", no-information " + note_number(gamma) +
        (id == ci::method_id::bootstrap_632_plus
             ? ", relative overfitting " + note_number(r.relative_overfitting) + ", weight " + note_number(r.weight)
             : std::string(", weight 0.632")) +
        "; mean of the per-split out-of-bag values " + note_number(mean_of(in.values)));
    if (const std::size_t never = oob.never_out_of_bag(); never > 0)
        e.notes.push_back(count_text(never, "row") + " never out of bag, left out of the leave-one-out "
                                                     "bootstrap error");
}

/// Runs interval method id (already checked to apply) on the input.
template <class In>
void run_interval(ci::method_id id, const In& in, estimate& e) {
    switch (id) {
    case ci::method_id::t:
        return estimate_t(in, e);
    case ci::method_id::wilson:
    case ci::method_id::clopper_pearson:
    case ci::method_id::agresti_coull:
        return estimate_proportion(in, e, id);
    case ci::method_id::bootstrap_percentile:
    case ci::method_id::bca:
        return estimate_bootstrap(in, e, id);
    case ci::method_id::delong:
        return estimate_delong(in, e);
    case ci::method_id::newcombe:
        return estimate_newcombe(in, e);
    case ci::method_id::corrected_t:
    case ci::method_id::naive_t:
        return estimate_resampled_t(in, e, id);
    case ci::method_id::bootstrap_632:
    case ci::method_id::bootstrap_632_plus:
        return estimate_632(in, e, id);
    case ci::method_id::wald:
        return estimate_wald(in, e);
    case ci::method_id::automatic:
        break;
    }
    HELDOUT_ASSERT(false);
}

} // namespace detail
HELDOUT_NAMESPACE_END
