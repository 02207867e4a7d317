// heldout/detail/labels.hpp — class labels as numbers: the bits of a label, the label range
// checks and the largest label of two arrays. Internal: include the public headers instead.
#pragma once

#include <heldout/core/config.hpp>
#include <heldout/core/error.hpp>

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>

HELDOUT_NAMESPACE_BEGIN

// Public (heldout::measure::max_classes); declared here because the label checks use it.
namespace measure {
/// The largest number of classes a confusion table may have (k^2 cells of two doubles).
inline constexpr std::size_t max_classes = 1024;
} // namespace measure

namespace detail {

/// Labels as unsigned 64-bit values: a negative label becomes huge, so one comparison
/// against a limit catches both "negative" and "too large".
template <class L>
constexpr std::uint64_t label_bits(L x) noexcept {
    if constexpr (std::is_signed_v<L>)
        return static_cast<std::uint64_t>(static_cast<std::int64_t>(x));
    else
        return static_cast<std::uint64_t>(x);
}

/// Largest valid label value for type L when no class count is given.
template <class L>
constexpr std::uint64_t label_type_limit() noexcept {
    return static_cast<std::uint64_t>(std::numeric_limits<L>::max());
}

/// Reports the first label outside 0..limit (truth first, then prediction); `k_given`
/// says whether the limit comes from a class count (otherwise from max_classes).
template <class L>
void check_label_limit(std::string_view who, std::string_view arg, std::span<const L> v, std::uint64_t limit,
                       bool k_given) {
    for (std::size_t i = 0; i < v.size(); ++i) {
        if constexpr (std::is_signed_v<L>) {
            if (v[i] < 0)
                fail_at(who, arg, "label " + std::to_string(static_cast<long long>(v[i])) + " is negative", i);
        }
        const std::uint64_t x = label_bits(v[i]);
        if (x > limit) {
            const std::string lab = "label " + std::to_string(x);
            if (k_given)
                fail_at(who, arg, lab + " outside the classes 0.." + std::to_string(limit), i);
            fail_at(who, arg,
                    lab + " exceeds the largest supported class " + std::to_string(limit) + " (at most " +
                        std::to_string(measure::max_classes) + " classes)",
                    i);
        }
    }
}

struct label_max {
    std::uint64_t truth = 0;
    std::uint64_t prediction = 0;
};

/// Largest label (as label_bits) of each array: one vectorisable pass.
template <class T, class P>
label_max max_labels(std::span<const T> t, std::span<const P> p) noexcept {
    std::uint64_t a = 0, b = 0;
    for (std::size_t i = 0; i < t.size(); ++i) {
        a = std::max(a, label_bits(t[i]));
        b = std::max(b, label_bits(p[i]));
    }
    return {a, b};
}

} // namespace detail

HELDOUT_NAMESPACE_END
