// Test data for the resampling drivers: y = 1 + 2x + noise over standard-normal x (seeded),
// with label = (y > 1), and a least-squares line fitted on the train rows. Shared by
// tests/estimate/evaluate_splits.cpp and tests/estimate/progress.cpp.
#pragma once

#include <cstddef>
#include <cstdint>
#include <random>
#include <span>
#include <vector>

namespace heldout_test {

struct line_data {
    std::vector<double> x, y;
    std::vector<std::uint8_t> label;
};

inline line_data make_line_data(std::size_t n, unsigned seed) {
    std::mt19937_64 g(seed); // test data only
    std::normal_distribution<double> d;
    line_data D;
    for (std::size_t i = 0; i < n; ++i) {
        D.x.push_back(d(g));
        D.y.push_back(1.0 + 2.0 * D.x.back() + d(g));
        D.label.push_back(static_cast<std::uint8_t>(D.y.back() > 1.0));
    }
    return D;
}

// Least-squares line y = a + b x fitted on the train rows (duplicates count), predicted on test.
struct line_fit {
    const line_data* D;
    std::vector<double> operator()(std::span<const std::size_t> train, std::span<const std::size_t> test) const {
        double sx = 0, sy = 0;
        for (auto r : train) {
            sx += D->x[r];
            sy += D->y[r];
        }
        const double n = static_cast<double>(train.size()), mx = sx / n, my = sy / n;
        double sxy = 0, sxx = 0;
        for (auto r : train) {
            sxy += (D->x[r] - mx) * (D->y[r] - my);
            sxx += (D->x[r] - mx) * (D->x[r] - mx);
        }
        const double b = sxy / sxx, a = my - b * mx;
        std::vector<double> out;
        for (auto r : test)
            out.push_back(a + b * D->x[r]);
        return out;
    }
};

} // namespace heldout_test
