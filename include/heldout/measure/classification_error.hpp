// heldout/measure/classification_error.hpp — the misclassification rate and its
// complement, accuracy, for class labels (binary or multiclass).
//
//   std::vector<int> truth{0, 1, 2, 2}, pred{0, 2, 2, 2};
//   double e = heldout::evaluate(heldout::measure::classification_error{}, truth, pred); // 1/4
//   double a = heldout::evaluate(heldout::measure::accuracy{}, truth, pred, weights);    // weighted
//
// classification error = sum_i w_i [y_i != f_i] / sum_i w_i, accuracy = 1 - that (both
// computed from the same two sums: accuracy is (W - mismatches) / W, not 1 - a rounded
// error). These need no k x k table, so they take any number of classes: `classes` = 0
// only requires labels >= 0; classes = k also requires labels < k. Unweighted batches
// are counted exactly in one fused pass (mismatches and the label range check together).
#pragma once

#include <heldout/core/measure.hpp>
#include <heldout/detail/label_scan.hpp>
#include <heldout/detail/labels.hpp>
#include <heldout/detail/state_checks.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/detail/validate.hpp>

#include <array>
#include <cstdint>
#include <limits>
#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

/// Running state of classification_error / accuracy: weight of mismatches, total weight,
/// observation count (visit_state order: accuracy tag (bool), classes, mismatch sum, weight
/// sum, count). The name in messages follows from Accuracy, so a deserialised accumulator
/// keeps it.
template <bool Accuracy>
class mismatch_accumulator {
public:
    /// classes = k requires labels < k; 0 accepts any non-negative label.
    explicit mismatch_accumulator(std::size_t classes = 0) : classes_(classes) {}

    /// Adds a batch of labels (any integral types).
    template <label_range T, label_range P>
    void add(const T& truth, const P& prediction) {
        auto t = values_of(truth, who_, "truth");
        auto p = values_of(prediction, who_, "prediction");
        detail::check_same_size(who_, "prediction", t.size(), p.size());
        detail::check_nonempty(who_, "truth", t.size());
        using Te = element_t<T>;
        using Pe = element_t<P>;
        const detail::label_scan s = detail::scan_labels<false>(t, p);
        if (s.max_t > limit<Te>() || s.max_p > limit<Pe>())
            report(t, p);
        mismatches_.add(static_cast<double>(s.mismatches));
        weight_.add(static_cast<double>(t.size()));
        count_ += t.size();
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
        using Te = element_t<T>;
        using Pe = element_t<P>;
        const detail::label_max m = detail::max_labels(t, p);
        if (m.truth > limit<Te>() || m.prediction > limit<Pe>())
            report(t, p);
        std::array<detail::compensated_sum, 2> s{};
        detail::blocked_sum<2>(
            t.size(),
            [&](std::size_t i, std::array<double, 2>& out) {
                const double wi = static_cast<double>(w[i]);
                out[0] = detail::label_bits(t[i]) != detail::label_bits(p[i]) ? wi : 0.0;
                out[1] = wi;
            },
            s);
        mismatches_.merge(s[0]);
        weight_.merge(s[1]);
        count_ += t.size();
    }

    /// Adds one observation.
    template <std::integral A, std::integral B>
    void add_one(A y, B f, double w = 1.0) {
        if (!std::isfinite(w) || w < 0)
            detail::fail(who_, "weights", "weight must be finite and non-negative, got " + detail::number_text(w));
        const std::span<const A> ys(&y, 1);
        const std::span<const B> fs(&f, 1);
        if (detail::label_bits(y) > limit<A>() || detail::label_bits(f) > limit<B>())
            report(ys, fs);
        if (detail::label_bits(y) != detail::label_bits(f))
            mismatches_.add(w);
        weight_.add(w);
        ++count_;
    }

    /// Combines two shards; both must have the same class count.
    void merge(const mismatch_accumulator& o) {
        if (classes_ != o.classes_)
            detail::fail_state(who_, "other",
                               "cannot merge a state with classes = " + std::to_string(o.classes_) +
                                   " into one with classes = " + std::to_string(classes_));
        mismatches_.merge(o.mismatches_);
        weight_.merge(o.weight_);
        count_ += o.count_;
    }

    /// The error rate (or accuracy); undefined with no observations or zero total weight.
    double value() const {
        if (count_ == 0)
            detail::fail_undefined(who_, "no observations");
        const double w = weight_.value();
        if (!(w > 0))
            detail::fail_undefined(who_, "total weight is zero");
        const double e = mismatches_.value();
        return Accuracy ? (w - e) / w : e / w;
    }

    void reset() noexcept {
        mismatches_.reset();
        weight_.reset();
        count_ = 0;
    }

    std::uint64_t count() const noexcept { return count_; }
    double total_weight() const noexcept { return weight_.value(); }
    /// Total weight of the misclassified observations.
    double mismatch_weight() const noexcept { return mismatches_.value(); }
    /// The measure this state belongs to (classification_error or accuracy, with its classes).
    auto measure() const;

