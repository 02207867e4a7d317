// heldout/query/gains.hpp — the gain of a graded relevance, the positional discount of the
// cumulated-gain measures, and what a query without any relevant item counts as.
//
//   heldout::measure::ndcg{.k = 10};                                   // gain 2^rel - 1 (default)
//   heldout::measure::ndcg{.k = 10, .gain = heldout::gain::linear};    // gain rel
//   heldout::measure::recall_at{.k = 5, .no_relevant = heldout::if_no_relevant::zero};
//   double g = heldout::gain_of(heldout::gain::exponential, 3.0);      // 7
//   double d = heldout::discount(1);                                   // 1 / log2(2) = 1
//
// Gains (Järvelin & Kekäläinen 2002 use the relevance itself; the exponential gain
// 2^rel - 1 is Burges et al. 2005's): exponential g(rel) = 2^rel - 1, linear g(rel) = rel.
// Discount of position i = 1, 2, ...: 1 / log2(1 + i) (position 1 is not discounted).
// Relevance is a finite number >= 0; the exponential gain takes rel <= 1023 (2^1024
// overflows the double range).
#pragma once

#include <heldout/core/config.hpp>

#include <cmath>
#include <cstddef>
#include <cstdint>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN

/// The gain of a graded relevance in the cumulated-gain measures (DCG, NDCG).
enum class gain : std::uint8_t {
    exponential, ///< 2^rel - 1 (Burges et al. 2005): the default
    linear       ///< rel (Järvelin & Kekäläinen 2002)
};

/// What a query with no relevant item (every relevance 0) counts as, for the measures that
/// are undefined there (NDCG, recall@k, reciprocal rank, AP@k).
enum class if_no_relevant : std::uint8_t {
    skip, ///< left out of the mean and of per_query, counted in skipped (the default)
    zero  ///< scored 0 and kept in the mean
};

constexpr std::string_view to_string(gain g) noexcept { return g == gain::exponential ? "exponential" : "linear"; }

/// Largest relevance the exponential gain takes (2^1023 - 1 is the largest finite gain).
inline constexpr double max_exponential_relevance = 1023.0;

/// The gain of relevance rel (rel >= 0, finite; at most 1023 for the exponential gain).
template <class R>
double gain_of(gain g, R rel) noexcept {
    const double r = static_cast<double>(rel);
    return g == gain::linear ? r : std::exp2(r) - 1.0;
}

/// The discount 1 / log2(1 + i) of position i = 1, 2, ...
inline double discount(std::size_t position) noexcept { return 1.0 / std::log2(1.0 + static_cast<double>(position)); }

HELDOUT_NAMESPACE_END
