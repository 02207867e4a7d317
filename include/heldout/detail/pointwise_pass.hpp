// heldout/detail/pointwise_pass.hpp — the fused pass behind every pointwise measure
// (mean_loss and so MSE/MAE, Brier score, cross-entropy): validation, per-row terms and
// compensated sums in one read of the data, vectorised, with a runtime AVX2 clone on x86-64.
// Internal: include the public headers instead.
//
// Rows are taken in chunks of 512. Integer truth is first converted into a small buffer
// (mixed-width loops do not vectorise); the term fills a buffer of per-row values in a
// loop GCC vectorises, while integer flags collect anything the fast path must not see
// (a truth other than 0/1, a probability outside the term's fast range, a non-finite
// input where the term would not propagate it, a bad weight); the buffer is summed in 8
// fixed double lanes, whose total goes into a Neumaier sum per chunk. A flagged chunk, or
// one whose total is not finite, is redone element by element in double (term.exact):
// that path throws input_error with the global index of the first bad element, and keeps
// legitimate infinite terms apart (p = 0 for the true class in log loss).
// The arithmetic of each row and the lane order are fixed, so the AVX2 clone gives
// bit-identical results; it only processes more rows per instruction. Strict IEEE
// arithmetic throughout (no -ffast-math, and no FMA: the clone targets AVX2 only).
// A term may opt into the wide pass (`wide_pass`): log loss (one logarithm a row), and the
// real-truth losses of mean_loss (MSE, MAE, ...), for which it measured faster; binary-truth
// losses such as the Brier score measured slower and keep the plain pass. The wide pass
// runs an AVX-512 clone (GCC, x86-64, chosen at run time where the CPU has AVX-512
// F/DQ/BW/VL): 8 doubles an instruction, and GCC fuses multiply-adds there, so each term
// is within a few ulp of the other clones' (tested: log loss within 1 ulp of a long-double
// reference, sums within 1e-15 relative) rather than bit-identical; the same machine always
// gives the same bits. It also gets software prefetch hints (see prefetch_rows), its lane
// sums in 32 lanes (4 independent vectors, see wide_sum_lanes) and, for double terms without
// weights, those sums taken in the term loop itself.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/values.hpp>
#include <heldout/detail/fast_log.hpp>
#include <heldout/detail/isa.hpp>
#include <heldout/detail/state_checks.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/detail/validate.hpp>

#include <array>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>

