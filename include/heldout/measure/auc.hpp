// heldout/measure/auc.hpp — exact area under the ROC curve (AUC) at about the cost of one
// radix sort, and heldout::ranked_sample, a sorted sample for fast resampled AUCs.
//
//   double a = heldout::evaluate(heldout::measure::auc{}, truth, scores);      // truth 0/1
//   double b = heldout::evaluate(heldout::measure::auc{}, truth, scores, w);   // weighted
//
//   auto acc = heldout::measure::auc{}.accumulator();   // streaming, mergeable exactly
//   acc.add(truth_batch, scores_batch);                  // carries the scores
//   other_shard.merge(acc);  double v = other_shard.value();
//
//   heldout::ranked_sample r(truth, scores);            // sorts once
//   double again = r.auc();                              // same value as above
//   double boot = r.auc_in_rank_order(counts);           // one bootstrap replicate, O(n)
//
// Definition (Mann–Whitney form; Bamber 1975, Mann & Whitney 1947): with positives X_i
// (truth 1) and negatives Y_j (truth 0), AUC = sum_ij w_i w_j psi(X_i, Y_j) / (W+ W-), where
// psi = 1 if X > Y, 1/2 if X = Y, 0 otherwise; unit weights give U / (m n). It equals the
// trapezoidal area under the empirical ROC curve, tied scores joined by a straight segment.
// Ties are exact (equal scores, -0 == +0). Truth is 0/1 of any integral type (bool, uint8_t,
// int...); scores are float or double (higher = more likely 1). Integer weights equal
// replicated rows.
//
// Errors: sizes differing, empty input, NaN/inf score, label outside 0/1, negative or
// non-finite weight -> heldout::input_error naming the argument and index; one class absent
// (or of zero total weight) -> heldout::undefined_error naming the missing class, never 0.5.
// Limits: 2^32 - 1 rows unweighted, 2^31 - 1 weighted and in ranked_sample.
//
// The accumulator keeps the scores (4 bytes each while every score is exactly a float,
// 8 bytes once a double score is not), the labels and, once any weight is given, the weights:
// merge appends, value() sorts. The sort buffers belong to the calling thread and are reused
// by every ranking measure (detail::thread_scratch), so after the first evaluation of a given
// size nothing is allocated again, even by fresh accumulators.
#pragma once

#include <heldout/core/measure.hpp>
#include <heldout/detail/auc_resampling.hpp>
#include <heldout/detail/ranks.hpp>
#include <heldout/detail/state_checks.hpp>
#include <heldout/measure/ranked_sample.hpp>

#include <algorithm>
#include <cmath>
#include <concepts>
#include <cstdint>
#include <limits>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace detail {

/// Scores, 0/1 labels and (optional) weights carried by the ranking accumulators. Scores
/// are stored as float while every score so far is exactly a float (so a float32 sort can
/// be used), as double otherwise; exactly one of the two vectors is in use.
class score_store {
public:
    template <label_range T, real_range S>
    void add(std::string_view who, const T& truth, const S& scores) {
        auto [y, s] = views(who, truth, scores);
        append(who, y, s);
        if (!weights_.empty())
            weights_.resize(labels_.size(), 1.0);
    }

    template <label_range T, real_range S, weight_range W>
    void add(std::string_view who, const T& truth, const S& scores, const W& weights) {
        auto [y, s] = views(who, truth, scores);
        auto w = values_of(weights, who, "weights");
        check_same_size(who, "weights", y.size(), w.size());
        check_weights(who, w);
        if (weights_.empty())
            weights_.assign(labels_.size(), 1.0);
        append(who, y, s);
        weights_.insert(weights_.end(), w.begin(), w.end());
    }

