// Small random queries with heavy ties, for the tie-order enumeration tests of the query measures.
#pragma once

#include <heldout/query.hpp>

#include <algorithm>
#include <cstddef>
#include <random>
#include <vector>

namespace heldout_test {

struct small_query {
    std::vector<double> scores;
    std::vector<double> rel;
    std::vector<int> id; // all 0: one query
};

/// n in 1..7 items (at most 5040 orders), scores from 3 levels (many ties), relevance 0..3 (some queries all 0).
inline small_query random_small_query(std::mt19937& g) {
    small_query q;
    const std::size_t n = std::uniform_int_distribution<std::size_t>(1, 7)(g);
    const int levels = std::uniform_int_distribution<int>(1, 3)(g);
    for (std::size_t i = 0; i < n; ++i) {
        q.scores.push_back(0.25 * std::uniform_int_distribution<int>(0, levels - 1)(g));
        q.rel.push_back(static_cast<double>(std::uniform_int_distribution<int>(0, 3)(g)));
        q.id.push_back(0);
    }
    return q;
}

/// n in 10..40 items with distinct scores but for two tie groups of 2..4 items (at most 576
/// orders), relevance 0..3: long enough for the selection path of a small cutoff.
inline small_query random_long_query(std::mt19937& g) {
    small_query q;
    const std::size_t n = std::uniform_int_distribution<std::size_t>(10, 40)(g);
    for (std::size_t i = 0; i < n; ++i) {
        q.scores.push_back(static_cast<double>(i) + 0.5);
        q.rel.push_back(static_cast<double>(std::uniform_int_distribution<int>(0, 5)(g) / 2));
        q.id.push_back(0);
    }
    for (int group = 0; group < 2; ++group) {
        const std::size_t size = std::uniform_int_distribution<std::size_t>(2, 4)(g);
        const std::size_t at = std::uniform_int_distribution<std::size_t>(0, n - 1)(g);
        for (std::size_t j = 0; j < size; ++j)
            q.scores[std::uniform_int_distribution<std::size_t>(0, n - 1)(g)] = q.scores[at];
    }
    std::shuffle(q.scores.begin(), q.scores.end(), g);
    return q;
}

/// The measure on one query, or -1 when it is undefined there.
template <class M>
double one_query(const M& m, const small_query& q) {
    try {
        return heldout::evaluate(m, heldout::by_query(q.id, q.rel), q.scores);
    } catch (const heldout::undefined_error&) {
        return -1;
    }
}

} // namespace heldout_test
