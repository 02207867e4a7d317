// heldout/detail/sum.hpp — compensated sums and the blocked, multi-lane accumulation
// that keeps pointwise measures both exact to the last digits and memory-bound.
// Internal: include the public headers instead.
//
// Scheme: rows are taken in blocks of `block_rows`; inside a block, `lanes` independent
// double partials (the compiler vectorises them; the order is fixed, so no -ffast-math is
// needed); each block's lanes are combined pairwise and the block total is added to a
// Neumaier-compensated running sum. The error is about (block_rows/lanes) * eps per
// block plus O(eps) overall, independent of n — 1e8 rows keep ~15 digits.
#pragma once

#include <heldout/core/config.hpp>
#include <heldout/core/error.hpp>

#include <array>
#include <cmath>
#include <cstddef>
#include <limits>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace detail {

/// One step of Neumaier's improved Kahan summation (Neumaier 1974, ZAMM 54:39-51) on a
/// (sum, carry) pair: the one compensated sum of heldout. Free, so that accumulators can keep
/// their sums and carries in parallel arrays (serialisable state); the value is sum + carry.
inline void compensated_add(double& sum, double& carry, double x) noexcept {
    const double t = sum + x;
    if (std::abs(sum) >= std::abs(x))
        carry += (sum - t) + x;
    else
        carry += (x - t) + sum;
    sum = t;
}

/// A Neumaier-compensated running sum (compensated_add on its own pair).
struct compensated_sum {
    double sum = 0.0;
    double carry = 0.0;

    void add(double x) noexcept { compensated_add(sum, carry, x); }
    void merge(const compensated_sum& o) noexcept {
        add(o.sum);
        carry += o.carry;
    }
    double value() const noexcept { return sum + carry; }
    void reset() noexcept { sum = carry = 0.0; }

    template <class F>
    void visit_state(F&& f) {
        f(sum);
        f(carry);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(sum);
        f(carry);
    }
    /// After a load (stream/serialize.hpp): sum and carry finite.
    void check_loaded(std::string_view field) const {
        if (!std::isfinite(sum) || !std::isfinite(carry))
            fail_loaded(field, "sum or carry is not finite");
    }
    friend bool operator==(const compensated_sum&, const compensated_sum&) = default;
};

/// The power of two 2^-e that brings a positive finite x into [1, 2) (1 when x is 0 or not
/// finite; at most 2^1022, so that it is finite for subnormal x). Why: weights mean only their
/// ratios, but products of weight sums (AUC's sum P_g N_below, MCC's TP TN) overflow or
/// underflow when all weights are scaled by 1e+-155 and beyond. Scaling the sums by this
/// factor first keeps the products near 1, and being a power of two it changes no bit of any
/// normal value: ratios of the scaled products equal the unscaled ones exactly.
inline double unit_scale(double x) noexcept {
    if (!(x > 0) || !(x <= std::numeric_limits<double>::max()))
        return 1.0;
    const int e = std::ilogb(x);
    return std::ldexp(1.0, e < -1022 ? 1022 : -e);
}

inline constexpr std::size_t lanes = 8;
inline constexpr std::size_t block_rows = 2048;

template <std::size_t Q>
using lane_block = std::array<std::array<double, lanes>, Q>;

/// Sums Q quantities over rows [0, n): term(i, out) writes the Q terms of row i into out.
/// Block totals go into the Q compensated sums in `totals`.
template <std::size_t Q, class Term>
inline void blocked_sum(std::size_t n, Term&& term, std::array<compensated_sum, Q>& totals) {
    for (std::size_t start = 0; start < n; start += block_rows) {
        const std::size_t end = n - start < block_rows ? n : start + block_rows;
        lane_block<Q> acc{};
        std::size_t i = start;
        for (; i + lanes <= end; i += lanes) {
            for (std::size_t j = 0; j < lanes; ++j) {
                std::array<double, Q> t;
                term(i + j, t);
                for (std::size_t q = 0; q < Q; ++q)
                    acc[q][j] += t[q];
            }
        }
        std::array<double, Q> tail{};
        for (; i < end; ++i) {
            std::array<double, Q> t;
            term(i, t);
            for (std::size_t q = 0; q < Q; ++q)
                tail[q] += t[q];
        }
        for (std::size_t q = 0; q < Q; ++q) {
            auto& a = acc[q];
            const double s = ((a[0] + a[1]) + (a[2] + a[3])) + ((a[4] + a[5]) + (a[6] + a[7]));
            totals[q].add(s + tail[q]);
        }
    }
}

} // namespace detail
HELDOUT_NAMESPACE_END
