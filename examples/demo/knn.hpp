// examples/demo/knn.hpp — k-nearest-neighbour classification for the demo.
//
//   demo::nearest_neighbours m{.k = 15};
//   m.fit(X, y, train_rows);
//   std::vector<double> p = m.predict(X, test_rows);   // share of failures among the k nearest
//
// Features are standardised on the training rows; distance is Euclidean on the
// standardised features; the k nearest training rows (ties in distance broken by the
// lower row number, so results do not depend on the sort) vote, and the score is the
// share of them with y = 1. Brute force: O(n_train) per prediction, plenty for the demo.
// Scored on its own training rows a point finds itself at distance 0: that is why the
// training error of k-NN is so optimistic.
#pragma once

#include <Eigen/Dense>

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <span>
#include <stdexcept>
#include <vector>

namespace demo {

class nearest_neighbours {
public:
    std::size_t k = 15;

    void fit(const Eigen::MatrixXd& x, std::span<const std::uint8_t> y, std::span<const std::size_t> rows) {
        if (rows.size() < k)
            throw std::invalid_argument("nearest_neighbours::fit: fewer training rows than k");
        const Eigen::Index d = x.cols();
        const auto n = static_cast<Eigen::Index>(rows.size());
        Eigen::VectorXd mean = Eigen::VectorXd::Zero(d), sd = Eigen::VectorXd::Zero(d);
        for (std::size_t r : rows)
            mean += x.row(static_cast<Eigen::Index>(r)).transpose();
        mean /= static_cast<double>(n);
        for (std::size_t r : rows)
            sd += (x.row(static_cast<Eigen::Index>(r)).transpose() - mean).cwiseAbs2();
        sd = (sd / static_cast<double>(std::max<Eigen::Index>(1, n - 1))).cwiseSqrt();
        for (Eigen::Index j = 0; j < d; ++j)
            if (!(sd(j) > 0))
                sd(j) = 1;
        mean_ = mean;
        scale_ = sd;
        train_.resize(n, d);
        labels_.resize(rows.size());
        rows_.assign(rows.begin(), rows.end());
        for (Eigen::Index i = 0; i < n; ++i) {
            const auto r = static_cast<Eigen::Index>(rows[static_cast<std::size_t>(i)]);
            train_.row(i) = ((x.row(r).transpose() - mean_).cwiseQuotient(scale_)).transpose();
            labels_[static_cast<std::size_t>(i)] = y[static_cast<std::size_t>(r)];
        }
    }

    std::vector<double> predict(const Eigen::MatrixXd& x, std::span<const std::size_t> rows) const {
        std::vector<double> p(rows.size());
        std::vector<neighbour> dist(static_cast<std::size_t>(train_.rows()));
        for (std::size_t i = 0; i < rows.size(); ++i) {
            const Eigen::RowVectorXd q =
                ((x.row(static_cast<Eigen::Index>(rows[i])).transpose() - mean_).cwiseQuotient(scale_)).transpose();
            for (Eigen::Index j = 0; j < train_.rows(); ++j) {
                const auto sj = static_cast<std::size_t>(j);
                dist[sj] = {(train_.row(j) - q).squaredNorm(), rows_[sj], labels_[sj]};
            }
            std::nth_element(dist.begin(), dist.begin() + static_cast<std::ptrdiff_t>(k - 1), dist.end());
            std::size_t positives = 0;
            for (std::size_t j = 0; j < k; ++j) // the k smallest by (distance, row) are in front
                positives += dist[j].label;
            p[i] = static_cast<double>(positives) / static_cast<double>(k);
        }
        return p;
    }

private:
    struct neighbour {
        double distance;
        std::size_t row;
        std::uint8_t label;
        bool operator<(const neighbour& o) const noexcept {
            return distance < o.distance || (distance == o.distance && row < o.row);
        }
    };
    Eigen::VectorXd mean_, scale_;
    Eigen::MatrixXd train_;
    std::vector<std::uint8_t> labels_;
    std::vector<std::size_t> rows_; // training row numbers, for breaking ties in distance
};

} // namespace demo
