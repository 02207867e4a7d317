// heldout/compare/friedman.hpp — several models over several data sets: the Friedman test,
// its Iman–Davenport F form, average ranks and the Nemenyi critical difference (Demšar 2006).
//
//   Eigen::MatrixXd acc(6, 3);                 // rows: data sets, columns: models
//   acc << .80, .82, .79,  .75, .78, .76,  .90, .91, .88,
//          .66, .70, .70,  .85, .84, .83,  .72, .75, .71;
//   auto f = heldout::friedman_test(acc, heldout::direction::higher_is_better, {"A", "B", "C"});
//   f.average_ranks;                           // {2.1667, 1.25, 2.5833}: 1 = best
//   f.f_p_value;                               // Iman–Davenport, 0.0437
//   double cd = heldout::nemenyi_critical_difference(3, 6, 0.05);      // 1.3531
//   auto groups = heldout::nemenyi_groups(f.average_ranks, cd);        // {{1, 0, 2}}: B, A, C
//   heldout::print_rank_table(std::cout, f, 0.05);
//
// Demšar J (2006) "Statistical comparisons of classifiers over multiple data sets", JMLR
// 7:1-30, presents: ranks within each data set (1 = best, midranks for ties), average rank
// R_j of model j, and with N data sets and k models
//   chi2_F = 12 N / (k (k+1)) [sum_j R_j^2 - k (k+1)^2 / 4]          ~ chi-squared(k - 1)
//   F_F    = (N - 1) chi2_F / (N (k - 1) - chi2_F)                  ~ F(k - 1, (k - 1)(N - 1))
// (Friedman 1937, JASA 32:675-701; Iman & Davenport 1980, Commun. Stat. A9:571-595).
// Ties: Demšar's chi2_F has no tie correction; heldout reports it, and also the tie-corrected
// form chi2_F / (1 - sum(t^3 - t) / (N k (k^2 - 1))) (t over the sizes of tie groups within
// rows) that scipy.stats.friedmanchisquare and R friedman.test give. F_F is built from
// Demšar's uncorrected chi2_F, as Demšar does. Perfect agreement of all data sets (no ties,
// the same order everywhere) makes F_F's denominator 0: F_F = +infinity and its p-value is
// exactly 0 (the limit, documented). Every model tied on every data set leaves the
// tie-corrected statistic 0/0: undefined_error.
//
// Nemenyi (1963) post-hoc test: two models differ when their average ranks differ by at least
//   CD = q_alpha sqrt(k (k+1) / (6 N)),  q_alpha = Q_{1-alpha}(k, inf) / sqrt(2),
// where Q is the studentized range of k iid standard normals, computed here (not tabulated):
// P(R <= q) = k * integral phi(z) [Phi(z) - Phi(z - q)]^(k-1) dz by adaptive Gauss–Kronrod
// quadrature and inverted with TOMS 748 (Boost.Math). Against a single control
// (Bonferroni–Dunn), q_alpha = z_{1 - alpha / (2 (k - 1))}.
#pragma once

#include <heldout/core/config.hpp>
#include <heldout/core/error.hpp>
#include <heldout/core/measure.hpp>
#include <heldout/detail/validate.hpp>

HELDOUT_EXTERNAL_BEGIN
#include <Eigen/Core>
HELDOUT_EXTERNAL_END
#include <boost/math/distributions/chi_squared.hpp>
#include <boost/math/distributions/fisher_f.hpp>
#include <boost/math/distributions/normal.hpp>
#include <boost/math/quadrature/gauss_kronrod.hpp>
#include <boost/math/tools/roots.hpp>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <iomanip>
#include <limits>
#include <numeric>
#include <ostream>
#include <sstream>
#include <string>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// Result of friedman_test.
struct friedman_result {
    std::size_t data_sets = 0;
    std::size_t models = 0;
    direction better = direction::higher_is_better;
    std::vector<std::string> names;    ///< model names ("model 1", ... unless given)
    std::vector<double> average_ranks; ///< R_j, midranks, 1 = best by `better`
    double chi_squared = 0;            ///< Demšar's chi2_F, no tie correction
    double chi_squared_p_value = 1;    ///< against chi-squared(k - 1)
    double tie_correction = 1;         ///< 1 - sum(t^3 - t) / (N k (k^2 - 1)); 1 without ties
    double chi_squared_corrected = 0;  ///< chi_squared / tie_correction (scipy, R)
    double chi_squared_corrected_p_value = 1;
    double df = 0;          ///< k - 1
    double f_statistic = 0; ///< Iman–Davenport F_F (from the uncorrected chi2_F)
    double f_df1 = 0;       ///< k - 1
    double f_df2 = 0;       ///< (k - 1)(N - 1)
    double f_p_value = 1;
};