HELDOUT_NAMESPACE_BEGIN
namespace detail {

/// Terms that opt into the wide pass (`static constexpr bool wide_pass = true`): the AVX-512
/// clone, prefetch hints and, for double terms, sums fused into the term loop (see the
/// header). Measured per term family: log loss and MSE/MAE gain (MSE, 1e7 float rows: 0.72x
/// -> 1.03-1.16x of a plain float sum); the Brier score lost (1.3x -> 10x the baseline's
/// time: its fused loop vectorised badly), so it stays out.
template <class Term>
inline constexpr bool term_wide_pass = requires {
    requires Term::wide_pass;
};

/// Integer truth: nonzero when the value is not 0 or 1 (checked on the raw labels).
/// Floating truth: a flag word (top bit) set unless the value is 0 or 1.
template <class Y>
HELDOUT_DETAIL_INLINE auto truth_flag(Y y) noexcept {
    if constexpr (std::is_same_v<Y, bool>) {
        return std::uint8_t{0};
    } else if constexpr (std::is_integral_v<Y>) {
        using U = std::make_unsigned_t<Y>;
        return static_cast<U>(static_cast<U>(y) & static_cast<U>(~U{1}));
    } else {
        // y (1 - y) is +-0 only for y in {0, 1}; -(|bits|) has its top bit set unless |bits| = 0.
        using U = same_width_uint<Y>;
        const U a = std::bit_cast<U>(y * (Y(1) - y)) & (~U{0} >> 1);
        return static_cast<U>(U{0} - a);
    }
}

/// A flag word (top bit) for a weight that is negative, infinite or NaN (-0 is flagged; the
/// exact path accepts it). Unsigned integer weights are always valid.
template <class W>
HELDOUT_DETAIL_INLINE auto weight_flag(W w) noexcept {
    if constexpr (std::is_floating_point_v<W>) {
        return outside_bits(w, W(0), std::numeric_limits<W>::max());
    } else if constexpr (std::is_signed_v<W>) {
        return static_cast<std::make_unsigned_t<W>>(w);
    } else {
        return std::uint8_t{0};
    }
}

template <class Y>
std::string truth_text(Y y) {
    if constexpr (std::is_floating_point_v<Y>)
        return number_text(static_cast<double>(y));
    else if constexpr (std::is_signed_v<Y>)
        return std::to_string(static_cast<long long>(y));
    else
        return std::to_string(static_cast<unsigned long long>(y));
}

/// A flag word (top bit) set where x is infinite or NaN (integer operations on the bits).
template <class T>
HELDOUT_DETAIL_INLINE same_width_uint<T> non_finite_flag(T x) noexcept {
    using U = same_width_uint<T>;
    const U a = std::bit_cast<U>(x) & (~U{0} >> 1);
    return std::bit_cast<U>(std::numeric_limits<T>::max()) - a;
}

/// Checks of the exact path: 0/1 truth and a probability in [0, 1] (global index i).
template <class Y>
void check_binary_truth_at(std::string_view who, Y y, std::size_t i) {
    if (!(y == Y(0) || y == Y(1)))
        fail_at(who, "truth",
                (std::is_floating_point_v<Y> && y != y) ? std::string("not finite (nan)")
                                                        : "label " + truth_text(y) + " outside the classes 0..1",
                i);
}
template <class P>
void check_probability_at(std::string_view who, P p, std::size_t i) {
    if (!(p >= P(0) && p <= P(1)))
        fail_at(who, "prediction",
                p != p ? std::string("not finite (nan)")
                       : "probability " + number_text(static_cast<double>(p)) + " outside [0, 1]",
                i);
}
template <class T>
void check_finite_at(std::string_view who, std::string_view arg, T x, std::size_t i) {
    if constexpr (std::is_floating_point_v<T>)
        if (!std::isfinite(x))
            fail_at(who, arg, x != x ? "not finite (nan)" : "not finite (inf)", i);
}
template <class W>
void check_weight_at(std::string_view who, W w, std::size_t i) {
    check_finite_at(who, "weights", w, i);
    if (w < W(0))
        fail_at(who, "weights", "negative weight " + number_text(static_cast<double>(w)), i);
}

/// Totals of one pass: sum of w * term, sum of w, and the weight of rows whose term is
/// +infinity where the term allows it (kept apart so that the compensated sums stay finite).
struct pass_totals {
    compensated_sum loss{};
    compensated_sum weight{};
    double infinite_weight = 0.0;

