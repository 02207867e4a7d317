// heldout/estimate/corrected_t.hpp — the corrected resampled t (Nadeau & Bengio 2003) for
// values obtained from J overlapping train/test splits, and the naive t over splits.
//
//   // d[j] = error(A) - error(B) on split j (subsampling, or r x k-fold in order)
//   heldout::resampled_t_result c = heldout::corrected_resampled_t(d, 90, 10, 0.95);
//   // c.mean, c.se, c.statistic, c.df, c.p_value, c.lower, c.upper
//   // repeated k-fold: n_test / n_train = 1/(k-1), e.g. 10 x 10-fold: (d, 9, 1)
//   auto naive = heldout::naive_resampled_t(d, 0.95);   // known to undercover
//
// Nadeau C, Bengio Y (2003) "Inference for the generalization error", Machine Learning
// 52:239-281: with mean d and sample variance s^2 (J - 1) of the J split values,
//   se = sqrt((1/J + n_test/n_train) s^2),  t = mean / se ~ t_{J-1},
//   interval mean +- t_{1-a/2, J-1} se.
// The n_test/n_train term is a heuristic for the correlation between splits that share
// training rows. For r repetitions of k-fold (Bouckaert & Frank 2004, PAKDD, LNCS
// 3056:3-12) the same formula applies to all k r fold values with n_test/n_train = 1/(k-1).
// The same function gives a corrected interval for one model's per-split errors
// (statistic and p-value then test "mean = 0", which is rarely of interest).
//
// naive_resampled_t drops the n_test/n_train term (se = s/sqrt(J)): that is the paired t
// over splits, which treats overlapping splits as independent and is known to have
// inflated type-I error and to undercover (Nadeau & Bengio 2003; Dietterich 1998).
//
// Policies: empty input, a non-finite value, n_train or n_test not positive and finite, or
// a level outside (0, 1) -> input_error; J = 1, or s^2 = 0 (all values equal: the statistic
// is 0/0 or +-inf and the interval has zero width) -> undefined_error.
#pragma once

#include <heldout/estimate/t_interval.hpp>

#include <cmath>
#include <cstddef>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN

/// A t test and interval on the mean of per-split values.
struct resampled_t_result {
    double mean = 0;      ///< mean of the split values
    double se = 0;        ///< (corrected) standard error of the mean
    double statistic = 0; ///< mean / se
    double df = 0;        ///< J - 1
    double p_value = 0;   ///< two-sided, for "mean = 0"
    double lower = 0;
    double upper = 0;
    double level = 0;
    std::size_t splits = 0; ///< J
    double correction = 0;  ///< n_test / n_train (0 for the naive t)
};

namespace detail {
template <class R>
resampled_t_result resampled_t(const R& values, double ratio, double level, std::string_view who) {
    auto v = values_of(values, who, "differences");
    check_nonempty(who, "differences", v.size());
    check_finite(who, "differences", v);
    check_level(who, level);
    if (v.size() < 2)
        fail_undefined(who, "one split has no variance (J = 1)");
    const auto mv = two_pass_mean_variance(v);
    if (!(mv.scaled_variance > 0)) // not variance: it underflows to 0 for values near 1e-200
        fail_undefined(who, "all split values are equal (variance 0): the t statistic is undefined");
    const double J = static_cast<double>(v.size());
    resampled_t_result r;
    r.mean = mv.mean;
    r.se = mv.root(1.0 / J + ratio);
    r.statistic = r.mean / r.se;
    r.df = J - 1;
    r.p_value = two_sided_t_p(r.statistic, r.df);
    const double q = two_sided_t(level, r.df);
    r.lower = r.mean - q * r.se;
    r.upper = r.mean + q * r.se;
    check_bounds(who, "differences", r.lower, r.upper);
    r.level = level;
    r.splits = v.size();
    r.correction = ratio;
    return r;
}
} // namespace detail

/// Nadeau-Bengio corrected resampled t on J split values (differences, or one model's errors).
template <value_range R>
resampled_t_result corrected_resampled_t(const R& differences, double n_train, double n_test, double level = 0.95) {
    constexpr std::string_view who = "heldout::corrected_resampled_t";
    if (!(std::isfinite(n_train) && n_train > 0))
        detail::fail(who, "n_train", "training size " + detail::number_text(n_train) + " is not positive");
    if (!(std::isfinite(n_test) && n_test > 0))
        detail::fail(who, "n_test", "test size " + detail::number_text(n_test) + " is not positive");
    return detail::resampled_t(differences, n_test / n_train, level, who);
}

/// The naive t over splits (se = s / sqrt(J)); known to undercover for overlapping splits.
template <value_range R>
resampled_t_result naive_resampled_t(const R& differences, double level = 0.95) {
    return detail::resampled_t(differences, 0.0, level, "heldout::naive_resampled_t");
}

HELDOUT_NAMESPACE_END
