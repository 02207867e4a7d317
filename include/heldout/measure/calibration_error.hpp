// heldout/measure/calibration_error.hpp — expected (and maximum) calibration error of
// probabilities, with equal-width or equal-count bins.
//
//   using namespace heldout;
//   measure::calibration_error ece;                                 // 15 equal-width bins, P(y = 1)
//   double a = evaluate(ece, y, p);
//   double b = evaluate(measure::calibration_error{.bins = 10, .binning = measure::bin_rule::equal_count,
//                                                  .variant = measure::calibration_variant::top_label}, y, p, w);
//   double m = evaluate(measure::calibration_error{.statistic = measure::calibration_statistic::maximum}, y, p);
//   double t = evaluate(measure::multiclass_calibration_error{.bins = 15}, labels, probs);  // top-label on rows
//
// Naeini, Cooper & Hauskrecht (2015), AAAI-15 pp. 2901-2907; Guo, Pleiss, Sun & Weinberger
// (2017), ICML, PMLR 70:1321-1330. Each row has a confidence c and a hit h in {0, 1}:
//  * positive_class (binary): c = p = P(y = 1), h = y;
//  * top_label (binary): predicted class 1 where p >= 1/2, c = max(p, 1 - p), h = [predicted = y];
//  * multiclass_calibration_error (always top-label): predicted class = the first column of
//    largest probability, c = that probability, h = [predicted = y].
// With bins B_1..B_M, W_m the weight in B_m and W the total weight:
//   ECE = sum_m (W_m / W) |acc_m - conf_m| = sum_m |H_m - C_m| / W,
//   MCE = max over bins with W_m > 0 of |acc_m - conf_m|,
// acc_m = H_m / W_m and conf_m = C_m / W_m (weighted sums of h and c). Empty bins add 0.
// Bins (right-closed, as in Naeini et al.; confidence 0 goes to the first bin):
//  * equal_width: B_1 = [0, 1/M], B_m = ((m-1)/M, m/M]. The edges m/M are computed by
//    division and each row is placed by comparing with them, because ceil(c M) - 1 alone
//    is wrong on some edges (0.07 * 100 = 7.000000000000001).
//  * equal_count: edges at weighted quantiles of the confidences: t_m (m = 1..M-1) is the
//    smallest confidence whose cumulative weight (in sorted order) reaches m W / M; a row
//    goes to bin #{m : c > t_m}. Tied confidences always share a bin, so the result does
//    not depend on row order; with ties, bins can hold unequal counts or be empty.
// ECE depends strongly on M, the binning and the variant: report them with the value.
// Equal-width state is per bin (fixed size); equal-count keeps the rows (merge appends).
#pragma once

#include <heldout/core/measure.hpp>
#include <heldout/detail/state_checks.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/detail/validate.hpp>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <numeric>
#include <string>
#include <string_view>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

/// How rows are binned by confidence.
enum class bin_rule : std::uint8_t { equal_width, equal_count };
/// Which confidence a binary calibration error bins.
enum class calibration_variant : std::uint8_t { positive_class, top_label };
/// The summary over bins: expected (ECE, weighted mean gap) or maximum (MCE, largest gap).
enum class calibration_statistic : std::uint8_t { expected, maximum };

namespace detail_calibration {
/// Index of the equal-width bin ((m-1)/M, m/M] holding c in [0, 1] (c = 0: the first).
inline std::size_t width_bin(double c, std::size_t m) {
    const double md = static_cast<double>(m);
    double g = std::ceil(c * md) - 1.0;
    std::size_t i = g < 0 ? 0 : (g > md - 1 ? m - 1 : static_cast<std::size_t>(g));
    // Edges by division, then move one bin at a time until edge(i) < c <= edge(i + 1).
    while (i > 0 && c <= static_cast<double>(i) / md)
        --i;
    while (i + 1 < m && c > static_cast<double>(i + 1) / md)
        ++i;
    return i;
}

} // namespace detail_calibration

/// Running state of calibration_error and multiclass_calibration_error.
struct calibration_error;
struct multiclass_calibration_error;

class calibration_error_accumulator {
public:
    /// The measure this state belongs to (binary form; its parameters included).
    calibration_error measure() const;

    calibration_error_accumulator() = default;
    calibration_error_accumulator(std::size_t bins, bin_rule rule, calibration_variant variant,
                                  calibration_statistic statistic, bool multiclass)
        : bins_(bins), rule_(static_cast<std::uint8_t>(rule)), variant_(static_cast<std::uint8_t>(variant)),
          statistic_(static_cast<std::uint8_t>(statistic)), multiclass_(multiclass) {
        if (bins_ == 0)
            detail::fail(who(), "bins", "the number of bins must be positive");
        bin_state_.assign(rule == bin_rule::equal_width ? 6 * bins_ : 0, 0.0); // equal count keeps rows instead
    }

