// Brute force for the query measures: every order of the tied items of one query is
// enumerated (std::next_permutation inside each tie group, an odometer across groups), the
// textbook definition is computed on each strict order, and the orders are averaged. This
// is the definition of the tie-exact value (McSherry & Najork 2008): "the expectation over all
// orders of the tied items, each equally likely", with no closed form involved.
#pragma once

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <functional>
#include <numeric>
#include <vector>

namespace heldout_test {

/// Textbook measures of one strict order: rel[i] = relevance at position i + 1.
struct strict_order {
    static double gain(double r, bool exponential) { return exponential ? std::pow(2.0, r) - 1.0 : r; }
    static double dcg(const std::vector<double>& rel, std::size_t k, bool exponential) {
        const std::size_t K = k == 0 ? rel.size() : std::min(k, rel.size());
        double s = 0;
        for (std::size_t i = 0; i < K; ++i)
            s += gain(rel[i], exponential) / std::log2(static_cast<double>(i) + 2.0);
        return s;
    }
    static double ndcg(const std::vector<double>& rel, std::size_t k, bool exponential) {
        std::vector<double> ideal = rel;
        std::sort(ideal.begin(), ideal.end(), std::greater<double>());
        return dcg(rel, k, exponential) / dcg(ideal, k, exponential);
    }
    static double relevant_in_top(const std::vector<double>& rel, std::size_t k) {
        double c = 0;
        for (std::size_t i = 0; i < std::min(k, rel.size()); ++i)
            c += rel[i] > 0 ? 1 : 0;
        return c;
    }
    static double relevant(const std::vector<double>& rel) { return relevant_in_top(rel, rel.size()); }
    static double precision(const std::vector<double>& rel, std::size_t k) {
        return relevant_in_top(rel, k) / static_cast<double>(k);
    }
    static double recall(const std::vector<double>& rel, std::size_t k) {
        return relevant_in_top(rel, k) / relevant(rel);
    }
    static double reciprocal_rank(const std::vector<double>& rel) {
        for (std::size_t i = 0; i < rel.size(); ++i)
            if (rel[i] > 0)
                return 1.0 / static_cast<double>(i + 1);
        return 0;
    }
    static double average_precision(const std::vector<double>& rel, std::size_t k) {
        const std::size_t K = k == 0 ? rel.size() : std::min(k, rel.size());
        const double R = relevant(rel);
        const double D = k == 0 ? R : std::min(static_cast<double>(k), R);
        double s = 0, hits = 0;
        for (std::size_t i = 0; i < K; ++i)
            if (rel[i] > 0) {
                hits += 1;
                s += hits / static_cast<double>(i + 1);
            }
        return s / D;
    }
};

/// Mean of f(order) over every order of the tied items (scores decreasing).
template <class F>
double over_tie_orders(const std::vector<double>& scores, const std::vector<double>& rel, F&& f,
                       std::size_t* orders = nullptr) {
    std::vector<std::size_t> idx(scores.size());
    std::iota(idx.begin(), idx.end(), std::size_t{0});
    std::stable_sort(idx.begin(), idx.end(), [&](std::size_t a, std::size_t b) { return scores[a] > scores[b]; });
    // Tie groups as [begin, end) ranges of idx, each sorted so next_permutation starts at the first order.
    std::vector<std::pair<std::size_t, std::size_t>> groups;
    for (std::size_t i = 0; i < idx.size();) {
        std::size_t j = i;
        while (j < idx.size() && scores[idx[j]] == scores[idx[i]])
            ++j;
        std::sort(idx.begin() + static_cast<std::ptrdiff_t>(i), idx.begin() + static_cast<std::ptrdiff_t>(j));
        groups.emplace_back(i, j);
        i = j;
    }
    double total = 0, carry = 0; // Neumaier's compensated sum: up to 8! orders are added
    std::size_t count = 0;
    std::vector<double> order(idx.size());
    while (true) {
        for (std::size_t i = 0; i < idx.size(); ++i)
            order[i] = rel[idx[i]];
        const double x = f(order), t = total + x;
        carry += std::abs(total) >= std::abs(x) ? (total - t) + x : (x - t) + total;
        total = t;
        ++count;
        // Odometer: advance the first group that has a next permutation, resetting those before it.
        std::size_t g = 0;
        for (; g < groups.size(); ++g) {
            auto b = idx.begin() + static_cast<std::ptrdiff_t>(groups[g].first);
            auto e = idx.begin() + static_cast<std::ptrdiff_t>(groups[g].second);
            if (std::next_permutation(b, e))
                break; // (next_permutation wrapped the earlier groups back to sorted order already)
        }
        if (g == groups.size())
            break;
    }
    if (orders)
        *orders = count;
    return (total + carry) / static_cast<double>(count);
}

} // namespace heldout_test
