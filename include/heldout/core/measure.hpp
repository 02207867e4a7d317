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
// A measure is a small copyable struct that declares (core/traits.hpp, core/kinds.hpp,
// core/capabilities.hpp):
//   static constexpr heldout::direction better;         lower_is_better, higher_is_better or
//                                                       toward_ideal (with `static constexpr double ideal`)
//   static constexpr heldout::prediction_kind kind;     or `using prediction = heldout::kinds::...;`
//   using truth = heldout::kinds::...;                  optional (the classic one for its prediction)
//   using capabilities = heldout::offers<...>;          optional (none)
//   static constexpr std::string_view key = "...";      its identity in bytes (cap::serialisable)
//   std::string name() const;                           for people: shows non-default parameters
//   bool operator==(const M&) const = default;          when it has parameters (data members)
//   accumulator() const;                                a running state: add, merge, value, reset
// heldout::check_measure<M>() checks all of it with readable messages; evaluate, the
// aggregator and compare call it.
#pragma once

#include <heldout/core/capabilities.hpp>
#include <heldout/core/error.hpp>
#include <heldout/core/kinds.hpp>
#include <heldout/core/traits.hpp>
#include <heldout/core/values.hpp>

#include <concepts>
#include <cstdint>
#include <span>
#include <string>
#include <string_view>
#include <utility>

HELDOUT_NAMESPACE_BEGIN

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
    typename prediction_kind_t<M>;
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

/// A typical input of kind K, to check a measure's members against.
template <class K>
struct sample_input {
    using type = typename K::view; // a kind added by another family names its view
};
template <>
struct sample_input<kinds::real> {
    using type = std::span<const double>;
};
template <>
struct sample_input<kinds::binary> {
    using type = std::span<const std::uint8_t>;
};
template <>
struct sample_input<kinds::label> {
    using type = std::span<const int>;
};
template <>
struct sample_input<kinds::score> {
    using type = std::span<const double>;
};
template <>
struct sample_input<kinds::probability> {
    using type = std::span<const double>;
};
template <>
struct sample_input<kinds::class_probabilities> {
    using type = row_matrix<double>;
};

template <class M>
using sample_truth_t = typename sample_input<truth_kind_t<M>>::type;
template <class M>
using sample_prediction_t = typename sample_input<prediction_kind_t<M>>::type;

template <class M>
concept has_row_losses = requires(const M& m, const sample_truth_t<M>& t, const sample_prediction_t<M>& p,
                                  std::span<double> out) {
    m.row_losses(t, p, out);
};
template <class M>
concept has_fitted = requires(const M& m, const sample_truth_t<M>& t, const sample_prediction_t<M>& p) {
    { m.fitted(t, p) } -> std::same_as<heldout::fitted_value>;
};
template <class M>
concept has_case_components = requires(const M& m, const sample_truth_t<M>& t, const sample_prediction_t<M>& p) {
    { m.case_components(t, p) } -> std::same_as<heldout::case_components>;
};
template <class M>
concept has_score_set = requires(const accumulator_t<M>& a, const sample_truth_t<M>& t, const sample_prediction_t<M>& p,
                                 std::span<const double> w) {
    { a.score_set(t, p) } -> std::convertible_to<double>;
    { a.score_set(t, p, w) } -> std::convertible_to<double>;
};
template <class M>
concept has_resampler = requires(const M& m, const sample_truth_t<M>& t, const sample_prediction_t<M>& p,
                                 std::string_view who) {
    m.resampler(t, p, who);
};

struct null_visitor {
    template <class X>
    void operator()(const X&) const noexcept {}
};
template <class M>
concept has_serialisable_parts = requires(const accumulator_t<M>& ca, accumulator_t<M>& a) {
    { M::key } -> std::convertible_to<std::string_view>;
    { ca.measure() } -> std::convertible_to<M>;
    ca.visit_state(null_visitor{});
    a.visit_state(null_visitor{});
    ca.check_state();
};

} // namespace detail

