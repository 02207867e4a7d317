// heldout/measure/confusion_matrix.hpp — the weighted k x k confusion table of class labels,
// and the accumulator every label measure is built on.
//
//   std::vector<std::uint8_t> truth{0, 1, 2, 1}, pred{0, 2, 2, 1};
//   Eigen::MatrixXd c = heldout::evaluate(heldout::measure::confusion_matrix{}, truth, pred);
//   // c(i, j) = total weight of observations with true class i predicted as class j:
//   // [[1, 0, 0], [0, 1, 1], [0, 0, 1]]
//
//   auto acc = heldout::measure::confusion_matrix{.classes = 3}.accumulator();
//   acc.add(truth, pred, weights);  acc.add_one(2, 0);  acc.merge(other);
//   double tp = acc(1, 1);  Eigen::MatrixXd table = acc.table();
//
// Conventions:
//  * rows are the true class, columns the predicted class; classes are 0..k-1;
//  * `classes` fixes k (labels >= k are an input_error); classes = 0 infers k as one more
//    than the largest label seen in truth or prediction, growing as labels arrive, and two
//    inferred accumulators merge into the larger k (missing rows/columns are zero);
//  * at most measure::max_classes (1024) classes, so that a stray label cannot ask for a
//    huge table;
//  * cells hold total weights (counts when no weights are given) as compensated double
//    sums: counts are exact up to 2^53; weights are summed in blocks of rows whose totals
//    are added with Neumaier compensation, so the error does not grow with n.
//
// A confusion table has no single value and no direction, so confusion_matrix is not an
// outer_measure: heldout::evaluate(confusion_matrix, ...) returns the table itself.
#pragma once

#include <heldout/core/measure.hpp>
#include <heldout/detail/isa.hpp>
#include <heldout/detail/state_checks.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/detail/validate.hpp>

#include <Eigen/Core>

#include <algorithm>
#include <array>
#include <cmath>
#include <concepts>
#include <cstddef>
#include <cstdint>
#include <cstring>
#include <limits>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

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

/// One pass over two label arrays: number of mismatches (t != p) and, for k = 2,
/// sum(t), sum(p), sum(t & p); plus the largest label of each array.
struct label_scan {
    std::uint64_t mismatches = 0;
    std::uint64_t sum_t = 0;
    std::uint64_t sum_p = 0;
    std::uint64_t sum_tp = 0;
    std::uint64_t max_t = 0;
    std::uint64_t max_p = 0;
};

#if defined(__GNUC__) || defined(__clang__)
#define HELDOUT_LABEL_VECTORS 1
// 16 byte lanes (SSE2 / NEON width); the compiler lowers these generic vector operations
// for whatever the target has.
typedef unsigned char label_u8x16 __attribute__((vector_size(16)));

inline label_u8x16 load_u8x16(const unsigned char* p) noexcept {
    label_u8x16 v;
    std::memcpy(&v, p, sizeof v);
    return v;
}
inline label_u8x16 max_u8x16(label_u8x16 a, label_u8x16 b) noexcept {
    const label_u8x16 m = reinterpret_cast<label_u8x16>(a > b);
    return (a & m) | (b & ~m);
}
inline std::uint64_t lane_sum(label_u8x16 v) noexcept {
    std::uint64_t s = 0;
    for (int l = 0; l < 16; ++l)
        s += v[l];
    return s;
}
inline std::uint64_t lane_max(label_u8x16 v) noexcept {
    std::uint64_t s = 0;
    for (int l = 0; l < 16; ++l)
        s = std::max<std::uint64_t>(s, v[l]);
    return s;
}

/// Byte labels: counts in byte lanes, flushed every 255 steps before they can wrap.
/// Binary = true also sums t, p and t & p (the four cells of a 2 x 2 table).
template <bool Binary>
label_scan scan_bytes(const unsigned char* t, const unsigned char* p, std::size_t n) noexcept {
    label_scan r;
    label_u8x16 mt{}, mp{};
    std::size_t i = 0;
    while (n - i >= 32) {
        const std::size_t steps = std::min<std::size_t>((n - i) / 32, 255);
        label_u8x16 e0{}, e1{}, t0s{}, t1s{}, p0s{}, p1s{}, b0s{}, b1s{};
        for (std::size_t s = 0; s < steps; ++s, i += 32) {
            const label_u8x16 t0 = load_u8x16(t + i), t1 = load_u8x16(t + i + 16);
            const label_u8x16 p0 = load_u8x16(p + i), p1 = load_u8x16(p + i + 16);
            mt = max_u8x16(mt, max_u8x16(t0, t1));
            mp = max_u8x16(mp, max_u8x16(p0, p1));
            if constexpr (Binary) {
                t0s += t0;
                t1s += t1;
                p0s += p0;
                p1s += p1;
                b0s += t0 & p0;
                b1s += t1 & p1;
            } else {
                e0 -= reinterpret_cast<label_u8x16>(t0 != p0); // a true lane is all ones (-1)
                e1 -= reinterpret_cast<label_u8x16>(t1 != p1);
            }
        }
        if constexpr (Binary) {
            r.sum_t += lane_sum(t0s) + lane_sum(t1s);
            r.sum_p += lane_sum(p0s) + lane_sum(p1s);
            r.sum_tp += lane_sum(b0s) + lane_sum(b1s);
        } else {
            r.mismatches += lane_sum(e0) + lane_sum(e1);
        }
    }
    r.max_t = lane_max(mt);
    r.max_p = lane_max(mp);
    for (; i < n; ++i) {
        r.max_t = std::max<std::uint64_t>(r.max_t, t[i]);
        r.max_p = std::max<std::uint64_t>(r.max_p, p[i]);
        if constexpr (Binary) {
            r.sum_t += t[i];
            r.sum_p += p[i];
            r.sum_tp += t[i] & p[i];
        } else {
            r.mismatches += t[i] != p[i];
        }
    }
    return r;
}

