// heldout/slices/estimate_slices.hpp — does the result hold in every subgroup? One estimate per
// slice of the data (region, device, age band, ...), each compared with the rest of the rows.
//
//   heldout::aggregator agg(heldout::measure::auc{});           // keeps its predictions (default)
//   for (const heldout::split& s : plan.splits(n)) agg.record(s, gather(y, s.test), fit_predict(s));
//   std::vector<int> region = ...;                               // one slice id per data row
//   for (const heldout::slice_estimate& r : heldout::estimate_slices(agg, heldout::measure::auc{}, region, {}))
//       std::cout << r << '\n';
//   // slice 3: AUC 0.71 [0.64, 0.78] 95% corrected t (Nadeau-Bengio), 50 splits, n=2150; vs rest -0.09,
//   //   p = 0.004 (Holm 0.02); too small: no
//   auto b = heldout::estimate_slices(agg, m, region, {.simultaneous = true});   // Bonferroni intervals
//
// What each entry holds (in increasing slice id; ids are any integers, one per data row, read
// at the row numbers of the recorded test rows):
//  * .slice, .rows (distinct data rows of the slice among the test rows), .class_rows (for a
//    0/1 or class-label truth: distinct rows of each class 0..k-1, k the number of classes in
//    the whole record), .splits_with_rows;
//  * .estimate: the measure on the slice's rows, following the estimate conventions: the
//    aggregator is re-recorded with each split's test rows cut to the slice (train sizes
//    kept), so over resampling splits the value is the mean of the per-split slice values
//    with the split-level interval (corrected t for random splits), and on one test set the
//    one-test-set interval ci::automatic picks (Wilson, DeLong, Wald, t, BCa);
//  * .too_small, by a fixed rule: fewer than 10 rows of either class (of any class, for class
//    labels) for measures of a 0/1 or class truth, fewer than 20 rows for any other truth
//    (real values, censored times, ...), or a split in which the slice has no test row. A
//    too-small slice keeps its value, but its interval is dropped unless it is a small-sample
//    one (Wilson, Clopper-Pearson), and it is not compared with the rest;
//  * .versus_rest: slice - rest, where rest is every other test row, with a test of "no
//    difference": over random splits the corrected resampled t on the per-split differences
//    (Nadeau & Bengio 2003), on one test set a z test from the two estimates' standard
//    errors (disjoint rows scored by one fixed model are independent samples). Its p-values
//    are Holm-adjusted (Holm 1979) across the slices compared (.adjusted_p_value);
//  * .worst marks the slice whose value is worst (by the measure's direction, or distance
//    from its ideal value) among those not too small, with a note: picking the worst of
//    many slices is itself a selection, so its value overstates how badly that slice would
//    do on new data. options.simultaneous = true gives Bonferroni intervals (each at level
//    1 - (1 - level)/k over the k slices), which hold for all slices at once, the worst too.
// A measure undefined on a slice (AUC on a slice with one class) gives an entry whose
// .undefined says why and whose estimate has no value (NaN) and no interval.
// Needs kept predictions (aggregator::keep_predictions(true), the default); refuses records of
// bootstrap splits (their .632 estimators need the apparent fit of the whole data).
// Works for every measure family: rows are cut through the same views the measures read.
#pragma once

#include <heldout/compare/holm.hpp>
#include <heldout/core/error.hpp>
#include <heldout/core/measure.hpp>
#include <heldout/core/split.hpp>
#include <heldout/core/values.hpp>
#include <heldout/detail/columns.hpp>
#include <heldout/detail/tracks.hpp>
#include <heldout/estimate/aggregator.hpp>
#include <heldout/estimate/corrected_t.hpp>
#include <heldout/estimate/estimate.hpp>
#include <heldout/estimate/t_interval.hpp>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <memory>
#include <optional>
#include <ostream>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// Options of estimate_slices.
struct slice_options {
    ci::method method = ci::automatic; ///< interval method of each slice's estimate
    double level = 0.95;               ///< confidence level (of each interval, or of all together)
    bool simultaneous = false;         ///< Bonferroni: each slice at 1 - (1 - level) / k
};

