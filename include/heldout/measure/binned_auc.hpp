// heldout/measure/binned_auc.hpp — a fixed-memory AUC for data too large to carry: one score
// histogram per class over fixed bins of a fixed score range, merged exactly, with a bound on
// its distance to the exact AUC that it reports itself.
//
//   heldout::measure::binned_auc m{.bins = 4096, .low = 0, .high = 1};   // probabilities
//   auto acc = m.accumulator();                                         // 2 x 4096 doubles, fixed
//   acc.add(truth_shard, scores_shard);     // any number of shards, any order
//   acc.merge(other_machine_acc);           // exact: histograms add
//   double a = acc.value();                 // |a - exact AUC| <= acc.error_bound()
//
// Bins: [low, high] cut into `bins` equal parts; a score s goes to bin
// floor((s - low) * bins / (high - low)), s = high to the last bin. That map is monotone in s
// (a difference and a product by a positive constant, each rounded to nearest, never reverse an
// order), so every score of bin b is <= every score of bin b + 1 (ties on a boundary land in
// one bin).
// Value: pairs in different bins are ordered by their bins; pairs in the same bin are counted
// as ties (one half): A_bin = sum_b P_b (N_{<b} + N_b / 2) / (P N), with P_b, N_b the positive
// and negative weight of bin b.
// Error bound: the exact AUC differs only on same-bin pairs, where the exact psi is 0, 1/2 or 1
// against the binned 1/2, so each such pair errs by at most 1/2 of its weight:
//   |A_bin - A_exact| <= sum_b P_b N_b / (2 P N)        (error_bound()).
// It is attained when, in every shared bin, all positives lie above (or all below) the
// negatives; it shrinks as bins narrow relative to the score density.
// Errors: a score outside [low, high] or not finite, labels outside 0/1, bad weights ->
// input_error with the index; bins = 0 or above 2^24, or low >= high -> input_error; merging
// accumulators of different bins or range -> input_error; a class absent -> undefined_error;
// a bin whose weight overflows double -> input_error naming the weights. The value does not
// depend on the scale of the weights (products are formed in units of the largest bin).
#pragma once

#include <heldout/core/measure.hpp>
#include <heldout/detail/ranks.hpp>
#include <heldout/detail/state_checks.hpp>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <limits>
#include <span>
#include <string>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

/// Running state of binned_auc: the bin layout and one weight histogram per class.
struct binned_auc;

class binned_auc_accumulator {
public:
    binned_auc_accumulator() : binned_auc_accumulator(1024, 0.0, 1.0) {}
    binned_auc_accumulator(std::size_t bins, double low, double high) : bins_(bins), low_(low), high_(high) {
        if (bins == 0)
            detail::fail(who(), "bins", "must be positive");
        if (bins > max_bins)
            detail::fail(who(), "bins",
                         std::to_string(bins) + " exceeds the limit of " + std::to_string(max_bins) + " (2^24) bins");
        if (!(std::isfinite(low) && std::isfinite(high) && low < high))
            detail::fail(who(), "high",
                         "need finite low < high, got [" + detail::number_text(low) + ", " + detail::number_text(high) +
                             "]");
        positive_.assign(bins, 0.0);
        negative_.assign(bins, 0.0);
    }

    template <label_range T, real_range S>
    void add(const T& truth, const S& scores) {
        auto [y, s] = views(truth, scores);
        check_scores(s);
        for (std::size_t i = 0; i < y.size(); ++i)
            (y[i] ? positive_ : negative_)[bin(static_cast<double>(s[i]))] += 1.0;
    }
    template <label_range T, real_range S, weight_range W>
    void add(const T& truth, const S& scores, const W& weights) {
        auto [y, s] = views(truth, scores);
        auto w = values_of(weights, who(), "weights");
        detail::check_same_size(who(), "weights", y.size(), w.size());
        detail::check_weights(who(), w);
        check_scores(s);
        for (std::size_t i = 0; i < y.size(); ++i)
            (y[i] ? positive_ : negative_)[bin(static_cast<double>(s[i]))] += static_cast<double>(w[i]);
    }
    template <std::integral Y, std::floating_point S>
    void add_one(Y y, S score, double w = 1.0) {
        if (!detail::is_binary_label(y))
            detail::fail(who(), "truth",
                         "label " + std::to_string(static_cast<long long>(y)) + " outside the classes 0..1");
        const double s = static_cast<double>(score);
        if (!(s >= low_ && s <= high_))
            detail::fail(who(), "score", "score " + detail::number_text(s) + " outside the bin range " + range());
        if (!std::isfinite(w) || w < 0)
            detail::fail(who(), "weights", "weight must be finite and non-negative");
        (y ? positive_ : negative_)[bin(s)] += w;
    }

    /// The measure this state belongs to (bins and range included).
    binned_auc measure() const;

    /// Exact: the histograms add (same layout required).
    void merge(const binned_auc_accumulator& o) {
        if (o.bins_ != bins_ || o.low_ != low_ || o.high_ != high_)
            detail::fail_state(who(), "other",
                               "different bins or range (" + std::to_string(o.bins_) + " bins on " + o.range() +
                                   " against " + std::to_string(bins_) + " on " + range() + ")");
        for (std::size_t b = 0; b < positive_.size(); ++b) {
            positive_[b] += o.positive_[b];
            negative_[b] += o.negative_[b];
        }
    }

    double value() const {
        const sums s = totals();
        return s.u / s.p / s.n;
    }
    /// Upper bound on |value() - exact AUC|: sum_b P_b N_b / (2 P N).
    double error_bound() const {
        const sums s = totals();
        return s.shared / (2 * s.p * s.n);
    }

