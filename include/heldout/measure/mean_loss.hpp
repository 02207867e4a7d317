// heldout/measure/mean_loss.hpp — a pointwise loss averaged over a set: the bridge from an
// inner loss to an outer measure.
//
//   using heldout::measure::mean_loss;
//   double mse = heldout::evaluate(mean_loss<heldout::loss::squared>{}, y, f);  // == measure::mse
//   double q90 = heldout::evaluate(mean_loss<heldout::loss::pinball>{{0.9}}, y, f, w);
//
// value = sum_i w_i L(y_i, f_i) / sum_i w_i, accumulated in fixed-order blocks of
// compensated double sums (detail/sum.hpp), so the result does not depend on how the
// data are batched beyond the last bits, and 1e8 rows lose no digits. Truth is real, or
// 0/1 for losses that declare truth_kind::binary; predictions are floating point.
#pragma once

#include <heldout/core/loss.hpp>
#include <heldout/core/measure.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/detail/validate.hpp>
#include <heldout/loss/squared.hpp>

#include <array>
#include <cstdint>
#include <string>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

template <pointwise_loss L>
struct mean_loss;

namespace detail_mean_loss {
template <class L>
std::string name_of() {
    if constexpr (requires { L::measure_name; })
        return std::string(L::measure_name);
    else
        return "mean " + std::string(L::name) + " loss";
}
} // namespace detail_mean_loss

/// Running state of mean_loss<L>: weighted loss sum, weight sum, row count.
template <pointwise_loss L>
class mean_loss_accumulator {
public:
    mean_loss_accumulator() = default;
    explicit mean_loss_accumulator(const L& l) : loss_(l) {}

    /// Adds a batch: truth (real, or 0/1 for binary losses) and floating-point predictions.
    template <value_range T, real_range P>
    void add(const T& truth, const P& prediction) {
        auto [t, p] = views(truth, prediction);
        std::array<detail::compensated_sum, 2> s{};
        detail::blocked_sum<2>(
            t.size(),
            [&](std::size_t i, std::array<double, 2>& out) {
                const double y = static_cast<double>(t[i]);
                const double f = static_cast<double>(p[i]);
                out[0] = loss_.value(y, f);
                out[1] = (y - y) + (f - f); // 0 when both are finite, NaN otherwise
            },
            s);
        if (!std::isfinite(s[1].value()) || !std::isfinite(s[0].value()))
            report(t, p);
        loss_sum_.merge(s[0]);
        weight_sum_.add(static_cast<double>(t.size()));
        count_ += t.size();
    }

    /// Adds a weighted batch (weights finite and non-negative).
    template <value_range T, real_range P, weight_range W>
    void add(const T& truth, const P& prediction, const W& weights) {
        auto [t, p] = views(truth, prediction);
        auto w = values_of(weights, who(), "weights");
        detail::check_same_size(who(), "weights", t.size(), w.size());
        detail::check_weights(who(), w);
        std::array<detail::compensated_sum, 3> s{};
        detail::blocked_sum<3>(
            t.size(),
            [&](std::size_t i, std::array<double, 3>& out) {
                const double y = static_cast<double>(t[i]);
                const double f = static_cast<double>(p[i]);
                const double wi = static_cast<double>(w[i]);
                out[0] = wi * loss_.value(y, f);
                out[1] = wi;
                out[2] = (y - y) + (f - f);
            },
            s);
        if (!std::isfinite(s[2].value()) || !std::isfinite(s[0].value()))
            report(t, p);
        loss_sum_.merge(s[0]);
        weight_sum_.merge(s[1]);
        count_ += t.size();
    }

    /// Adds one observation.
    void add_one(double y, double f, double w = 1.0) {
        if (!std::isfinite(y))
            detail::fail(who(), "truth", "not finite");
        if (!std::isfinite(f))
            detail::fail(who(), "prediction", "not finite");
        if (!std::isfinite(w) || w < 0)
            detail::fail(who(), "weights", "weight must be finite and non-negative");
        if constexpr (loss_truth_v<L> == truth_kind::binary)
            if (y != 0.0 && y != 1.0)
                detail::fail(who(), "truth", "label " + detail::number_text(y) + " outside the classes 0..1");
        loss_sum_.add(w * loss_.value(y, f));
        weight_sum_.add(w);
        ++count_;
    }

    void merge(const mean_loss_accumulator& o) {
        loss_sum_.merge(o.loss_sum_);
        weight_sum_.merge(o.weight_sum_);
        count_ += o.count_;
    }

    double value() const {
        if (count_ == 0)
            detail::fail_undefined(who(), "no observations");
        const double w = weight_sum_.value();
        if (!(w > 0))
            detail::fail_undefined(who(), "total weight is zero");
        return loss_sum_.value() / w;
    }

    void reset() noexcept {
        loss_sum_.reset();
        weight_sum_.reset();
        count_ = 0;
    }

    std::uint64_t count() const noexcept { return count_; }
    double total_weight() const noexcept { return weight_sum_.value(); }
    const L& loss() const noexcept { return loss_; }

    template <class F>
    void visit_state(F&& f) {
        loss_sum_.visit_state(f);
        weight_sum_.visit_state(f);
        f(count_);
    }
    template <class F>
    void visit_state(F&& f) const {
        loss_sum_.visit_state(f);
        weight_sum_.visit_state(f);
        f(count_);
    }

private:
    static std::string who() { return "measure " + detail_mean_loss::name_of<L>(); }

    template <class T, class P>
    auto views(const T& truth, const P& prediction) const {
        auto t = values_of(truth, who(), "truth");
        auto p = values_of(prediction, who(), "prediction");
        detail::check_nonempty(who(), "truth", t.size());
        detail::check_same_size(who(), "prediction", t.size(), p.size());
        if constexpr (loss_truth_v<L> == truth_kind::binary) {
            if constexpr (std::integral<element_t<T>>)
                detail::check_binary(who(), "truth", t);
            else
                for (std::size_t i = 0; i < t.size(); ++i)
                    if (t[i] != 0 && t[i] != 1)
                        detail::fail_at(
                            who(), "truth",
                            "label " + detail::number_text(static_cast<double>(t[i])) + " outside the classes 0..1", i);
        }
        return std::pair{t, p};
    }

    template <class T, class P>
    [[noreturn]] void report(std::span<const T> t, std::span<const P> p) const {
        detail::check_finite(who(), "truth", t);
        detail::check_finite(who(), "prediction", p);
        detail::fail(who(), "prediction", "loss is not finite (overflow, or a prediction outside the loss's domain)");
    }

    L loss_{};
    detail::compensated_sum loss_sum_{};
    detail::compensated_sum weight_sum_{};
    std::uint64_t count_ = 0;
};

/// The mean of loss L over the observations (weighted mean when weights are given).
template <pointwise_loss L>
struct mean_loss {
    static constexpr direction better = direction::lower_is_better;
    static constexpr prediction_kind kind =
        loss_truth_v<L> == truth_kind::binary ? prediction_kind::score : prediction_kind::real;

    L loss{};

    std::string name() const { return detail_mean_loss::name_of<L>(); }
    mean_loss_accumulator<L> accumulator() const { return mean_loss_accumulator<L>(loss); }
};

/// Mean squared error: mean_loss<loss::squared> itself.
using mse = mean_loss<loss::squared>;

} // namespace measure
HELDOUT_NAMESPACE_END
