// heldout/core/measure.hpp — what an outer measure is, and evaluate().
//
//   heldout::measure::mse m;                        // any measure object
//   double v = heldout::evaluate(m, truth, prediction);          // a whole set
//   double w = heldout::evaluate(m, truth, prediction, weights); // weighted
//
//   auto acc = m.accumulator();                     // streaming and mergeable
//   acc.add(truth_batch, prediction_batch);         // a batch (weights optional)
//   acc.add_one(y, f);                              // one observation (weight optional)
//   acc.merge(other_acc);                           // exact combination of two shards
//   double now = acc.value();  acc.reset();
//
// A measure knows its name, its direction (lower or higher is better), the kind of
// prediction it needs, and makes accumulators. Accumulators expose their state to
// visit_state(f) (fields in a fixed order), which serialisation and merging tests use.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/values.hpp>

#include <concepts>
#include <string>
#include <string_view>
#include <utility>

HELDOUT_NAMESPACE_BEGIN

/// Which way a measure improves.
enum class direction { lower_is_better, higher_is_better };

/// True when value a is better than value b under direction d.
constexpr bool better(direction d, double a, double b) noexcept {
    return d == direction::lower_is_better ? a < b : a > b;
}

/// The kind of prediction a measure needs.
enum class prediction_kind {
    real,               ///< real-valued prediction of a real truth (regression)
    score,              ///< real-valued score for a 0/1 truth, higher = more likely 1 (ranking, margins)
    probability,        ///< P(y = 1) in [0, 1] for a 0/1 truth
    label,              ///< a class label 0..k-1 for a class truth
    class_probabilities ///< an n x k matrix of class probabilities for a class truth
};

constexpr std::string_view to_string(prediction_kind k) noexcept {
    switch (k) {
    case prediction_kind::real:
        return "real value";
    case prediction_kind::score:
        return "binary score";
    case prediction_kind::probability:
        return "probability";
    case prediction_kind::label:
        return "class label";
    case prediction_kind::class_probabilities:
        return "class-probability rows";
    }
    return "?";
}

/// The running state of a measure: reset, merge with its own kind, read the value.
template <class A>
concept accumulator = std::copyable<A> && requires(A& a, const A& b) {
    a.reset();
    a.merge(b);
    { b.value() } -> std::convertible_to<double>;
};

/// An outer measure: name, direction, prediction kind, and an accumulator factory.
template <class M>
concept outer_measure = std::copyable<M> && requires(const M& m) {
    { m.name() } -> std::convertible_to<std::string>;
    { M::better } -> std::convertible_to<direction>;
    { M::kind } -> std::convertible_to<prediction_kind>;
    { m.accumulator() } -> accumulator;
};

/// The accumulator type of measure M.
template <outer_measure M>
using accumulator_t = decltype(std::declval<const M&>().accumulator());

/// M can score predictions P against truth T (the pairing compiles).
template <class M, class T, class P>
concept scores = outer_measure<M> && requires(accumulator_t<M>& a, const T& t, const P& p) {
    a.add(t, p);
};

/// M can score predictions P against truth T with weights W.
template <class M, class T, class P, class W>
concept scores_weighted = outer_measure<M> && requires(accumulator_t<M>& a, const T& t, const P& p, const W& w) {
    a.add(t, p, w);
};

namespace detail {
// Readable refusals for wrong pairings, checked before the generic one.
template <class M, class P>
constexpr void check_prediction_type() {
    using Pr = std::remove_cvref_t<P>;
    if constexpr (M::kind == prediction_kind::label) {
        static_assert(label_range<Pr>, "heldout: this measure scores class labels (integral elements); real-valued "
                                       "scores become labels only through heldout::labels_at(scores, threshold)");
    } else if constexpr (M::kind == prediction_kind::class_probabilities) {
        static_assert(probability_rows<Pr>, "heldout: this measure needs class-probability rows (an Eigen matrix, "
                                            "or heldout::rows(flat, k) over a row-major range)");
    } else {
        static_assert(real_range<Pr>, "heldout: this measure needs floating-point predictions (real values, scores "
                                      "or probabilities), not integer class labels");
    }
}
} // namespace detail

/// Scores a whole set of predictions with measure m.
template <outer_measure M, class T, class P>
double evaluate(const M& m, const T& truth, const P& prediction) {
    detail::check_prediction_type<M, P>();
    static_assert(scores<M, T, P>, "heldout: this measure cannot score this truth/prediction pairing");
    auto acc = m.accumulator();
    // A measure whose state carries its rows (the ranking ones) scores a whole set in place
    // through score_set, without copying it into the state first.
    if constexpr (requires { acc.score_set(truth, prediction); }) {
        return acc.score_set(truth, prediction);
    } else {
        acc.add(truth, prediction);
        return acc.value();
    }
}

/// Scores a whole set of weighted predictions with measure m.
template <outer_measure M, class T, class P, class W>
double evaluate(const M& m, const T& truth, const P& prediction, const W& weights) {
    detail::check_prediction_type<M, P>();
    static_assert(scores_weighted<M, T, P, W>, "heldout: this measure cannot score this truth/prediction/weights "
                                               "pairing (weights are a contiguous range of numbers)");
    auto acc = m.accumulator();
    if constexpr (requires { acc.score_set(truth, prediction, weights); }) {
        return acc.score_set(truth, prediction, weights);
    } else {
        acc.add(truth, prediction, weights);
        return acc.value();
    }
}

HELDOUT_NAMESPACE_END