/// Byte labels, 3 <= K <= 8 classes: the cell code (t << 4) | p of W rows at a time (W = 16,
/// or 32 in the AVX2 clone) is compared with each cell code and counted in byte lanes. The
/// rows go in blocks of 255 steps (then the byte counters are flushed, before they can wrap;
/// a block of both arrays is at most 16 KiB, so it stays in L1), and each block is read
/// once per group of at most 12 cells: 12 counters, the code and the loads fit the 16 vector
/// registers, where all K^2 counters at once spilled to memory (measured at K = 5, 1e6 rows:
/// 0.29 ms in groups against 0.34 ms without, AVX2; SSE2 0.44 ms either way). The high
/// nibbles of t | p are collected on the side: a label >= 16 would alias a cell, so the
/// counts are only used when none is seen. Returns false when a label is >= K (then the
/// caller falls back and reports or grows). out: K x K counts, row-major.
/// V is a GCC vector of unsigned char; no function here takes or returns one by value (a
/// 32-byte vector argument outside an AVX function would change the ABI).
template <class V, std::size_t K, std::size_t First, bool High, std::size_t... I>
HELDOUT_DETAIL_INLINE void count_cell_group(const unsigned char* t, const unsigned char* p, std::size_t steps,
                                            std::uint64_t* total, V& high, std::index_sequence<I...>) noexcept {
    constexpr std::size_t W = sizeof(V);
    V cnt[sizeof...(I)] = {};
    for (std::size_t s = 0; s < steps; ++s) {
        V a, b;
        std::memcpy(&a, t + s * W, W);
        std::memcpy(&b, p + s * W, W);
        if constexpr (High)
            high |= a | b;
        const V code = (a << 4) | b;
        // cnt[I] += (code == cell code of First + I); a true lane is all ones (-1)
        ((cnt[I] -=
          reinterpret_cast<V>(code == static_cast<unsigned char>((((First + I) / K) << 4) | ((First + I) % K)))),
         ...);
    }
    for (std::size_t c = 0; c < sizeof...(I); ++c)
        for (std::size_t l = 0; l < W; ++l)
            total[First + c] += cnt[c][l];
}

inline constexpr std::size_t cell_group = 12;

template <class V, std::size_t K, std::size_t First = 0>
HELDOUT_DETAIL_INLINE void count_cell_groups(const unsigned char* t, const unsigned char* p, std::size_t steps,
                                             std::uint64_t* total, V& high) noexcept {
    constexpr std::size_t left = K * K - First;
    constexpr std::size_t count = left < cell_group ? left : cell_group;
    count_cell_group<V, K, First, First == 0>(t, p, steps, total, high, std::make_index_sequence<count>{});
    if constexpr (First + count < K * K)
        count_cell_groups<V, K, First + count>(t, p, steps, total, high);
}

template <class V, std::size_t K>
HELDOUT_DETAIL_INLINE bool count_bytes_small_body(const unsigned char* t, const unsigned char* p, std::size_t n,
                                                  std::uint64_t* out) noexcept {
    constexpr std::size_t KK = K * K;
    constexpr std::size_t W = sizeof(V);
    std::uint64_t total[KK] = {};
    V high{};
    std::size_t i = 0;
    while (n - i >= W) {
        const std::size_t steps = std::min<std::size_t>((n - i) / W, 255);
        count_cell_groups<V, K>(t + i, p + i, steps, total, high);
        i += steps * W;
    }
    unsigned char seen = 0;
    for (std::size_t l = 0; l < W; ++l)
        seen |= high[l];
    bool ok = (seen >> 4) == 0;
    for (; i < n; ++i) {
        if (t[i] >= K || p[i] >= K)
            ok = false;
        else
            ++total[t[i] * K + p[i]];
    }
    std::uint64_t counted = 0;
    for (std::size_t v = 0; v < KK; ++v) {
        out[v] = total[v];
        counted += total[v];
    }
    return ok && counted == n; // rows with a label in K..15 matched no cell
}

template <std::size_t K>
bool count_bytes_small_baseline(const unsigned char* t, const unsigned char* p, std::size_t n,
                                std::uint64_t* out) noexcept {
    return count_bytes_small_body<label_u8x16, K>(t, p, n, out);
}