    void merge(const pass_totals& o) noexcept {
        loss.merge(o.loss);
        weight.merge(o.weight);
        infinite_weight += o.infinite_weight;
    }
};

inline constexpr std::size_t pass_chunk = 512;
inline constexpr std::size_t pass_lanes = 8;
/// The wide pass's lane sums: 4 independent vectors of 8 lanes, folded lane-wise into 8 at
/// the end of a chunk. With one vector every add waited on the previous one (4 cycles of FMA
/// latency per 8 rows); float MSE in cache went from 0.44-0.48x to 0.68-0.70x of bench_suite's
/// float read loop on an AMD EPYC (Zen 5, 2026-12-04), and 1e7 rows from 0.71-0.88x to
/// 0.85-0.89x. The other clones keep 8 lanes (their bits are pinned).
inline constexpr std::size_t wide_sum_lanes = 4 * pass_lanes;

template <std::size_t N>
HELDOUT_DETAIL_INLINE std::array<double, pass_lanes> fold_to_pass_lanes(const std::array<double, N>& a) noexcept {
    static_assert(N == pass_lanes || N == wide_sum_lanes);
    if constexpr (N == pass_lanes) {
        return a;
    } else {
        std::array<double, pass_lanes> r{};
        for (std::size_t j = 0; j < pass_lanes; ++j)
            r[j] = (a[j] + a[j + pass_lanes]) + (a[j + 2 * pass_lanes] + a[j + 3 * pass_lanes]);
        return r;
    }
}
/// Chunks ahead that a pass asks the memory system for (see prefetch_rows).
inline constexpr std::size_t pass_prefetch_ahead = 2;

/// One pass over rows [0, n). Term provides:
///   template <class Y, class P> using truth_buffer   the type integer truth is converted to
///   R fast(TY y, P p) const       vectorisable; valid where flag(...) == 0
///   U flag(TY y, P p) const       a flag word, top bit set where the fast path does not apply
///   static constexpr bool binary_truth        truth must be 0/1 (checked by the pass itself)
///   void check(who, Y y, P p, i)  throws input_error for a bad element (exact path)
///   double exact(double y, double p) const   the reference value
///   static constexpr bool infinite_ok         +inf is a legitimate term (log loss)
///   void report(who, y, p, i)      throws for a non-finite term on valid input
/// w == nullptr means unit weights (W = void). SumLanes: the lanes of the sums (pass_lanes;
/// wide_sum_lanes in the AVX-512 clone).
template <class Term, class Y, class P, class W, std::size_t SumLanes = pass_lanes>
HELDOUT_DETAIL_INLINE void pointwise_pass_body(std::string_view who, const Term& term, const Y* y, const P* p,
                                               const W* w, std::size_t n, pass_totals& out) {
    using TY = typename Term::template truth_buffer<Y, P>;
    using R = decltype(term.fast(TY{}, P{}));
    constexpr bool weighted = !std::is_void_v<W>;
    alignas(64) TY ty[std::is_same_v<TY, Y> ? 1 : pass_chunk];
    alignas(64) R buf[pass_chunk];
    alignas(64) double wb[weighted ? pass_chunk : 1];
    const auto fold = [](const std::array<double, pass_lanes>& a) {
        return ((a[0] + a[1]) + (a[2] + a[3])) + ((a[4] + a[5]) + (a[6] + a[7]));
    };
    for (std::size_t start = 0; start < n; start += pass_chunk) {
        const std::size_t c = n - start < pass_chunk ? n - start : pass_chunk;
        if constexpr (term_wide_pass<Term>) {
            if (const std::size_t ahead = start + pass_prefetch_ahead * pass_chunk; ahead < n) {
                const std::size_t end = n - ahead < pass_chunk ? n : ahead + pass_chunk;
                prefetch_rows(p, ahead, end);
                prefetch_rows(y, ahead, end);
                if constexpr (weighted)
                    prefetch_rows(w, ahead, end);
            }
        }
        const P* __restrict pc = p + start;
        const TY* __restrict yv;
        bool exact = false;
        if constexpr (std::is_same_v<TY, Y>) {
            yv = y + start;
        } else {
            // Integer truth: converted here; 0/1 is checked on the raw labels (nearly free).
            const Y* __restrict yc = y + start;
            decltype(truth_flag(Y{})) yflag = 0;
            for (std::size_t k = 0; k < c; ++k) {
                if constexpr (Term::binary_truth)
                    yflag |= truth_flag(yc[k]);
                ty[k] = static_cast<TY>(yc[k]);
            }
            exact = yflag != 0;
            yv = ty;
        }
        decltype(term.flag(TY{}, P{})) flag = 0;
        decltype(truth_flag(TY{})) tflag = 0;
        // Compute-bound double terms, unweighted: the terms go straight into the lanes (the
        // same lanes and order as the summing loop below), saving a store and a load a row; a
        // flagged chunk discards them. Double log loss at 1e6 rows: 4.4x -> 3.8-4.0x the
        // baseline's time.
        constexpr bool fuse = !weighted && term_wide_pass<Term> && std::is_same_v<R, double>;
        std::array<double, SumLanes> fused{};
        double fused_tail = 0;
        if constexpr (!fuse) {
            for (std::size_t k = 0; k < c; ++k) {
                flag |= term.flag(yv[k], pc[k]);
                if constexpr (Term::binary_truth && std::is_same_v<TY, Y> && std::is_floating_point_v<Y>)
                    tflag |= truth_flag(yv[k]); // floating truth: checked here
                buf[k] = term.fast(yv[k], pc[k]);
            }
        } else {
            std::size_t k = 0;
            for (; k + SumLanes <= c; k += SumLanes)
                for (std::size_t j = 0; j < SumLanes; ++j) {
                    flag |= term.flag(yv[k + j], pc[k + j]);
                    if constexpr (Term::binary_truth && std::is_same_v<TY, Y> && std::is_floating_point_v<Y>)
                        tflag |= truth_flag(yv[k + j]);
                    fused[j] += static_cast<double>(term.fast(yv[k + j], pc[k + j]));
                }
            for (; k < c; ++k) {
                flag |= term.flag(yv[k], pc[k]);
                if constexpr (Term::binary_truth && std::is_same_v<TY, Y> && std::is_floating_point_v<Y>)
                    tflag |= truth_flag(yv[k]);
                fused_tail += static_cast<double>(term.fast(yv[k], pc[k]));
            }
        }
        exact = exact || flag_set(flag) || flag_set(tflag);
        if constexpr (weighted) {
            const W* __restrict wc = w + start;
            decltype(weight_flag(W{})) wflag = 0;
            for (std::size_t k = 0; k < c; ++k) {
                wflag |= weight_flag(wc[k]);
                wb[k] = static_cast<double>(wc[k]);
            }
            exact = exact || flag_set(wflag);
        }
        double sum = 0, wsum = static_cast<double>(c);
        if constexpr (fuse) {
            if (!exact) {
                sum = fold(fold_to_pass_lanes(fused)) + fused_tail;
                exact = !std::isfinite(sum); // a NaN, overflow, or an input to report
            }
        } else if (!exact) {
            std::array<double, SumLanes> lane{};
            std::array<double, SumLanes> wlane{};
            double tail = 0, wtail = 0;
            std::size_t k = 0;
            for (; k + SumLanes <= c; k += SumLanes)
                for (std::size_t j = 0; j < SumLanes; ++j) {
                    if constexpr (weighted) {
                        lane[j] += wb[k + j] * static_cast<double>(buf[k + j]);
                        wlane[j] += wb[k + j];
                    } else {
                        lane[j] += static_cast<double>(buf[k + j]);
                    }
                }
            for (; k < c; ++k) {
                if constexpr (weighted) {
                    tail += wb[k] * static_cast<double>(buf[k]);
                    wtail += wb[k];
                } else {
                    tail += static_cast<double>(buf[k]);
                }
            }
            sum = fold(fold_to_pass_lanes(lane)) + tail;
            if constexpr (weighted)
                wsum = fold(fold_to_pass_lanes(wlane)) + wtail;
            exact = !std::isfinite(sum) || !std::isfinite(wsum); // a NaN, overflow, or an input to report
        }
        if (exact) {
            // Element by element in double, checking in index order so that the first bad
            // element is the one reported.
            std::array<double, pass_lanes> lane{};
            std::array<double, pass_lanes> wlane{};
            double inf_w = 0;
            for (std::size_t k = 0; k < c; ++k) {
                const std::size_t i = start + k;
                term.check(who, y[i], p[i], i);
                double wk = 1.0;
                if constexpr (weighted) {
                    check_weight_at(who, w[i], i);
                    wk = static_cast<double>(w[i]);
                }
                const double v = term.exact(static_cast<double>(y[i]), static_cast<double>(p[i]));
                if (!std::isfinite(v)) {
                    if (!(Term::infinite_ok && v == std::numeric_limits<double>::infinity()))
                        term.report(who, static_cast<double>(y[i]), static_cast<double>(p[i]), i);
                    if (wk > 0)
                        inf_w += wk;
                } else if (wk > 0) {
                    lane[k % pass_lanes] += wk * v;
                }
                wlane[k % pass_lanes] += wk;
            }
            sum = fold(lane);
            wsum = fold(wlane);
            if (!std::isfinite(sum) || !std::isfinite(wsum))
                fail(who, "prediction", "arithmetic overflow (values too large for double)");
            out.infinite_weight += inf_w;
            wsum -= inf_w; // weight is kept as finite part + infinite part
        }
        out.loss.add(sum);
        out.weight.add(wsum);
    }
}

template <class Term, class Y, class P, class W>
void pointwise_pass_baseline(std::string_view who, const Term& term, const Y* y, const P* p, const W* w, std::size_t n,
                             pass_totals& out) {
    pointwise_pass_body<Term, Y, P, W>(who, term, y, p, w, n, out);
}

#if HELDOUT_DETAIL_HAS_AVX2_CLONE
template <class Term, class Y, class P, class W>
HELDOUT_DETAIL_TARGET_AVX2 void pointwise_pass_avx2(std::string_view who, const Term& term, const Y* y, const P* p,
                                                    const W* w, std::size_t n, pass_totals& out) {
    pointwise_pass_body<Term, Y, P, W>(who, term, y, p, w, n, out);
}
#endif

#if HELDOUT_DETAIL_HAS_AVX512_CLONE
template <class Term, class Y, class P, class W>
HELDOUT_DETAIL_TARGET_AVX512 void pointwise_pass_avx512(std::string_view who, const Term& term, const Y* y, const P* p,
                                                        const W* w, std::size_t n, pass_totals& out) {
    pointwise_pass_body<Term, Y, P, W, wide_sum_lanes>(who, term, y, p, w, n, out);
}
#endif

/// Runs the pass with the given clone (best_isa() by default; a term without the AVX-512
/// opt-in runs the AVX2 clone there); W = void for no weights.
template <class W, class Term, class Y, class P>
void pointwise_pass(std::string_view who, const Term& term, std::span<const Y> y, std::span<const P> p, const W* w,
                    pass_totals& out, isa which = best_isa()) {
#if HELDOUT_DETAIL_HAS_AVX512_CLONE
    if constexpr (term_wide_pass<Term>) {
        if (which == isa::avx512) {
            pointwise_pass_avx512<Term, Y, P, W>(who, term, y.data(), p.data(), w, y.size(), out);
            return;
        }
    }
#endif
#if HELDOUT_DETAIL_HAS_AVX2_CLONE
    if (which == isa::avx2 || which == isa::avx512) {
        pointwise_pass_avx2<Term, Y, P, W>(who, term, y.data(), p.data(), w, y.size(), out);
        return;
    }
#endif
    (void)which;
    pointwise_pass_baseline<Term, Y, P, W>(who, term, y.data(), p.data(), w, y.size(), out);
}

/// The fields every binary probability term shares: truth buffered as P, 0/1 and
/// [0, 1] checks in the exact path.
struct binary_probability_term_base {
    static constexpr bool binary_truth = true;
    template <class Y, class P>
    using truth_buffer = P;
    template <class Y, class P>
    void check(std::string_view who, Y y, P p, std::size_t i) const {
        check_binary_truth_at(who, y, i);
        check_probability_at(who, p, i);
    }
    [[noreturn]] void report(std::string_view who, double, double, std::size_t i) const {
        fail_at(who, "prediction", "term is not finite", i);
    }
};

/// The mean of a binary term over (truth 0/1, probability) rows, weighted or not.
/// Policy: `static constexpr std::string_view name`, `template <class T> auto term() const`
/// (the Term of pointwise_pass for predictions of type T), `double exact(y, p) const`,
/// `void validate(std::string_view who) const`, and visit_state for its parameters.
template <class Policy>
class binary_mean_accumulator {
public:
    binary_mean_accumulator() = default;
    explicit binary_mean_accumulator(const Policy& p) : policy_(p) { policy_.validate(who()); }

