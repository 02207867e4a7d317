// heldout/estimate/ci.hpp — the interval methods an aggregator can compute, as named values.
//
//   heldout::estimate e = agg.estimate(heldout::measure::mse{});                // ci::automatic, 95%
//   auto w = agg.estimate(error, heldout::ci::wilson, 0.90);                     // one test set
//   auto b = agg.estimate(auc, heldout::ci::bca(5000, /*seed*/ 7));              // B and seed given
//   auto c = agg.estimate(mse, heldout::ci::corrected_t);                        // repeated k-fold
//
// Each value names one published method; what it is computed from:
//   t                     one test set: Student t on the per-observation losses (Student 1908)
//   wilson                one test set, 0/1 losses: Wilson score interval (Wilson 1927)
//   clopper_pearson       one test set, 0/1 losses: Clopper-Pearson interval (1934)
//   agresti_coull         one test set, 0/1 losses: Agresti-Coull interval (1998)
//   bootstrap_percentile  one test set: percentile bootstrap over the test observations, the
//                         fitted model held fixed (Efron & Tibshirani 1993, ch. 13)
//   bca                   one test set: bias-corrected and accelerated bootstrap over the test
//                         observations, jackknife acceleration (Efron 1987)
//   delong                one test set, AUC: DeLong, DeLong & Clarke-Pearson (1988) variance
//   newcombe              one test set, AUC with few positives or negatives: Newcombe's (2006)
//                         score-type interval (estimate/newcombe_auc.hpp)
//   corrected_t           several splits without replacement (k-fold, repeated k-fold,
//                         subsampling): Nadeau & Bengio (2003) corrected resampled t over the
//                         per-split values, variance factor 1/J + n_test/n_train
//   naive_t               several splits: the plain t interval over per-split values. Known to
//                         undercover (the splits share training rows); reported for contrast only
//   bootstrap_632         bootstrap plans: Efron's (1983) .632 point estimate (no interval)
//   bootstrap_632_plus    bootstrap plans: Efron & Tibshirani's (1997) .632+ point estimate
//   wald                  one test set, a fitted value (calibration slope / intercept): value
//                         +- z se with se from the fit's inverse information (Wald 1943)
//   automatic             the valid default for what was run (see below)
//
// ci::automatic resolves, from the recorded splits and the measure:
//   one split: 0/1 losses -> wilson; AUC -> delong (newcombe when the smaller class has fewer
//              than delong_small_class = 30 rows); a fitted value -> wald; other pointwise
//              losses -> t; any other
//              measure -> bca with 2000 replicates, seed 0;
//   several random splits without replacement -> corrected_t; leave-one-out, walk-forward,
//   purged -> refused (heldout::design_rules);
//   bootstrap plans (splits carrying draw counts) -> bootstrap_632_plus.
// A method that does not fit what was run is refused with heldout::input_error saying why
// (Wilson on pooled cross-validation predictions, corrected t on one test set, ...).
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/estimate/methods.hpp>

#include <cstddef>
#include <cstdint>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace ci {

/// A method and its settings (bootstrap replicates and seed; ignored by the others).
struct method {
    method_id id = method_id::automatic;
    std::size_t replicates = 2000;
    std::uint64_t seed = 0;

    /// The same bootstrap method with B replicates and a seed: `ci::bca(5000, 7)`.
    constexpr method operator()(std::size_t b, std::uint64_t s = 0) const {
        if (id != method_id::bootstrap_percentile && id != method_id::bca)
            detail::fail("heldout::ci::method", "replicates",
                         "only ci::bootstrap_percentile and ci::bca take replicates and a seed");
        if (b < 2)
            detail::fail("heldout::ci::method", "replicates", "at least 2 bootstrap replicates are needed");
        return method{id, b, s};
    }
    friend constexpr bool operator==(const method&, const method&) = default;
};

inline constexpr method automatic{method_id::automatic};
inline constexpr method t{method_id::t};
inline constexpr method wilson{method_id::wilson};
inline constexpr method clopper_pearson{method_id::clopper_pearson};
inline constexpr method agresti_coull{method_id::agresti_coull};
inline constexpr method bootstrap_percentile{method_id::bootstrap_percentile};
inline constexpr method bca{method_id::bca};
inline constexpr method delong{method_id::delong};
inline constexpr method corrected_t{method_id::corrected_t};
inline constexpr method naive_t{method_id::naive_t};
inline constexpr method bootstrap_632{method_id::bootstrap_632};
inline constexpr method bootstrap_632_plus{method_id::bootstrap_632_plus};
inline constexpr method newcombe{method_id::newcombe};
inline constexpr method wald{method_id::wald};

/// The identifier used in exports ("corrected_t"): the method table's key.
constexpr std::string_view id_text(method_id m) noexcept { return info(m).key; }

/// The label printed beside an estimate ("corrected t (Nadeau-Bengio)"): the method table's label.
constexpr std::string_view label(method_id m) noexcept { return info(m).label; }

} // namespace ci
HELDOUT_NAMESPACE_END
