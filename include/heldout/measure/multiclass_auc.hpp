// heldout/measure/multiclass_auc.hpp — AUC for c >= 2 classes from class-probability rows:
// the Hand & Till (2001) M measure, or one-vs-rest AUCs averaged with prevalence weights.
//
//   Eigen::MatrixXd p(n, 3);                    // row i: p(class 0..2 | x_i), rows sum to 1
//   double m = heldout::evaluate(heldout::measure::multiclass_auc{}, truth, p);   // Hand & Till M
//   heldout::measure::multiclass_auc ovr{heldout::measure::multiclass_auc_method::one_vs_rest_weighted};
//   double o = heldout::evaluate(ovr, truth, heldout::rows(flat, 3), weights);
//
// Hand & Till (2001, Machine Learning 45:171-186): for classes i != j, A(i|j) is
// the two-class AUC of class i against class j using column i as the score, over the rows of
// those two classes only (ties one half); A(i, j) = (A(i|j) + A(j|i)) / 2 and
// M = 2 / (c (c - 1)) sum_{i<j} A(i, j). M does not depend on the class priors.
// one_vs_rest_weighted: AUC_i = class i against all other rows using column i, averaged with
// weights n_i / n (Provost & Domingos 2003, Machine Learning 52:199-215); it depends on the
// priors. Weights (optional) act as replicated rows in both.
// Absent classes: every class 0..c-1 must be present (with positive total weight); otherwise the
// value is undefined and undefined_error names the first missing class — pairs are never
// skipped silently, since M over fewer classes is a different measure. Other errors: labels
// outside 0..c-1, probability rows outside [0, 1] or not summing to 1, sizes -> input_error.
// Cost: c radix sorts of n rows and O(n c) counting per column.
#pragma once

#include <heldout/core/measure.hpp>
#include <heldout/detail/ranks.hpp>
#include <heldout/detail/state_checks.hpp>

#include <algorithm>
#include <cstdint>
#include <string>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

/// Which multiclass AUC.
enum class multiclass_auc_method : std::uint8_t {
    hand_till,           ///< Hand & Till (2001) M: mean of pairwise A(i, j)
    one_vs_rest_weighted ///< one-vs-rest AUCs weighted by class prevalence
};

/// Running state of multiclass_auc: the probability rows, labels and weights.
struct multiclass_auc;

class multiclass_auc_accumulator {
public:
    /// The measure this state belongs to (its method included).
    multiclass_auc measure() const;

    multiclass_auc_accumulator() = default;
    explicit multiclass_auc_accumulator(multiclass_auc_method m) : method_(static_cast<std::uint8_t>(m)) {}

    template <label_range T, probability_rows P>
    void add(const T& truth, const P& probabilities) {
        const std::size_t n = append(truth, probabilities);
        if (!weights_.empty())
            weights_.resize(weights_.size() + n, 1.0);
    }
    template <label_range T, probability_rows P, weight_range W>
    void add(const T& truth, const P& probabilities, const W& weights) {
        auto w = values_of(weights, who(), "weights");
        detail::check_weights(who(), w);
        if (weights_.empty())
            weights_.assign(labels_.size(), 1.0);
        const std::size_t before = labels_.size();
        detail::check_same_size(who(), "weights", values_of(truth, who(), "truth").size(), w.size());
        append(truth, probabilities);
        HELDOUT_ASSERT(labels_.size() == before + w.size());
        (void)before;
        weights_.insert(weights_.end(), w.begin(), w.end());
    }

    void merge(const multiclass_auc_accumulator& o) {
        if (o.labels_.empty())
            return;
        if (method_ != o.method_)
            detail::fail_state(who(), "other", "cannot merge accumulators of different methods");
        if (classes_ != 0 && classes_ != o.classes_)
            detail::fail_state(who(), "other",
                               "has " + std::to_string(o.classes_) + " classes, this one " + std::to_string(classes_));
        classes_ = o.classes_;
        // Decided before anything is appended: a fresh accumulator has no rows to tell us.
        const bool weighted = !weights_.empty() || !o.weights_.empty();
        const std::size_t rows = labels_.size(), other_rows = o.labels_.size();
        if (weighted) {
            weights_.resize(rows, 1.0);
            if (o.weights_.empty())
                weights_.resize(rows + other_rows, 1.0);
            else
                append_all(weights_, o.weights_);
        }
        append_all(probs_, o.probs_);
        append_all(labels_, o.labels_);
    }