    /// Adds a batch: truth 0/1 (integral or floating) and probabilities in [0, 1].
    template <value_range T, real_range P>
    void add(const T& truth, const P& prediction) {
        add_impl(truth, prediction, static_cast<const void*>(nullptr), 0);
    }
    /// Adds a weighted batch (weights finite and non-negative).
    template <value_range T, real_range P, weight_range W>
    void add(const T& truth, const P& prediction, const W& weights) {
        auto w = values_of(weights, who(), "weights");
        add_impl(truth, prediction, w.data(), w.size());
    }
    /// Adds one observation.
    void add_one(double y, double p, double w = 1.0) {
        policy_.validate(who());
        check_binary_truth_at(who(), y, 0);
        check_probability_at(who(), p, 0);
        check_weight_at(who(), w, 0);
        const double v = policy_.exact(y, p);
        if (w > 0 && v == std::numeric_limits<double>::infinity()) {
            totals_.infinite_weight += w;
        } else {
            if (w > 0)
                totals_.loss.add(w * v);
            totals_.weight.add(w);
        }
        ++count_;
    }
    /// Combines two shards; both must be of the same measure (equal parameters).
    void merge(const binary_mean_accumulator& o) {
        if (!(policy_ == o.policy_))
            fail_state(who(), "other",
                       "cannot merge a state of " + o.measure().name() + " into one of " + measure().name() +
                           ": the parameters differ");
        totals_.merge(o.totals_);
        count_ += o.count_;
    }
    /// sum w term / sum w; +infinity when a row of positive weight has an infinite term.
    double value() const {
        if (count_ == 0)
            fail_undefined(who(), "no observations");
        const double w = totals_.weight.value() + totals_.infinite_weight;
        if (!(w > 0))
            fail_undefined(who(), "total weight is zero");
        if (totals_.infinite_weight > 0)
            return std::numeric_limits<double>::infinity();
        return totals_.loss.value() / w;
    }
    void reset() noexcept {
        totals_ = {};
        count_ = 0;
    }
    std::uint64_t count() const noexcept { return count_; }
    double total_weight() const noexcept { return totals_.weight.value() + totals_.infinite_weight; }
    const Policy& parameters() const noexcept { return policy_; }
    /// The measure this state belongs to (its parameters included).
    auto measure() const { return policy_.measure(); }