    /// Binary: truth 0/1 (integral or floating), p = P(y = 1) in [0, 1].
    template <value_range T, real_range P>
    void add(const T& truth, const P& prediction) {
        add_binary(truth, prediction, static_cast<const double*>(nullptr), 0);
    }
    template <value_range T, real_range P, weight_range W>
    void add(const T& truth, const P& prediction, const W& weights) {
        auto w = values_of(weights, who(), "weights");
        add_binary(truth, prediction, w.data(), w.size());
    }
    /// Multiclass (top-label): labels 0..k-1 and n x k class-probability rows.
    template <label_range T, probability_rows P>
    void add(const T& truth, const P& prediction) {
        add_rows(truth, prediction, static_cast<const double*>(nullptr), 0);
    }
    template <label_range T, probability_rows P, weight_range W>
    void add(const T& truth, const P& prediction, const W& weights) {
        auto w = values_of(weights, who(), "weights");
        add_rows(truth, prediction, w.data(), w.size());
    }
    /// One binary row.
    void add_one(double y, double p, double w = 1.0) {
        if (multiclass_)
            detail::fail(who(), "prediction", "a multiclass calibration error takes class-probability rows");
        if (!(y == 0 || y == 1))
            detail::fail(who(), "truth", "label " + detail::number_text(y) + " outside the classes 0..1");
        if (!(p >= 0 && p <= 1))
            detail::fail(who(), "prediction", "probability " + detail::number_text(p) + " outside [0, 1]");
        if (!std::isfinite(w) || w < 0)
            detail::fail(who(), "weights", "weight must be finite and non-negative");
        double c = p, h = y;
        binary_row(y, p, c, h);
        put(c, h, w);
        ++count_;
    }

    void merge(const calibration_error_accumulator& o) {
        if (o.bins_ != bins_ || o.rule_ != rule_ || o.variant_ != variant_ || o.statistic_ != statistic_ ||
            o.multiclass_ != multiclass_)
            detail::fail_state(who(), "other", "accumulators with different bins, binning or variant do not merge");
        count_ += o.count_;
        detail::compensated_add(weight_, weight_carry_, o.weight_);
        weight_carry_ += o.weight_carry_;
        for (std::size_t m = 0; m < bins_ && !bin_state_.empty(); ++m)
            for (std::size_t q = 0; q < 3; ++q) {
                detail::compensated_add(bin_state_[6 * m + 2 * q], bin_state_[6 * m + 2 * q + 1],
                                        o.bin_state_[6 * m + 2 * q]);
                bin_state_[6 * m + 2 * q + 1] += o.bin_state_[6 * m + 2 * q + 1];
            }
        conf_.insert(conf_.end(), o.conf_.begin(), o.conf_.end());
        hit_.insert(hit_.end(), o.hit_.begin(), o.hit_.end());
        row_weight_.insert(row_weight_.end(), o.row_weight_.begin(), o.row_weight_.end());
    }

    /// ECE (or MCE, per the measure's statistic).
    double value() const {
        if (count_ == 0)
            detail::fail_undefined(who(), "no observations");
        const double total = weight_ + weight_carry_;
        if (!(total > 0))
            detail::fail_undefined(who(), "total weight is zero");
        const std::vector<double>& b = binned();
        detail::compensated_sum ece;
        double mce = 0;
        for (std::size_t m = 0; m < bins_; ++m) {
            const double wm = b[6 * m] + b[6 * m + 1];
            if (!(wm > 0))
                continue;
            const double gap = std::abs((b[6 * m + 4] + b[6 * m + 5]) - (b[6 * m + 2] + b[6 * m + 3]));
            ece.add(gap);
            mce = std::max(mce, gap / wm);
        }
        return statistic_ == static_cast<std::uint8_t>(calibration_statistic::maximum) ? mce : ece.value() / total;
    }
    /// The per-bin (weight, mean confidence, accuracy) of non-empty bins, in bin order,
    /// for reliability diagrams: bins() * 3 numbers, NaN-free (empty bins give weight 0,
    /// confidence and accuracy 0).
    std::vector<double> bin_summary() const {
        const std::vector<double>& b = binned();
        std::vector<double> out;
        for (std::size_t m = 0; m < bins_; ++m) {
            const double wm = b[6 * m] + b[6 * m + 1];
            out.push_back(wm);
            out.push_back(wm > 0 ? (b[6 * m + 2] + b[6 * m + 3]) / wm : 0.0);
            out.push_back(wm > 0 ? (b[6 * m + 4] + b[6 * m + 5]) / wm : 0.0);
        }
        return out;
    }
    void reset() noexcept {
        count_ = 0;
        weight_ = weight_carry_ = 0;
        std::fill(bin_state_.begin(), bin_state_.end(), 0.0);
        conf_.clear();
        hit_.clear();
        row_weight_.clear();
    }
    std::size_t bins() const noexcept { return bins_; }