#if HELDOUT_DETAIL_HAS_AVX2_CLONE
typedef unsigned char label_u8x32 __attribute__((vector_size(32)));
template <std::size_t K>
HELDOUT_DETAIL_TARGET_AVX2 bool count_bytes_small_avx2(const unsigned char* t, const unsigned char* p, std::size_t n,
                                                       std::uint64_t* out) noexcept {
    return count_bytes_small_body<label_u8x32, K>(t, p, n, out);
}
#endif

/// count_bytes_small_body in the best clone this CPU runs (or the one given).
template <std::size_t K>
bool count_bytes_small(const unsigned char* t, const unsigned char* p, std::size_t n, std::uint64_t* out,
                       isa which = best_isa()) noexcept {
#if HELDOUT_DETAIL_HAS_AVX2_CLONE
    if (which != isa::baseline)
        return count_bytes_small_avx2<K>(t, p, n, out);
#endif
    (void)which;
    return count_bytes_small_baseline<K>(t, p, n, out);
}
#endif

/// The fused pass for any label types. Byte labels of either signedness (and bool) share
/// the byte-lane kernel: a negative int8 shows up as a byte >= 128, which the range check
/// after the pass rejects before anything is used.
template <bool Binary, class T, class P>
label_scan scan_labels(std::span<const T> t, std::span<const P> p) noexcept {
#ifdef HELDOUT_LABEL_VECTORS
    if constexpr (sizeof(T) == 1 && sizeof(P) == 1) {
        label_scan r = scan_bytes<Binary>(reinterpret_cast<const unsigned char*>(t.data()),
                                          reinterpret_cast<const unsigned char*>(p.data()), t.size());
        if constexpr (std::is_signed_v<T>)
            if (r.max_t > 127)
                r.max_t = std::numeric_limits<std::uint64_t>::max();
        if constexpr (std::is_signed_v<P>)
            if (r.max_p > 127)
                r.max_p = std::numeric_limits<std::uint64_t>::max();
        return r;
    } else
#endif
    {
        label_scan r;
        std::uint64_t mt = 0, mp = 0, a0 = 0, a1 = 0, a2 = 0;
        for (std::size_t i = 0; i < t.size(); ++i) {
            const std::uint64_t a = label_bits(t[i]), b = label_bits(p[i]);
            mt = std::max(mt, a);
            mp = std::max(mp, b);
            if constexpr (Binary) {
                a0 += a;
                a1 += b;
                a2 += a & b;
            } else {
                a0 += a != b;
            }
        }
        r.max_t = mt;
        r.max_p = mp;
        if constexpr (Binary) {
            r.sum_t = a0;
            r.sum_p = a1;
            r.sum_tp = a2;
        } else {
            r.mismatches = a0;
        }
        return r;
    }
}

/// Neumaier step on a (sum, carry) pair stored in two arrays.
inline void compensated_add(double& sum, double& carry, double x) noexcept {
    const double t = sum + x;
    if (std::abs(sum) >= std::abs(x))
        carry += (sum - t) + x;
    else
        carry += (x - t) + sum;
    sum = t;
}

/// A read-only k x k view of a confusion table: cell (i, j) = a[o] (+ b[o] if b), with
/// o = i * row_stride + j * col_stride. Label measures compute their value from it.
struct table_view {
    std::size_t k = 0;
    const double* a = nullptr;
    const double* b = nullptr;
    std::ptrdiff_t row_stride = 0;
    std::ptrdiff_t col_stride = 1;

    double operator()(std::size_t i, std::size_t j) const noexcept {
        const std::ptrdiff_t o =
            static_cast<std::ptrdiff_t>(i) * row_stride + static_cast<std::ptrdiff_t>(j) * col_stride;
        return b ? a[o] + b[o] : a[o];
    }
};

/// Checks a user-given table (square, finite, non-negative) and views it.
inline table_view view_of_table(std::string_view who, const Eigen::MatrixXd& c) {
    if (c.rows() != c.cols())
        fail(who, "table",
             "must be square (rows = true class, columns = predicted class), got " + std::to_string(c.rows()) + " x " +
                 std::to_string(c.cols()));
    if (static_cast<std::size_t>(c.rows()) > measure::max_classes)
        fail(who, "table", "more than " + std::to_string(measure::max_classes) + " classes");
    const std::span<const double> cells(c.data(), static_cast<std::size_t>(c.size()));
    for (std::size_t o = 0; o < cells.size(); ++o) {
        const double x = cells[o];
        if (!std::isfinite(x) || x < 0) {
            const std::size_t r = o % static_cast<std::size_t>(c.rows()), col = o / static_cast<std::size_t>(c.rows());
            fail(who, "table",
                 (std::isfinite(x) ? "negative cell " + number_text(x) : std::string("cell not finite")) + " at row " +
                     std::to_string(r) + ", column " + std::to_string(col));
        }
    }
    return {static_cast<std::size_t>(c.rows()), c.data(), nullptr, 1, static_cast<std::ptrdiff_t>(c.rows())};
}

