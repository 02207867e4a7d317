// Tests for heldout/core/measure.hpp: the measure concept, directions, and evaluate().
#include <heldout/core/measure.hpp>
#include <heldout/measure/mean_loss.hpp>

#include <doctest/doctest.h>

#include <string>
#include <vector>

namespace {
// A user's own measure: the share of predictions within 0.5 of the truth.
struct within_half {
    static constexpr heldout::direction better = heldout::direction::higher_is_better;
    static constexpr heldout::prediction_kind kind = heldout::prediction_kind::real;
    std::string name() const { return "within 0.5"; }
    struct acc {
        double hits = 0, n = 0;
        template <heldout::value_range T, heldout::real_range P>
        void add(const T& t, const P& p) {
            auto a = heldout::values_of(t), b = heldout::values_of(p);
            for (std::size_t i = 0; i < a.size(); ++i) {
                hits += std::abs(double(a[i]) - double(b[i])) <= 0.5 ? 1 : 0;
                n += 1;
            }
        }
        void merge(const acc& o) { hits += o.hits, n += o.n; }
        double value() const {
            if (n == 0)
                heldout::detail::fail_undefined("measure within 0.5", "no observations");
            return hits / n;
        }
        void reset() { hits = n = 0; }
    };
    acc accumulator() const { return {}; }
};
} // namespace

TEST_SUITE("core/measure") {
    TEST_CASE("better() follows the direction") {
        CHECK(heldout::better(heldout::direction::lower_is_better, 0.1, 0.2));
        CHECK_FALSE(heldout::better(heldout::direction::lower_is_better, 0.2, 0.1));
        CHECK(heldout::better(heldout::direction::higher_is_better, 0.9, 0.8));
        CHECK_FALSE(heldout::better(heldout::direction::higher_is_better, 0.8, 0.8));
    }
    TEST_CASE("prediction kinds have readable names") {
        CHECK(heldout::to_string(heldout::prediction_kind::label) == "class label");
        CHECK(heldout::to_string(heldout::prediction_kind::class_probabilities) == "class-probability rows");
    }
    TEST_CASE("a user's own measure satisfies the concept and works with evaluate()") {
        static_assert(heldout::outer_measure<within_half>);
        static_assert(heldout::accumulator<within_half::acc>);
        const std::vector<double> y{1.0, 2.0, 3.0, 4.0};
        const std::vector<double> f{1.2, 2.9, 3.5, 4.0}; // hits: 0.2 yes, 0.9 no, 0.5 yes, 0 yes -> 3/4
        CHECK(heldout::evaluate(within_half{}, y, f) == 0.75);
    }
    TEST_CASE("the scores concept tells which pairings compile") {
        static_assert(heldout::scores<heldout::measure::mse, std::vector<double>, std::vector<double>>);
        static_assert(!heldout::scores<heldout::measure::mse, std::vector<double>, std::vector<int>>);
        static_assert(heldout::scores_weighted<heldout::measure::mse, std::vector<double>, std::vector<float>,
                                               std::vector<double>>);
        CHECK(std::is_same_v<heldout::accumulator_t<heldout::measure::mse>,
                             heldout::measure::mean_loss_accumulator<heldout::loss::squared>>);
    }
}