    void reset() noexcept {
        std::fill(positive_.begin(), positive_.end(), 0.0);
        std::fill(negative_.begin(), negative_.end(), 0.0);
    }
    std::size_t bins() const noexcept { return static_cast<std::size_t>(bins_); }

    template <class F>
    void visit_state(F&& f) {
        f(bins_);
        f(low_);
        f(high_);
        f(positive_);
        f(negative_);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(bins_);
        f(low_);
        f(high_);
        f(positive_);
        f(negative_);
    }

    /// After a load (stream/serialize.hpp): bins in 1..2^24 and equal to the stored bins,
    /// finite low < high, bin weights finite and >= 0.
    void check_state() const {
        if (bins_ == 0 || bins_ > max_bins)
            detail::fail_loaded("bins", std::to_string(bins_) + " outside 1..2^24");
        detail::check_loaded_size("positive", positive_.size(), static_cast<std::size_t>(bins_), "one per bin");
        detail::check_loaded_size("negative", negative_.size(), static_cast<std::size_t>(bins_), "one per bin");
        if (!(std::isfinite(low_) && std::isfinite(high_) && low_ < high_ && std::isfinite(high_ - low_)))
            detail::fail_loaded("range", "need finite low < high, got " + range());
        detail::check_loaded_nonnegative("positive", std::span<const double>(positive_));
        detail::check_loaded_nonnegative("negative", std::span<const double>(negative_));
    }

private:
    struct sums {
        double u, p, n, shared;
    };
    static std::string_view who() { return "measure binned AUC"; }
    // Why 2^24: that many bins already hold 256 MiB of state, copied by every merge and
    // serialisation, and resolve [low, high] finer than a float resolves [0.5, 1) (2^23
    // values); the exact measure::auc needs less memory than that up to about 2^24 rows. A
    // larger count is a mistake, refused before it allocates (1e12 bins would take 16 TB).
    static constexpr std::size_t max_bins = std::size_t{1} << 24;
    std::string range() const { return "[" + detail::number_text(low_) + ", " + detail::number_text(high_) + "]"; }

    std::size_t bin(double s) const noexcept {
        const double x = (s - low_) * (static_cast<double>(bins_) / (high_ - low_));
        const std::size_t b = x <= 0 ? 0 : static_cast<std::size_t>(x);
        return b < bins_ ? b : static_cast<std::size_t>(bins_ - 1);
    }

    template <class T, class S>
    auto views(const T& truth, const S& scores) const {
        auto y = values_of(truth, who(), "truth");
        auto s = values_of(scores, who(), "scores");
        detail::check_nonempty(who(), "truth", y.size());
        detail::check_same_size(who(), "scores", y.size(), s.size());
        detail::check_binary(who(), "truth", y);
        return std::pair{y, s};
    }
    template <class S>
    void check_scores(std::span<const S> s) const {
        for (std::size_t i = 0; i < s.size(); ++i) {
            const double x = static_cast<double>(s[i]);
            if (!(x >= low_ && x <= high_)) {
                if (std::isnan(x))
                    detail::fail_at(who(), "scores", "not finite (nan)", i);
                detail::fail_at(who(), "scores",
                                "score " + detail::number_text(x) + " outside the bin range " + range(), i);
            }
        }
    }

    /// The sums in units of the largest bin weight (scaled by a power of two, exact), so that
    /// the products of bin weights neither overflow nor underflow at any scale of the weights;
    /// value() and error_bound() are ratios, so the units cancel to the last bit.
    sums totals() const {
        double top = 0;
        for (std::size_t b = 0; b < positive_.size(); ++b)
            top = std::max(top, std::max(positive_[b], negative_[b]));
        if (!(top <= std::numeric_limits<double>::max()))
            detail::fail(who(), "weights",
                         "the weight of a bin overflows double (beyond 1.8e308): scale the weights down");
        const double scale = detail::unit_scale(top);
        detail::compensated_sum u, below, pos, shared;
        for (std::size_t b = 0; b < positive_.size(); ++b) {
            const double p = positive_[b] * scale, q = negative_[b] * scale;
            u.add(p * (below.value() + 0.5 * q));
            shared.add(p * q);
            below.add(q);
            pos.add(p);
        }
        detail::check_both_classes(who(), pos.value(), below.value(), true);
        return {u.value(), pos.value(), below.value(), shared.value()};
    }

    std::uint64_t bins_;
    double low_, high_;
    std::vector<double> positive_, negative_;
};

/// Fixed-memory AUC over `bins` equal bins of [low, high], with a reported error bound.
struct binned_auc {
    static constexpr direction better = direction::higher_is_better;
    static constexpr prediction_kind kind = prediction_kind::score;
    using capabilities = offers<cap::serialisable>;
    static constexpr std::string_view key = "binned_auc";
    std::size_t bins = 1024;
    double low = 0;
    double high = 1;
    bool operator==(const binned_auc&) const = default;
    std::string name() const {
        std::string p;
        detail::parameter_if<std::size_t>(p, "bins", bins, 1024,
                                          [](const std::size_t& b) { return std::to_string(b); });
        if (low != 0 || high != 1)
            p += (p.empty() ? "" : ", ") + std::string("range [") + detail::number_text(low) + ", " +
                 detail::number_text(high) + "]";
        return detail::with_parameters("binned AUC", p);
    }
    binned_auc_accumulator accumulator() const { return binned_auc_accumulator(bins, low, high); }
};

inline binned_auc binned_auc_accumulator::measure() const { return {bins_, low_, high_}; }

} // namespace measure
HELDOUT_NAMESPACE_END