/// Row (true-class) and column (predicted-class) totals and the grand total of a table.
/// compute() reuses the buffers, so a kept table_margins allocates only when k grows.
struct table_margins {
    std::vector<double> row, col;
    double total = 0;
    double trace = 0;

    table_margins() = default;
    explicit table_margins(const table_view& v) { compute(v); }

    void compute(const table_view& v) {
        row.assign(v.k, 0.0);
        col.assign(v.k, 0.0);
        colsum_.assign(v.k, compensated_sum{});
        compensated_sum n{}, d{};
        for (std::size_t i = 0; i < v.k; ++i) {
            compensated_sum r{};
            for (std::size_t j = 0; j < v.k; ++j) {
                const double x = v(i, j);
                r.add(x);
                colsum_[j].add(x);
                n.add(x);
            }
            row[i] = r.value();
            d.add(v(i, i));
        }
        for (std::size_t j = 0; j < v.k; ++j)
            col[j] = colsum_[j].value();
        total = n.value();
        trace = d.value();
    }

private:
    std::vector<compensated_sum> colsum_;
};

/// One table_margins per thread for the accumulators' value(): after the first value() of
/// a given k nothing is allocated (fresh accumulators included), copies of an accumulator
/// carry no scratch, and value() on one object from several threads does not race.
inline table_margins& margins_scratch() {
    thread_local table_margins m;
    return m;
}

/// Checks that a table holds some weight; the one message for an empty table.
inline void check_table_weight(std::string_view who, const table_view& v, const table_margins& m) {
    if (v.k == 0)
        fail_undefined(who, "no observations");
    // First: an overflowed compensated sum reads NaN (inf - inf in its carry), not > 0.
    if (!(m.total <= std::numeric_limits<double>::max()))
        fail(who, "weights", "the total weight overflows double (beyond 1.8e308): scale the weights down");
    if (!(m.total > 0))
        fail_undefined(who, "total weight is zero");
}

} // namespace detail

namespace measure {

/// Running weighted confusion table; see the header comment for the conventions.
///
/// State (visit_state order): name (used in messages), fixed classes (0 = inferred), k,
/// cells (k*k row-major sums), carries (their Neumaier compensations), count
/// (observations). A reset accumulator equals a fresh one.
class confusion_accumulator {
public:
    /// An accumulator that infers k from the labels (classes = 0) or fixes it.
    explicit confusion_accumulator(std::size_t classes = 0, std::string who = "measure confusion matrix")
        : who_(std::move(who)), classes_(classes) {
        if (classes_ > max_classes)
            detail::fail(who_, "classes",
                         std::to_string(classes_) + " exceeds the largest supported " + std::to_string(max_classes));
        reset();
    }

    /// Adds a batch of labels (any integral types, classes 0..k-1).
    template <label_range T, label_range P>
    void add(const T& truth, const P& prediction) {
        auto t = values_of(truth, who_, "truth");
        auto p = values_of(prediction, who_, "prediction");
        detail::check_same_size(who_, "prediction", t.size(), p.size());
        detail::check_nonempty(who_, "truth", t.size());
        add_span(t, p);
    }

    /// Adds a weighted batch (weights finite and non-negative).
    template <label_range T, label_range P, weight_range W>
    void add(const T& truth, const P& prediction, const W& weights) {
        auto t = values_of(truth, who_, "truth");
        auto p = values_of(prediction, who_, "prediction");
        auto w = values_of(weights, who_, "weights");
        detail::check_same_size(who_, "prediction", t.size(), p.size());
        detail::check_same_size(who_, "weights", t.size(), w.size());
        detail::check_nonempty(who_, "truth", t.size());
        detail::check_weights(who_, w);
        add_weighted_span(t, p, w);
    }

    /// Adds one observation with true class y, predicted class f and weight w.
    template <std::integral A, std::integral B>
    void add_one(A y, B f, double w = 1.0) {
        if (!std::isfinite(w) || w < 0)
            detail::fail(who_, "weights", "weight must be finite and non-negative, got " + detail::number_text(w));
        const std::span<const A> ys(&y, 1);
        const std::span<const B> fs(&f, 1);
        const std::uint64_t limit = label_limit();
        detail::check_label_limit(who_, "truth", ys, limit, classes_ != 0);
        detail::check_label_limit(who_, "prediction", fs, limit, classes_ != 0);
        const std::size_t i = static_cast<std::size_t>(y), j = static_cast<std::size_t>(f);
        grow(std::max(i, j) + 1);
        const std::size_t o = i * k_ + j;
        detail::compensated_add(cells_[o], carry_[o], w);
        ++count_;
    }