    template <class F>
    void visit_state(F&& f) {
        policy_.visit_state(f);
        totals_.loss.visit_state(f);
        totals_.weight.visit_state(f);
        f(totals_.infinite_weight);
        f(count_);
    }
    template <class F>
    void visit_state(F&& f) const {
        policy_.visit_state(f);
        totals_.loss.visit_state(f);
        totals_.weight.visit_state(f);
        f(totals_.infinite_weight);
        f(count_);
    }

    /// After a load (stream/serialize.hpp): parameters in range, finite sums, weights >= 0.
    void check_state() const {
        check_loaded_parameters("parameters", [&] { policy_.validate(who()); });
        totals_.loss.check_loaded("loss sum");
        totals_.weight.check_loaded("weight sum");
        if (totals_.weight.value() < 0)
            fail_loaded("weight sum", "is negative");
        check_loaded_nonnegative("infinite weight", totals_.infinite_weight);
    }

    /// For tests and benchmarks: the same batch through a chosen clone.
    template <value_range T, real_range P>
    void add_with(isa which, const T& truth, const P& prediction) {
        add_impl(truth, prediction, static_cast<const void*>(nullptr), 0, which);
    }

private:
    static const std::string& who() {
        static const std::string w = "measure " + std::string(Policy::name); // built once: no allocation per batch
        return w;
    }

    template <class T, class P, class W>
    void add_impl(const T& truth, const P& prediction, const W* w, std::size_t wn, isa which = best_isa()) {
        auto t = values_of(truth, who(), "truth");
        auto p = values_of(prediction, who(), "prediction");
        check_nonempty(who(), "truth", t.size());
        check_same_size(who(), "prediction", t.size(), p.size());
        if constexpr (!std::is_void_v<W>)
            check_same_size(who(), "weights", t.size(), wn);
        pass_totals local; // the state changes only when the whole batch is valid
        pointwise_pass<W>(who(), policy_.template term<element_t<P>>(), t, p, w, local, which);
        totals_.merge(local);
        count_ += t.size();
    }

    Policy policy_{};
    pass_totals totals_{};
    std::uint64_t count_ = 0;
};

} // namespace detail
HELDOUT_NAMESPACE_END
