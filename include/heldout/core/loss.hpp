// heldout/core/loss.hpp — what a pointwise loss is.
//
//   struct my_loss {                                   // a user's own loss
//       static constexpr std::string_view name = "log-cosh";
//       double value(double y, double f) const { return std::log(std::cosh(f - y)); }
//       double derivative(double y, double f) const { return std::tanh(f - y); }
//       double second_derivative(double y, double f) const {
//           double t = std::tanh(f - y); return 1 - t * t; }
//   };
//   static_assert(heldout::differentiable_loss<my_loss>);
//   double m = heldout::evaluate(heldout::measure::mean_loss<my_loss>{}, y, f);
//
// A pointwise loss scores one prediction f against one truth y. An *inner* loss is what a
// learner minimises (it needs derivatives in f); averaged over a test set, the same loss is
// an *outer* measure (measure::mean_loss<L>). Truth is real (regression) unless the loss
// declares `static constexpr heldout::truth_kind truth = heldout::truth_kind::binary`, in
// which case y is 0 or 1 and f is a real score (for logistic: a logit).
#pragma once

#include <heldout/core/config.hpp>

#include <concepts>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN

/// What the truth of a loss is: a real number, or a 0/1 label.
enum class truth_kind { real, binary };

/// A loss of one prediction: value(y, f) and a name.
template <class L>
concept pointwise_loss = std::copy_constructible<L> && requires(const L& l, double y, double f) {
    { l.value(y, f) } -> std::convertible_to<double>;
    { L::name } -> std::convertible_to<std::string_view>;
};

/// A pointwise loss with first and second derivatives with respect to the prediction f.
template <class L>
concept differentiable_loss = pointwise_loss<L> && requires(const L& l, double y, double f) {
    { l.derivative(y, f) } -> std::convertible_to<double>;
    { l.second_derivative(y, f) } -> std::convertible_to<double>;
};

namespace detail {
template <class L>
constexpr truth_kind loss_truth() {
    if constexpr (requires { L::truth; })
        return L::truth;
    else
        return truth_kind::real;
}
} // namespace detail

/// The truth kind of a loss (real unless it declares `truth`).
template <pointwise_loss L>
inline constexpr truth_kind loss_truth_v = detail::loss_truth<L>();

HELDOUT_NAMESPACE_END
