// Shared by tests/stream/*.cpp: one seeded data set holding every kind of input a measure
// family takes, and helpers that feed any accumulator a slice of it. The lists of measures
// live in each test (allocation, serialize, parallel), each entry naming its input kind.
#pragma once

#include <heldout/core/measure.hpp>
#include <heldout/core/values.hpp>

#include <Eigen/Core>

#include <cmath>
#include <concepts>
#include <cstddef>
#include <cstdint>
#include <random>
#include <span>
#include <type_traits>
#include <vector>

namespace stream_cases {

/// The truth/prediction pairing of a measure family.
enum class input {
    real,        ///< real truth, real prediction (regression)
    counts,      ///< counts >= 0 against a log-mean (Poisson deviance)
    margin,      ///< 0/1 truth, real-valued margin (logistic, hinge losses)
    probability, ///< 0/1 truth, P(y = 1) in (0, 1)
    score,       ///< 0/1 truth, float scores in [0, 1] with many ties
    score_wide,  ///< 0/1 truth, double scores that are not all floats, with ties
    labels2,     ///< 0/1 truth and 0/1 predicted labels
    labels3,     ///< labels 0..2 and predicted labels 0..2
    rows3        ///< labels 0..2 and n x 3 class-probability rows
};

template <input K>
using kind = std::integral_constant<input, K>;

/// Invented data (std::mt19937_64, fixed seed): tests only need all kinds side by side.
struct data {
    std::size_t n;
    std::vector<double> y, f, counts, prob, w, rows3, score_wide;
    std::vector<float> score;
    std::vector<std::uint8_t> y01, pred01, lab3, pred3;

    explicit data(std::size_t rows, std::uint64_t seed = 3)
        : n(rows), y(rows), f(rows), counts(rows), prob(rows), w(rows), rows3(3 * rows), score(rows), y01(rows),
          pred01(rows), lab3(rows), pred3(rows) {
        score_wide.resize(rows);
        std::mt19937_64 g(seed);
        std::normal_distribution<double> d;
        std::uniform_real_distribution<double> u(0.0, 1.0);
        for (std::size_t i = 0; i < rows; ++i) {
            y[i] = d(g);
            f[i] = y[i] + 0.7 * d(g);
            counts[i] = std::floor(2.0 * std::abs(y[i]));
            y01[i] = static_cast<std::uint8_t>(f[i] + 0.5 * d(g) > 0);
            prob[i] = 1.0 / (1.0 + std::exp(-1.5 * y[i]));
            // Scores on a grid of 1/256 in [0, 1]: real ties, and exact floats.
            score[i] = static_cast<float>(std::round(256.0 * prob[i]) / 256.0);
            score_wide[i] = std::round(1000.0 * prob[i]) / 1000.0; // k / 1000: mostly not a float
            pred01[i] = static_cast<std::uint8_t>(y[i] > 0.1);
            lab3[i] = static_cast<std::uint8_t>(y[i] < -0.4 ? 0 : (y[i] < 0.4 ? 1 : 2));
            pred3[i] = static_cast<std::uint8_t>(f[i] < -0.4 ? 0 : (f[i] < 0.4 ? 1 : 2));
            const double a = std::exp(-f[i]), b = 1.0, c = std::exp(f[i]);
            rows3[3 * i] = a / (a + b + c);
            rows3[3 * i + 1] = b / (a + b + c);
            rows3[3 * i + 2] = 1.0 - rows3[3 * i] - rows3[3 * i + 1];
            w[i] = i % 7 == 3 ? 0.0 : 0.25 + u(g); // some zero weights
        }
    }
};

/// The truth of kind K.
template <input K>
auto truth(const data& d) {
    if constexpr (K == input::real)
        return std::span<const double>(d.y);
    else if constexpr (K == input::counts)
        return std::span<const double>(d.counts);
    else if constexpr (K == input::labels3 || K == input::rows3)
        return std::span<const std::uint8_t>(d.lab3);
    else
        return std::span<const std::uint8_t>(d.y01);
}

/// The prediction of kind K (a span, or class-probability rows).
template <input K>
auto prediction(const data& d) {
    if constexpr (K == input::real || K == input::counts || K == input::margin)
        return std::span<const double>(d.f);
    else if constexpr (K == input::probability)
        return std::span<const double>(d.prob);
    else if constexpr (K == input::score)
        return std::span<const float>(d.score);
    else if constexpr (K == input::score_wide)
        return std::span<const double>(d.score_wide);
    else if constexpr (K == input::labels2)
        return std::span<const std::uint8_t>(d.pred01);
    else if constexpr (K == input::labels3)
        return std::span<const std::uint8_t>(d.pred3);
    else
        return heldout::rows(d.rows3, 3);
}

template <class P>
auto slice(const P& p, std::size_t first, std::size_t count) {
    if constexpr (heldout::probability_rows<P>)
        return p.slice(first, count);
    else
        return p.subspan(first, count);
}

/// Adds rows first..first+count of kind K to acc (with the weights when `weighted`).
template <input K, class Acc>
void feed(Acc& acc, const data& d, std::size_t first, std::size_t count, bool weighted) {
    const auto t = truth<K>(d).subspan(first, count);
    const auto p = slice(prediction<K>(d), first, count);
    if (weighted)
        acc.add(t, p, std::span<const double>(d.w).subspan(first, count));
    else
        acc.add(t, p);
}

/// Everything an accumulator reports, as numbers: value() (the cells of a confusion table),
/// plus the error bound of a binned AUC.
template <class Acc>
std::vector<double> read(const Acc& acc) {
    if constexpr (std::convertible_to<decltype(acc.value()), double>) {
        std::vector<double> out{static_cast<double>(acc.value())};
        if constexpr (requires { acc.error_bound(); })
            out.push_back(acc.error_bound());
        return out;
    } else {
        const auto t = acc.value();
        return std::vector<double>(t.data(), t.data() + t.size());
    }
}

/// How the state from another path must agree with one evaluate() over all rows.
enum class agree {
    exact,            ///< equal: exact state (counts, carried scores or rows)
    exact_unweighted, ///< equal without weights (integer counts); weighted sums agree to 1e-12
    close             ///< floating-point sums merged in another order: 1e-12 relative
};

/// A 3-class cost matrix with unequal costs (rows: truth, columns: prediction).
inline Eigen::MatrixXd costs3() {
    Eigen::MatrixXd c(3, 3);
    c << 0, 1, 2, 1, 0, 1, 4, 1, 0;
    return c;
}

} // namespace stream_cases
