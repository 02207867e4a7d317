// heldout/core/loss.hpp — what a pointwise loss is, and what it may declare.
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
//
// Optional declarations of a loss, all read in one place (heldout::loss_traits<L>):
//  * `static constexpr heldout::truth_kind truth` — binary for 0/1 truth (real otherwise);
//  * `static constexpr std::string_view measure_name` — the mean's name ("MSE");
//  * `static constexpr bool propagates_non_finite = true` — a NaN or infinite input always
//    gives a non-finite value, so the fused pass need not check inputs separately (faster);
//  * `static constexpr std::string_view truth_domain` — named in the message when the loss
//    is not finite on finite inputs (poisson: "y >= 0");
//  * parameters (data members): `bool operator==(const L&) const` (identity of the measure),
//    `visit_state(f)` const and non-const (serialised state), `void validate(std::string_view
//    who) const` (checks them) and `std::string parameters_text() const` ("delta 1.5", shown
//    in the measure's printed name when not the default).
// A loss with data members that lacks operator== or visit_state does not compile as a
// measure's loss (its parameters would be lost from the identity or the bytes).
#pragma once

#include <heldout/core/config.hpp>

#include <concepts>
#include <string>
#include <string_view>
#include <type_traits>

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
struct loss_state_probe {
    template <class X>
    void operator()(const X&) const noexcept {}
};
} // namespace detail

/// Everything a loss declares, read in one place.
template <pointwise_loss L>
struct loss_traits {
    static constexpr truth_kind truth = [] {
        if constexpr (requires {
                          { L::truth } -> std::convertible_to<truth_kind>;
                      })
            return static_cast<truth_kind>(L::truth);
        else
            return truth_kind::real;
    }();
    static constexpr bool propagates_non_finite = [] {
        if constexpr (requires {
                          { L::propagates_non_finite } -> std::convertible_to<bool>;
                      })
            return static_cast<bool>(L::propagates_non_finite);
        else
            return false;
    }();
    static constexpr bool has_parameters = !std::is_empty_v<L>;

    /// The mean's name: measure_name, or "mean <name> loss".
    static std::string measure_name() {
        if constexpr (requires {
                          { L::measure_name } -> std::convertible_to<std::string_view>;
                      })
            return std::string(L::measure_name);
        else
            return "mean " + std::string(L::name) + " loss";
    }
    /// What the loss says about its domain, for messages ("" when it says nothing).
    static constexpr std::string_view truth_domain() noexcept {
        if constexpr (requires {
                          { L::truth_domain } -> std::convertible_to<std::string_view>;
                      })
            return L::truth_domain;
        else
            return {};
    }
    /// Checks the parameters (the loss's validate, when it has one).
    static void validate(const L& l, std::string_view who) {
        if constexpr (requires { l.validate(who); })
            l.validate(who);
    }
    /// The parameters for printed names ("" for the default parameters).
    static std::string parameters_text(const L& l) {
        if constexpr (!has_parameters) {
            (void)l;
            return {};
        } else {
            if (l == L{})
                return {};
            if constexpr (requires {
                              { l.parameters_text() } -> std::convertible_to<std::string>;
                          })
                return l.parameters_text();
            else
                return "non-default parameters";
        }
    }
    /// Checks at compile time that a loss with parameters declares what they need.
    static constexpr bool check() {
        if constexpr (has_parameters) {
            static_assert(std::equality_comparable<L>, "heldout: this loss has data members (parameters): declare "
                                                       "`bool operator==(const my_loss&) const = default;` so that "
                                                       "measures with different parameters are told apart");
            static_assert(std::default_initializable<L>, "heldout: a loss with parameters needs default values");
            static_assert(
                requires(const L& c, L& m) {
                    c.visit_state(detail::loss_state_probe{});
                    m.visit_state(detail::loss_state_probe{});
                },
                "heldout: this loss has data members (parameters): give it visit_state(f) (const and non-const) "
                "calling "
                "f on each, so serialised state keeps them");
        }
        return true;
    }
};

/// The truth kind of a loss (real unless it declares `truth`).
template <pointwise_loss L>
inline constexpr truth_kind loss_truth_v = loss_traits<L>::truth;

HELDOUT_NAMESPACE_END