/// A slice against the rest of the test rows.
struct slice_contrast {
    double rest_value = 0; ///< the measure on the other test rows (estimate convention)
    double difference = 0; ///< slice - rest
    std::optional<double> se{};
    std::optional<double> lower{};
    std::optional<double> upper{};
    double statistic = 0;        ///< t (several splits) or z (one test set)
    std::optional<double> df{};  ///< of the t
    double p_value = 1;          ///< two-sided, "no difference"
    double adjusted_p_value = 1; ///< Holm-adjusted across the slices compared
    std::string method_label;
};

/// One slice's result; see the header comment.
struct slice_estimate {
    std::int64_t slice = 0;
    std::size_t rows = 0;                ///< distinct data rows of the slice among the test rows
    std::vector<std::size_t> class_rows; ///< per class 0..k-1 (0/1 or class truth), else empty
    std::size_t splits_with_rows = 0;    ///< splits in which the slice has test rows
    heldout::estimate estimate;          ///< the measure on the slice
    bool too_small = false;
    std::string too_small_reason; ///< which part of the rule it meets
    std::string undefined;        ///< non-empty: the measure is undefined on the slice
    std::optional<slice_contrast> versus_rest{};
    bool worst = false; ///< the worst slice (among those not too small)
};

/// "slice 3: AUC 0.71 [...] ...; vs rest -0.09 [...], p = 0.004 (Holm 0.02); too small"
inline std::ostream& operator<<(std::ostream& os, const slice_estimate& r) {
    os << "slice " << r.slice << ": ";
    if (!r.undefined.empty())
        os << r.estimate.measure << " undefined (" << r.undefined << ")";
    else
        os << r.estimate;
    if (r.versus_rest) {
        const auto& c = *r.versus_rest;
        os << "; vs rest " << detail::readable_number(c.difference);
        if (c.lower && c.upper)
            os << " [" << detail::readable_number(*c.lower) << ", " << detail::readable_number(*c.upper) << "]";
        os << ", p = " << detail::readable_number(c.p_value) << " (Holm " << detail::readable_number(c.adjusted_p_value)
           << ")";
    }
    if (r.too_small)
        os << "; too small: " << r.too_small_reason;
    if (r.worst)
        os << "; worst slice";
    return os;
}

