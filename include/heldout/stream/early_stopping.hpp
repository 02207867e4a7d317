// heldout/stream/early_stopping.hpp — stop training once a validation measure stops improving.
//
//   heldout::early_stopping stop{heldout::measure::mse{}, {.patience = 3, .min_improvement = 0}};
//   for (std::size_t epoch = 0;; ++epoch) {
//       train_one_epoch();
//       if (stop.update(validation_mse())) break;   // true once 3 epochs in a row did not improve
//   }
//   restore(stop.best_epoch());                      // 0-based; stop.best_value() is its value
//
// An epoch improves when its value beats the best so far by more than min_improvement in the
// measure's direction (lower or higher is better; for a measure with an ideal value, such as
// the calibration slope, closer to the ideal). update() returns true once `patience`
// consecutive epochs have not improved, and keeps returning true after that.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/measure.hpp>

#include <cmath>
#include <cstddef>

HELDOUT_NAMESPACE_BEGIN

/// Options of early_stopping.
struct early_stopping_options {
    std::size_t patience = 3;     ///< epochs without improvement before stopping (>= 1)
    double min_improvement = 0.0; ///< an improvement must exceed this (>= 0)
};

/// Patience-based early stopping on a per-epoch validation value.
class early_stopping {
public:
    /// Direction taken from the measure.
    template <outer_measure M>
    early_stopping(const M&, early_stopping_options options = {}) : early_stopping(M::better, options) {
        if constexpr (has_ideal_v<M>)
            ideal_ = ideal_value_v<M>;
    }

    explicit early_stopping(direction better, early_stopping_options options = {})
        : better_(better), options_(options) {
        if (options_.patience == 0)
            detail::fail("heldout::early_stopping", "patience", "must be at least 1");
        if (!(options_.min_improvement >= 0.0) || !std::isfinite(options_.min_improvement))
            detail::fail("heldout::early_stopping", "min_improvement", "must be finite and non-negative");
    }

    /// Records the value of the next epoch; true when training should stop.
    bool update(double value) {
        if (!std::isfinite(value))
            detail::fail_at("heldout::early_stopping::update", "value", std::isnan(value) ? "NaN" : "infinite",
                            epochs_);
        if (epochs_ == 0 || improves(value)) {
            best_value_ = value;
            best_epoch_ = epochs_;
            waited_ = 0;
        } else {
            ++waited_;
        }
        ++epochs_;
        return waited_ >= options_.patience;
    }

    /// True once patience ran out.
    bool stopped() const noexcept { return epochs_ > 0 && waited_ >= options_.patience; }
    /// 0-based epoch of the best value.
    std::size_t best_epoch() const {
        require_epoch();
        return best_epoch_;
    }
    double best_value() const {
        require_epoch();
        return best_value_;
    }
    /// Epochs recorded so far.
    std::size_t epochs() const noexcept { return epochs_; }
    /// Epochs since the last improvement.
    std::size_t epochs_without_improvement() const noexcept { return waited_; }
    void reset() noexcept { epochs_ = best_epoch_ = waited_ = 0; }

private:
    bool improves(double v) const noexcept {
        if (better_ == direction::toward_ideal)
            return distance_from_ideal(v, ideal_) < distance_from_ideal(best_value_, ideal_) - options_.min_improvement;
        return better_ == direction::lower_is_better ? v < best_value_ - options_.min_improvement
                                                     : v > best_value_ + options_.min_improvement;
    }
    void require_epoch() const {
        if (epochs_ == 0)
            detail::fail("heldout::early_stopping", "", "no epoch recorded yet");
    }

    direction better_;
    double ideal_ = 0.0; // toward_ideal: the measure's ideal value (0 when given a direction alone)
    early_stopping_options options_;
    double best_value_ = 0.0;
    std::size_t best_epoch_ = 0;
    std::size_t waited_ = 0;
    std::size_t epochs_ = 0;
};

HELDOUT_NAMESPACE_END