    template <std::integral Y, std::floating_point S>
    void add_one(std::string_view who, Y y, S score, double w) {
        if (!is_binary_label(y))
            fail(who, "truth", "label " + std::to_string(static_cast<long long>(y)) + " outside the classes 0..1");
        if (!std::isfinite(score))
            fail(who, "score", std::isnan(score) ? "not finite (nan)" : "not finite (inf)");
        if (!std::isfinite(w) || w < 0)
            fail(who, "weights", "weight must be finite and non-negative");
        const double d = static_cast<double>(score);
        if (wide_.empty() && static_cast<double>(static_cast<float>(d)) == d)
            narrow_.push_back(static_cast<float>(d));
        else {
            widen();
            wide_.push_back(d);
        }
        // Decided before the row goes in: on a fresh store the earlier rows are none, not "unweighted".
        const bool weighted = !weights_.empty() || w != 1.0;
        if (weighted)
            weights_.resize(labels_.size(), 1.0);
        labels_.push_back(static_cast<std::uint8_t>(y != Y(0)));
        if (weighted)
            weights_.push_back(w);
    }

    /// Appends the rows of o (o may be *this: its rows then enter twice).
    void merge(const score_store& o) {
        // Both decided before anything is appended: a fresh store has no rows to tell us.
        const bool wide = !wide_.empty() || !o.wide_.empty();
        const bool weighted = !weights_.empty() || !o.weights_.empty();
        const std::size_t rows = labels_.size(), other_rows = o.labels_.size();
        if (wide) {
            widen();
            append_all(wide_, o.wide_);
            append_all(wide_, o.narrow_); // empty when o is *this (it is wide then)
        } else {
            append_all(narrow_, o.narrow_);
        }
        if (weighted) {
            weights_.resize(rows, 1.0);
            if (o.weights_.empty())
                weights_.resize(rows + other_rows, 1.0);
            else
                append_all(weights_, o.weights_);
        }
        append_all(labels_, o.labels_);
    }

    void reset() noexcept {
        narrow_.clear();
        wide_.clear();
        labels_.clear();
        weights_.clear();
    }

    std::size_t size() const noexcept { return labels_.size(); }
    bool weighted() const noexcept { return !weights_.empty(); }
    bool narrow() const noexcept { return wide_.empty(); }
    std::span<const float> narrow_scores() const noexcept { return narrow_; }
    std::span<const double> wide_scores() const noexcept { return wide_; }
    std::span<const std::uint8_t> labels() const noexcept { return labels_; }
    std::span<const double> weights() const noexcept { return weights_; }

    /// Calls f(scores) with the span of float or of double scores in use.
    template <class F>
    decltype(auto) with_scores(F&& f) const {
        if (wide_.empty())
            return f(std::span<const float>(narrow_));
        return f(std::span<const double>(wide_));
    }

    template <class F>
    void visit_state(F&& f) {
        f(narrow_);
        f(wide_);
        f(labels_);
        f(weights_);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(narrow_);
        f(wide_);
        f(labels_);
        f(weights_);
    }

    /// After a load (stream/serialize.hpp): float or double scores (not both), one score and
    /// one 0/1 label per row, finite scores, weights absent or one finite weight >= 0 per row.
    void check_state() const {
        if (!narrow_.empty() && !wide_.empty())
            fail_loaded("scores", "holds both float and double scores");
        const std::size_t n = labels_.size();
        if (n > max_packed_rows)
            fail_loaded("labels", "more than 2^31 - 1 rows");
        check_loaded_size(wide_.empty() ? "float scores" : "double scores",
                          wide_.empty() ? narrow_.size() : wide_.size(), n, "one per label");
        check_loaded_finite("float scores", std::span<const float>(narrow_));
        check_loaded_finite("double scores", std::span<const double>(wide_));
        check_loaded_labels("labels", std::span<const std::uint8_t>(labels_), 2);
        if (!weights_.empty())
            check_loaded_size("weights", weights_.size(), n, "one per row");
        check_loaded_nonnegative("weights", std::span<const double>(weights_));
    }

private:
    template <class T, class S>
    static auto views(std::string_view who, const T& truth, const S& scores) {
        static_assert(rankable_score_v<element_t<S>>, "heldout: ranking measures take float or double scores");
        auto y = values_of(truth, who, "truth");
        auto s = values_of(scores, who, "scores");
        check_nonempty(who, "truth", y.size());
        check_same_size(who, "scores", y.size(), s.size());
        check_binary(who, "truth", y);
        check_finite(who, "scores", s);
        return std::pair{y, s};
    }