namespace detail::slices {

inline constexpr std::string_view who = "heldout::estimate_slices";

/// The rows at `positions` (ascending) of rows [offset, offset + test) of column c, as a new
/// column of the same kind, read through view type V.
template <class V>
std::unique_ptr<column_base> gather(const column_base& c, std::size_t offset, std::span<const std::size_t> positions,
                                    std::string_view arg) {
    using traits = column_traits<V>;
    auto out = std::make_unique<typename traits::column>();
    std::size_t a = 0;
    while (a < positions.size()) {
        std::size_t b = a + 1;
        while (b < positions.size() && positions[b] == positions[b - 1] + 1)
            ++b; // a run of consecutive positions is appended as one view
        traits::append(*out, view_of<V>(c, offset + positions[a], b - a), who, arg);
        a = b;
    }
    return out;
}

/// Records split s with the test rows at `positions` of recorded split i into `into`.
template <class M>
void record_subset(aggregator& into, const split& s, const column_base& t, const column_base& p, std::size_t offset,
                   std::span<const std::size_t> positions) {
    const std::size_t n = positions.size();
    bool done = false;
    with_view(t, 0, 0, view_candidates<M>{}, [&](const auto& t0) {
        using VT = std::remove_cvref_t<decltype(t0)>;
        with_view(p, 0, 0, view_candidates<M>{}, [&](const auto& p0) {
            using VP = std::remove_cvref_t<decltype(p0)>;
            if constexpr (recordable<VT> && recordable<VP>) {
                const auto tc = gather<VT>(t, offset, positions, "truth");
                const auto pc = gather<VP>(p, offset, positions, "predictions");
                into.record(s, view_of<VT>(*tc, 0, n), view_of<VP>(*pc, 0, n));
                done = true;
            }
        });
    });
    if (!done)
        fail(who, "agg", "the recorded columns (" + t.describe() + ", " + p.describe() + ") cannot be cut into slices");
}

/// Class of a kept truth value (0/1 or class label), or -1 when not a class.
inline std::int64_t class_of(const recorded_column& c, std::size_t j) {
    if (c.integral())
        return c.labels[j];
    const double v = c.values[j];
    return v >= 0 && v == std::floor(v) && v < 1e6 ? static_cast<std::int64_t>(v) : -1;
}

inline bool small_sample_interval(ci::method_id id) {
    return id == ci::method_id::wilson || id == ci::method_id::clopper_pearson;
}

/// The note on a Bonferroni interval (options.simultaneous): each slice at `each`.
inline std::string simultaneous_note(std::size_t slices, double each, double overall) {
    return "simultaneous (Bonferroni) interval over " + count_text(slices, "slice") + ": level " + number_text(each) +
           " each, " + number_text(overall) + " for all together";
}

/// What both overloads do last: Holm-adjusts the slice-vs-rest p-values (p_values[j] belongs
/// to slice compared[j]) and marks the worst slice, among those not too small (among all
/// defined ones when every slice is), with its note. badness(value) orders the slices.
template <class Badness>
void finish_slices(std::vector<slice_estimate>& out, const std::vector<std::size_t>& compared,
                   const std::vector<double>& p_values, Badness&& badness) {
    if (!p_values.empty()) {
        const auto adjusted = holm_adjust(p_values);
        for (std::size_t j = 0; j < compared.size(); ++j)
            out[compared[j]].versus_rest->adjusted_p_value = adjusted[j];
    }
    const std::size_t K = out.size();
    std::optional<std::size_t> worst;
    for (const bool strict : {true, false}) {
        for (std::size_t k = 0; k < K; ++k)
            if (out[k].undefined.empty() && (!strict || !out[k].too_small) &&
                (!worst || badness(out[k].estimate.value) > badness(out[*worst].estimate.value)))
                worst = k;
        if (worst)
            break;
    }
    if (worst && K > 1) {
        out[*worst].worst = true;
        out[*worst].estimate.notes.push_back(
            "the worst of " + count_text(K, "slice") +
            ": picking the worst of many is itself optimistic about finding a problem, its value overstates how "
            "badly this slice would do on new data and its interval does not account for the choice; judge it by "
            "the Holm-adjusted p-value or by simultaneous (Bonferroni) intervals");
    }
}

} // namespace detail::slices