    template <class F>
    void visit_state(F&& f) {
        visit(*this, f);
    }
    template <class F>
    void visit_state(F&& f) const {
        visit(*this, f);
    }

    /// After a load (stream/serialize.hpp): bins positive (at most 2^20 with equal-count bins,
    /// whose value() allocates per bin), known codes, 6 sums per bin (equal width) or rows of
    /// confidence, hit and weight of one length (equal count), confidences in [0, 1], hits
    /// 0/1, finite non-negative weights, finite sums.
    void check_state() const {
        if (bins_ == 0)
            detail::fail_loaded("bins", "the number of bins must be positive");
        if (rule_ > 1 || variant_ > 1 || statistic_ > 1)
            detail::fail_loaded("binning", "unknown binning, variant or statistic code");
        if (multiclass_ && variant_ != static_cast<std::uint8_t>(calibration_variant::top_label))
            detail::fail_loaded("variant", "a multiclass calibration error is top-label");
        detail::check_loaded_nonnegative("weight", weight_);
        detail::check_loaded_finite("weight carry", weight_carry_);
        if (equal_count()) {
            if (bins_ > (std::uint64_t{1} << 20))
                detail::fail_loaded("bins", "more than 2^20 equal-count bins");
            if (!bin_state_.empty())
                detail::fail_loaded("bin sums", "an equal-count state keeps rows, not bin sums");
            detail::check_loaded_size("rows", conf_.size(), count_, "the row count");
            detail::check_loaded_size("hits", hit_.size(), conf_.size(), "one per confidence");
            detail::check_loaded_size("row weights", row_weight_.size(), conf_.size(), "one per confidence");
            for (std::size_t i = 0; i < conf_.size(); ++i) {
                if (!(conf_[i] >= 0 && conf_[i] <= 1))
                    detail::fail_loaded("confidences", "element " + std::to_string(i) + " is not in [0, 1]");
                if (!(hit_[i] == 0 || hit_[i] == 1))
                    detail::fail_loaded("hits", "element " + std::to_string(i) + " is not 0 or 1");
            }
            detail::check_loaded_nonnegative("row weights", std::span<const double>(row_weight_));
        } else {
            if (bins_ > bin_state_.size() / 6)
                detail::fail_loaded("bins", "says " + std::to_string(bins_) + " bins, the state holds sums for " +
                                                std::to_string(bin_state_.size() / 6));
            detail::check_loaded_size("bin sums", bin_state_.size(), 6 * bins_, "6 per bin");
            if (!conf_.empty() || !hit_.empty() || !row_weight_.empty())
                detail::fail_loaded("rows", "an equal-width state keeps bin sums, not rows");
            detail::check_loaded_finite("bin sums", std::span<const double>(bin_state_));
            for (std::size_t m = 0; m < bins_; ++m)
                if (bin_state_[6 * m] < 0)
                    detail::fail_loaded("bin sums", "bin " + std::to_string(m) + " has a negative weight");
        }
    }

private:
    static std::string_view who() { return "measure calibration error"; }

    template <class Self, class F>
    static void visit(Self& s, F& f) {
        f(s.bins_);
        f(s.rule_);
        f(s.variant_);
        f(s.statistic_);
        f(s.multiclass_);
        f(s.count_);
        f(s.weight_);
        f(s.weight_carry_);
        f(s.bin_state_);
        f(s.conf_);
        f(s.hit_);
        f(s.row_weight_);
    }

    bool equal_count() const noexcept { return rule_ == static_cast<std::uint8_t>(bin_rule::equal_count); }

    void binary_row(double y, double p, double& c, double& h) const {
        if (variant_ == static_cast<std::uint8_t>(calibration_variant::top_label)) {
            const double predicted = p >= 0.5 ? 1.0 : 0.0;
            c = p >= 0.5 ? p : 1.0 - p;
            h = predicted == y ? 1.0 : 0.0;
        } else {
            c = p;
            h = y;
        }
    }

