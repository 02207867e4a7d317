// Tests for heldout/loss/zero_one.hpp: the 0-1 loss of a thresholded score.
#include <heldout/loss/zero_one.hpp>
#include <heldout/measure/mean_loss.hpp>

#include <doctest/doctest.h>

#include <vector>

TEST_SUITE("loss/zero_one") {
    TEST_CASE("worked values: predicted class 1 where f >= threshold") {
        const heldout::loss::zero_one l; // threshold 0 (logits, margins)
        CHECK(l.value(1.0, 0.3) == 0.0);
        CHECK(l.value(0.0, 0.3) == 1.0);
        CHECK(l.value(1.0, -0.3) == 1.0);
        CHECK(l.value(0.0, -0.3) == 0.0);
        CHECK(l.value(1.0, 0.0) == 0.0); // f == threshold predicts 1 (as heldout::labels_at)
        const heldout::loss::zero_one half{0.5};
        CHECK(half.value(1.0, 0.4) == 1.0);
        CHECK(half.value(1.0, 0.5) == 0.0);
    }
    TEST_CASE("it is a pointwise loss but not a differentiable one") {
        static_assert(heldout::pointwise_loss<heldout::loss::zero_one>);
        static_assert(!heldout::differentiable_loss<heldout::loss::zero_one>);
        CHECK(heldout::loss_truth_v<heldout::loss::zero_one> == heldout::truth_kind::binary);
    }
    TEST_CASE("averaged, it is the error rate at the threshold: 2 wrong of 5") {
        using M = heldout::measure::mean_loss<heldout::loss::zero_one>;
        const std::vector<int> y{1, 0, 1, 0, 1};
        const std::vector<double> f{0.9, 0.2, -0.1, -3.0, 0.0}; // wrong: rows 1 (0.2 >= 0) and 2
        CHECK(heldout::evaluate(M{}, y, f) == 0.4);
        const std::vector<int> bad{1, 0, 2, 0, 1};
        CHECK_THROWS_WITH_AS(heldout::evaluate(M{}, bad, f),
                             "measure mean 0-1 loss: argument 'truth': label 2 outside the classes 0..1 at index 2",
                             heldout::input_error);
    }
}
