// heldout/measure/confusion_accumulator.hpp — the running weighted k x k confusion table of
// class labels, on which confusion_matrix and every label measure are built (conventions in
// measure/confusion_matrix.hpp).
//
//   heldout::measure::confusion_accumulator acc(3);        // 3 classes; 0 infers k
//   acc.add(truth, pred);  acc.add(truth, pred, weights);  acc.add_one(2, 0);  acc.merge(other);
//   double tp = acc(1, 1);  Eigen::MatrixXd table = acc.table();
#pragma once

#include <heldout/core/config.hpp>
#include <heldout/core/measure.hpp>
#include <heldout/detail/cell_count.hpp>
#include <heldout/detail/confusion_table.hpp>
#include <heldout/detail/label_scan.hpp>
#include <heldout/detail/labels.hpp>
#include <heldout/detail/state_checks.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/detail/validate.hpp>

HELDOUT_EXTERNAL_BEGIN
#include <Eigen/Core>
HELDOUT_EXTERNAL_END

#include <algorithm>
#include <cmath>
#include <concepts>
#include <cstddef>
#include <cstdint>
#include <span>
#include <string>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

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
    // The two totals are member templates (of an unused parameter) so that Eigen's reductions
    // are compiled only where they are called (bench/include_cost.sh).
    /// Row totals: the weight of each true class.
    template <class = void>
    Eigen::VectorXd true_totals() const {
        return table().rowwise().sum();
    }
    /// Column totals: the weight of each predicted class.
    template <class = void>
    Eigen::VectorXd predicted_totals() const {
        return table().colwise().sum().transpose();
    }

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
#ifdef HELDOUT_DETAIL_LABEL_VECTORS
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

} // namespace measure

HELDOUT_NAMESPACE_END
