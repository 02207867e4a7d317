// heldout/censored/concordance_estimate.hpp — a C-index on one test set with its standard
// error and normal interval, and the paired comparison of two models' C-indices on the same
// rows.
//
//   auto truth = heldout::censored(time, event);
//   heldout::estimate e = heldout::concordance_estimate(heldout::measure::harrell_c{}, truth, risk, 0.95);
//   // e.value, *e.se, *e.lower, *e.upper
//   heldout::comparison d = heldout::compare_concordance(heldout::measure::uno_c{.horizon = 5}, truth,
//                                                        risk_a, risk_b, 0.95);
//
// The variance is the infinitesimal jackknife (Therneau & Atkinson, "Concordance" vignette of
// R survival): with case weights w, C(w) = N(w) / D(w) over the comparable pairs, each pair
// weighing w_i w_j u_i; the influence of row k is dC/dw_k = (n_k - C d_k) / D at w = 1, where
// n_k (d_k) sums the concordant + tied/2 (comparable) pair weights that involve row k, and
// var = sum_k (dC/dw_k)^2. For Uno's C the weights u_i = G(T_i-)^-2 are held fixed. Interval:
// C -+ z se, z the normal quantile. Two models: the difference C_a - C_b has variance
// sum_k (dC_a/dw_k - dC_b/dw_k)^2; the p-value is two-sided normal. R's
// concordance(Surv(time, event) ~ a + b, reverse = TRUE)$var gives the same matrix.
#pragma once

#include <heldout/censored/detail/concordance_counts.hpp>
#include <heldout/censored/harrell_c.hpp>
#include <heldout/censored/truth.hpp>
#include <heldout/censored/uno_c.hpp>
#include <heldout/compare/comparison.hpp>
#include <heldout/estimate/estimate.hpp>

#include <boost/math/distributions/normal.hpp>

#include <cmath>
#include <concepts>
#include <cstddef>
#include <cstdint>
#include <span>
#include <string>
#include <type_traits>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

namespace detail {

template <class M>
concept concordance_measure = std::same_as<M, measure::harrell_c> || std::same_as<M, measure::uno_c>;

/// The C-index and each row's influence dC/dw_k.
struct concordance_influence {
    double value = 0;
    std::vector<double> influence;
};

template <class M, class T, class E, class R>
concordance_influence concordance_with_influence(const M& m, const censored_times<T, E>& truth, const R& risk,
                                                 std::string_view arg) {
    const std::string who = m.name();
    const auto r = values_of(risk, who, arg);
    check_censored(who, truth, r.size(), arg);
    std::vector<double> time(r.size()), score(r.size());
    std::vector<std::uint8_t> event(r.size());
    for (std::size_t i = 0; i < r.size(); ++i) {
        check_finite_risk(who, static_cast<double>(r[i]), i);
        time[i] = static_cast<double>(truth.time[i]);
        event[i] = static_cast<std::uint8_t>(truth.event[i] != E(0));
        score[i] = static_cast<double>(r[i]);
    }
    if constexpr (std::same_as<M, measure::uno_c>)
        check_time_parameter(who, "horizon", m.horizon);
    require_event(who, event);
    const auto c = count_concordance(time, event, score, m.pair_weights(time, event), true);
    const double d = c.comparable();
    if (!(d > 0))
        fail_undefined(who, "no comparable pair");
    concordance_influence out;
    out.value = c.value();
    out.influence.resize(r.size());
    for (std::size_t k = 0; k < r.size(); ++k) {
        const double nk = c.row_concordant[k] + 0.5 * c.row_tied[k];
        const double dk = c.row_concordant[k] + c.row_discordant[k] + c.row_tied[k];
        out.influence[k] = (nk - out.value * dk) / d;
    }
    return out;
}

template <class = void>
double normal_z(double level, std::string_view who) {
    if (!(level > 0 && level < 1))
        fail(who, "level", "must be in (0, 1), got " + number_text(level));
    return boost::math::quantile(boost::math::normal_distribution<double>(), 0.5 + level / 2);
}

} // namespace detail

/// Harrell's or Uno's C on one test set with its infinitesimal-jackknife standard error and
/// the normal interval C -+ z se.
template <class M, class T, class E, real_range R>
requires detail::concordance_measure<M> estimate concordance_estimate(const M& m, const censored_times<T, E>& truth,
                                                                      const R& risk, double level = 0.95) {
    const double z = detail::normal_z(level, m.name());
    const auto c = detail::concordance_with_influence(m, truth, risk, "risk");
    double var = 0;
    for (const double x : c.influence)
        var += x * x;
    estimate e;
    e.measure = m.name();
    e.value = c.value;
    e.se = std::sqrt(var);
    e.lower = c.value - z * *e.se;
    e.upper = c.value + z * *e.se;
    e.level = level;
    e.method_label = "normal, infinitesimal jackknife";
    e.splits = 0; // one test set, no splits (as the DeLong interval)
    e.observations = truth.size();
    e.notes.push_back("one test set; variance by the infinitesimal jackknife (Therneau & Atkinson)");
    if constexpr (std::same_as<M, measure::uno_c>)
        e.notes.push_back("censoring weights G(T-)^-2 held fixed in the variance");
    return e;
}

/// Two models' C-indices on the same rows: C_a - C_b with its infinitesimal-jackknife
/// standard error, normal interval and two-sided p-value.
template <class M, class T, class E, real_range Ra, real_range Rb>
requires detail::concordance_measure<M> comparison compare_concordance(const M& m, const censored_times<T, E>& truth,
                                                                       const Ra& risk_a, const Rb& risk_b,
                                                                       double level = 0.95) {
    const double z = detail::normal_z(level, m.name());
    const auto a = detail::concordance_with_influence(m, truth, risk_a, "risk_a");
    const auto b = detail::concordance_with_influence(m, truth, risk_b, "risk_b");
    double var = 0;
    for (std::size_t k = 0; k < a.influence.size(); ++k) {
        const double d = a.influence[k] - b.influence[k];
        var += d * d;
    }
    comparison c;
    c.measure = m.name();
    c.difference = a.value - b.value;
    c.se = std::sqrt(var);
    c.lower = c.difference - z * *c.se;
    c.upper = c.difference + z * *c.se;
    c.level = level;
    if (*c.se > 0) {
        c.statistic = c.difference / *c.se;
        c.p_value = 2 * boost::math::cdf(
                            boost::math::complement(boost::math::normal_distribution<double>(), std::abs(c.statistic)));
    } else {
        c.statistic = 0;
        c.p_value = c.difference == 0 ? 1.0 : 0.0;
        c.notes.push_back("zero standard error: the two scores order every comparable pair alike");
    }
    c.method_label = "paired z, infinitesimal jackknife";
    c.splits = 1;
    c.observations = truth.size();
    return c;
}

HELDOUT_NAMESPACE_END
