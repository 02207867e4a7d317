// heldout/core/traits.hpp — what a measure declares about itself, read in one place: its
// identity (type + parameters), the kinds of its truth and prediction, its direction and
// the capabilities it offers; and the checks that turn a wrong declaration into a readable
// compile error.
//
//   using T = heldout::measure_traits<heldout::measure::auc>;
//   static_assert(std::is_same_v<T::prediction, heldout::kinds::score>);
//   static_assert(T::offers<heldout::cap::case_components>);
//   heldout::same_measure(heldout::measure::f_beta{2.0}, heldout::measure::f_beta{1.0});  // false
//
// Identity. Two measures are the same measure when they have the same type and equal
// parameters. A measure's parameters are its data members: an empty measure type has none;
// a measure with data members says how they compare with `bool operator==(const M&) const`
// (usually `= default`), or it does not compile as a measure. Printed names are for people
// only; nothing is ever matched by name().
//
// Direction. Most measures improve one way (`direction::lower_is_better` or
// `higher_is_better`). Some have an ideal value instead (a calibration slope is best at 1,
// a calibration intercept at 0): such a measure declares
//     static constexpr heldout::direction better = heldout::direction::toward_ideal;
//     static constexpr double ideal = 1.0;
// (both or neither; check_measure refuses one without the other), and everything that
// ranks values (comparisons, tuning, early stopping) ranks them by |value - ideal|.
#pragma once

#include <heldout/core/capabilities.hpp>
#include <heldout/core/kinds.hpp>

#include <array>
#include <concepts>
#include <cstddef>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>

HELDOUT_NAMESPACE_BEGIN

/// Which way a measure improves.
enum class direction {
    lower_is_better,
    higher_is_better,
    toward_ideal ///< the closer to the measure's declared `ideal` value, the better
};

/// How far value v is from the ideal value: |v - ideal|.
constexpr double distance_from_ideal(double v, double ideal) noexcept { return v < ideal ? ideal - v : v - ideal; }

/// True when value a is better than value b under direction d (toward_ideal: closer to
/// `ideal`, which the measure declares; see ideal_value_v).
constexpr bool better(direction d, double a, double b, double ideal) noexcept {
    switch (d) {
    case direction::lower_is_better:
        return a < b;
    case direction::higher_is_better:
        return a > b;
    case direction::toward_ideal:
        return distance_from_ideal(a, ideal) < distance_from_ideal(b, ideal);
    }
    return false;
}
/// The same for the two one-way directions (toward_ideal here measures the distance to 0:
/// pass the measure's ideal with the four-argument form instead).
constexpr bool better(direction d, double a, double b) noexcept { return better(d, a, b, 0.0); }

namespace detail {

template <class M>
struct prediction_of {
    using type = kind_t<M::kind>;
};
template <class M>
requires requires { typename M::prediction; }
struct prediction_of<M> {
    using type = typename M::prediction;
};

template <class M>
struct truth_of {
    using type = default_truth_t<typename prediction_of<M>::type>;
};
template <class M>
requires requires { typename M::truth; }
struct truth_of<M> {
    using type = typename M::truth;
};

template <class M>
constexpr bool has_key() {
    return requires {
        { M::key } -> std::convertible_to<std::string_view>;
    };
}

template <class M>
constexpr bool declares_ideal() {
    return requires {
        { M::ideal } -> std::convertible_to<double>;
    };
}

} // namespace detail

/// Whether measure M declares an ideal value (and so direction::toward_ideal).
template <class M>
inline constexpr bool has_ideal_v = detail::declares_ideal<M>();

/// The ideal value measure M declares (only for measures with has_ideal_v).
template <class M>
requires(detail::declares_ideal<M>()) inline constexpr double ideal_value_v = static_cast<double>(M::ideal);

/// The prediction kind of measure M (a tag from heldout::kinds).
template <class M>
using prediction_kind_t = typename detail::prediction_of<M>::type;

/// The truth kind of measure M (declared, or the classic one for its prediction kind).
template <class M>
using truth_kind_t = typename detail::truth_of<M>::type;

/// Everything a measure declares, read in one place.
template <class M>
struct measure_traits {
    using prediction = prediction_kind_t<M>;
    using truth = truth_kind_t<M>;
    using capabilities = capabilities_t<M>;
    static constexpr direction better = M::better;
    /// Whether M declares an ideal value (direction::toward_ideal).
    static constexpr bool has_ideal = has_ideal_v<M>;
    /// How bad a value is, as a number where lower is better: v for lower_is_better, -v for
    /// higher_is_better, |v - ideal| for toward_ideal. Comparisons and tuning rank by it.
    static constexpr double badness(double v) noexcept {
        if constexpr (has_ideal_v<M>)
            return distance_from_ideal(v, static_cast<double>(M::ideal));
        else
            return M::better == direction::lower_is_better ? v : -v;
    }
    /// Whether value a is better than value b for M (by badness).
    static constexpr bool better_value(double a, double b) noexcept { return badness(a) < badness(b); }
    /// Whether M declares capability C.
    template <class C>
    static constexpr bool offers = offers_v<M, C>;
    /// Whether M has parameters (data members) that are part of its identity.
    static constexpr bool has_parameters = !std::is_empty_v<M>;
    /// M's key in serialised state ("" when it declares none).
    static constexpr std::string_view key() noexcept {
        if constexpr (detail::has_key<M>())
            return M::key;
        else
            return {};
    }
};

namespace detail {

/// Compile-time concatenation of string constants (keys of measure templates).
template <const std::string_view&... S>
struct joined {
    static constexpr std::size_t size = (S.size() + ... + 0);
    static constexpr std::array<char, size + 1> chars = [] {
        std::array<char, size + 1> a{};
        std::size_t i = 0;
        for (const std::string_view part : {S...})
            for (const char c : part)
                a[i++] = c;
        return a;
    }();
};
template <const std::string_view&... S>
inline constexpr std::string_view joined_v{joined<S...>::chars.data(), joined<S...>::size};

/// "base (parameters)", or base alone when there is nothing to show.
inline std::string with_parameters(std::string base, std::string_view parameters) {
    if (!parameters.empty()) {
        base += " (";
        base += parameters;
        base += ')';
    }
    return base;
}

/// Appends "name value" to a parameter list when value differs from the default.
template <class V>
void parameter_if(std::string& out, std::string_view name, const V& value, const V& default_value,
                  std::string (*text)(const V&)) {
    if (value == default_value)
        return;
    if (!out.empty())
        out += ", ";
    out += name;
    out += ' ';
    out += text(value);
}

} // namespace detail

/// Whether a and b are the same measure: the same type and equal parameters.
template <class A, class B>
constexpr bool same_measure(const A& a, const B& b) {
    if constexpr (!std::is_same_v<A, B>) {
        return false;
    } else if constexpr (std::is_empty_v<A>) {
        (void)a;
        (void)b;
        return true;
    } else {
        static_assert(std::equality_comparable<A>,
                      "heldout: this measure has data members (parameters), so its identity includes them: "
                      "declare how they compare, e.g. `bool operator==(const my_measure&) const = default;`");
        return a == b;
    }
}

HELDOUT_NAMESPACE_END