/// Checks everything measure M declares, with a message naming what is wrong; evaluate,
/// the aggregator and compare call it. A capability declared but not implemented, or
/// implemented but not declared, does not compile.
template <class M>
constexpr bool check_measure() {
    static_assert(std::copyable<M>, "heldout: a measure is a copyable struct");
    static_assert(
        requires {
            { M::better } -> std::convertible_to<direction>;
        },
        "heldout: a measure declares `static constexpr heldout::direction better`");
    if constexpr (requires {
                      { M::better } -> std::convertible_to<direction>;
                  }) {
        static_assert(
            (M::better == direction::toward_ideal) == has_ideal_v<M>,
            "heldout: a measure with `better = heldout::direction::toward_ideal` declares its ideal value, "
            "`static constexpr double ideal = ...;`, and a measure declaring `ideal` has better = toward_ideal");
    }
    static_assert(data_kind<prediction_kind_t<M>>,
                  "heldout: a measure declares its prediction kind: `static constexpr heldout::prediction_kind kind` "
                  "or `using prediction = heldout::kinds::...;`");
    static_assert(data_kind<truth_kind_t<M>>, "heldout: a measure's `truth` is a kind from heldout::kinds");
    static_assert(
        requires(const M& m) {
            { m.name() } -> std::convertible_to<std::string>;
        },
        "heldout: a measure has `std::string name() const`");
    static_assert(
        requires(const M& m) {
            { m.accumulator() } -> accumulator;
        },
        "heldout: a measure's accumulator() returns a copyable state with reset(), merge(other) and "
        "value()");
    static_assert(std::is_empty_v<M> || std::equality_comparable<M>,
                  "heldout: this measure has data members (parameters), so its identity includes them: declare how "
                  "they compare, e.g. `bool operator==(const my_measure&) const = default;`");
    if constexpr (offers_v<M, cap::row_losses>)
        static_assert(detail::has_row_losses<M>, "heldout: the measure declares cap::row_losses but has no `void "
                                                 "row_losses(truth, prediction, std::span<double> out) const`");
    else
        static_assert(!detail::has_row_losses<M>,
                      "heldout: the measure has row_losses(...) but does not declare heldout::cap::row_losses");
    if constexpr (offers_v<M, cap::case_components>)
        static_assert(detail::has_case_components<M>, "heldout: the measure declares cap::case_components but has no "
                                                      "`heldout::case_components case_components(truth, prediction) "
                                                      "const`");
    else
        static_assert(!detail::has_case_components<M>, "heldout: the measure has case_components(...) but does not "
                                                       "declare heldout::cap::case_components");
    if constexpr (offers_v<M, cap::fitted_se>)
        static_assert(detail::has_fitted<M>, "heldout: the measure declares cap::fitted_se but has no "
                                             "`heldout::fitted_value fitted(truth, prediction) const`");
    else
        static_assert(!detail::has_fitted<M>,
                      "heldout: the measure has fitted(...) but does not declare heldout::cap::fitted_se");
    if constexpr (offers_v<M, cap::whole_set>)
        static_assert(detail::has_score_set<M>, "heldout: the measure declares cap::whole_set but its accumulator has "
                                                "no `double score_set(truth, prediction[, weights]) const`");
    else
        static_assert(!detail::has_score_set<M>,
                      "heldout: the accumulator has score_set(...) but the measure does not declare "
                      "heldout::cap::whole_set");
    if constexpr (offers_v<M, cap::resampling>)
        static_assert(detail::has_resampler<M>, "heldout: the measure declares cap::resampling but has no "
                                                "`resampler(truth, prediction, who) const`");
    else
        static_assert(!detail::has_resampler<M>,
                      "heldout: the measure has resampler(...) but does not declare heldout::cap::resampling");
    if constexpr (offers_v<M, cap::serialisable>)
        static_assert(detail::has_serialisable_parts<M>,
                      "heldout: the measure declares cap::serialisable: it needs `static constexpr std::string_view "
                      "key`, and its accumulator `measure()`, visit_state(f) (const and non-const) and `void "
                      "check_state() const` (every invariant of a loaded state: input_error naming the field)");
    return true;
}

namespace detail {
// Readable refusals for wrong pairings, checked before the generic one.
template <class M, class P>
constexpr void check_prediction_type() {
    using Pr = std::remove_cvref_t<P>;
    using K = prediction_kind_t<M>;
    if constexpr (std::is_same_v<K, kinds::label>) {
        static_assert(label_range<Pr>, "heldout: this measure scores class labels (integral elements); real-valued "
                                       "scores become labels only through heldout::labels_at(scores, threshold) or "
                                       "the measure heldout::at_threshold(m, threshold)");
    } else if constexpr (std::is_same_v<K, kinds::class_probabilities>) {
        static_assert(probability_rows<Pr>, "heldout: this measure needs class-probability rows (an Eigen matrix, "
                                            "or heldout::rows(flat, k) over a row-major range)");
    } else if constexpr (std::is_same_v<K, kinds::real> || std::is_same_v<K, kinds::score> ||
                         std::is_same_v<K, kinds::probability>) {
        static_assert(real_range<Pr>, "heldout: this measure needs floating-point predictions (real values, scores "
                                      "or probabilities), not integer class labels");
    }
}
} // namespace detail

/// Scores a whole set of predictions with measure m.
template <outer_measure M, class T, class P>
double evaluate(const M& m, const T& truth, const P& prediction) {
    static_assert(check_measure<M>());
    detail::check_prediction_type<M, P>();
    static_assert(scores<M, T, P>, "heldout: this measure cannot score this truth/prediction pairing");
    auto acc = m.accumulator();
    // A measure whose state carries its rows (the ranking ones) scores a whole set in place,
    // without copying it into the state first.
    if constexpr (offers_v<M, cap::whole_set>) {
        return acc.score_set(truth, prediction);
    } else {
        acc.add(truth, prediction);
        return acc.value();
    }
}

/// Scores a whole set of weighted predictions with measure m.
template <outer_measure M, class T, class P, class W>
double evaluate(const M& m, const T& truth, const P& prediction, const W& weights) {
    static_assert(check_measure<M>());
    detail::check_prediction_type<M, P>();
    static_assert(scores_weighted<M, T, P, W>, "heldout: this measure cannot score this truth/prediction/weights "
                                               "pairing (weights are a contiguous range of numbers)");
    auto acc = m.accumulator();
    if constexpr (offers_v<M, cap::whole_set>) {
        return acc.score_set(truth, prediction, weights);
    } else {
        acc.add(truth, prediction, weights);
        return acc.value();
    }
}

HELDOUT_NAMESPACE_END
