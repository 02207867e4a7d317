// heldout/detail/validate.hpp — the argument checks every public function uses.
// Internal: include the public headers instead.
//
// Each check throws heldout::input_error through detail::fail / fail_at, so every message
// has the one shape "who: argument 'arg': problem at index i".
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/values.hpp>

#include <cmath>
#include <cstddef>
#include <limits>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>

HELDOUT_NAMESPACE_BEGIN
namespace detail {

inline void check_nonempty(std::string_view who, std::string_view arg, std::size_t n) {
    if (n == 0)
        fail(who, arg, "empty input");
}

inline void check_same_size(std::string_view who, std::string_view arg, std::size_t expected, std::size_t got,
                            std::string_view against = "truth") {
    if (expected != got)
        fail(who, arg,
             "size " + std::to_string(got) + " differs from size " + std::to_string(expected) + " of '" +
                 std::string(against) + "'");
}

template <class T>
void check_finite(std::string_view who, std::string_view arg, std::span<const T> v) {
    if constexpr (std::is_floating_point_v<T>) {
        for (std::size_t i = 0; i < v.size(); ++i)
            if (!std::isfinite(v[i]))
                fail_at(who, arg, std::isnan(v[i]) ? "not finite (nan)" : "not finite (inf)", i);
    }
}

/// Labels must lie in 0..k-1 (k = 0 means "any non-negative label").
template <class L>
void check_labels(std::string_view who, std::string_view arg, std::span<const L> v, std::size_t k) {
    for (std::size_t i = 0; i < v.size(); ++i) {
        if constexpr (std::is_signed_v<L>) {
            if (v[i] < 0)
                fail_at(who, arg, "label " + std::to_string(static_cast<long long>(v[i])) + " is negative", i);
        }
        if (k != 0 && static_cast<std::size_t>(v[i]) >= k)
            fail_at(who, arg,
                    "label " + std::to_string(static_cast<unsigned long long>(v[i])) + " outside the classes 0.." +
                        std::to_string(k - 1),
                    i);
    }
}

/// Binary truth: every label 0 or 1.
template <class L>
void check_binary(std::string_view who, std::string_view arg, std::span<const L> v) {
    check_labels(who, arg, v, 2);
}

template <class T>
void check_probabilities(std::string_view who, std::string_view arg, std::span<const T> v) {
    for (std::size_t i = 0; i < v.size(); ++i)
        if (!(v[i] >= T(0) && v[i] <= T(1)))
            fail_at(who, arg,
                    std::isnan(v[i]) ? std::string("not finite (nan)")
                                     : "probability " + number_text(static_cast<double>(v[i])) + " outside [0, 1]",
                    i);
}

template <class W>
void check_weights(std::string_view who, std::span<const W> w) {
    for (std::size_t i = 0; i < w.size(); ++i) {
        if constexpr (std::is_floating_point_v<W>) {
            if (!std::isfinite(w[i]))
                fail_at(who, "weights", std::isnan(w[i]) ? "not finite (nan)" : "not finite (inf)", i);
        }
        if (w[i] < W(0))
            fail_at(who, "weights", "negative weight " + number_text(static_cast<double>(w[i])), i);
    }
}

/// Tolerance for a probability row to count as summing to one: max(1e-6, 4 k eps_T).
template <class T>
constexpr double row_sum_tolerance(std::size_t k) {
    double t = 4.0 * static_cast<double>(k) * static_cast<double>(std::numeric_limits<T>::epsilon());
    return t > 1e-6 ? t : 1e-6;
}

template <class T>
void check_probability_rows(std::string_view who, std::string_view arg, const row_matrix<T>& p) {
    const double tol = row_sum_tolerance<T>(p.cols);
    for (std::size_t i = 0; i < p.rows; ++i) {
        double s = 0;
        for (std::size_t j = 0; j < p.cols; ++j) {
            const T x = p(i, j);
            if (!(x >= T(0) && x <= T(1)))
                fail_at(who, arg,
                        std::isnan(x) ? std::string("not finite (nan) in column ") + std::to_string(j)
                                      : "probability " + number_text(static_cast<double>(x)) +
                                            " outside [0, 1] in column " + std::to_string(j),
                        i);
            s += static_cast<double>(x);
        }
        if (std::abs(s - 1.0) > tol)
            fail_at(who, arg, "row sums to " + number_text(s) + ", not 1 (tolerance " + number_text(tol) + ")", i);
    }
}

} // namespace detail
HELDOUT_NAMESPACE_END