namespace detail::cmp {

inline void check_alpha(std::string_view caller, double alpha) {
    if (!(alpha > 0 && alpha < 1))
        fail(caller, "alpha", "must lie in (0, 1), got " + number_text(alpha));
}

/// P(R <= q) for the range R of k iid standard normals (infinite degrees of freedom).
template <class = void>
double studentized_range_cdf_infinite(double q, std::size_t k) {
    if (!(q > 0))
        return 0.0;
    const boost::math::normal_distribution<double> nd;
    const double km1 = static_cast<double>(k - 1);
    auto integrand = [&](double z) {
        // Phi(z) - Phi(z - q) from whichever side keeps both terms away from 1.
        const double d = z > 0.5 * q ? boost::math::cdf(boost::math::complement(nd, z - q)) -
                                           boost::math::cdf(boost::math::complement(nd, z))
                                     : boost::math::cdf(nd, z) - boost::math::cdf(nd, z - q);
        return d > 0 ? boost::math::pdf(nd, z) * std::pow(d, km1) : 0.0;
    };
    // The integrand is below phi(z), so |z| > 12 contributes less than 1e-32 per unit of k.
    // Splitting at the centre q/2 of the window keeps the adaptive steps on the peak.
    double err = 0;
    using gk = boost::math::quadrature::gauss_kronrod<double, 31>;
    const double mid = std::min(0.5 * q, 12.0);
    const double left = gk::integrate(integrand, -12.0, mid, 15, 1e-12, &err);
    const double right = mid < 12.0 ? gk::integrate(integrand, mid, 12.0, 15, 1e-12, &err) : 0.0;
    return std::min(1.0, static_cast<double>(k) * (left + right));
}

} // namespace detail::cmp

/// Quantile of the studentized range of `models` iid standard normals with infinite degrees
/// of freedom: the q with P(R <= q) = probability (computed by quadrature and root finding).
template <class = void>
double studentized_range_quantile(std::size_t models, double probability) {
    constexpr std::string_view who = "heldout::studentized_range_quantile";
    if (models < 2)
        detail::fail(who, "models", "need at least 2, got " + std::to_string(models));
    if (!(probability > 0 && probability < 1))
        detail::fail(who, "probability", "must lie in (0, 1), got " + detail::number_text(probability));
    auto g = [&](double q) { return detail::cmp::studentized_range_cdf_infinite(q, models) - probability; };
    double hi = 4.0;
    while (g(hi) < 0)
        hi *= 2;
    std::uintmax_t iterations = 200;
    const auto r = boost::math::tools::toms748_solve(g, 0.0, hi, -probability, g(hi),
                                                     boost::math::tools::eps_tolerance<double>(50), iterations);
    return 0.5 * (r.first + r.second);
}

/// Nemenyi critical difference of average ranks for `models` models over `data_sets` data
/// sets at family-wise level alpha: q_alpha sqrt(k (k+1) / (6 N)).
template <class = void>
double nemenyi_critical_difference(std::size_t models, std::size_t data_sets, double alpha) {
    constexpr std::string_view who = "heldout::nemenyi_critical_difference";
    if (models < 2)
        detail::fail(who, "models", "need at least 2, got " + std::to_string(models));
    if (data_sets < 1)
        detail::fail(who, "data_sets", "need at least 1, got 0");
    detail::cmp::check_alpha(who, alpha);
    const double k = static_cast<double>(models), n = static_cast<double>(data_sets);
    const double q = studentized_range_quantile(models, 1 - alpha) / std::sqrt(2.0);
    return q * std::sqrt(k * (k + 1) / (6 * n));
}

/// Bonferroni–Dunn critical difference for comparing k - 1 models with one control:
/// z_{1 - alpha / (2 (k - 1))} sqrt(k (k+1) / (6 N)) (Demšar 2006, section 3.2.2).
template <class = void>
double bonferroni_dunn_critical_difference(std::size_t models, std::size_t data_sets, double alpha) {
    constexpr std::string_view who = "heldout::bonferroni_dunn_critical_difference";
    if (models < 2)
        detail::fail(who, "models", "need at least 2, got " + std::to_string(models));
    if (data_sets < 1)
        detail::fail(who, "data_sets", "need at least 1, got 0");
    detail::cmp::check_alpha(who, alpha);
    const double k = static_cast<double>(models), n = static_cast<double>(data_sets);
    const double z = boost::math::quantile(
        boost::math::complement(boost::math::normal_distribution<double>(), alpha / (2 * (k - 1))));
    return z * std::sqrt(k * (k + 1) / (6 * n));
}