    void put(double c, double h, double w) {
        detail::compensated_add(weight_, weight_carry_, w);
        if (equal_count()) {
            conf_.push_back(c);
            hit_.push_back(h);
            row_weight_.push_back(w);
        } else {
            const std::size_t m = detail_calibration::width_bin(c, bins_);
            detail::compensated_add(bin_state_[6 * m], bin_state_[6 * m + 1], w);
            detail::compensated_add(bin_state_[6 * m + 2], bin_state_[6 * m + 3], w * c);
            detail::compensated_add(bin_state_[6 * m + 4], bin_state_[6 * m + 5], w * h);
        }
    }

    template <class T, class P, class W>
    void add_binary(const T& truth, const P& prediction, const W* w, std::size_t wn) {
        if (multiclass_)
            detail::fail(who(), "prediction", "a multiclass calibration error takes class-probability rows");
        auto t = values_of(truth, who(), "truth");
        auto p = values_of(prediction, who(), "prediction");
        detail::check_nonempty(who(), "truth", t.size());
        detail::check_same_size(who(), "prediction", t.size(), p.size());
        if (w) {
            detail::check_same_size(who(), "weights", t.size(), wn);
            detail::check_weights(who(), std::span<const W>(w, wn));
        }
        for (std::size_t i = 0; i < t.size(); ++i)
            if (!(t[i] == 0 || t[i] == 1))
                detail::fail_at(who(), "truth",
                                "label " + detail::number_text(static_cast<double>(t[i])) + " outside the classes 0..1",
                                i);
        detail::check_probabilities(who(), "prediction", p);
        reserve(t.size());
        for (std::size_t i = 0; i < t.size(); ++i) {
            double c = 0, h = 0;
            binary_row(static_cast<double>(t[i]), static_cast<double>(p[i]), c, h);
            put(c, h, w ? static_cast<double>(w[i]) : 1.0);
        }
        count_ += t.size();
    }

    template <class T, class P, class W>
    void add_rows(const T& truth, const P& prediction, const W* w, std::size_t wn) {
        if (!multiclass_)
            detail::fail(who(), "prediction", "a binary calibration error takes P(y = 1), not rows");
        auto t = values_of(truth, who(), "truth");
        const auto rows = rows_of(prediction);
        detail::check_nonempty(who(), "truth", t.size());
        detail::check_same_size(who(), "prediction", t.size(), rows.rows);
        if (w) {
            detail::check_same_size(who(), "weights", t.size(), wn);
            detail::check_weights(who(), std::span<const W>(w, wn));
        }
        detail::check_probability_rows(who(), "prediction", rows);
        detail::check_labels(who(), "truth", t, rows.cols);
        reserve(t.size());
        for (std::size_t i = 0; i < t.size(); ++i) {
            std::size_t best = 0;
            for (std::size_t k = 1; k < rows.cols; ++k)
                if (rows(i, k) > rows(i, best))
                    best = k;
            const double c = static_cast<double>(rows(i, best));
            put(c, static_cast<std::size_t>(t[i]) == best ? 1.0 : 0.0, w ? static_cast<double>(w[i]) : 1.0);
        }
        count_ += t.size();
    }

    void reserve(std::size_t n) {
        if (equal_count()) {
            conf_.reserve(conf_.size() + n);
            hit_.reserve(hit_.size() + n);
            row_weight_.reserve(row_weight_.size() + n);
        }
    }

    /// The per-bin sums: the state itself (equal width) or computed from the rows.
    const std::vector<double>& binned() const {
        if (!equal_count())
            return bin_state_;
        const std::size_t n = conf_.size();
        order_.resize(n);
        std::iota(order_.begin(), order_.end(), std::size_t{0});
        std::sort(order_.begin(), order_.end(), [&](std::size_t a, std::size_t b) { return conf_[a] < conf_[b]; });
        // Thresholds t_m: smallest confidence whose cumulative weight reaches m W / M
        // (compared as C M >= m W, no division).
        const double total = weight_ + weight_carry_;
        const double md = static_cast<double>(bins_);
        edges_.assign(bins_ > 0 ? bins_ - 1 : 0, 0.0);
        double c = 0;
        std::size_t m = 1, j = 0;
        for (; j < n && m < bins_; ++j) {
            c += row_weight_[order_[j]];
            while (m < bins_ && c * md >= static_cast<double>(m) * total)
                edges_[m++ - 1] = conf_[order_[j]];
        }
        for (; m < bins_; ++m) // rounding kept the running sum short: the top confidence
            edges_[m - 1] = conf_[order_[n - 1]];
        scratch_.assign(6 * bins_, 0.0);
        for (std::size_t i = 0; i < n; ++i) {
            // bin = #{m : conf > t_m}; the edges are sorted, so a binary search counts them.
            const std::size_t b =
                static_cast<std::size_t>(std::lower_bound(edges_.begin(), edges_.end(), conf_[i]) - edges_.begin());
            detail::compensated_add(scratch_[6 * b], scratch_[6 * b + 1], row_weight_[i]);
            detail::compensated_add(scratch_[6 * b + 2], scratch_[6 * b + 3], row_weight_[i] * conf_[i]);
            detail::compensated_add(scratch_[6 * b + 4], scratch_[6 * b + 5], row_weight_[i] * hit_[i]);
        }
        return scratch_;
    }

