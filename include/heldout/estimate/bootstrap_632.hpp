// heldout/estimate/bootstrap_632.hpp — the .632 and .632+ bootstrap estimators of
// prediction error (Efron 1983, JASA 78:316-331; Efron & Tibshirani 1997, JASA 92:548-560).
//
//   heldout::out_of_bag_losses oob(n);               // n = rows of the data set
//   for (const heldout::split& s : bootstrap_plan.splits(n)) {   // s.test = out-of-bag rows
//       auto f = fit_predict(s.train, s.test);
//       oob.add(s.test, per_row_losses(truth, s.test, f));
//   }
//   double apparent = ...;                           // error of the rule fit on all rows, on all rows
//   double gamma = heldout::no_information_error_rate(truth_labels, full_fit_labels);   // 0/1 loss
//   heldout::bootstrap_632_result e = heldout::bootstrap_632(apparent, oob.leave_one_out_error(), gamma);
//   // e.err_632, e.err_632_plus, e.relative_overfitting, e.weight
//
// Definitions (notation of Efron & Tibshirani 1997):
//  * leave-one-out bootstrap Err^(1) = (1/n') sum_i [mean of L_i^b over the bootstrap
//    models b whose sample does not contain i]; points never out of bag are dropped and
//    n' = the number of points that were out of bag at least once (never_out_of_bag()
//    counts the others). pooled_error() is Efron 1983's eps0 instead: the sum of all
//    out-of-bag losses over the total number of out-of-bag cases.
//  * .632 = 0.368 apparent + 0.632 Err^(1). heldout uses the papers' rounded 0.632 (and
//    0.368 = 1 - 0.632), not 1 - e^-1 = 0.63212...
//  * no-information error gamma = (1/n^2) sum_i sum_j L(y_i, f(x_j)): closed forms for
//    0/1 loss on labels (sum_k p_k (1 - q_k), observed and predicted class shares) and
//    squared error (mean y^2 + mean f^2 - 2 mean y mean f); any pointwise loss by the O(n^2)
//    double sum (no_information_error).
//  * Err^(1)' = min(Err^(1), gamma); R = (Err^(1)' - apparent)/(gamma - apparent) when
//    Err^(1) > apparent and gamma > apparent, else 0 (so R is in [0, 1]);
//    .632+ = .632 + (Err^(1)' - apparent) 0.368 0.632 R / (1 - 0.368 R): Efron & Tibshirani
//    1997 eq. (32), as recalled (the paper could not be reached from here; two independent
//    recollections agree). The correction is added to the *unclipped* .632 estimate. The
//    weighted form (1 - w) apparent + w Err^(1)', w = 0.632/(1 - 0.368 R), equals it only when
//    Err^(1) <= gamma; when Err^(1) > gamma it drops to gamma, and when gamma < apparent <
//    Err^(1) it falls below the apparent error, which eq. (32) never does (it is at least
//    .632 >= apparent whenever Err^(1) >= apparent). weight is still reported as w.
#pragma once

#include <heldout/core/loss.hpp>
#include <heldout/core/values.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/detail/validate.hpp>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <span>
#include <string>
#include <string_view>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// The .632 weight used throughout (the papers' rounded value, not 1 - e^-1).
inline constexpr double bootstrap_632_weight = 0.632;

/// Per-row out-of-bag losses over bootstrap replicates: Err^(1) and the pooled estimate.
class out_of_bag_losses {
public:
    out_of_bag_losses() = default;
    explicit out_of_bag_losses(std::size_t n) : sum_(n), count_(n, 0) {}

    /// Records one bootstrap model's losses on its out-of-bag rows.
    template <label_range R, value_range L>
    void add(const R& rows, const L& losses) {
        constexpr std::string_view who = "heldout::out_of_bag_losses::add";
        auto r = values_of(rows, who, "rows");
        auto l = values_of(losses, who, "losses");
        detail::check_same_size(who, "losses", r.size(), l.size(), "rows");
        detail::check_finite(who, "losses", l);
        for (std::size_t i = 0; i < r.size(); ++i) {
            if constexpr (std::is_signed_v<element_t<R>>)
                if (r[i] < 0)
                    detail::fail_at(who, "rows", "negative row number", i);
            if (static_cast<std::size_t>(r[i]) >= sum_.size())
                detail::fail_at(who, "rows",
                                "row " + std::to_string(static_cast<std::size_t>(r[i])) + " outside 0.." +
                                    std::to_string(sum_.size() == 0 ? 0 : sum_.size() - 1),
                                i);
        }
        for (std::size_t i = 0; i < r.size(); ++i) {
            const std::size_t k = static_cast<std::size_t>(r[i]);
            sum_[k].add(static_cast<double>(l[i]));
            ++count_[k];
        }
        ++replicates_;
    }

