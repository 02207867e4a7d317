// heldout/measure/median_absolute_error.hpp — the (weighted) median of |y_i - f_i|.
//
//   double m = heldout::evaluate(heldout::measure::median_absolute_error{}, y, f);
//   double w = heldout::evaluate(heldout::measure::median_absolute_error{}, y, f, wts);
//
// Definition. Sort the absolute errors e_(1) <= ... <= e_(n), carrying their weights;
// C_j = w_(1) + ... + w_(j), W = C_n. The lower median is the smallest e_(j) with
// C_j >= W/2, the upper median the smallest e_(j) with C_j > W/2; the value is their
// midpoint. With unit weights this is the ordinary median: the middle value for odd n, the
// mean of the two middle values for even n. Integer weights act as replication; rows of
// weight 0 never decide the value. Undefined with no rows or zero total weight.
// The accumulator keeps every error (merge appends, exact); value() sorts a copy in a
// buffer that keeps its capacity, O(n log n).
#pragma once

#include <heldout/core/measure.hpp>
#include <heldout/detail/pointwise_pass.hpp>
#include <heldout/detail/state_checks.hpp>
#include <heldout/detail/validate.hpp>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

/// Running state of median_absolute_error: all absolute errors and their weights.
struct median_absolute_error;

class median_absolute_error_accumulator {
public:
    /// The measure this state belongs to.
    median_absolute_error measure() const;

    template <value_range T, real_range P>
    void add(const T& truth, const P& prediction) {
        auto [t, p] = views(truth, prediction);
        errors_.reserve(errors_.size() + t.size());
        weights_.reserve(weights_.size() + t.size());
        for (std::size_t i = 0; i < t.size(); ++i) {
            errors_.push_back(std::fabs(static_cast<double>(t[i]) - static_cast<double>(p[i])));
            weights_.push_back(1.0);
        }
    }
    template <value_range T, real_range P, weight_range W>
    void add(const T& truth, const P& prediction, const W& weights) {
        auto w = values_of(weights, who(), "weights");
        auto [t, p] = views(truth, prediction);
        detail::check_same_size(who(), "weights", t.size(), w.size());
        detail::check_weights(who(), w);
        errors_.reserve(errors_.size() + t.size());
        weights_.reserve(weights_.size() + t.size());
        for (std::size_t i = 0; i < t.size(); ++i) {
            errors_.push_back(std::fabs(static_cast<double>(t[i]) - static_cast<double>(p[i])));
            weights_.push_back(static_cast<double>(w[i]));
        }
    }
    void add_one(double y, double f, double w = 1.0) {
        detail::check_finite_at(who(), "truth", y, 0);
        detail::check_finite_at(who(), "prediction", f, 0);
        if (!std::isfinite(w) || w < 0)
            detail::fail(who(), "weights", "weight must be finite and non-negative");
        errors_.push_back(std::fabs(y - f));
        weights_.push_back(w);
    }
    void merge(const median_absolute_error_accumulator& o) {
        errors_.insert(errors_.end(), o.errors_.begin(), o.errors_.end());
        weights_.insert(weights_.end(), o.weights_.begin(), o.weights_.end());
    }
    double value() const {
        if (errors_.empty())
            detail::fail_undefined(who(), "no observations");
        sorted_.resize(errors_.size());
        double total = 0;
        for (std::size_t i = 0; i < errors_.size(); ++i) {
            sorted_[i] = {errors_[i], weights_[i]};
            total += weights_[i];
        }
        if (!(total > 0))
            detail::fail_undefined(who(), "total weight is zero");
        std::sort(sorted_.begin(), sorted_.end(), [](const auto& a, const auto& b) { return a.first < b.first; });
        // Cumulative weights in sorted order; 2 C_j against W is exact scaling.
        double c = 0, lower = 0, upper = 0;
        bool have_lower = false;
        for (const auto& [e, w] : sorted_) {
            c += w;
            if (!have_lower && 2 * c >= total) {
                lower = e;
                have_lower = true;
            }
            if (2 * c > total) {
                upper = e;
                break;
            }
        }
        if (!have_lower) // rounding in the running sum kept 2C below W: the top value
            lower = upper = sorted_.back().first;
        else if (2 * c <= total)
            upper = sorted_.back().first;
        return 0.5 * (lower + upper);
    }
    void reset() noexcept {
        errors_.clear();
        weights_.clear();
    }
    std::size_t count() const noexcept { return errors_.size(); }

    template <class F>
    void visit_state(F&& f) {
        f(errors_);
        f(weights_);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(errors_);
        f(weights_);
    }

    /// After a load (stream/serialize.hpp): one weight per error, errors finite and >= 0,
    /// weights finite and >= 0.
    void check_state() const {
        detail::check_loaded_size("weights", weights_.size(), errors_.size(), "one per error");
        detail::check_loaded_nonnegative("errors", std::span<const double>(errors_));
        detail::check_loaded_nonnegative("weights", std::span<const double>(weights_));
    }

private:
    static std::string_view who() { return "measure median absolute error"; }

    template <class T, class P>
    static auto views(const T& truth, const P& prediction) {
        auto t = values_of(truth, who(), "truth");
        auto p = values_of(prediction, who(), "prediction");
        detail::check_nonempty(who(), "truth", t.size());
        detail::check_same_size(who(), "prediction", t.size(), p.size());
        detail::check_finite(who(), "truth", t);
        detail::check_finite(who(), "prediction", p);
        for (std::size_t i = 0; i < t.size(); ++i)
            if (!std::isfinite(static_cast<double>(t[i]) - static_cast<double>(p[i])))
                detail::fail_at(who(), "prediction", "arithmetic overflow (values too large for double)", i);
        return std::pair{t, p};
    }

    std::vector<double> errors_;
    std::vector<double> weights_;
    mutable std::vector<std::pair<double, double>> sorted_; // scratch for value(), not state
};

/// The (weighted) median absolute error; see the header for the definition.
struct median_absolute_error {
    static constexpr direction better = direction::lower_is_better;
    static constexpr prediction_kind kind = prediction_kind::real;

    using capabilities = offers<cap::serialisable>;
    static constexpr std::string_view key = "median_absolute_error";
    std::string name() const { return "median absolute error"; }
    median_absolute_error_accumulator accumulator() const { return {}; }
};

inline median_absolute_error median_absolute_error_accumulator::measure() const { return {}; }

} // namespace measure
HELDOUT_NAMESPACE_END