/// One estimate per slice of the test rows, each compared with the rest; see the header comment.
template <outer_measure M, value_range S>
std::vector<slice_estimate> estimate_slices(const aggregator& agg, const M& m, const S& slice_of_row,
                                            const slice_options& options = {}) {
    using namespace detail::slices;
    static_assert(check_measure<M>());
    static_assert(std::integral<element_t<S>>, "heldout::estimate_slices: slice ids are integers, one per data row");
    detail::check_level(who, options.level);
    if (agg.empty())
        detail::fail(who, "agg", "no splits recorded");
    if (!agg.keeps_predictions())
        detail::fail(who, "agg",
                     "predictions were not kept (keep_predictions(false)): slices are cut from the kept test rows");
    const plan_shape shape = agg.shape();
    if (shape.bootstrap)
        detail::fail(who, "agg",
                     "the splits are bootstrap samples: their .632 estimators need the apparent fit of the whole "
                     "data, which has no slice; record a plan without replacement (k-fold, holdout)");
    const auto ids = values_of(slice_of_row, who, "slice_of_row");
    const auto& recs = agg.splits();
    const std::size_t J = recs.size();
    const detail::column_base* truth = detail::aggregator_access::truth(agg);
    const detail::column_base* pred = detail::aggregator_access::predictions(agg);

    // Slice ids, sorted; each test row's slice index.
    std::vector<std::int64_t> distinct;
    std::size_t max_row = 0;
    for (std::size_t i = 0; i < J; ++i)
        for (const std::size_t r : agg.test_rows(i)) {
            if (r >= ids.size())
                detail::fail(who, "slice_of_row",
                             "size " + std::to_string(ids.size()) + " does not reach test row " + std::to_string(r) +
                                 " of split " + std::to_string(i) + ": give one slice id per data row");
            distinct.push_back(static_cast<std::int64_t>(ids[r]));
            max_row = std::max(max_row, r);
        }
    std::sort(distinct.begin(), distinct.end());
    distinct.erase(std::unique(distinct.begin(), distinct.end()), distinct.end());
    const std::size_t K = distinct.size();
    // The slice index of every recorded test row (in record order, as the kept columns).
    std::vector<std::size_t> slice_at;
    for (std::size_t i = 0; i < J; ++i)
        for (const std::size_t r : agg.test_rows(i))
            slice_at.push_back(static_cast<std::size_t>(
                std::lower_bound(distinct.begin(), distinct.end(), static_cast<std::int64_t>(ids[r])) -
                distinct.begin()));

    // Classes of the truth (0/1 or class labels): counted over the whole record first.
    using truth_is = truth_kind_t<M>;
    constexpr bool classes = std::is_same_v<truth_is, kinds::binary> || std::is_same_v<truth_is, kinds::label>;
    std::size_t n_classes = std::is_same_v<truth_is, kinds::binary> ? 2 : 0;
    std::vector<std::int64_t> class_of_row; // by data row, -1 when not a test row
    if constexpr (classes) {
        class_of_row.assign(max_row + 1, -1);
        for (std::size_t i = 0; i < J; ++i) {
            const auto t = agg.truth_of(i);
            const auto rows = agg.test_rows(i);
            for (std::size_t j = 0; j < rows.size(); ++j) {
                const std::int64_t c = class_of(t, j);
                if (c < 0)
                    detail::fail_at(who, "agg", "kept truth is not a class label", j);
                class_of_row[rows[j]] = c;
                n_classes = std::max(n_classes, static_cast<std::size_t>(c) + 1);
            }
        }
    }

    const double level = options.simultaneous ? 1.0 - (1.0 - options.level) / static_cast<double>(K) : options.level;
    std::size_t max_train = 0;
    for (const auto& r : recs)
        max_train = std::max(max_train, r.train_size);
    const std::vector<std::size_t> train_stand_in(max_train, 0); // only its size is recorded
    std::vector<std::size_t> pos_in, pos_out, rows_in, rows_out;
    std::vector<char> seen(max_row + 1, 0);

    std::vector<slice_estimate> out(K);
    std::vector<std::size_t> compared;
    std::vector<double> p_values;
    for (std::size_t k = 0; k < K; ++k) {
        slice_estimate& res = out[k];
        res.slice = distinct[k];
        if constexpr (classes)
            res.class_rows.assign(n_classes, 0);
        aggregator in_slice(m), rest(m);
        std::fill(seen.begin(), seen.end(), char{0});
        for (std::size_t i = 0; i < J; ++i) {
            const auto rows = agg.test_rows(i);
            pos_in.clear();
            pos_out.clear();
            rows_in.clear();
            rows_out.clear();
            for (std::size_t j = 0; j < rows.size(); ++j) {
                if (slice_at[recs[i].offset + j] == k) {
                    pos_in.push_back(j);
                    rows_in.push_back(rows[j]);
                    if (!seen[rows[j]]) {
                        seen[rows[j]] = 1;
                        ++res.rows;
                        if constexpr (classes)
                            ++res.class_rows[static_cast<std::size_t>(class_of_row[rows[j]])];
                    }
                } else {
                    pos_out.push_back(j);
                    rows_out.push_back(rows[j]);
                }
            }
            const auto& r = recs[i];
            const std::span<const std::size_t> train(train_stand_in.data(), r.train_size);
            if (!pos_in.empty()) {
                ++res.splits_with_rows;
                record_subset<M>(in_slice, split{train, rows_in, r.repeat, r.fold, r.index, {}, r.design}, *truth,
                                 *pred, r.offset, pos_in);
            }
            if (!pos_out.empty())
                record_subset<M>(rest, split{train, rows_out, r.repeat, r.fold, r.index, {}, r.design}, *truth, *pred,
                                 r.offset, pos_out);
        }

        // The rule for too small (see the header comment).
        if (res.splits_with_rows < J) {
            res.too_small = true;
            res.too_small_reason =
                "no test row in " + std::to_string(J - res.splits_with_rows) + " of " + detail::count_text(J, "split");
        } else if constexpr (classes) {
            for (std::size_t c = 0; c < n_classes; ++c)
                if (res.class_rows[c] < 10) {
                    res.too_small = true;
                    res.too_small_reason = "fewer than 10 rows of class " + std::to_string(c) + " (" +
                                           std::to_string(res.class_rows[c]) + ")";
                    break;
                }
        } else {
            if (res.rows < 20) {
                res.too_small = true;
                res.too_small_reason = "fewer than 20 rows (" + std::to_string(res.rows) + ")";
            }
        }

        // The slice's estimate.
        try {
            res.estimate = in_slice.estimate(m, options.method, level);
        } catch (const undefined_error& e) {
            res.undefined = e.problem();
            res.estimate.measure = m.name();
            res.estimate.level = level;
            res.estimate.value = std::numeric_limits<double>::quiet_NaN();
            res.estimate.per_split = in_slice.split_values(m);
            res.estimate.notes.push_back("undefined on this slice: " + res.undefined);
        }
        if (options.simultaneous)
            res.estimate.notes.push_back(simultaneous_note(K, level, options.level));
        if (res.too_small && res.undefined.empty()) {
            if (!small_sample_interval(res.estimate.method) && res.estimate.has_interval()) {
                res.estimate.se.reset();
                res.estimate.lower.reset();
                res.estimate.upper.reset();
                res.estimate.method_label += "; no interval: slice too small";
            }
            res.estimate.notes.push_back("slice too small (" + res.too_small_reason +
                                         "): its value is noisy and it is not compared with the rest");
        }
        if (res.too_small || !res.undefined.empty() || rest.empty())
            continue;

        // The slice against the rest.
        slice_contrast c;
        if (J == 1) {
            heldout::estimate r;
            try {
                r = rest.estimate(m, options.method, level);
            } catch (const undefined_error&) {
                continue;
            }
            if (!res.estimate.se || !r.se)
                continue;
            const double se = std::sqrt(*res.estimate.se * *res.estimate.se + *r.se * *r.se);
            if (!(se > 0))
                continue;
            c.rest_value = r.value;
            c.difference = res.estimate.value - r.value;
            c.se = se;
            c.statistic = c.difference / se;
            c.p_value = std::min(1.0, 2.0 * detail::normal_cdf(-std::abs(c.statistic)));
            const double z = detail::two_sided_z(level);
            c.lower = c.difference - z * se;
            c.upper = c.difference + z * se;
            c.method_label = "z from the standard errors of slice (" + res.estimate.method_label + ") and rest (" +
                             r.method_label + "), independent rows";
        } else {
            const record_shape rs = agg.method_shape();
            if (rs.mixed_designs || rs.design != split_design::random)
                continue; // no valid paired test over splits of this design (docs/slices.md)
            const auto vs = in_slice.split_values(m), vr = rest.split_values(m);
            std::vector<double> d;
            double rest_sum = 0;
            for (std::size_t i = 0; i < J; ++i)
                if (vs[i].value && vr[i].value) {
                    d.push_back(*vs[i].value - *vr[i].value);
                    rest_sum += *vr[i].value;
                }
            if (d.size() < 2)
                continue;
            resampled_t_result t;
            try {
                t = corrected_resampled_t(d, shape.mean_train, shape.mean_test, level);
            } catch (const undefined_error&) {
                continue; // every difference equal: no variance
            }
            c.rest_value = rest_sum / static_cast<double>(d.size());
            c.difference = t.mean;
            c.se = t.se;
            c.lower = t.lower;
            c.upper = t.upper;
            c.statistic = t.statistic;
            c.df = t.df;
            c.p_value = t.p_value;
            c.method_label =
                "corrected resampled t (Nadeau-Bengio) on " + detail::count_text(d.size(), "split") + "' differences";
        }
        res.versus_rest = c;
        compared.push_back(k);
        p_values.push_back(c.p_value);
    }
    finish_slices(out, compared, p_values, [](double v) { return measure_traits<M>::badness(v); });
    return out;
}

HELDOUT_NAMESPACE_END