    template <class L, class S>
    void append(std::string_view, std::span<const L> y, std::span<const S> s) {
        if constexpr (std::is_same_v<S, float>) {
            if (wide_.empty())
                narrow_.insert(narrow_.end(), s.begin(), s.end());
            else
                wide_.insert(wide_.end(), s.begin(), s.end());
        } else {
            bool exact = wide_.empty();
            for (std::size_t i = 0; exact && i < s.size(); ++i)
                exact = static_cast<double>(static_cast<float>(s[i])) == s[i];
            if (exact) {
                narrow_.insert(narrow_.end(), s.begin(), s.end()); // exact: every value is a float
            } else {
                widen();
                wide_.insert(wide_.end(), s.begin(), s.end());
            }
        }
        // Labels were checked to be 0/1, so the conversion keeps their value.
        labels_.insert(labels_.end(), y.begin(), y.end());
    }

    /// d += s, where s may be d itself (a self-merge: insert from its own range is undefined,
    /// so grow d first and copy from its new storage).
    template <class T, class U>
    static void append_all(std::vector<T>& d, const std::vector<U>& s) {
        if constexpr (std::is_same_v<T, U>) {
            if (&d == &s) {
                const std::size_t n = d.size();
                d.resize(2 * n);
                std::copy_n(d.data(), n, d.data() + n);
                return;
            }
        }
        d.insert(d.end(), s.begin(), s.end());
    }

    void widen() {
        if (!narrow_.empty()) {
            wide_.assign(narrow_.begin(), narrow_.end());
            narrow_.clear();
        }
    }

    std::vector<float> narrow_;
    std::vector<double> wide_;
    std::vector<std::uint8_t> labels_;
    std::vector<double> weights_;
};

/// Tie groups (ascending score) of the rows in a score store.
inline const std::vector<tie_group>& store_groups(std::string_view who, const score_store& st, rank_scratch& sc) {
    if (st.size() == 0)
        fail_undefined(who, "no observations");
    st.with_scores([&](auto s) {
        ranked_groups(who, s, st.labels(), st.weights(), sc);
        return 0;
    });
    return sc.groups;
}

/// The accumulator of a measure computed from the tie groups of the carried scores: Eval has
/// `static constexpr std::string_view who()` (called in every add and value, so it must not
/// build a string), `double operator()(const std::vector<tie_group>&, bool weighted) const`,
/// `bool operator==`, and visit_state over its parameters (they travel with the state,
/// so a deserialised accumulator computes the same measure).
template <class Eval>
class grouped_accumulator {
public:
    grouped_accumulator() = default;
    explicit grouped_accumulator(const Eval& e) : eval_(e) {}