/// Friedman test on a data-sets x models matrix of one measure's values; `better` says which
/// way the measure improves (rank 1 = best). `names` label the columns (optional).
template <class Derived>
friedman_result friedman_test(const Eigen::MatrixBase<Derived>& results, direction better,
                              std::vector<std::string> names = {}) {
    constexpr std::string_view who = "heldout::friedman_test";
    const auto N = static_cast<std::size_t>(results.rows());
    const auto k = static_cast<std::size_t>(results.cols());
    if (N < 2)
        detail::fail(who, "results", "need at least 2 data sets (rows), got " + std::to_string(N));
    if (k < 2)
        detail::fail(who, "results", "need at least 2 models (columns), got " + std::to_string(k));
    if (!names.empty() && names.size() != k)
        detail::fail(who, "names", std::to_string(names.size()) + " names for " + std::to_string(k) + " models");
    for (std::size_t i = 0; i < N; ++i)
        for (std::size_t j = 0; j < k; ++j) {
            const double x = static_cast<double>(results(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)));
            if (!std::isfinite(x))
                detail::fail(who, "results",
                             std::string(std::isnan(x) ? "not finite (nan)" : "not finite (inf)") + " at data set " +
                                 std::to_string(i) + ", model " + std::to_string(j));
        }

    friedman_result r;
    r.data_sets = N;
    r.models = k;
    r.better = better;
    if (names.empty())
        for (std::size_t j = 0; j < k; ++j)
            names.push_back("model " + std::to_string(j + 1));
    r.names = std::move(names);

    // Rank sums S_j are multiples of 1/2 and the tie sum is an integer, so the statistics below
    // are formed from exactly represented parts (perfect agreement is detected exactly).
    std::vector<double> rank_sum(k, 0.0);
    std::vector<std::size_t> order(k);
    double tie_sum = 0; // sum over rows and tie groups of t^3 - t
    for (std::size_t i = 0; i < N; ++i) {
        auto v = [&](std::size_t j) {
            return static_cast<double>(results(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)));
        };
        std::iota(order.begin(), order.end(), std::size_t{0});
        std::sort(order.begin(), order.end(),
                  [&](std::size_t a, std::size_t b) { return heldout::better(better, v(a), v(b)); });
        for (std::size_t s = 0; s < k;) {
            std::size_t e = s + 1;
            while (e < k && v(order[e]) == v(order[s]))
                ++e;
            const double midrank = 0.5 * static_cast<double>(s + 1 + e); // ranks s+1..e
            for (std::size_t m = s; m < e; ++m)
                rank_sum[order[m]] += midrank;
            const double t = static_cast<double>(e - s);
            tie_sum += t * t * t - t;
            s = e;
        }
    }
    const double n = static_cast<double>(N), kd = static_cast<double>(k);
    double dev2 = 0; // sum_j (S_j - N (k+1)/2)^2, exact
    r.average_ranks.resize(k);
    for (std::size_t j = 0; j < k; ++j) {
        const double d = rank_sum[j] - n * (kd + 1) / 2;
        dev2 += d * d;
        r.average_ranks[j] = rank_sum[j] / n;
    }
    const double scale = n * kd * (kd + 1); // chi2_F = 12 dev2 / scale
    r.chi_squared = 12 * dev2 / scale;
    r.df = kd - 1;
    const boost::math::chi_squared_distribution<double> chi(r.df);
    r.chi_squared_p_value = boost::math::cdf(boost::math::complement(chi, r.chi_squared));

    r.tie_correction = 1 - tie_sum / (n * kd * (kd * kd - 1));
    if (!(r.tie_correction > 0))
        detail::fail_undefined(who, "every model ties with every other on every data set: nothing to rank");
    r.chi_squared_corrected = r.chi_squared / r.tie_correction;
    r.chi_squared_corrected_p_value = boost::math::cdf(boost::math::complement(chi, r.chi_squared_corrected));

    r.f_df1 = kd - 1;
    r.f_df2 = (kd - 1) * (n - 1);
    // F_F = (N-1) chi2 / (N(k-1) - chi2) = (N-1) 12 dev2 / (N(k-1) scale - 12 dev2).
    const double denom = n * (kd - 1) * scale - 12 * dev2;
    if (denom <= 0) {
        r.f_statistic = std::numeric_limits<double>::infinity(); // perfect agreement: documented limit
        r.f_p_value = 0;
    } else {
        r.f_statistic = (n - 1) * 12 * dev2 / denom;
        const boost::math::fisher_f_distribution<double> f(r.f_df1, r.f_df2);
        r.f_p_value = boost::math::cdf(boost::math::complement(f, r.f_statistic));
    }
    return r;
}

