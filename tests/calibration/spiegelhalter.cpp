// Tests for heldout/calibration/spiegelhalter.hpp: Spiegelhalter's (1986) z test.
#include <heldout/calibration/spiegelhalter.hpp>

#include "support/reference.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <random>
#include <string>
#include <vector>

TEST_SUITE("calibration/spiegelhalter") {
    TEST_CASE("worked example: z = sum (y - p)(1 - 2p) / sqrt(sum (1 - 2p)^2 p (1 - p))") {
        const std::vector<int> y{1, 0, 1};
        const std::vector<double> p{0.8, 0.3, 0.4};
        // numerator (0.2)(-0.6) + (-0.3)(0.4) + (0.6)(0.2) = -0.12; variance
        // 0.36 * 0.16 + 0.16 * 0.21 + 0.04 * 0.24 = 0.0576 + 0.0336 + 0.0096 = 0.1008
        const auto r = heldout::spiegelhalter_test(y, p);
        CHECK(r.z == doctest::Approx(-0.12 / std::sqrt(0.1008)).epsilon(1e-14));
        CHECK(r.p_value == doctest::Approx(std::erfc(0.12 / std::sqrt(0.1008) / std::sqrt(2.0))).epsilon(1e-12));
        CHECK(r.n == 3);
    }
    TEST_CASE("live reference: the paper's formula in base R, 2 pnorm(-|z|)") {
        // Source: tests/reference/ref_calibration.R (Spiegelhalter 1986, Stat. Med. 5:421-433).
        heldout_test::reference_table ref("ref_calibration");
        for (const std::string c : {"big", "weighted", "small", "extreme"}) {
            CAPTURE(c);
            const auto r = heldout::spiegelhalter_test(ref.get_as<int>(c + ".y"), ref.get(c + ".p"));
            const auto e = ref.get("R." + c + ".spiegelhalter");
            CHECK(heldout_test::close(r.z, e[0], 1e-12));
            CHECK(heldout_test::close(r.p_value, e[1], 1e-9));
        }
    }
    TEST_CASE("calibrated probabilities: the test rejects at about its level (2000 seeded sets of 200)") {
        // Under calibration z is close to N(0, 1): a 5% test rejects about 5% of the time; the
        // binomial sd of the share over 2000 sets is 0.5%, so [3%, 7%] is a 4-sd band.
        std::mt19937_64 g(1986);
        std::uniform_real_distribution<double> u;
        int rejected = 0;
        for (int s = 0; s < 2000; ++s) {
            std::vector<double> p(200);
            std::vector<int> y(200);
            for (std::size_t i = 0; i < 200; ++i) {
                p[i] = 0.05 + 0.9 * u(g);
                y[i] = u(g) < p[i] ? 1 : 0;
            }
            rejected += heldout::spiegelhalter_test(y, p).p_value < 0.05 ? 1 : 0;
        }
        CHECK(rejected > 60);
        CHECK(rejected < 140);
    }
    TEST_CASE("bad input and the undefined case") {
        CHECK_THROWS_WITH_AS(heldout::spiegelhalter_test(std::vector<int>{1, 0}, std::vector<double>{0.5, 0.5}),
                             "heldout::spiegelhalter_test: undefined: every probability is 0, 1/2 or 1: the statistic "
                             "has no variance",
                             heldout::undefined_error);
        CHECK_THROWS_WITH_AS(heldout::spiegelhalter_test(std::vector<int>{1, 3}, std::vector<double>{0.5, 0.2}),
                             "heldout::spiegelhalter_test: argument 'truth': label outside the classes 0..1 at index 1",
                             heldout::input_error);
        CHECK_THROWS_AS(heldout::spiegelhalter_test(std::vector<int>{1, 0}, std::vector<double>{0.5, -0.2}),
                        heldout::input_error);
        CHECK_THROWS_AS(heldout::spiegelhalter_test(std::vector<int>{}, std::vector<double>{}), heldout::input_error);
    }
}
