// heldout/compare/holm.hpp — Holm's step-down adjustment of several p-values.
//
//   std::vector<double> p{0.01, 0.04, 0.03, 0.005};
//   auto adj = heldout::holm_adjust(p);      // {0.03, 0.06, 0.06, 0.02}, in the input order
//   bool reject_first = adj[0] <= 0.05;      // family-wise error rate held at 5%
//
// Holm S (1979) "A simple sequentially rejective multiple test procedure", Scand. J. Statist.
// 6:65-70. With p_(1) <= ... <= p_(m) sorted, the adjusted value of the i-th smallest is
// max over j <= i of min(1, (m - j + 1) p_(j)). Rejecting where the adjusted value is <= alpha
// is Holm's procedure; it controls the family-wise error rate under any dependence between
// the tests, which is what comparisons sharing one set of splits need.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/values.hpp>
#include <heldout/detail/validate.hpp>

#include <algorithm>
#include <cstddef>
#include <numeric>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// Holm-adjusted p-values, in the order of the input (each in [0, 1]).
template <real_range P>
std::vector<double> holm_adjust(const P& p_values) {
    constexpr std::string_view who = "heldout::holm_adjust";
    const auto p = values_of(p_values, who, "p_values");
    detail::check_nonempty(who, "p_values", p.size());
    detail::check_probabilities(who, "p_values", p);
    const std::size_t m = p.size();
    std::vector<std::size_t> order(m);
    std::iota(order.begin(), order.end(), std::size_t{0});
    // Ties get equal adjusted values whatever their order, so a stable sort is only for
    // reproducibility of the intermediate steps.
    std::stable_sort(order.begin(), order.end(), [&](std::size_t i, std::size_t j) { return p[i] < p[j]; });
    std::vector<double> out(m);
    double running = 0;
    for (std::size_t r = 0; r < m; ++r) {
        const double scaled = std::min(1.0, static_cast<double>(m - r) * static_cast<double>(p[order[r]]));
        running = std::max(running, scaled);
        out[order[r]] = running;
    }
    return out;
}

HELDOUT_NAMESPACE_END