    template <label_range T, real_range S>
    void add(const T& truth, const S& scores) {
        store_.add(eval_.who(), truth, scores);
    }
    template <label_range T, real_range S, weight_range W>
    void add(const T& truth, const S& scores, const W& weights) {
        store_.add(eval_.who(), truth, scores, weights);
    }
    template <std::integral Y, std::floating_point S>
    void add_one(Y y, S score, double w = 1.0) {
        store_.add_one(eval_.who(), y, score, w);
    }
    /// The measure of this set alone, computed in place (evaluate's route; the state is untouched).
    template <label_range T, real_range S>
    double score_set(const T& truth, const S& scores) const {
        static_assert(rankable_score_v<element_t<S>>, "heldout: ranking measures take float or double scores");
        const auto y = values_of(truth, eval_.who(), "truth");
        const auto s = values_of(scores, eval_.who(), "scores");
        return eval_(ranked_groups(eval_.who(), s, y, std::span<const double>{}, thread_scratch()), false);
    }
    template <label_range T, real_range S, weight_range W>
    double score_set(const T& truth, const S& scores, const W& weights) const {
        static_assert(rankable_score_v<element_t<S>>, "heldout: ranking measures take float or double scores");
        const auto y = values_of(truth, eval_.who(), "truth");
        const auto s = values_of(scores, eval_.who(), "scores");
        const auto w = values_of(weights, eval_.who(), "weights");
        check_same_size(eval_.who(), "weights", y.size(), w.size());
        return eval_(ranked_groups(eval_.who(), s, y, w, thread_scratch()), true);
    }
    void merge(const grouped_accumulator& o) {
        if (!(eval_ == o.eval_))
            fail_state(eval_.who(), "other",
                       "cannot merge a state of " + o.eval_.measure().name() + " into one of " +
                           eval_.measure().name() + ": the parameters differ");
        store_.merge(o.store_);
    }
    double value() const { return eval_(store_groups(eval_.who(), store_, thread_scratch()), store_.weighted()); }
    void reset() noexcept { store_.reset(); }
    std::size_t count() const noexcept { return store_.size(); }
    const Eval& parameters() const noexcept { return eval_; }
    /// The measure this state belongs to (its parameters included).
    auto measure() const { return eval_.measure(); }

    template <class F>
    void visit_state(F&& f) {
        eval_.visit_state(f);
        store_.visit_state(f);
    }
    template <class F>
    void visit_state(F&& f) const {
        eval_.visit_state(f);
        store_.visit_state(f);
    }

    /// After a load (stream/serialize.hpp): the parameters (an Eval with parameters checks
    /// them in check_loaded()), then the carried rows.
    void check_state() const {
        if constexpr (requires { eval_.check_loaded(); })
            eval_.check_loaded();
        store_.check_state();
    }

private:
    Eval eval_{};
    score_store store_;
};

} // namespace detail

namespace measure {

struct auc;

/// Running state of measure::auc: carries the scores; merge appends, value() sorts.
class auc_accumulator {
public:
    /// Adds a batch: truth 0/1 (any integral type), float or double scores.
    template <label_range T, real_range S>
    void add(const T& truth, const S& scores) {
        store_.add(who(), truth, scores);
    }
    /// Adds a weighted batch (weights finite and non-negative).
    template <label_range T, real_range S, weight_range W>
    void add(const T& truth, const S& scores, const W& weights) {
        store_.add(who(), truth, scores, weights);
    }
    /// Adds one observation.
    template <std::integral Y, std::floating_point S>
    void add_one(Y y, S score, double w = 1.0) {
        store_.add_one(who(), y, score, w);
    }
    /// The exact AUC of this set alone, computed in place (evaluate's route: no copy of the
    /// rows; the state is untouched).
    template <label_range T, real_range S>
    double score_set(const T& truth, const S& scores) const {
        static_assert(detail::rankable_score_v<element_t<S>>, "heldout: ranking measures take float or double scores");
        const auto y = values_of(truth, who(), "truth");
        const auto s = values_of(scores, who(), "scores");
        return detail::exact_auc(who(), s, y, detail::thread_scratch());
    }
    template <label_range T, real_range S, weight_range W>
    double score_set(const T& truth, const S& scores, const W& weights) const {
        static_assert(detail::rankable_score_v<element_t<S>>, "heldout: ranking measures take float or double scores");
        const auto y = values_of(truth, who(), "truth");
        const auto s = values_of(scores, who(), "scores");
        const auto w = values_of(weights, who(), "weights");
        detail::check_same_size(who(), "weights", y.size(), w.size());
        return detail::exact_weighted_auc(who(), s, y, w, detail::thread_scratch());
    }
    void merge(const auc_accumulator& o) { store_.merge(o.store_); }
    /// The measure this state belongs to.
    auc measure() const;

