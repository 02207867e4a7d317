// heldout/measure/brier_score.hpp — the Brier score of probability forecasts: binary
// P(y = 1) against 0/1 truth, and Brier's original multi-category form on rows.
//
//   using namespace heldout;
//   double b  = evaluate(measure::brier_score{}, y, p);                  // mean (p - y)^2, in [0, 1]
//   double bw = evaluate(measure::brier_score{}, y, p, w);               // weighted
//   double bm = evaluate(measure::multiclass_brier_score{}, labels, probs);  // in [0, 2]
//
// Brier (1950), "Verification of forecasts expressed in terms of probability", Monthly
// Weather Review 78:1-3. Binary: BS = sum w_i (p_i - y_i)^2 / sum w_i with p = P(y = 1).
// Multiclass (the original): BS = sum_i w_i sum_k (p_ik - o_ik)^2 / sum w_i, o_ik = [y_i = k].
// For two classes the original is exactly twice the binary form (both classes' squared
// errors are equal), so brier_score = multiclass_brier_score / 2 on rows (1 - p, p).
#pragma once

#include <heldout/core/measure.hpp>
#include <heldout/detail/pointwise_pass.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/detail/validate.hpp>

#include <cstdint>
#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace measure {
struct brier_score;
}
namespace detail {

/// (p - y)^2 in double, in the form binary_pass wants.
struct brier_term : binary_probability_term_base {
    static constexpr bool infinite_ok = false;
    template <class T>
    HELDOUT_DETAIL_INLINE double fast(T y, T p) const noexcept {
        const double d = static_cast<double>(p) - static_cast<double>(y);
        return d * d;
    }
    template <class T>
    HELDOUT_DETAIL_INLINE same_width_uint<T> flag(T, T p) const noexcept {
        return outside_bits(p, T(0), T(1));
    }
    double exact(double y, double p) const noexcept { return (p - y) * (p - y); }
};

struct brier_policy {
    static constexpr std::string_view name = "Brier score";
    template <class T>
    brier_term term() const {
        return {};
    }
    double exact(double y, double p) const noexcept { return (p - y) * (p - y); }
    void validate(std::string_view) const {}
    template <class F>
    void visit_state(F&&) const {}
    bool operator==(const brier_policy&) const = default;
    measure::brier_score measure() const;
};

} // namespace detail

namespace measure {

/// Running state of brier_score.
using brier_score_accumulator = detail::binary_mean_accumulator<detail::brier_policy>;

/// Binary Brier score: mean (p - y)^2 with p = P(y = 1), truth 0/1.
struct brier_score {
    static constexpr direction better = direction::lower_is_better;
    static constexpr prediction_kind kind = prediction_kind::probability;

    using capabilities = offers<cap::row_losses, cap::serialisable>;
    static constexpr std::string_view key = "brier_score";

    std::string name() const { return "Brier score"; }
    brier_score_accumulator accumulator() const { return brier_score_accumulator(detail::brier_policy{}); }
    /// (p - y)^2 of each row (rows that add() accepted).
    template <value_range T, real_range P>
    void row_losses(const T& truth, const P& prediction, std::span<double> out) const {
        auto t = values_of(truth);
        auto p = values_of(prediction);
        for (std::size_t i = 0; i < out.size(); ++i)
            out[i] = detail::brier_policy{}.exact(static_cast<double>(t[i]), static_cast<double>(p[i]));
    }
};

struct multiclass_brier_score;

/// Running state of multiclass_brier_score.
class multiclass_brier_score_accumulator {
public:
    /// Adds labels 0..k-1 and n x k class-probability rows (each row sums to 1).
    template <label_range T, probability_rows P>
    void add(const T& truth, const P& prediction) {
        add_impl(truth, prediction, static_cast<const double*>(nullptr));
    }
    template <label_range T, probability_rows P, weight_range W>
    void add(const T& truth, const P& prediction, const W& weights) {
        auto w = values_of(weights, who(), "weights");
        detail::check_same_size(who(), "weights", values_of(truth, who(), "truth").size(), w.size());
        detail::check_weights(who(), w);
        add_impl(truth, prediction, w.data());
    }
    void merge(const multiclass_brier_score_accumulator& o) {
        score_.merge(o.score_);
        weight_.merge(o.weight_);
        count_ += o.count_;
    }
    double value() const {
        if (count_ == 0)
            detail::fail_undefined(who(), "no observations");
        if (!(weight_.value() > 0))
            detail::fail_undefined(who(), "total weight is zero");
        return score_.value() / weight_.value();
    }
    void reset() noexcept {
        score_.reset();
        weight_.reset();
        count_ = 0;
    }
    std::uint64_t count() const noexcept { return count_; }
    /// The measure this state belongs to.
    multiclass_brier_score measure() const;

