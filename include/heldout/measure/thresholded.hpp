// heldout/measure/thresholded.hpp — a label measure scored on real-valued scores or
// probabilities through an explicit threshold: class 1 where score >= threshold.
//
//   using namespace heldout;
//   auto error = at_threshold(measure::classification_error{}, 0.3);   // measure::thresholded<...>
//   double e = evaluate(error, truth, probabilities);                    // share of ([p >= 0.3] != y)
//   aggregator agg(measure::brier_score{}, measure::cross_entropy{}, measure::auc{},
//                  at_threshold(measure::classification_error{}, 0.5),
//                  at_threshold(measure::f_beta{1.0}, 0.5));             // one aggregator, one set of predictions
//
// The threshold is part of the measure's identity and always shows in its name
// ("classification error (threshold 0.3)"); an aggregator tracking thresholds 0.3 and 0.5
// keeps two measures. The truth is 0/1 (the labels the inner measure sees); scores may be
// probabilities, logits or margins (any real value, NaN refused with its index). The inner
// measure keeps every capability it has that survives thresholding: per-row losses (so the
// Wilson interval and McNemar's test apply to a thresholded error rate), and serialised state.
#pragma once

#include <heldout/core/measure.hpp>
#include <heldout/detail/state_checks.hpp>
#include <heldout/detail/validate.hpp>

#include <array>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

template <class M>
struct thresholded;

namespace detail_threshold {
inline constexpr std::string_view key_prefix = "at_threshold/";
inline constexpr std::size_t chunk = 4096; // labels made on the stack, a chunk at a time

template <class M>
using capabilities_of =
    std::conditional_t<offers_v<M, cap::row_losses>,
                       std::conditional_t<offers_v<M, cap::serialisable>, offers<cap::row_losses, cap::serialisable>,
                                          offers<cap::row_losses>>,
                       std::conditional_t<offers_v<M, cap::serialisable>, offers<cap::serialisable>, offers<>>>;

template <class M>
constexpr std::string_view key_of() {
    if constexpr (offers_v<M, cap::serialisable>)
        return detail::joined_v<key_prefix, M::key>;
    else
        return {};
}

/// Labels [s >= threshold] of scores [first, first + n); NaN refused with its index.
template <class S>
void labels_of(std::string_view who, std::span<const S> s, std::size_t first, std::size_t n, double threshold,
               std::uint8_t* out) {
    for (std::size_t i = 0; i < n; ++i) {
        const double x = static_cast<double>(s[first + i]);
        if (x != x)
            detail::fail_at(who, "prediction", "not finite (nan)", first + i);
        out[i] = static_cast<std::uint8_t>(x >= threshold);
    }
}
} // namespace detail_threshold

/// Running state of thresholded<M>: the inner measure's state, fed with thresholded labels.
template <class M>
class thresholded_accumulator {
public:
    thresholded_accumulator() : thresholded_accumulator(M{}, 0.5) {}
    thresholded_accumulator(const M& m, double threshold) : inner_(m.accumulator()), threshold_(threshold) {
        check_threshold(threshold_);
    }

    /// 0/1 truth (integral) and real-valued scores.
    template <label_range T, real_range S>
    void add(const T& truth, const S& scores) {
        add_impl(truth, scores, static_cast<const double*>(nullptr));
    }
    template <label_range T, real_range S, weight_range W>
    void add(const T& truth, const S& scores, const W& weights) {
        add_impl(truth, scores, &weights);
    }
    void add_one(int y, double score, double w = 1.0) {
        if (score != score)
            detail::fail_at(who(), "prediction", "not finite (nan)", 0);
        const std::uint8_t f = static_cast<std::uint8_t>(score >= threshold_);
        const std::uint8_t yy = static_cast<std::uint8_t>(y);
        if (y != 0 && y != 1)
            detail::fail_at(who(), "truth", "label " + std::to_string(y) + " outside the classes 0..1", 0);
        const std::array<double, 1> ww{w};
        inner_.add(std::span<const std::uint8_t>(&yy, 1), std::span<const std::uint8_t>(&f, 1), ww);
    }

    /// Combines two shards; both must be of the same measure (same inner measure and threshold).
    void merge(const thresholded_accumulator& o) {
        if (threshold_ != o.threshold_)
            detail::fail_state(who(), "other",
                               "cannot merge a state at threshold " + detail::number_text(o.threshold_) +
                                   " into one at threshold " + detail::number_text(threshold_));
        inner_.merge(o.inner_);
    }
    double value() const { return inner_.value(); }
    void reset() { inner_.reset(); }
    double threshold() const noexcept { return threshold_; }
    const accumulator_t<M>& inner() const noexcept { return inner_; }