    /// Adds another accumulator's table (an inferred k grows to the larger of the two).
    void merge(const confusion_accumulator& o) {
        if (&o == this) {
            const confusion_accumulator copy(o); // cells are read while they are written
            merge(copy);
            return;
        }
        HELDOUT_ASSERT(o.cells_.size() == o.k_ * o.k_ && o.carry_.size() == o.cells_.size());
        if (classes_ != 0 && o.k_ > classes_)
            detail::fail(who_, "other",
                         "cannot merge a table of " + std::to_string(o.k_) + " classes into one fixed at " +
                             std::to_string(classes_));
        grow(o.k_);
        for (std::size_t i = 0; i < o.k_; ++i)
            for (std::size_t j = 0; j < o.k_; ++j) {
                const std::size_t a = i * k_ + j, b = i * o.k_ + j;
                detail::compensated_add(cells_[a], carry_[a], o.cells_[b]);
                carry_[a] += o.carry_[b];
            }
        count_ += o.count_;
    }

    /// The table (k x k, rows = true class, columns = predicted class).
    Eigen::MatrixXd table() const {
        Eigen::MatrixXd m(static_cast<Eigen::Index>(k_), static_cast<Eigen::Index>(k_));
        for (std::size_t i = 0; i < k_; ++i)
            for (std::size_t j = 0; j < k_; ++j)
                m(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)) = (*this)(i, j);
        return m;
    }
    /// The value of a confusion matrix is its table (it has no single number).
    Eigen::MatrixXd value() const { return table(); }

    /// Cell (i, j): total weight of true class i predicted as j (0 outside the table).
    double operator()(std::size_t i, std::size_t j) const noexcept {
        if (i >= k_ || j >= k_)
            return 0.0;
        return cells_[i * k_ + j] + carry_[i * k_ + j];
    }
    /// Number of classes k of the table so far.
    std::size_t classes() const noexcept { return k_; }
    /// Number of observations added (unweighted).
    std::uint64_t count() const noexcept { return count_; }
    /// Sum of all cells (the total weight).
    double total_weight() const {
        detail::compensated_sum s{};
        for (std::size_t o = 0; o < cells_.size(); ++o) {
            s.add(cells_[o]);
            s.carry += carry_[o];
        }
        return s.value();
    }
    /// Row totals: the weight of each true class.
    Eigen::VectorXd true_totals() const { return table().rowwise().sum(); }
    /// Column totals: the weight of each predicted class.
    Eigen::VectorXd predicted_totals() const { return table().colwise().sum().transpose(); }

    /// Empties the table (an inferred k returns to 0); buffers keep their capacity.
    void reset() noexcept {
        k_ = classes_;
        cells_.assign(k_ * k_, 0.0);
        carry_.assign(k_ * k_, 0.0);
        count_ = 0;
    }

    /// The name used in messages ("measure precision", ...).
    const std::string& who() const noexcept { return who_; }
    /// The fixed number of classes, or 0 when inferred.
    std::size_t fixed_classes() const noexcept { return classes_; }

    /// The table as a view (no copy), for the label measures.
    detail::table_view view() const noexcept {
        return {k_, cells_.data(), carry_.data(), static_cast<std::ptrdiff_t>(k_), 1};
    }

    // The name and the fixed k come first: a deserialised table keeps its messages and its
    // class count. Filled from bytes, the state is checked before it is used.
    template <class F>
    void visit_state(F&& f) {
        f(who_);
        f(classes_);
        f(k_);
        f(cells_);
        f(carry_);
        f(count_);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(who_);
        f(classes_);
        f(k_);
        f(cells_);
        f(carry_);
        f(count_);
    }

    /// After a load (stream/serialize.hpp): a state this class can produce: k within the
    /// fixed or largest classes, k x k cells and carries, cells finite and >= 0.
    void check_state() const {
        const bool ok = classes_ <= max_classes && k_ <= max_classes && (classes_ == 0 || k_ == classes_) &&
                        cells_.size() == k_ * k_ && carry_.size() == cells_.size();
        if (!ok)
            detail::fail_loaded("cells", "inconsistent confusion table state (classes " + std::to_string(classes_) +
                                             ", k " + std::to_string(k_) + ", " + std::to_string(cells_.size()) +
                                             " cells)");
        detail::check_loaded_nonnegative("cells", std::span<const double>(cells_));
        detail::check_loaded_finite("carries", std::span<const double>(carry_));
    }

private:
    std::uint64_t label_limit() const noexcept { return (classes_ != 0 ? classes_ : max_classes) - 1; }

    /// Grows an inferred table to k classes, keeping its cells. The rows are moved in place
    /// (last row first: a row only moves towards the end), so a buffer that held k x k
    /// cells before a reset() grows again without allocating.
    void grow(std::size_t k) {
        if (k <= k_)
            return;
        HELDOUT_ASSERT(classes_ == 0 && k <= max_classes);
        const std::size_t old = k_;
        cells_.resize(k * k, 0.0);
        carry_.resize(k * k, 0.0);
        double* const cells = cells_.data();
        double* const carry = carry_.data();
        for (std::size_t i = old; i-- > 0;) {
            const std::size_t from = i * old, to = i * k;
            std::copy_backward(cells + from, cells + from + old, cells + to + old);
            std::copy_backward(carry + from, carry + from + old, carry + to + old);
            // zero the new columns of row i (they may hold cells of the old layout)
            std::fill(cells + to + old, cells + to + k, 0.0);
            std::fill(carry + to + old, carry + to + k, 0.0);
        }
        k_ = k;
    }

