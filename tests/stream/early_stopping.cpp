// Tests for heldout/stream/early_stopping.hpp, on scripted validation curves.
#include <heldout/measure/mean_loss.hpp>
#include <heldout/stream/early_stopping.hpp>

#include <doctest/doctest.h>

#include <limits>
#include <vector>

namespace {
struct higher_measure { // a minimal higher-is-better measure, to take the direction from
    static constexpr heldout::direction better = heldout::direction::higher_is_better;
    static constexpr heldout::prediction_kind kind = heldout::prediction_kind::real;
    std::string name() const { return "score"; }
    auto accumulator() const { return heldout::measure::mse{}.accumulator(); }
};
} // namespace

TEST_SUITE("stream/early_stopping") {
    TEST_CASE("a scripted loss curve stops after patience epochs without improvement") {
        // epoch:          0    1    2    3     4     5     6
        // best so far:   1.0  0.8  0.6  0.6   0.55  0.55  0.55
        // waited:         0    0    0    1     0     1     2  -> with patience 3, not yet
        // epoch 7: 0.60 -> waited 3 -> stop; best epoch 4 (0.55)
        const std::vector<double> curve{1.0, 0.8, 0.6, 0.61, 0.55, 0.58, 0.57, 0.60, 0.40};
        heldout::early_stopping stop{heldout::measure::mse{}, {.patience = 3, .min_improvement = 0}};
        std::size_t stopped_at = 0;
        for (std::size_t e = 0; e < curve.size(); ++e)
            if (stop.update(curve[e])) {
                stopped_at = e;
                break;
            }
        CHECK(stopped_at == 7);
        CHECK(stop.best_epoch() == 4);
        CHECK(stop.best_value() == 0.55);
        CHECK(stop.stopped());
    }
    TEST_CASE("min_improvement: gains at or below it do not count") {
        heldout::early_stopping stop{heldout::direction::lower_is_better, {.patience = 2, .min_improvement = 0.05}};
        CHECK_FALSE(stop.update(1.00)); // epoch 0: best 1.00
        CHECK_FALSE(stop.update(0.96)); // gain 0.04 <= 0.05: waited 1
        CHECK_FALSE(stop.update(0.90)); // gain 0.10 > 0.05: best 0.90, epoch 2
        CHECK_FALSE(stop.update(0.86)); // gain 0.04: waited 1
        CHECK(stop.update(0.85));       // gain 0.05, not more: waited 2 -> stop
        CHECK(stop.best_epoch() == 2);
    }
    TEST_CASE("direction comes from the measure: higher is better") {
        heldout::early_stopping stop{higher_measure{}, {.patience = 1}};
        CHECK_FALSE(stop.update(0.70));
        CHECK_FALSE(stop.update(0.75));
        CHECK(stop.update(0.74));
        CHECK(stop.best_value() == 0.75);
        CHECK(stop.best_epoch() == 1);
    }
    TEST_CASE("bad input and empty state are refused clearly") {
        CHECK_THROWS_WITH_AS(heldout::early_stopping(heldout::direction::lower_is_better, {.patience = 0}),
                             "heldout::early_stopping: argument 'patience': must be at least 1", heldout::input_error);
        CHECK_THROWS_AS(heldout::early_stopping(heldout::direction::lower_is_better, {.min_improvement = -1}),
                        heldout::input_error);
        heldout::early_stopping stop{heldout::direction::lower_is_better};
        CHECK_THROWS_AS((void)stop.best_epoch(), heldout::input_error);
        stop.update(1.0);
        CHECK_THROWS_WITH_AS(stop.update(std::numeric_limits<double>::quiet_NaN()),
                             "heldout::early_stopping::update: argument 'value': NaN at index 1", heldout::input_error);
    }
}
