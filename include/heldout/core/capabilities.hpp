// heldout/core/capabilities.hpp — what a measure offers beyond streaming and merging, declared
// by name so that a misspelt or half-implemented capability is a compile error, never a
// silently disabled feature.
//
//   struct my_measure {
//       using capabilities = heldout::offers<heldout::cap::row_losses, heldout::cap::serialisable>;
//       ...
//   };
//   static_assert(heldout::offers_v<my_measure, heldout::cap::row_losses>);
//
// Every measure streams (its accumulator adds batches) and merges (shards combine exactly);
// those are part of what a measure is (core/measure.hpp). The optional capabilities, and
// what each requires (checked by heldout::check_measure<M>() with a message naming the
// missing member):
//
//   cap::row_losses       the value is the (weighted) mean of one number per row; the measure
//                         has `void row_losses(truth, prediction, std::span<double> out) const`
//                         writing those numbers. Gives the t, Wilson and .632 methods, McNemar
//                         (0/1 values) and the paired bootstrap on kept losses.
//   cap::case_components  the value is a two-sample U statistic of cases and controls (the ROC
//                         AUC); the measure has `heldout::case_components
//                         case_components(truth, prediction) const` (DeLong's structural
//                         components). Gives ci::delong and paired::delong.
//   cap::fitted_se        the value is a maximum-likelihood estimate of a model fitted to the
//                         test rows (the calibration slope and intercept); the measure has
//                         `heldout::fitted_value fitted(truth, prediction) const` giving the
//                         value and its standard error from the inverse information. Gives
//                         ci::wald on one test set.
//   cap::whole_set        the accumulator has `double score_set(truth, prediction) const` and a
//                         weighted form: evaluate() scores a whole set in place, without
//                         copying it into the state first (same value and errors as add +
//                         value).
//   cap::resampling       the measure has `resampler(truth, prediction, who) const` returning
//                         an engine with full(), replicate(seed, b, out) and jackknife(out)
//                         (estimate/bootstrap.hpp): the bootstrap uses it instead of
//                         re-adding weighted rows.
//   cap::serialisable     the measure has `static constexpr std::string_view key` (its
//                         identity in bytes, stable across versions and machines) and its
//                         accumulator has `measure()`, visit_state (const and non-const) and
//                         `void check_state() const`, which deserialize calls once every field
//                         is read: each invariant of the loaded fields (labels < classes, row
//                         lengths, weights as long as values, non-negative counts, finite
//                         sums, parameters in range) or an input_error naming the field
//                         (detail::fail_loaded). serialize / deserialize(bytes, m).
#pragma once

#include <heldout/core/config.hpp>

#include <cstddef>
#include <type_traits>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// DeLong's structural components of a two-sample U statistic (DeLong, DeLong &
/// Clarke-Pearson 1988): value = mean of `cases` = mean of `controls`; cases[i] is the share
/// of controls that case i (truth 1, i-th in row order) outranks (ties count one half),
/// controls[j] the share of cases that outrank control j (truth 0, j-th in row order).
struct case_components {
    double value = 0;
    std::vector<double> cases;
    std::vector<double> controls;
};

/// A maximum-likelihood value with its standard error from the inverse (observed = expected,
/// for the canonical-link models used here) Fisher information.
struct fitted_value {
    double value = 0;
    double se = 0;
    std::size_t iterations = 0; ///< Newton steps the fit took
};

namespace cap {
/// The value is the (weighted) mean of per-row values: `row_losses(truth, prediction, out)`.
struct row_losses {};
/// DeLong structural components: `case_components(truth, prediction)`.
struct case_components {};
/// A fitted value with its standard error: `fitted(truth, prediction)`.
struct fitted_se {};
/// In-place scoring of a whole set: the accumulator's `score_set(truth, prediction[, weights])`.
struct whole_set {};
/// Its own bootstrap engine: `resampler(truth, prediction, who)`.
struct resampling {};
/// Bytes that cross machines: `key`, the accumulator's `measure()`, `visit_state` and `check_state()`.
struct serialisable {};
} // namespace cap

/// The list of capabilities a measure declares: `using capabilities = heldout::offers<...>;`.
template <class... C>
struct offers {
    static_assert((std::is_empty_v<C> && ...), "heldout::offers takes capability tags from heldout::cap");
};

namespace detail {
template <class List, class C>
struct list_has : std::false_type {};
template <class... Cs, class C>
struct list_has<offers<Cs...>, C> : std::bool_constant<(std::is_same_v<Cs, C> || ...)> {};

template <class M>
struct declared_capabilities {
    using type = offers<>;
};
template <class M>
requires requires { typename M::capabilities; }
struct declared_capabilities<M> {
    using type = typename M::capabilities;
};
} // namespace detail

/// The capabilities measure M declares (offers<> when it declares none).
template <class M>
using capabilities_t = typename detail::declared_capabilities<M>::type;

/// Whether measure M declares capability C.
template <class M, class C>
inline constexpr bool offers_v = detail::list_has<capabilities_t<M>, C>::value;

HELDOUT_NAMESPACE_END
