// heldout/compare/paired.hpp — the paired comparison methods as named values (the rows of the
// method table in estimate/methods.hpp).
//
//   auto c = heldout::compare(agg_a, agg_b, heldout::measure::mse{});                 // paired::automatic
//   auto f = heldout::compare(agg_a, agg_b, mse, heldout::paired::five_by_two_f);     // 5x2cv plan
//   auto b = heldout::compare(m, truth, f_a, f_b, heldout::paired::bootstrap_bca(5000, 7));  // B and seed
//
// What each needs and where it comes from: heldout::paired::methods (estimate/methods.hpp).
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/estimate/methods.hpp>

#include <cstddef>
#include <cstdint>

HELDOUT_NAMESPACE_BEGIN
namespace paired {

/// A paired method and its settings (bootstrap replicates and seed; ignored by the others).
struct method {
    method_id id = method_id::automatic;
    std::size_t replicates = 2000;
    std::uint64_t seed = 0;

    /// The same bootstrap method with B replicates and a seed: `paired::bootstrap_bca(5000, 7)`.
    constexpr method operator()(std::size_t b, std::uint64_t s = 0) const {
        if (id != method_id::bootstrap_percentile && id != method_id::bootstrap_bca)
            detail::fail("heldout::paired::method", "replicates",
                         "only paired::bootstrap_percentile and paired::bootstrap_bca take replicates and a seed");
        if (b < 2)
            detail::fail("heldout::paired::method", "replicates", "at least 2 bootstrap replicates are needed");
        return method{id, b, s};
    }
    friend constexpr bool operator==(const method&, const method&) = default;
};

inline constexpr method automatic{method_id::automatic};
inline constexpr method corrected_t{method_id::corrected_t};
inline constexpr method naive_t{method_id::naive_t};
inline constexpr method five_by_two_t{method_id::five_by_two_t};
inline constexpr method five_by_two_f{method_id::five_by_two_f};
inline constexpr method mcnemar_exact{method_id::mcnemar_exact};
inline constexpr method mcnemar_mid_p{method_id::mcnemar_mid_p};
inline constexpr method mcnemar_chi_squared{method_id::mcnemar_chi_squared};
inline constexpr method mcnemar_corrected{method_id::mcnemar_corrected};
inline constexpr method delong{method_id::delong};
inline constexpr method bootstrap_percentile{method_id::bootstrap_percentile};
inline constexpr method bootstrap_bca{method_id::bootstrap_bca};
/// Per-query values of two rankers (heldout::compare_queries): paired t over queries, and the
/// paired randomization (sign-flip) test.
inline constexpr method query_t{method_id::query_t};
inline constexpr method randomization{method_id::randomization};

} // namespace paired
HELDOUT_NAMESPACE_END