    template <class F>
    void visit_state(F&& f) {
        score_.visit_state(f);
        weight_.visit_state(f);
        f(count_);
    }
    template <class F>
    void visit_state(F&& f) const {
        score_.visit_state(f);
        weight_.visit_state(f);
        f(count_);
    }

    /// After a load (stream/serialize.hpp): finite sums, weight and score >= 0.
    void check_state() const {
        score_.check_loaded("score sum");
        weight_.check_loaded("weight sum");
        if (score_.value() < 0)
            detail::fail_loaded("score sum", "is negative");
        if (weight_.value() < 0)
            detail::fail_loaded("weight sum", "is negative");
    }

private:
    static std::string_view who() { return "measure multiclass Brier score"; }

    template <class T, class P, class W>
    void add_impl(const T& truth, const P& prediction, const W* w) {
        auto t = values_of(truth, who(), "truth");
        const auto rows = rows_of(prediction);
        detail::check_nonempty(who(), "truth", t.size());
        detail::check_same_size(who(), "prediction", t.size(), rows.rows);
        detail::check_probability_rows(who(), "prediction", rows);
        detail::check_labels(who(), "truth", t, rows.cols);
        detail::compensated_sum score, weight;
        for (std::size_t i = 0; i < t.size(); ++i) {
            const double wi = w ? static_cast<double>(w[i]) : 1.0;
            double s = 0;
            for (std::size_t k = 0; k < rows.cols; ++k) {
                const double d = static_cast<double>(rows(i, k)) - (static_cast<std::size_t>(t[i]) == k ? 1.0 : 0.0);
                s += d * d;
            }
            score.add(wi * s);
            weight.add(wi);
        }
        score_.merge(score);
        weight_.merge(weight);
        count_ += t.size();
    }

    detail::compensated_sum score_{};
    detail::compensated_sum weight_{};
    std::uint64_t count_ = 0;
};

/// Brier's original multi-category score on class-probability rows, range [0, 2].
struct multiclass_brier_score {
    static constexpr direction better = direction::lower_is_better;
    static constexpr prediction_kind kind = prediction_kind::class_probabilities;

    using capabilities = offers<cap::row_losses, cap::serialisable>;
    static constexpr std::string_view key = "multiclass_brier_score";

    std::string name() const { return "multiclass Brier score"; }
    multiclass_brier_score_accumulator accumulator() const { return {}; }
    /// sum_k (p_ik - [y_i = k])^2 of each row (rows that add() accepted).
    template <label_range T, probability_rows P>
    void row_losses(const T& truth, const P& prediction, std::span<double> out) const {
        auto t = values_of(truth);
        const auto rows = rows_of(prediction);
        for (std::size_t i = 0; i < out.size(); ++i) {
            double s = 0;
            for (std::size_t k = 0; k < rows.cols; ++k) {
                const double d = static_cast<double>(rows(i, k)) - (static_cast<std::size_t>(t[i]) == k ? 1.0 : 0.0);
                s += d * d;
            }
            out[i] = s;
        }
    }
};

inline multiclass_brier_score multiclass_brier_score_accumulator::measure() const { return {}; }

} // namespace measure

inline measure::brier_score detail::brier_policy::measure() const { return {}; }

namespace measure {} // namespace measure
HELDOUT_NAMESPACE_END