    double value() const {
        const std::size_t n = labels_.size();
        if (n == 0)
            detail::fail_undefined(who(), "no observations");
        const std::size_t k = static_cast<std::size_t>(classes_);
        // Weights in units of the largest (a power of two, exact): the products of class
        // weights below neither overflow nor underflow, and the ratios keep every bit.
        double top = 0;
        for (double w : weights_)
            top = std::max(top, w);
        scale_ = detail::unit_scale(top);
        std::vector<double>& tot = class_weight_;
        tot.assign(k, 0.0);
        for (std::size_t i = 0; i < n; ++i)
            tot[labels_[i]] += weight(i);
        for (std::size_t c = 0; c < k; ++c)
            if (!(tot[c] > 0))
                detail::fail_undefined(who(), "class " + std::to_string(c) + " is absent" +
                                                  (weights_.empty() ? "" : " or has zero total weight") +
                                                  "; every class needs observations");
        const bool hand_till = method_ == static_cast<std::uint8_t>(multiclass_auc_method::hand_till);
        std::vector<double>& u = pair_u_; // hand_till: u[i k + j] = U(i|j); else u[i] = U_i vs rest
        u.assign(hand_till ? k * k : k, 0.0);
        for (std::size_t col = 0; col < k; ++col)
            count_column(col, hand_till);
        detail::compensated_sum s;
        double total = 0;
        for (double t : tot)
            total += t;
        if (hand_till) {
            for (std::size_t i = 0; i < k; ++i)
                for (std::size_t j = i + 1; j < k; ++j)
                    s.add((u[i * k + j] + u[j * k + i]) / (tot[i] * tot[j]) / 2);
            return s.value() * 2 / (static_cast<double>(k) * static_cast<double>(k - 1));
        }
        for (std::size_t i = 0; i < k; ++i)
            s.add(tot[i] / total * (u[i] / (tot[i] * (total - tot[i]))));
        return s.value();
    }

    void reset() noexcept {
        classes_ = 0;
        probs_.clear();
        labels_.clear();
        weights_.clear();
    }
    std::size_t count() const noexcept { return labels_.size(); }

    template <class F>
    void visit_state(F&& f) {
        f(method_);
        f(classes_);
        f(probs_);
        f(labels_);
        f(weights_);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(method_);
        f(classes_);
        f(probs_);
        f(labels_);
        f(weights_);
    }

    /// After a load (stream/serialize.hpp): method known, at least 2 classes when rows are
    /// held, rows of `classes` probabilities in [0, 1], labels below classes, weights either
    /// absent or one finite non-negative weight per row.
    void check_state() const {
        if (method_ > static_cast<std::uint8_t>(multiclass_auc_method::one_vs_rest_weighted))
            detail::fail_loaded("method", "unknown code " + std::to_string(method_));
        const std::size_t n = labels_.size();
        if (n == 0 && (classes_ != 0 || !probs_.empty() || !weights_.empty()))
            detail::fail_loaded("classes", "an empty state holds classes, rows or weights");
        if (n == 0)
            return;
        if (classes_ < 2 || classes_ > detail::max_packed_rows)
            detail::fail_loaded("classes", "is " + std::to_string(classes_) + ", needs at least 2");
        if (n > detail::max_packed_rows)
            detail::fail_loaded("labels", "more than 2^31 - 1 rows");
        const std::size_t k = static_cast<std::size_t>(classes_);
        if (probs_.size() / k != n || probs_.size() % k != 0)
            detail::check_loaded_size("probabilities", probs_.size(), n * k, "rows x classes");
        for (std::size_t i = 0; i < probs_.size(); ++i)
            if (!(probs_[i] >= 0 && probs_[i] <= 1))
                detail::fail_loaded("probabilities", "element " + std::to_string(i) + " is not in [0, 1]");
        detail::check_loaded_labels("labels", std::span<const std::uint32_t>(labels_), k);
        if (!weights_.empty())
            detail::check_loaded_size("weights", weights_.size(), n, "one per row");
        detail::check_loaded_nonnegative("weights", std::span<const double>(weights_));
    }

private:
    static std::string_view who() { return "measure multiclass AUC"; }
    double weight(std::size_t i) const noexcept { return weights_.empty() ? 1.0 : weights_[i] * scale_; }

    /// d += s, where s may be d itself (a self-merge: insert from its own range is undefined,
    /// so grow d first and copy from its new storage).
    template <class T>
    static void append_all(std::vector<T>& d, const std::vector<T>& s) {
        if (&d != &s) {
            d.insert(d.end(), s.begin(), s.end());
            return;
        }
        const std::size_t n = d.size();
        d.resize(2 * n);
        std::copy_n(d.data(), n, d.data() + n);
    }