    /// The measure this state belongs to (inner measure and threshold).
    thresholded<M> measure() const requires offers_v<M, cap::serialisable> { return {inner_.measure(), threshold_}; }

    template <class F>
    void visit_state(F&& f) requires offers_v<M, cap::serialisable> {
        f(threshold_);
        inner_.visit_state(f);
    }
    template <class F>
    void visit_state(F&& f) const requires offers_v<M, cap::serialisable> {
        f(threshold_);
        inner_.visit_state(f);
    }

    /// After a load (stream/serialize.hpp): the threshold checked as a given one, then the
    /// inner measure's state.
    void check_state() const requires offers_v<M, cap::serialisable> {
        detail::check_loaded_parameters("threshold", [&] { check_threshold(threshold_); });
        inner_.check_state();
    }

private:
    static void check_threshold(double t) {
        if (t != t)
            detail::fail(who(), "threshold", "not finite (nan)");
    }
    static const std::string& who() {
        static const std::string w = "measure " + M{}.name() + " at a threshold";
        return w;
    }

    template <class T, class S, class W>
    void add_impl(const T& truth, const S& scores, const W* weights) {
        const auto t = values_of(truth, who(), "truth");
        const auto s = values_of(scores, who(), "prediction");
        detail::check_nonempty(who(), "truth", t.size());
        detail::check_same_size(who(), "prediction", t.size(), s.size());
        detail::check_binary(who(), "truth", t);
        if constexpr (!std::is_same_v<W, double>) {
            const auto w = values_of(*weights, who(), "weights");
            detail::check_same_size(who(), "weights", t.size(), w.size());
        }
        // The inner state changes only once every row is known to be valid.
        accumulator_t<M> next = inner_;
        std::array<std::uint8_t, detail_threshold::chunk> labels;
        for (std::size_t first = 0; first < t.size(); first += detail_threshold::chunk) {
            const std::size_t n = std::min(detail_threshold::chunk, t.size() - first);
            detail_threshold::labels_of(who(), s, first, n, threshold_, labels.data());
            const std::span<const std::uint8_t> f(labels.data(), n);
            try {
                if constexpr (std::is_same_v<W, double>)
                    next.add(t.subspan(first, n), f);
                else
                    next.add(t.subspan(first, n), f, values_of(*weights).subspan(first, n));
            } catch (const input_error& e) {
                detail::rethrow_shifted(e, first);
            }
        }
        inner_ = std::move(next);
    }

    accumulator_t<M> inner_;
    double threshold_ = 0.5;
};

/// Label measure M scored on real-valued scores through `threshold` (class 1 where score >= threshold).
template <class M>
struct thresholded {
    static_assert(std::is_same_v<prediction_kind_t<M>, kinds::label>,
                  "heldout::at_threshold takes a measure of class labels (classification error, precision, ...)");
    static constexpr direction better = M::better;
    using prediction = kinds::score;
    using truth = kinds::binary;
    using capabilities = detail_threshold::capabilities_of<M>;
    static constexpr std::string_view key = detail_threshold::key_of<M>();

    M measure{};
    double threshold = 0.5;

    bool operator==(const thresholded& o) const { return same_measure(measure, o.measure) && threshold == o.threshold; }
    /// "classification error (threshold 0.3)": the threshold always shows.
    std::string name() const {
        return detail::with_parameters(measure.name(), "threshold " + detail::number_text(threshold));
    }
    thresholded_accumulator<M> accumulator() const { return thresholded_accumulator<M>(measure, threshold); }

    /// The inner measure's per-row values of the thresholded labels.
    template <label_range T, real_range S>
    void row_losses(const T& labels_in, const S& scores,
                    std::span<double> out) const requires offers_v<M, cap::row_losses> {
        const auto t = values_of(labels_in);
        const auto s = values_of(scores);
        std::array<std::uint8_t, detail_threshold::chunk> labels;
        for (std::size_t first = 0; first < out.size(); first += detail_threshold::chunk) {
            const std::size_t n = std::min(detail_threshold::chunk, out.size() - first);
            detail_threshold::labels_of("measure " + name(), s, first, n, threshold, labels.data());
            measure.row_losses(t.subspan(first, n), std::span<const std::uint8_t>(labels.data(), n),
                               out.subspan(first, n));
        }
    }
};

} // namespace measure

/// Label measure m scored on real-valued scores: class 1 where score >= threshold.
template <class M>
measure::thresholded<M> at_threshold(const M& m, double threshold) {
    if (threshold != threshold)
        detail::fail("heldout::at_threshold", "threshold", "not finite (nan)");
    return {m, threshold};
}

HELDOUT_NAMESPACE_END