    /// The exact AUC of everything added (undefined_error when a class is absent).
    double value() const {
        if (store_.size() == 0)
            detail::fail_undefined(who(), "no observations");
        if (store_.weighted())
            return store_.with_scores([&](auto s) {
                return detail::exact_weighted_auc(who(), s, store_.labels(), store_.weights(),
                                                  detail::thread_scratch());
            });
        return store_.with_scores(
            [&](auto s) { return detail::exact_auc(who(), s, store_.labels(), detail::thread_scratch()); });
    }
    void reset() noexcept { store_.reset(); }
    std::size_t count() const noexcept { return store_.size(); }

    template <class F>
    void visit_state(F&& f) {
        store_.visit_state(f);
    }
    template <class F>
    void visit_state(F&& f) const {
        store_.visit_state(f);
    }

    /// After a load (stream/serialize.hpp): the carried rows.
    void check_state() const { store_.check_state(); }

private:
    static std::string_view who() { return "measure AUC"; }
    detail::score_store store_;
};

/// Exact area under the ROC curve, ties counted one half, optionally weighted.
struct auc {
    static constexpr direction better = direction::higher_is_better;
    static constexpr prediction_kind kind = prediction_kind::score;
    using capabilities = offers<cap::whole_set, cap::case_components, cap::resampling, cap::serialisable>;
    static constexpr std::string_view key = "auc";

    std::string name() const { return "AUC"; }
    auc_accumulator accumulator() const { return {}; }

    /// DeLong's structural components (DeLong, DeLong & Clarke-Pearson 1988): for each case
    /// (truth 1, in row order) the share of controls it outranks, ties one half; for each
    /// control the share of cases that outrank it. From one sort (Sun & Xu 2014's midranks).
    template <label_range T, real_range S>
    heldout::case_components case_components(const T& truth, const S& scores) const {
        const ranked_sample r(truth, scores);
        heldout::case_components c;
        c.value = r.auc(); // undefined_error when a class is absent
        const std::size_t n = r.size();
        const double m = static_cast<double>(r.positives()), q = static_cast<double>(r.negatives());
        std::vector<double> per_row(n);
        std::vector<std::uint8_t> is_case(n);
        std::uint64_t neg_below = 0, pos_below = 0;
        for (std::size_t start = 0; start < n;) {
            std::size_t end = start;
            std::uint64_t gp = 0, gn = 0;
            for (;; ++end) {
                (r.positive(end) ? gp : gn) += 1;
                if (r.ends_group(end))
                    break;
            }
            const std::uint64_t pos_above = r.positives() - pos_below - gp;
            const double v10 = static_cast<double>(2 * neg_below + gn) / (2 * q);
            const double v01 = static_cast<double>(2 * pos_above + gp) / (2 * m);
            for (std::size_t i = start; i <= end; ++i) {
                per_row[r.row(i)] = r.positive(i) ? v10 : v01;
                is_case[r.row(i)] = r.positive(i) ? 1 : 0;
            }
            neg_below += gn;
            pos_below += gp;
            start = end + 1;
        }
        c.cases.reserve(r.positives());
        c.controls.reserve(r.negatives());
        for (std::size_t i = 0; i < n; ++i)
            (is_case[i] ? c.cases : c.controls).push_back(per_row[i]);
        return c;
    }

    /// The bootstrap engine: one sort, then one integer pass per replicate (estimate/bootstrap.hpp).
    template <label_range T, real_range S>
    detail::auc_resample_engine<T, S> resampler(const T& truth, const S& scores, std::string_view who) const {
        return detail::auc_resample_engine<T, S>(truth, scores, who);
    }
};

inline auc auc_accumulator::measure() const { return {}; }

} // namespace measure

HELDOUT_NAMESPACE_END