    // A tag first: accuracy and classification error have the same layout otherwise, and
    // bytes of one must not be read as the other.
    template <class F>
    void visit_state(F&& f) {
        bool accuracy = Accuracy;
        f(accuracy);
        if (accuracy != Accuracy)
            detail::fail("heldout::deserialize", "bytes",
                         std::string("the state is of ") + (accuracy ? "accuracy" : "classification error") +
                             ", not of " + std::string(who_));
        f(classes_);
        mismatches_.visit_state(f);
        weight_.visit_state(f);
        f(count_);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(Accuracy);
        f(classes_);
        mismatches_.visit_state(f);
        weight_.visit_state(f);
        f(count_);
    }

    /// After a load (stream/serialize.hpp): finite sums, 0 <= mismatch weight <= total weight.
    void check_state() const {
        mismatches_.check_loaded("mismatch sum");
        weight_.check_loaded("weight sum");
        if (!(mismatches_.value() >= 0 && weight_.value() >= 0))
            detail::fail_loaded("weight sum", "a weight sum is negative");
        if (mismatches_.value() > weight_.value() * (1 + 1e-12))
            detail::fail_loaded("mismatch sum", "exceeds the total weight");
    }

private:
    /// Largest acceptable label_bits value for label type L.
    template <class L>
    std::uint64_t limit() const noexcept {
        const std::uint64_t type_max = detail::label_type_limit<L>();
        return classes_ != 0 ? std::min<std::uint64_t>(classes_ - 1, type_max) : type_max;
    }

    template <class T, class P>
    [[noreturn]] void report(std::span<const T> t, std::span<const P> p) const {
        // Without a class count only negative labels are wrong; the type limit is never hit.
        const bool k_given = classes_ != 0;
        detail::check_label_limit(who_, "truth", t, k_given ? classes_ - 1 : std::numeric_limits<std::uint64_t>::max(),
                                  true);
        detail::check_label_limit(who_, "prediction", p,
                                  k_given ? classes_ - 1 : std::numeric_limits<std::uint64_t>::max(), true);
        HELDOUT_ASSERT(false);
        detail::fail(who_, "truth", "label outside the classes");
    }

    static constexpr std::string_view who_ = Accuracy ? "measure accuracy" : "measure classification error";
    std::size_t classes_ = 0;
    detail::compensated_sum mismatches_{};
    detail::compensated_sum weight_{};
    std::uint64_t count_ = 0;
};

namespace detail_mismatch {
inline std::string classes_text(std::size_t k) { return k == 0 ? std::string() : "classes " + std::to_string(k); }

/// out[i] = 1 where the labels differ (Accuracy: where they agree), else 0.
template <bool Accuracy, class T, class P>
void row_values(const T& truth, const P& prediction, std::span<double> out) {
    auto t = values_of(truth);
    auto p = values_of(prediction);
    for (std::size_t i = 0; i < out.size(); ++i)
        out[i] = (detail::label_bits(t[i]) == detail::label_bits(p[i])) == Accuracy ? 1.0 : 0.0;
}
} // namespace detail_mismatch

/// Misclassification rate: the (weighted) share of observations with y != f.
struct classification_error {
    static constexpr direction better = direction::lower_is_better;
    static constexpr prediction_kind kind = prediction_kind::label;
    using capabilities = offers<cap::row_losses, cap::serialisable>;
    static constexpr std::string_view key = "classification_error";
    /// Number of classes k (labels must be < k); 0 = any non-negative label.
    std::size_t classes = 0;

    bool operator==(const classification_error&) const = default;
    std::string name() const {
        return detail::with_parameters("classification error", detail_mismatch::classes_text(classes));
    }
    /// The name in error messages (without the class count).
    std::string message_name() const { return "classification error"; }
    mismatch_accumulator<false> accumulator() const { return mismatch_accumulator<false>(classes); }
    /// 1 for a misclassified row, 0 otherwise (rows that add() accepted).
    template <label_range T, label_range P>
    void row_losses(const T& truth, const P& prediction, std::span<double> out) const {
        detail_mismatch::row_values<false>(truth, prediction, out);
    }
};

/// Accuracy: the (weighted) share of observations with y == f.
struct accuracy {
    static constexpr direction better = direction::higher_is_better;
    static constexpr prediction_kind kind = prediction_kind::label;
    using capabilities = offers<cap::row_losses, cap::serialisable>;
    static constexpr std::string_view key = "accuracy";
    /// Number of classes k (labels must be < k); 0 = any non-negative label.
    std::size_t classes = 0;

    bool operator==(const accuracy&) const = default;
    std::string name() const { return detail::with_parameters("accuracy", detail_mismatch::classes_text(classes)); }
    /// The name in error messages (without the class count).
    std::string message_name() const { return "accuracy"; }
    mismatch_accumulator<true> accumulator() const { return mismatch_accumulator<true>(classes); }
    /// 1 for a correctly classified row, 0 otherwise (rows that add() accepted).
    template <label_range T, label_range P>
    void row_losses(const T& truth, const P& prediction, std::span<double> out) const {
        detail_mismatch::row_values<true>(truth, prediction, out);
    }
};

template <bool Accuracy>
auto mismatch_accumulator<Accuracy>::measure() const {
    if constexpr (Accuracy)
        return accuracy{classes_};
    else
        return classification_error{classes_};
}

} // namespace measure
HELDOUT_NAMESPACE_END