    /// Err^(1): mean over rows out of bag at least once of their mean out-of-bag loss.
    double leave_one_out_error() const {
        detail::compensated_sum s;
        std::size_t used = 0;
        for (std::size_t i = 0; i < sum_.size(); ++i)
            if (count_[i] > 0) {
                s.add(sum_[i].value() / static_cast<double>(count_[i]));
                ++used;
            }
        if (used == 0)
            detail::fail_undefined("heldout::out_of_bag_losses", "no row was ever out of bag");
        return s.value() / static_cast<double>(used);
    }

    /// Efron 1983's pooled eps0: all out-of-bag losses over all out-of-bag cases.
    double pooled_error() const {
        detail::compensated_sum s;
        std::uint64_t cases = 0;
        for (std::size_t i = 0; i < sum_.size(); ++i) {
            s.merge(sum_[i]);
            cases += count_[i];
        }
        if (cases == 0)
            detail::fail_undefined("heldout::out_of_bag_losses", "no row was ever out of bag");
        return s.value() / static_cast<double>(cases);
    }

    std::size_t rows() const noexcept { return sum_.size(); }
    std::size_t replicates() const noexcept { return replicates_; }
    /// Rows never out of bag (dropped from Err^(1)).
    std::size_t never_out_of_bag() const noexcept {
        return static_cast<std::size_t>(std::count(count_.begin(), count_.end(), std::uint64_t{0}));
    }
    /// Times row i was out of bag.
    std::uint64_t out_of_bag_count(std::size_t i) const { return count_.at(i); }

private:
    std::vector<detail::compensated_sum> sum_;
    std::vector<std::uint64_t> count_;
    std::size_t replicates_ = 0;
};

/// The .632 and .632+ estimates with their ingredients.
struct bootstrap_632_result {
    double apparent = 0;             ///< resubstitution error err
    double leave_one_out = 0;        ///< Err^(1) as given
    double no_information = 0;       ///< gamma
    double leave_one_out_capped = 0; ///< Err^(1)' = min(Err^(1), gamma)
    double relative_overfitting = 0; ///< R' in [0, 1]
    double weight = 0;               ///< w = 0.632 / (1 - 0.368 R')
    double err_632 = 0;              ///< 0.368 err + 0.632 Err^(1)
    double err_632_plus = 0;         ///< .632 + (Err^(1)' - err) 0.368 0.632 R'/(1 - 0.368 R'), E&T 1997 eq. (32)
};

/// .632 and .632+ from apparent error, leave-one-out bootstrap error and no-information error.
inline bootstrap_632_result bootstrap_632(double apparent, double leave_one_out, double no_information) {
    constexpr std::string_view who = "heldout::bootstrap_632";
    if (!std::isfinite(apparent))
        detail::fail(who, "apparent", "not finite");
    if (!std::isfinite(leave_one_out))
        detail::fail(who, "leave_one_out", "not finite");
    if (!std::isfinite(no_information))
        detail::fail(who, "no_information", "not finite");
    constexpr double w0 = bootstrap_632_weight;
    constexpr double w1 = 1.0 - bootstrap_632_weight;
    bootstrap_632_result r;
    r.apparent = apparent;
    r.leave_one_out = leave_one_out;
    r.no_information = no_information;
    r.err_632 = w1 * apparent + w0 * leave_one_out;
    r.leave_one_out_capped = std::min(leave_one_out, no_information);
    r.relative_overfitting = (leave_one_out > apparent && no_information > apparent)
                                 ? (r.leave_one_out_capped - apparent) / (no_information - apparent)
                                 : 0.0;
    r.weight = w0 / (1.0 - w1 * r.relative_overfitting);
    // eq. (32): the correction goes on the unclipped .632 (see the header comment for why
    // the weighted form is not used). R = 0 leaves .632 as it is.
    r.err_632_plus = r.err_632 + (r.leave_one_out_capped - apparent) * w1 * w0 * r.relative_overfitting /
                                     (1.0 - w1 * r.relative_overfitting);
    return r;
}

