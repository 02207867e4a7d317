// heldout/compare/mcnemar.hpp — McNemar's test: two classifiers scored on one test set.
//
//   auto r = heldout::mcnemar_test(truth, labels_a, labels_b, heldout::mcnemar::mid_p);
//   r.p_value;                       // two-sided
//   r.only_a_correct;                // b: A right, B wrong
//   r.only_b_correct;                // c: A wrong, B right
//   auto s = heldout::mcnemar_test(10, 3, heldout::mcnemar::exact);   // from the two counts
//
// Only the discordant rows carry information (McNemar 1947, Psychometrika 12:153-157).
// With b = #(A right, B wrong), c = #(A wrong, B right), n = b + c, k = min(b, c):
//  * exact:       b ~ Binomial(n, 1/2) given n; p = min(1, 2 P(X <= k)); statistic = b.
//  * mid_p:       p = 2 P(X <= k - 1) + P(X = k), the exact p less half the probability of the
//                 observed table on each side (Fagerland, Lydersen & Laake 2013, BMC Med. Res.
//                 Methodol. 13:91, who recommend it); statistic = b.
//  * chi_squared: statistic = (b - c)^2 / n against chi-squared with 1 df.
//  * corrected:   Edwards' (1948, Psychometrika 13:185-187) continuity correction,
//                 statistic = max(|b - c| - 1, 0)^2 / n (0 when |b - c| <= 1, as R's
//                 mcnemar.test gives), against chi-squared with 1 df.
// Binomial tails come from Boost.Math (regularized incomplete beta), never from term sums,
// so n in the millions is exact to the last digits.
// No discordant rows (n = 0): the data give no evidence of a difference; p = 1 and
// statistic = 0 for every variant (the chi-squared forms are 0/0 there; 0 is a convention,
// documented here and in docs/compare.md).
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/values.hpp>
#include <heldout/detail/validate.hpp>

#include <boost/math/distributions/binomial.hpp>
#include <boost/math/distributions/chi_squared.hpp>

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <ostream>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN

/// The four published forms of McNemar's test.
enum class mcnemar {
    exact,       ///< conditional binomial test, two-sided
    mid_p,       ///< mid-p version of the exact test
    chi_squared, ///< (b - c)^2 / (b + c) against chi-squared(1)
    corrected    ///< with Edwards' continuity correction
};

constexpr std::string_view to_string(mcnemar v) noexcept {
    switch (v) {
    case mcnemar::exact:
        return "McNemar exact";
    case mcnemar::mid_p:
        return "McNemar mid-p";
    case mcnemar::chi_squared:
        return "McNemar chi-squared";
    case mcnemar::corrected:
        return "McNemar chi-squared, continuity-corrected";
    }
    return "?";
}

/// Result of mcnemar_test.
struct mcnemar_result {
    double statistic = 0;             ///< b for exact / mid_p; the chi-squared value otherwise
    double p_value = 1;               ///< two-sided
    std::uint64_t only_a_correct = 0; ///< b: rows where A is right and B wrong
    std::uint64_t only_b_correct = 0; ///< c: rows where A is wrong and B right
    std::uint64_t observations = 0;   ///< all rows (0 when built from counts)
    mcnemar variant = mcnemar::exact;
};

inline std::ostream& operator<<(std::ostream& os, const mcnemar_result& r) {
    os << to_string(r.variant) << ": A only right " << r.only_a_correct << ", B only right " << r.only_b_correct
       << ", statistic " << r.statistic << ", p = " << r.p_value;
    if (r.observations != 0)
        os << ", n=" << r.observations;
    return os;
}

/// McNemar's test from the two discordant counts b (A right, B wrong) and c (A wrong, B right).
template <class = void>
mcnemar_result mcnemar_test(std::uint64_t only_a_correct, std::uint64_t only_b_correct, mcnemar variant) {
    mcnemar_result r;
    r.only_a_correct = only_a_correct;
    r.only_b_correct = only_b_correct;
    r.variant = variant;
    const std::uint64_t n = only_a_correct + only_b_correct;
    if (n == 0) {
        r.statistic = 0; // documented convention: no discordant pairs, no evidence
        r.p_value = 1;
        return r;
    }
    const double b = static_cast<double>(only_a_correct);
    const double c = static_cast<double>(only_b_correct);
    const double nd = static_cast<double>(n);
    const std::uint64_t k = std::min(only_a_correct, only_b_correct);
    switch (variant) {
    case mcnemar::exact:
    case mcnemar::mid_p: {
        const boost::math::binomial_distribution<double> bin(nd, 0.5);
        const double kd = static_cast<double>(k);
        r.statistic = b;
        if (variant == mcnemar::exact) {
            r.p_value = std::min(1.0, 2.0 * boost::math::cdf(bin, kd));
        } else {
            const double below = k == 0 ? 0.0 : boost::math::cdf(bin, kd - 1);
            r.p_value = std::min(1.0, 2.0 * below + boost::math::pdf(bin, kd));
        }
        break;
    }
    case mcnemar::chi_squared:
    case mcnemar::corrected: {
        double diff = b > c ? b - c : c - b; // exact in double for counts below 2^53
        if (variant == mcnemar::corrected)
            diff = std::max(diff - 1.0, 0.0);
        r.statistic = diff * diff / nd;
        const boost::math::chi_squared_distribution<double> chi(1.0);
        r.p_value = boost::math::cdf(boost::math::complement(chi, r.statistic));
        break;
    }
    }
    return r;
}

/// McNemar's test of classifiers A and B on one test set: a row counts as right when the
/// predicted label equals the truth (any number of classes).
template <label_range T, label_range A, label_range B>
mcnemar_result mcnemar_test(const T& truth, const A& labels_a, const B& labels_b, mcnemar variant) {
    constexpr std::string_view who = "heldout::mcnemar_test";
    const auto t = values_of(truth, who, "truth");
    const auto a = values_of(labels_a, who, "labels_a");
    const auto b = values_of(labels_b, who, "labels_b");
    detail::check_nonempty(who, "truth", t.size());
    detail::check_same_size(who, "labels_a", t.size(), a.size());
    detail::check_same_size(who, "labels_b", t.size(), b.size());
    detail::check_labels(who, "truth", t, 0);
    detail::check_labels(who, "labels_a", a, 0);
    detail::check_labels(who, "labels_b", b, 0);
    std::uint64_t only_a = 0, only_b = 0;
    for (std::size_t i = 0; i < t.size(); ++i) {
        const auto y = static_cast<std::uint64_t>(t[i]);
        const bool ra = static_cast<std::uint64_t>(a[i]) == y;
        const bool rb = static_cast<std::uint64_t>(b[i]) == y;
        only_a += static_cast<std::uint64_t>(ra && !rb);
        only_b += static_cast<std::uint64_t>(rb && !ra);
    }
    auto r = mcnemar_test(only_a, only_b, variant);
    r.observations = t.size();
    return r;
}

HELDOUT_NAMESPACE_END
