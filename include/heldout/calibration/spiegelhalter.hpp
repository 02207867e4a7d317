// heldout/calibration/spiegelhalter.hpp — Spiegelhalter's z test of calibration.
//
//   auto s = heldout::spiegelhalter_test(y, p);
//   s.z; s.p_value;   // two-sided; a small p-value: the probabilities are not calibrated
//
// Spiegelhalter DJ (1986) "Probabilistic prediction in patient management and clinical
// trials", Statistics in Medicine 5:421-433. Under the hypothesis that every p_i is the true
// P(y_i = 1), the Brier score's deviation from its expectation, standardised, is
//   z = sum_i (y_i - p_i)(1 - 2 p_i) / sqrt( sum_i (1 - 2 p_i)^2 p_i (1 - p_i) ),
// approximately standard normal; the p-value is 2 (1 - Phi(|z|)). Probabilities in [0, 1];
// undefined_error when the denominator is 0 (every p in {0, 1/2, 1}: no variance to test).
// The test looks at the Brier score as a whole, so it can miss miscalibration that
// discrimination offsets; read it beside the calibration slope and the reliability table.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/values.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/detail/validate.hpp>
#include <heldout/estimate/t_interval.hpp>

#include <cmath>
#include <cstddef>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN

/// Spiegelhalter's z and its two-sided p-value.
struct spiegelhalter_result {
    double z = 0;
    double p_value = 1;
    std::size_t n = 0;
};

/// Spiegelhalter's (1986) z test that probabilities p are calibrated for 0/1 truth.
template <value_range T, real_range P>
spiegelhalter_result spiegelhalter_test(const T& truth, const P& probability) {
    constexpr std::string_view who = "heldout::spiegelhalter_test";
    const auto t = values_of(truth, who, "truth");
    const auto p = values_of(probability, who, "probability");
    detail::check_nonempty(who, "truth", t.size());
    detail::check_same_size(who, "probability", t.size(), p.size());
    for (std::size_t i = 0; i < t.size(); ++i)
        if (!(t[i] == 0 || t[i] == 1))
            detail::fail_at(who, "truth", "label outside the classes 0..1", i);
    detail::check_probabilities(who, "probability", p);
    detail::compensated_sum num, var;
    for (std::size_t i = 0; i < t.size(); ++i) {
        const double pi = static_cast<double>(p[i]);
        const double y = t[i] == 1 ? 1.0 : 0.0;
        const double c = 1.0 - 2.0 * pi;
        num.add((y - pi) * c);
        var.add(c * c * pi * (1.0 - pi));
    }
    if (!(var.value() > 0))
        detail::fail_undefined(who, "every probability is 0, 1/2 or 1: the statistic has no variance");
    spiegelhalter_result r;
    r.n = t.size();
    r.z = num.value() / std::sqrt(var.value());
    r.p_value = std::min(1.0, 2.0 * detail::normal_cdf(-std::abs(r.z)));
    return r;
}

HELDOUT_NAMESPACE_END