/// Groups of models that the critical difference cannot tell apart: maximal runs (by
/// average rank) whose ranks span less than `cd`, each with at least two models, listed
/// as model indices from best to worst. These are the bars of a critical-difference diagram.
inline std::vector<std::vector<std::size_t>> nemenyi_groups(const std::vector<double>& average_ranks, double cd) {
    constexpr std::string_view who = "heldout::nemenyi_groups";
    detail::check_nonempty(who, "average_ranks", average_ranks.size());
    detail::check_finite(who, "average_ranks", std::span<const double>(average_ranks));
    if (!(cd > 0) || !std::isfinite(cd))
        detail::fail(who, "cd", "must be finite and positive, got " + detail::number_text(cd));
    const std::size_t k = average_ranks.size();
    std::vector<std::size_t> order(k);
    std::iota(order.begin(), order.end(), std::size_t{0});
    std::stable_sort(order.begin(), order.end(),
                     [&](std::size_t a, std::size_t b) { return average_ranks[a] < average_ranks[b]; });
    std::vector<std::vector<std::size_t>> groups;
    std::size_t last_end = 0; // a run ending at or before this is inside the previous group
    for (std::size_t s = 0; s < k; ++s) {
        std::size_t e = s;
        while (e + 1 < k && average_ranks[order[e + 1]] - average_ranks[order[s]] < cd)
            ++e;
        if (e > s && e + 1 > last_end) {
            groups.emplace_back(order.begin() + static_cast<std::ptrdiff_t>(s),
                                order.begin() + static_cast<std::ptrdiff_t>(e + 1));
            last_end = e + 1;
        }
    }
    return groups;
}

/// A readable table: models from best to worst with their average ranks, the Friedman and
/// Iman–Davenport statistics, the Nemenyi critical difference at `alpha` and its groups.
template <class = void>
void print_rank_table(std::ostream& os, const friedman_result& r, double alpha = 0.05) {
    detail::cmp::check_alpha("heldout::print_rank_table", alpha);
    std::vector<std::size_t> order(r.models);
    std::iota(order.begin(), order.end(), std::size_t{0});
    std::stable_sort(order.begin(), order.end(),
                     [&](std::size_t a, std::size_t b) { return r.average_ranks[a] < r.average_ranks[b]; });
    std::size_t width = 5;
    for (const auto& s : r.names)
        width = std::max(width, s.size());
    std::ostringstream o;
    o << "Average ranks over " << r.data_sets << " data sets (1 = best; "
      << (r.better == direction::higher_is_better ? "higher" : "lower") << " values are better)\n";
    o << "  " << std::left << std::setw(static_cast<int>(width)) << "model"
      << "  rank\n";
    o << std::fixed << std::setprecision(3);
    for (std::size_t j : order)
        o << "  " << std::left << std::setw(static_cast<int>(width)) << r.names[j] << "  " << std::right
          << r.average_ranks[j] << '\n';
    o << std::defaultfloat << std::setprecision(4);
    o << "Friedman chi-squared " << r.chi_squared << " (df " << r.df << "), p = " << r.chi_squared_p_value;
    if (r.tie_correction < 1)
        o << "; tie-corrected " << r.chi_squared_corrected << ", p = " << r.chi_squared_corrected_p_value;
    o << '\n';
    o << "Iman-Davenport F " << r.f_statistic << " (df " << r.f_df1 << ", " << r.f_df2 << "), p = " << r.f_p_value
      << '\n';
    const double cd = nemenyi_critical_difference(r.models, r.data_sets, alpha);
    o << "Nemenyi critical difference at alpha = " << alpha << ": " << cd << '\n';
    const auto groups = nemenyi_groups(r.average_ranks, cd);
    o << "Not told apart:";
    if (groups.empty())
        o << " none (every pair differs by at least the critical difference)";
    for (const auto& g : groups) {
        o << " {";
        for (std::size_t m = 0; m < g.size(); ++m)
            o << (m ? ", " : "") << r.names[g[m]];
        o << '}';
    }
    o << '\n';
    os << o.str();
}

HELDOUT_NAMESPACE_END