    std::uint64_t bins_ = 15;
    std::uint8_t rule_ = 0, variant_ = 0, statistic_ = 0;
    bool multiclass_ = false;
    std::uint64_t count_ = 0;
    double weight_ = 0, weight_carry_ = 0;
    std::vector<double> bin_state_ = std::vector<double>(6 * 15, 0.0); // per bin: weight, sum c, sum h (sum, carry)
    std::vector<double> conf_, hit_, row_weight_;                      // equal-count rows
    mutable std::vector<std::size_t> order_;                           // scratch for value(), not state
    mutable std::vector<double> edges_, scratch_;
};

/// Running state of multiclass_calibration_error: the top-label calibration state over
/// class-probability rows.
class multiclass_calibration_error_accumulator : public calibration_error_accumulator {
public:
    multiclass_calibration_error_accumulator()
        : multiclass_calibration_error_accumulator(15, bin_rule::equal_width, calibration_statistic::expected) {}
    multiclass_calibration_error_accumulator(std::size_t bins, bin_rule rule, calibration_statistic statistic)
        : calibration_error_accumulator(bins, rule, calibration_variant::top_label, statistic, true) {}
    void merge(const multiclass_calibration_error_accumulator& o) { calibration_error_accumulator::merge(o); }
    /// The measure this state belongs to (its parameters included).
    multiclass_calibration_error measure() const;
};

/// Expected (or maximum) calibration error of binary probabilities P(y = 1).
struct calibration_error {
    static constexpr direction better = direction::lower_is_better;
    static constexpr prediction_kind kind = prediction_kind::probability;
    using capabilities = offers<cap::serialisable>;
    static constexpr std::string_view key = "calibration_error";

    std::size_t bins = 15; // Guo et al. (2017) used 15
    bin_rule binning = bin_rule::equal_width;
    calibration_variant variant = calibration_variant::positive_class;
    calibration_statistic statistic = calibration_statistic::expected;

    bool operator==(const calibration_error&) const = default;
    std::string name() const {
        return std::string(statistic == calibration_statistic::maximum ? "MCE" : "ECE") + " (" + std::to_string(bins) +
               (binning == bin_rule::equal_width ? " equal-width" : " equal-count") + " bins, " +
               (variant == calibration_variant::top_label ? "top-label" : "positive class") + ")";
    }
    calibration_error_accumulator accumulator() const {
        return calibration_error_accumulator(bins, binning, variant, statistic, false);
    }
};

/// Top-label expected (or maximum) calibration error of class-probability rows.
struct multiclass_calibration_error {
    static constexpr direction better = direction::lower_is_better;
    static constexpr prediction_kind kind = prediction_kind::class_probabilities;
    using capabilities = offers<cap::serialisable>;
    static constexpr std::string_view key = "multiclass_calibration_error";

    std::size_t bins = 15;
    bin_rule binning = bin_rule::equal_width;
    calibration_statistic statistic = calibration_statistic::expected;

    bool operator==(const multiclass_calibration_error&) const = default;
    std::string name() const {
        return std::string(statistic == calibration_statistic::maximum ? "MCE" : "ECE") + " (" + std::to_string(bins) +
               (binning == bin_rule::equal_width ? " equal-width" : " equal-count") + " bins, top-label)";
    }
    multiclass_calibration_error_accumulator accumulator() const {
        return multiclass_calibration_error_accumulator(bins, binning, statistic);
    }
};

inline calibration_error calibration_error_accumulator::measure() const {
    return {bins_, static_cast<bin_rule>(rule_), static_cast<calibration_variant>(variant_),
            static_cast<calibration_statistic>(statistic_)};
}
inline multiclass_calibration_error multiclass_calibration_error_accumulator::measure() const {
    const calibration_error b = calibration_error_accumulator::measure();
    return {b.bins, b.binning, b.statistic};
}

} // namespace measure
HELDOUT_NAMESPACE_END
