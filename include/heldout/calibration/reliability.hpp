// heldout/calibration/reliability.hpp — the table behind a reliability diagram: predictions
// binned by probability, each bin with its count, mean predicted probability, observed
// frequency of class 1 and the Wilson interval of that frequency.
//
//   using namespace heldout;
//   for (const calibration_bin& b : reliability(y, p, 10))               // 10 equal-width bins
//       std::cout << b.mean_predicted << ' ' << b.observed << " [" << b.lower << ", " << b.upper
//                 << "] n=" << b.count << '\n';
//   auto q = reliability(y, p, 5, {.binning = measure::bin_rule::equal_count, .level = 0.9});
//
// Bins follow the rules of measure::calibration_error (Naeini, Cooper & Hauskrecht 2015), so a
// diagram and an ECE computed with the same bins agree:
//  * equal_width (default): B_1 = [0, 1/M], B_m = ((m-1)/M, m/M], edges computed by division;
//  * equal_count: t_m (m = 1..M-1) is the smallest probability whose cumulative count (in
//    sorted order) reaches m n / M, and a row goes to bin #{m : p > t_m}. Tied probabilities
//    share a bin, so bins can hold unequal counts when there are ties.
// Empty bins are left out; each bin says which it is (.index) and its edges (.left, .right:
// the bin is (left, right], the first one [0, right]). The interval of .observed is Wilson's
// (1927) score interval for k of n at the requested level (heldout::wilson_interval; Newcombe
// 1998, method 3), which keeps its coverage near the nominal level in small bins and never
// leaves [0, 1] — a bin of 3 predictions shows how little it says.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/values.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/detail/validate.hpp>
#include <heldout/estimate/binomial_interval.hpp>
#include <heldout/measure/calibration_error.hpp>

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <numeric>
#include <string_view>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// One non-empty bin of a reliability table.
struct calibration_bin {
    std::size_t index = 0;     ///< bin number 0..bins-1
    double left = 0;           ///< the bin is (left, right] (the first bin [0, right])
    double right = 0;          ///<
    std::size_t count = 0;     ///< predictions in the bin
    double mean_predicted = 0; ///< their mean probability
    double observed = 0;       ///< share of them whose truth is 1
    double lower = 0;          ///< Wilson interval of observed
    double upper = 0;          ///<
};

/// Options of reliability().
struct reliability_options {
    measure::bin_rule binning = measure::bin_rule::equal_width;
    double level = 0.95; ///< of the Wilson intervals
};

namespace detail {
/// reliability() with the name errors carry (report::reliability_bins draws the same bins).
template <value_range T, real_range P>
std::vector<calibration_bin> reliability_for(std::string_view who, const T& truth, const P& probability,
                                             std::size_t bins, const reliability_options& options) {
    const auto t = values_of(truth, who, "truth");
    const auto p = values_of(probability, who, "probability");
    detail::check_nonempty(who, "truth", t.size());
    detail::check_same_size(who, "probability", t.size(), p.size());
    if (bins < 1 || bins > 100000)
        detail::fail(who, "bins", "must lie in 1..100000, got " + std::to_string(bins));
    detail::check_level(who, options.level);
    for (std::size_t i = 0; i < t.size(); ++i)
        if (!(t[i] == 0 || t[i] == 1))
            detail::fail_at(who, "truth", "label outside the classes 0..1", i);
    detail::check_probabilities(who, "probability", p);

    const std::size_t n = t.size();
    std::vector<std::size_t> bin_of(n);
    std::vector<double> left(bins), right(bins);
    if (options.binning == measure::bin_rule::equal_width) {
        for (std::size_t i = 0; i < n; ++i)
            bin_of[i] = measure::detail_calibration::width_bin(static_cast<double>(p[i]), bins);
        for (std::size_t b = 0; b < bins; ++b) {
            left[b] = static_cast<double>(b) / static_cast<double>(bins);
            right[b] = static_cast<double>(b + 1) / static_cast<double>(bins);
        }
    } else {
        std::vector<std::size_t> order(n);
        std::iota(order.begin(), order.end(), std::size_t{0});
        std::sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) { return p[a] < p[b]; });
        // t_m: the smallest probability whose cumulative count reaches m n / M (as j M >= m n).
        std::vector<double> edges(bins - 1, 0.0);
        std::size_t m = 1;
        for (std::size_t j = 1; j <= n && m < bins; ++j)
            while (m < bins && j * bins >= m * n)
                edges[m++ - 1] = static_cast<double>(p[order[j - 1]]);
        for (std::size_t i = 0; i < n; ++i)
            bin_of[i] = static_cast<std::size_t>(
                std::lower_bound(edges.begin(), edges.end(), static_cast<double>(p[i])) - edges.begin());
        for (std::size_t b = 0; b < bins; ++b) {
            left[b] = b == 0 ? 0.0 : edges[b - 1];
            right[b] = b + 1 == bins ? 1.0 : edges[b];
        }
    }
    std::vector<std::size_t> count(bins, 0), ones(bins, 0);
    std::vector<detail::compensated_sum> sum(bins);
    for (std::size_t i = 0; i < n; ++i) {
        ++count[bin_of[i]];
        ones[bin_of[i]] += t[i] == 1 ? std::size_t{1} : std::size_t{0};
        sum[bin_of[i]].add(static_cast<double>(p[i]));
    }
    std::vector<calibration_bin> out;
    for (std::size_t b = 0; b < bins; ++b) {
        if (count[b] == 0)
            continue;
        const auto w = wilson_interval(ones[b], count[b], options.level);
        const double c = static_cast<double>(count[b]);
        out.push_back(
            {b, left[b], right[b], count[b], sum[b].value() / c, static_cast<double>(ones[b]) / c, w.lower, w.upper});
    }
    return out;
}
} // namespace detail

/// The non-empty bins of probabilities p (class 1) against 0/1 truth; see the header comment.
template <value_range T, real_range P>
std::vector<calibration_bin> reliability(const T& truth, const P& probability, std::size_t bins,
                                         const reliability_options& options = {}) {
    return detail::reliability_for("heldout::reliability", truth, probability, bins, options);
}

HELDOUT_NAMESPACE_END
