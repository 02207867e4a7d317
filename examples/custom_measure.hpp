// examples/custom_measure.hpp — a measure of one's own with a parameter, in about twenty
// lines: the share of predictions that miss the truth by more than a tolerance. Written as a
// pointwise loss, its mean heldout::measure::mean_loss<miss> is a full measure: evaluate,
// the aggregator and its intervals, compare, serialisation (the tolerance travels in the
// bytes and is part of the identity) and evaluate_parallel all work, with weights that may
// have any scale. examples/custom_measure.cpp shows each use; tests/core/custom_measure.cpp
// checks them. DEVELOPERS.md says how to write a measure that is not a mean of rows.
#pragma once

#include <heldout/heldout.hpp>

#include <cmath>
#include <string>
#include <string_view>

struct miss {
    static constexpr std::string_view name = "miss";              // identity in bytes: "mean_loss/miss"
    static constexpr std::string_view measure_name = "miss rate"; // the mean's printed name
    double tolerance = 1.0;                                       // a parameter

    bool operator==(const miss&) const = default; // the parameter is part of the identity
    std::string parameters_text() const { return "tolerance " + heldout::detail::number_text(tolerance); }
    void validate(std::string_view who) const {
        if (!(tolerance >= 0) || !std::isfinite(tolerance))
            throw heldout::input_error(std::string(who) + ": argument 'tolerance': must be finite and >= 0");
    }
    template <class F>
    void visit_state(F&& f) {
        f(tolerance);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(tolerance);
    }

    double value(double y, double f) const { return std::abs(y - f) > tolerance ? 1.0 : 0.0; }
};

using miss_rate = heldout::measure::mean_loss<miss>;