    template <class T, class P>
    [[noreturn]] void report_labels(std::span<const T> t, std::span<const P> p, std::uint64_t limit) const {
        detail::check_label_limit(who_, "truth", t, limit, classes_ != 0);
        detail::check_label_limit(who_, "prediction", p, limit, classes_ != 0);
        HELDOUT_ASSERT(false);
        detail::fail(who_, "truth", "label outside the classes");
    }

    /// The k to count with before the labels are known: the fixed k, the current one, or
    /// the one seen before the last reset.
    std::size_t guess_k() const noexcept { return std::max<std::size_t>({k_, hint_, 2}); }

    template <class T, class P>
    void add_span(std::span<const T> t, std::span<const P> p) {
        const std::uint64_t limit = label_limit();
        std::size_t kk = guess_k();
        if (4 * t.size() < kk * kk) {
            add_direct(t, p, limit); // a batch much smaller than the table: no count table to clear
            return;
        }
        for (int attempt = 0; attempt < 2; ++attempt) {
            std::uint64_t max_label = 0;
            bool ok = false;
            if (kk <= 2) {
                // Binary: the four cells follow from n, sum(t), sum(p), sum(t & p).
                const detail::label_scan s = detail::scan_labels<true>(t, p);
                max_label = std::max(s.max_t, s.max_p);
                ok = max_label <= 1;
                if (ok) {
                    const std::uint64_t n = t.size();
                    scratch_.assign(4, 0);
                    scratch_[3] = s.sum_tp;
                    scratch_[2] = s.sum_t - s.sum_tp;
                    scratch_[1] = s.sum_p - s.sum_tp;
                    scratch_[0] = n - s.sum_t - s.sum_p + s.sum_tp;
                    kk = 2;
                }
            } else if (kk <= small_k) {
                ok = count_small(t, p, kk, max_label);
                if (ok)
                    max_label = used_max(kk);
            } else {
                const detail::label_max m = detail::max_labels(t, p);
                max_label = std::max(m.truth, m.prediction);
                ok = max_label < kk;
                if (ok)
                    count_large(t, p, kk);
            }
            if (max_label > limit)
                report_labels(t, p, limit);
            if (ok) {
                commit(kk, static_cast<std::size_t>(max_label) + 1);
                count_ += t.size();
                return;
            }
            kk = static_cast<std::size_t>(max_label) + 1; // inferred k grows: count again
        }
        HELDOUT_ASSERT(false); // the second count uses k = largest label + 1, so it cannot fail
        add_direct(t, p, limit);
    }

    /// k x k counts in four interleaved sub-tables (independent increments), range check
    /// fused into the same pass. Returns false when a label is >= k.
    template <class T, class P>
    bool count_small(std::span<const T> t, std::span<const P> p, std::size_t k, std::uint64_t& max_label) {
#ifdef HELDOUT_LABEL_VECTORS
        if constexpr (sizeof(T) == 1 && sizeof(P) == 1) {
            if (k <= 8) {
                scratch_.assign(k * k, 0);
                const auto* a = reinterpret_cast<const unsigned char*>(t.data());
                const auto* b = reinterpret_cast<const unsigned char*>(p.data());
                bool ok = false;
                switch (k) {
                case 3:
                    ok = detail::count_bytes_small<3>(a, b, t.size(), scratch_.data());
                    break;
                case 4:
                    ok = detail::count_bytes_small<4>(a, b, t.size(), scratch_.data());
                    break;
                case 5:
                    ok = detail::count_bytes_small<5>(a, b, t.size(), scratch_.data());
                    break;
                case 6:
                    ok = detail::count_bytes_small<6>(a, b, t.size(), scratch_.data());
                    break;
                case 7:
                    ok = detail::count_bytes_small<7>(a, b, t.size(), scratch_.data());
                    break;
                default:
                    ok = detail::count_bytes_small<8>(a, b, t.size(), scratch_.data());
                    break;
                }
                if (!ok) {
                    const detail::label_max m = detail::max_labels(t, p);
                    max_label = std::max(m.truth, m.prediction);
                }
                return ok;
            }
        }
#endif
        const std::size_t kk = k * k;
        sub_.assign(4 * kk, 0);
        scratch_.assign(kk, 0);
        std::uint64_t bad = 0;
        const std::size_t n = t.size();
        for (std::size_t start = 0; start < n; start += chunk) {
            const std::size_t end = std::min(n, start + chunk);
            std::size_t i = start;
            for (; i + 4 <= end; i += 4) {
                for (std::size_t l = 0; l < 4; ++l) {
                    const std::uint64_t a = detail::label_bits(t[i + l]), b = detail::label_bits(p[i + l]);
                    const bool in = (a < k) & (b < k);
                    bad |= !in;
                    sub_[l * kk + (in ? a * k + b : 0)] += in;
                }
            }
            for (; i < end; ++i) {
                const std::uint64_t a = detail::label_bits(t[i]), b = detail::label_bits(p[i]);
                const bool in = (a < k) & (b < k);
                bad |= !in;
                sub_[in ? a * k + b : 0] += in;
            }
            for (std::size_t c = 0; c < kk; ++c) {
                scratch_[c] += std::uint64_t(sub_[c]) + sub_[kk + c] + sub_[2 * kk + c] + sub_[3 * kk + c];
                sub_[c] = sub_[kk + c] = sub_[2 * kk + c] = sub_[3 * kk + c] = 0;
            }
        }
        if (bad) {
            const detail::label_max m = detail::max_labels(t, p);
            max_label = std::max(m.truth, m.prediction);
            return false;
        }
        return true;
    }

