// heldout/censored/truth.hpp — the truth of a time-to-event model: an observed time that may
// be censored, viewed without copying.
//
//   std::vector<double> time = {2, 5, 5, 9};
//   std::vector<int> event = {1, 0, 1, 0};            // 1 = event seen, 0 = censored
//   auto truth = heldout::censored(time, event);      // a view over both ranges
//   double c = heldout::evaluate(heldout::measure::harrell_c{}, truth, risk);
//
// time: finite and >= 0 (any floating or integral type); event: 0 or 1 (any integral type,
// bool included). The kind tag is heldout::kinds::censored; its stored form is
// heldout::censored_times<double, std::uint8_t>. Bad rows are input_error naming the row.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/values.hpp>

#include <cmath>
#include <concepts>
#include <cstddef>
#include <cstdint>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>

HELDOUT_NAMESPACE_BEGIN

/// Observed times and event indicators of the same rows (non-owning).
template <class T = double, class E = std::uint8_t>
struct censored_times {
    std::span<const T> time;
    std::span<const E> event;
    std::size_t size() const noexcept { return time.size(); }
};

/// Views `time` (observed times) and `event` (1 = event, 0 = censored) as one censored truth.
/// Sizes must agree; the values are checked by the measures that read them.
template <value_range Tr, label_range Er>
auto censored(const Tr& time, const Er& event) {
    auto t = values_of(time, "heldout::censored", "time");
    auto e = values_of(event, "heldout::censored", "event");
    if (t.size() != e.size())
        detail::fail("heldout::censored", "event",
                     "size " + std::to_string(e.size()) + " differs from time's size " + std::to_string(t.size()));
    return censored_times<element_t<Tr>, element_t<Er>>{t, e};
}

namespace detail {
template <class X>
struct is_censored_times : std::false_type {};
template <class T, class E>
struct is_censored_times<censored_times<T, E>> : std::true_type {};
} // namespace detail

/// A censored truth: what heldout::censored(time, event) returns.
template <class X>
concept censored_truth = detail::is_censored_times<std::remove_cvref_t<X>>::value;

namespace kinds {
/// An observed event time with its event indicator (heldout::censored).
struct censored {
    static constexpr std::string_view name = "censored event time";
    using view = censored_times<double, std::uint8_t>;
};
/// A predicted survival probability S(t | x) at the measure's time, in [0, 1].
struct survival_probability {
    static constexpr std::string_view name = "survival probability";
    using view = std::span<const double>;
};
/// Predicted survival curves: one row per observation, one column per grid time
/// (heldout::rows(flat, k) or an Eigen matrix).
struct survival_curves {
    static constexpr std::string_view name = "survival curve rows";
    using view = row_matrix<double>;
};
} // namespace kinds

namespace detail {

/// Checks one censored row: time finite and >= 0, event 0 or 1; `offset` is the index of
/// the batch's first row in what the caller sees.
template <class T, class E>
void check_censored_row(std::string_view who, T time, E event, std::size_t i) {
    const double t = static_cast<double>(time);
    if (std::isnan(t))
        fail_at(who, "time", "NaN", i);
    if (!std::isfinite(t))
        fail_at(who, "time", "not finite", i);
    if (t < 0)
        fail_at(who, "time", "negative (" + number_text(t) + ")", i);
    if constexpr (std::same_as<E, bool>) {
        (void)event;
    } else {
        if (event != E(0) && event != E(1))
            fail_at(who, "event", "not 0 or 1 (" + std::to_string(static_cast<long long>(event)) + ")", i);
    }
}

/// Checks a censored truth against a prediction of `n` rows.
template <class T, class E>
void check_censored(std::string_view who, const censored_times<T, E>& y, std::size_t n, std::string_view pred_arg) {
    if (y.time.size() != n)
        fail(who, pred_arg,
             "size " + std::to_string(n) + " differs from the truth's size " + std::to_string(y.time.size()));
    for (std::size_t i = 0; i < n; ++i)
        check_censored_row(who, y.time[i], y.event[i], i);
}

} // namespace detail

HELDOUT_NAMESPACE_END
