// examples/demo/logistic.hpp — logistic regression fitted by iteratively reweighted least
// squares (IRLS, i.e. Newton's method on the log-likelihood) on Eigen, for the demo.
//
//   demo::logistic_regression m;
//   m.fit(X, y, train_rows);                       // rows of X and y to fit on
//   std::vector<double> p = m.predict(X, test_rows);   // P(y = 1) for each test row
//
// Features are standardised on the training rows (mean 0, sd 1) so that one small ridge
// penalty (1e-6, not on the intercept) fits every column alike; it only keeps the Newton
// system positive definite when the classes are separable. Each step solves
// (Z' W Z + ridge) delta = Z' (y - p) - ridge beta with W = diag(p (1 - p)) by LDLT, until
// the largest step is below 1e-10 or 50 steps.
#pragma once

#include <Eigen/Dense>

#include <cmath>
#include <cstddef>
#include <cstdint>
#include <span>
#include <stdexcept>
#include <vector>

namespace demo {

class logistic_regression {
public:
    double ridge = 1e-6;
    int max_steps = 50;

    void fit(const Eigen::MatrixXd& x, std::span<const std::uint8_t> y, std::span<const std::size_t> rows) {
        const auto n = static_cast<Eigen::Index>(rows.size());
        const Eigen::Index d = x.cols();
        if (n == 0)
            throw std::invalid_argument("logistic_regression::fit: no training rows");
        mean_ = Eigen::VectorXd::Zero(d);
        scale_ = Eigen::VectorXd::Zero(d);
        for (std::size_t r : rows)
            mean_ += x.row(static_cast<Eigen::Index>(r)).transpose();
        mean_ /= static_cast<double>(n);
        for (std::size_t r : rows)
            scale_ += (x.row(static_cast<Eigen::Index>(r)).transpose() - mean_).cwiseAbs2();
        scale_ = (scale_ / static_cast<double>(std::max<Eigen::Index>(1, n - 1))).cwiseSqrt();
        for (Eigen::Index j = 0; j < d; ++j)
            if (!(scale_(j) > 0))
                scale_(j) = 1;
        Eigen::MatrixXd z(n, d + 1);
        Eigen::VectorXd t(n);
        for (Eigen::Index i = 0; i < n; ++i) {
            const auto r = static_cast<Eigen::Index>(rows[static_cast<std::size_t>(i)]);
            z(i, 0) = 1;
            z.row(i).tail(d) = ((x.row(r).transpose() - mean_).cwiseQuotient(scale_)).transpose();
            t(i) = y[static_cast<std::size_t>(r)];
        }
        beta_ = Eigen::VectorXd::Zero(d + 1);
        Eigen::MatrixXd penalty = Eigen::MatrixXd::Identity(d + 1, d + 1) * ridge;
        penalty(0, 0) = 0;
        for (steps_ = 0; steps_ < max_steps; ++steps_) {
            const Eigen::VectorXd p = (1.0 + (-(z * beta_).array()).exp()).inverse().matrix();
            const Eigen::VectorXd w = (p.array() * (1 - p.array())).max(1e-12).matrix();
            const Eigen::MatrixXd h = z.transpose() * w.asDiagonal() * z + penalty;
            const Eigen::VectorXd g = z.transpose() * (t - p) - penalty * beta_;
            const Eigen::VectorXd delta = h.ldlt().solve(g);
            beta_ += delta;
            if (delta.cwiseAbs().maxCoeff() < 1e-10)
                break;
        }
    }

    double predict_one(const Eigen::RowVectorXd& row) const {
        const double eta = beta_(0) + ((row.transpose() - mean_).cwiseQuotient(scale_)).dot(beta_.tail(mean_.size()));
        return 1 / (1 + std::exp(-eta));
    }

    std::vector<double> predict(const Eigen::MatrixXd& x, std::span<const std::size_t> rows) const {
        std::vector<double> p(rows.size());
        for (std::size_t i = 0; i < rows.size(); ++i)
            p[i] = predict_one(x.row(static_cast<Eigen::Index>(rows[i])));
        return p;
    }

    /// Coefficients on the standardised features, intercept first.
    const Eigen::VectorXd& coefficients() const noexcept { return beta_; }
    int steps() const noexcept { return steps_; }

private:
    Eigen::VectorXd mean_, scale_, beta_;
    int steps_ = 0;
};

} // namespace demo