    /// The largest label with a count in the kk x kk scratch table.
    std::uint64_t used_max(std::size_t kk) const noexcept {
        std::uint64_t m = 0;
        for (std::size_t a = 0; a < kk; ++a)
            for (std::size_t b = 0; b < kk; ++b)
                if (scratch_[a * kk + b] != 0)
                    m = std::max<std::uint64_t>(m, std::max(a, b));
        return m;
    }

    /// Small batch, large table: check, grow, then add each row to its cell.
    template <class T, class P>
    void add_direct(std::span<const T> t, std::span<const P> p, std::uint64_t limit) {
        const detail::label_max m = detail::max_labels(t, p);
        const std::uint64_t max_label = std::max(m.truth, m.prediction);
        if (max_label > limit)
            report_labels(t, p, limit);
        grow(static_cast<std::size_t>(max_label) + 1);
        hint_ = std::max<std::size_t>(hint_, k_);
        for (std::size_t i = 0; i < t.size(); ++i) {
            const std::size_t o = static_cast<std::size_t>(t[i]) * k_ + static_cast<std::size_t>(p[i]);
            detail::compensated_add(cells_[o], carry_[o], 1.0);
        }
        count_ += t.size();
    }

    /// Large k: labels already checked; one table of 64-bit counts.
    template <class T, class P>
    void count_large(std::span<const T> t, std::span<const P> p, std::size_t k) {
        scratch_.assign(k * k, 0);
        for (std::size_t i = 0; i < t.size(); ++i)
            ++scratch_[static_cast<std::size_t>(t[i]) * k + static_cast<std::size_t>(p[i])];
    }

    /// Adds the kk x kk counts in scratch_ into the table; `needed` = largest label + 1.
    void commit(std::size_t kk, std::size_t needed) {
        grow(std::min(needed, kk));
        hint_ = std::max(hint_, k_);
        const std::size_t m = std::min(kk, k_);
        for (std::size_t i = 0; i < m; ++i)
            for (std::size_t j = 0; j < m; ++j) {
                const std::uint64_t c = scratch_[i * kk + j];
                if (c != 0) {
                    const std::size_t o = i * k_ + j;
                    detail::compensated_add(cells_[o], carry_[o], static_cast<double>(c));
                }
            }
    }

    template <class T, class P, class W>
    void add_weighted_span(std::span<const T> t, std::span<const P> p, std::span<const W> w) {
        const std::uint64_t limit = label_limit();
        const detail::label_max m = detail::max_labels(t, p);
        const std::uint64_t max_label = std::max(m.truth, m.prediction);
        if (max_label > limit)
            report_labels(t, p, limit);
        grow(static_cast<std::size_t>(max_label) + 1);
        hint_ = std::max(hint_, k_);
        const std::size_t k = k_, kk = k * k;
        // Per-block partial tables, each block total added with compensation: the error
        // is that of a 2048-term sum per block, independent of n.
        const std::size_t block = std::max<std::size_t>(detail::block_rows, 2 * kk);
        part_.assign(kk, 0.0);
        for (std::size_t start = 0; start < t.size(); start += block) {
            const std::size_t end = std::min(t.size(), start + block);
            for (std::size_t i = start; i < end; ++i)
                part_[static_cast<std::size_t>(t[i]) * k + static_cast<std::size_t>(p[i])] += static_cast<double>(w[i]);
            for (std::size_t c = 0; c < kk; ++c) {
                if (part_[c] != 0.0) {
                    detail::compensated_add(cells_[c], carry_[c], part_[c]);
                    part_[c] = 0.0;
                }
            }
        }
        count_ += t.size();
    }

    static constexpr std::size_t small_k = 64;
    static constexpr std::size_t chunk = std::size_t(1) << 30; // uint32 sub-counts never wrap

    std::string who_;
    std::size_t classes_ = 0;
    std::size_t hint_ = 0;
    // state
    std::uint64_t k_ = 0;
    std::vector<double> cells_;
    std::vector<double> carry_;
    std::uint64_t count_ = 0;
    // scratch (not state)
    std::vector<std::uint64_t> scratch_;
    std::vector<std::uint32_t> sub_;
    std::vector<double> part_;
};