    template <class T, class P>
    std::size_t append(const T& truth, const P& probabilities) {
        auto y = values_of(truth, who(), "truth");
        const auto p = rows_of(probabilities);
        detail::check_nonempty(who(), "truth", y.size());
        detail::check_same_size(who(), "probabilities", y.size(), p.rows);
        if (p.cols < 2)
            detail::fail(who(), "probabilities", "needs at least 2 columns (one per class)");
        if (classes_ != 0 && p.cols != classes_)
            detail::fail(who(), "probabilities",
                         "has " + std::to_string(p.cols) + " columns, earlier batches " + std::to_string(classes_));
        detail::check_labels(who(), "truth", y, p.cols);
        detail::check_probability_rows(who(), "probabilities", p);
        if (labels_.size() + y.size() > detail::max_packed_rows)
            detail::fail(who(), "truth", "more than 2^31 - 1 rows in total");
        classes_ = p.cols;
        for (std::size_t i = 0; i < p.rows; ++i)
            for (std::size_t j = 0; j < p.cols; ++j)
                probs_.push_back(static_cast<double>(p(i, j)));
        for (auto l : y)
            labels_.push_back(static_cast<std::uint32_t>(l));
        return y.size();
    }

    /// Sorts the rows by column col and adds the Mann–Whitney sums of class col against the others.
    void count_column(std::size_t col, bool hand_till) const {
        const std::size_t n = labels_.size(), k = static_cast<std::size_t>(classes_);
        auto& buf = scratch_;
        buf.prepare(n);
        for (std::size_t i = 0; i < n; ++i) {
            const std::uint64_t key = detail::order_key(probs_[i * k + col]);
            buf.keys[i] = key;
            detail::radix_layout<std::uint64_t>::count(buf.hist, key);
            buf.payload[i] = static_cast<std::uint32_t>(i);
        }
        buf.sort(n);
        std::vector<double>& below = below_;
        std::vector<double>& cnt = group_;
        below.assign(k, 0.0);
        cnt.assign(k, 0.0);
        std::vector<std::uint32_t>& touched = touched_;
        double below_all = 0;
        std::size_t i = 0;
        while (i < n) {
            const std::uint64_t key = buf.keys[i];
            touched.clear();
            double group_all = 0;
            for (; i < n && buf.keys[i] == key; ++i) {
                const std::uint32_t r = buf.payload[i];
                const std::uint32_t c = labels_[r];
                if (cnt[c] == 0)
                    touched.push_back(c);
                const double w = weight(r);
                cnt[c] += w;
                group_all += w;
            }
            const double ci = cnt[col];
            if (ci > 0) {
                if (hand_till) {
                    for (std::size_t j = 0; j < k; ++j)
                        if (j != col)
                            pair_u_[col * k + j] += ci * (below[j] + cnt[j] / 2);
                } else {
                    const double rest_below = below_all - below[col], rest_group = group_all - ci;
                    pair_u_[col] += ci * (rest_below + rest_group / 2);
                }
            }
            for (std::uint32_t c : touched) {
                below[c] += cnt[c];
                cnt[c] = 0;
            }
            below_all += group_all;
        }
    }

    std::uint8_t method_ = static_cast<std::uint8_t>(multiclass_auc_method::hand_till);
    std::uint64_t classes_ = 0;
    std::vector<double> probs_; // row-major n x classes_
    std::vector<std::uint32_t> labels_;
    std::vector<double> weights_; // empty: all weights 1
    // scratch (not state)
    mutable detail::radix_buffers<std::uint64_t, std::uint32_t> scratch_;
    mutable std::vector<double> class_weight_, pair_u_, below_, group_;
    mutable std::vector<std::uint32_t> touched_;
    mutable double scale_ = 1; // value()'s unit of weight
};

/// Multiclass AUC from class-probability rows: Hand & Till M (default) or prevalence-weighted
/// one-vs-rest.
struct multiclass_auc {
    static constexpr direction better = direction::higher_is_better;
    static constexpr prediction_kind kind = prediction_kind::class_probabilities;
    using capabilities = offers<cap::serialisable>;
    static constexpr std::string_view key = "multiclass_auc";
    multiclass_auc_method method = multiclass_auc_method::hand_till;
    bool operator==(const multiclass_auc&) const = default;
    std::string name() const {
        return method == multiclass_auc_method::hand_till ? "multiclass AUC (Hand & Till M)"
                                                          : "multiclass AUC (prevalence-weighted one-vs-rest)";
    }
    multiclass_auc_accumulator accumulator() const { return multiclass_auc_accumulator(method); }
};

inline multiclass_auc multiclass_auc_accumulator::measure() const {
    return {static_cast<multiclass_auc_method>(method_)};
}

} // namespace measure
HELDOUT_NAMESPACE_END