/// No-information error rate for 0/1 loss: sum_k p_k (1 - q_k) over classes 0..k-1.
template <label_range T, label_range F>
double no_information_error_rate(const T& truth, const F& predicted) {
    constexpr std::string_view who = "heldout::no_information_error_rate";
    auto t = values_of(truth, who, "truth");
    auto f = values_of(predicted, who, "predicted");
    detail::check_nonempty(who, "truth", t.size());
    detail::check_same_size(who, "predicted", t.size(), f.size());
    detail::check_labels(who, "truth", t, 0);
    detail::check_labels(who, "predicted", f, 0);
    std::size_t k = 0;
    for (std::size_t i = 0; i < t.size(); ++i)
        k = std::max({k, static_cast<std::size_t>(t[i]) + 1, static_cast<std::size_t>(f[i]) + 1});
    std::vector<std::uint64_t> p(k, 0), q(k, 0);
    for (std::size_t i = 0; i < t.size(); ++i) {
        ++p[static_cast<std::size_t>(t[i])];
        ++q[static_cast<std::size_t>(f[i])];
    }
    // gamma = 1 - sum_k p_k q_k, computed from integer counts.
    const double n = static_cast<double>(t.size());
    double agree = 0;
    for (std::size_t c = 0; c < k; ++c)
        agree += static_cast<double>(p[c]) * static_cast<double>(q[c]);
    return 1.0 - agree / (n * n);
}

/// No-information squared error: mean y^2 + mean f^2 - 2 mean y mean f.
template <real_range T, real_range F>
double no_information_squared_error(const T& truth, const F& prediction) {
    constexpr std::string_view who = "heldout::no_information_squared_error";
    auto t = values_of(truth, who, "truth");
    auto f = values_of(prediction, who, "prediction");
    detail::check_nonempty(who, "truth", t.size());
    detail::check_same_size(who, "prediction", t.size(), f.size());
    detail::check_finite(who, "truth", t);
    detail::check_finite(who, "prediction", f);
    // (1/n^2) sum_i sum_j (y_i - f_j)^2 = var_pop(y) + var_pop(f) + (mean y - mean f)^2,
    // the same closed form arranged without cancellation.
    detail::compensated_sum sy, sf;
    for (std::size_t i = 0; i < t.size(); ++i) {
        sy.add(static_cast<double>(t[i]));
        sf.add(static_cast<double>(f[i]));
    }
    const double n = static_cast<double>(t.size());
    const double my = sy.value() / n, mf = sf.value() / n;
    detail::compensated_sum vy, vf;
    for (std::size_t i = 0; i < t.size(); ++i) {
        const double dy = static_cast<double>(t[i]) - my, df = static_cast<double>(f[i]) - mf;
        vy.add(dy * dy);
        vf.add(df * df);
    }
    return vy.value() / n + vf.value() / n + (my - mf) * (my - mf);
}

/// No-information error for any pointwise loss: the O(n^2) double sum (1/n^2) sum_i sum_j L(y_i, f_j).
template <pointwise_loss L, value_range T, real_range F>
double no_information_error(const L& loss, const T& truth, const F& prediction) {
    constexpr std::string_view who = "heldout::no_information_error";
    auto t = values_of(truth, who, "truth");
    auto f = values_of(prediction, who, "prediction");
    detail::check_nonempty(who, "truth", t.size());
    detail::check_same_size(who, "prediction", t.size(), f.size());
    detail::check_finite(who, "truth", t);
    detail::check_finite(who, "prediction", f);
    detail::compensated_sum s;
    for (std::size_t i = 0; i < t.size(); ++i) {
        double row = 0;
        for (std::size_t j = 0; j < f.size(); ++j)
            row += loss.value(static_cast<double>(t[i]), static_cast<double>(f[j]));
        s.add(row);
    }
    const double n = static_cast<double>(t.size());
    const double g = s.value() / (n * n);
    if (!std::isfinite(g))
        detail::fail(who, "prediction", "loss is not finite for some pair (y_i, f_j)");
    return g;
}

HELDOUT_NAMESPACE_END
