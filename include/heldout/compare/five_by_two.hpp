// heldout/compare/five_by_two.hpp — the 5x2cv paired t test (Dietterich 1998) and the
// combined 5x2cv F test (Alpaydin 1999) from the ten fold differences.
//
//   // d[2 i + j] = measure(A) - measure(B) on fold j of replication i, in the order run
//   std::vector<double> d{0.05, 0.03, 0.02, 0.04, 0.06, 0.01, 0.03, 0.03, 0.04, 0.00};
//   auto r = heldout::five_by_two_test(d, 0.95);
//   r.t_statistic;  r.t_p_value;    // 2.2588, 0.0735  (t with 5 df)
//   r.f_statistic;  r.f_p_value;    // 2.5510, 0.1565  (F with 10 and 5 df)
//
// Dietterich TG (1998) Neural Computation 10:1895-1923; Alpaydin E (1999) Neural Computation
// 11:1885-1892. With p_i^(j) the difference on fold j of replication i,
// pbar_i = (p_i^(1) + p_i^(2)) / 2 and s_i^2 = (p_i^(1) - pbar_i)^2 + (p_i^(2) - pbar_i)^2:
//   t = p_1^(1) / sqrt(sum_i s_i^2 / 5)             ~ t(5)
//   F = sum_i sum_j (p_i^(j))^2 / (2 sum_i s_i^2)     ~ F(10, 5)
// Only the first difference enters t's numerator, so the fold order matters: pass the
// differences exactly as run (heldout's 5x2cv plan yields them in this order). The interval
// is the one that inverts the t test: p_1^(1) +- t_{(1+level)/2, 5} sqrt(sum s_i^2 / 5).
// sum_i s_i^2 = 0 (each replication's two folds agree) leaves both undefined: undefined_error.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/values.hpp>
#include <heldout/detail/validate.hpp>

#include <boost/math/distributions/fisher_f.hpp>
#include <boost/math/distributions/students_t.hpp>

#include <cmath>
#include <cstddef>

HELDOUT_NAMESPACE_BEGIN

/// Result of five_by_two_test: both statistics of the same ten differences.
struct five_by_two_result {
    double first_difference = 0; ///< p_1^(1), the t test's numerator
    double mean_difference = 0;  ///< mean of the ten differences
    double variance_sum = 0;     ///< sum_i s_i^2
    double se = 0;               ///< sqrt(sum_i s_i^2 / 5)
    double t_statistic = 0;      ///< ~ t(5)
    double t_p_value = 1;        ///< two-sided
    double f_statistic = 0;      ///< ~ F(10, 5)
    double f_p_value = 1;        ///< upper tail
    double level = 0.95;
    double lower = 0; ///< p_1^(1) - t_{(1+level)/2,5} se
    double upper = 0; ///< p_1^(1) + t_{(1+level)/2,5} se
};

namespace detail::cmp {
inline void check_level(std::string_view who, double level) {
    if (!(level > 0 && level < 1))
        fail(who, "level", "must lie in (0, 1), got " + number_text(level));
}
} // namespace detail::cmp

/// The 5x2cv t and combined F tests from ten differences in fold order
/// (replication 1 fold 1, replication 1 fold 2, replication 2 fold 1, ...).
template <real_range D>
five_by_two_result five_by_two_test(const D& differences, double level = 0.95) {
    constexpr std::string_view who = "heldout::five_by_two_test";
    const auto d = values_of(differences, who, "differences");
    if (d.size() != 10)
        detail::fail(who, "differences",
                     "need exactly 10 (5 replications x 2 folds, in fold order), got " + std::to_string(d.size()));
    detail::check_finite(who, "differences", d);
    detail::cmp::check_level(who, level);
    five_by_two_result r;
    r.level = level;
    double s2 = 0, sq = 0, sum = 0;
    for (std::size_t i = 0; i < 5; ++i) {
        const double a = static_cast<double>(d[2 * i]), b = static_cast<double>(d[2 * i + 1]);
        // (a - m)^2 + (b - m)^2 with m = (a + b)/2 is (a - b)^2 / 2.
        s2 += 0.5 * (a - b) * (a - b);
        sq += a * a + b * b;
        sum += a + b;
    }
    r.first_difference = static_cast<double>(d[0]);
    r.mean_difference = sum / 10;
    r.variance_sum = s2;
    if (!(s2 > 0))
        detail::fail_undefined(who, "the two folds of every replication give the same difference (sum of s_i^2 = 0)");
    r.se = std::sqrt(s2 / 5);
    r.t_statistic = r.first_difference / r.se;
    const boost::math::students_t_distribution<double> t5(5.0);
    r.t_p_value = 2 * boost::math::cdf(boost::math::complement(t5, std::abs(r.t_statistic)));
    r.f_statistic = sq / (2 * s2);
    const boost::math::fisher_f_distribution<double> f(10.0, 5.0);
    r.f_p_value = boost::math::cdf(boost::math::complement(f, r.f_statistic));
    const double q = boost::math::quantile(boost::math::complement(t5, (1 - level) / 2));
    r.lower = r.first_difference - q * r.se;
    r.upper = r.first_difference + q * r.se;
    return r;
}

HELDOUT_NAMESPACE_END