/// The accumulator of every table-based label measure M: a confusion_accumulator plus
/// the measure, whose value is computed from the table when asked. M provides name() and
/// message_name() (its name in messages, without parameters such as costs),
/// table_classes() (the fixed k, or 0; it checks the parameters), from_view(view, margins,
/// who), visit_state over its parameters, and optionally check_usable(who) (refuses a
/// measure that cannot score, e.g. a default cost_weighted_error without costs).
///
/// State (visit_state order): the measure's parameters (nested), then the confusion
/// table's state (name, fixed k, k, cells, carries, count).
template <class M>
class table_accumulator {
public:
    /// The accumulator of a default M (what deserialize() fills).
    table_accumulator() : table_accumulator(M{}) {}
    explicit table_accumulator(const M& m) : m_(m), table_(m.table_classes(), "measure " + m.message_name()) {}

    template <label_range T, label_range P>
    void add(const T& truth, const P& prediction) {
        check_usable();
        table_.add(truth, prediction);
    }
    template <label_range T, label_range P, weight_range W>
    void add(const T& truth, const P& prediction, const W& weights) {
        check_usable();
        table_.add(truth, prediction, weights);
    }
    template <std::integral A, std::integral B>
    void add_one(A y, B f, double w = 1.0) {
        check_usable();
        table_.add_one(y, f, w);
    }
    /// Combines two shards; both must be of the same measure (equal parameters).
    void merge(const table_accumulator& o) {
        if (!same_measure(m_, o.m_))
            detail::fail_state(table_.who(), "other",
                               "cannot merge a state of measure " + o.m_.name() + " into one of " + m_.name());
        table_.merge(o.table_);
    }

    /// The measure on the table so far; undefined_error when it is 0/0 (see the measure).
    /// Allocates nothing once a table of this k has been scored on this thread.
    double value() const {
        check_usable();
        if (table_.count() == 0)
            detail::fail_undefined(table_.who(), "no observations");
        const detail::table_view v = table_.view();
        detail::table_margins& m = detail::margins_scratch();
        m.compute(v);
        return m_.from_view(v, m, table_.who());
    }
    void reset() noexcept { table_.reset(); }

    /// The confusion table underneath.
    const confusion_accumulator& confusion() const noexcept { return table_; }
    std::uint64_t count() const noexcept { return table_.count(); }
    double total_weight() const { return table_.total_weight(); }
    const M& measure() const noexcept { return m_; }

    // The parameters come first, so deserialised bytes restore the measure; read from
    // bytes, they are checked as the constructor checks them.
    template <class F>
    void visit_state(F&& f) {
        f(m_);
        table_.visit_state(f);
        // Bytes of a measure with the same layout (precision read as recall) are refused.
        if (m_.table_classes() != table_.fixed_classes() || table_.who() != "measure " + m_.message_name())
            detail::fail("heldout::deserialize", "bytes",
                         "the state is of " + table_.who() + " with " + std::to_string(table_.fixed_classes()) +
                             " fixed classes, not of measure " + m_.message_name());
    }
    template <class F>
    void visit_state(F&& f) const {
        f(m_);
        table_.visit_state(f);
    }
    /// After a load (stream/serialize.hpp): the parameters as the constructor checks them,
    /// then the table.
    void check_state() const {
        detail::check_loaded_parameters("parameters", [&] { (void)m_.table_classes(); });
        table_.check_state();
    }

private:
    void check_usable() const {
        if constexpr (requires(const M& m) { m.check_usable(std::string_view{}); })
            m_.check_usable(table_.who());
    }

    M m_;
    confusion_accumulator table_;
};

/// The weighted k x k confusion table (rows = true class, columns = predicted class).
struct confusion_matrix {
    static constexpr prediction_kind kind = prediction_kind::label;
    /// Number of classes k; 0 infers it from the labels (largest label + 1).
    std::size_t classes = 0;

    std::string name() const { return "confusion matrix"; }
    confusion_accumulator accumulator() const { return confusion_accumulator(classes, "measure " + name()); }
};

} // namespace measure

/// The confusion table of a whole set (rows = true class, columns = predicted class).
template <class T, class P>
Eigen::MatrixXd evaluate(const measure::confusion_matrix& m, const T& truth, const P& prediction) {
    detail::check_prediction_type<measure::confusion_matrix, P>();
    static_assert(label_range<T>, "heldout: a confusion matrix needs class labels (integral elements) as truth");
    auto acc = m.accumulator();
    acc.add(truth, prediction);
    return acc.table();
}

/// The weighted confusion table of a whole set.
template <class T, class P, class W>
Eigen::MatrixXd evaluate(const measure::confusion_matrix& m, const T& truth, const P& prediction, const W& weights) {
    detail::check_prediction_type<measure::confusion_matrix, P>();
    static_assert(label_range<T>, "heldout: a confusion matrix needs class labels (integral elements) as truth");
    static_assert(weight_range<W>, "heldout: weights are a contiguous range of numbers");
    auto acc = m.accumulator();
    acc.add(truth, prediction, weights);
    return acc.table();
}

HELDOUT_NAMESPACE_END
