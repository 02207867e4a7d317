// The custom-measure example (examples/custom_measure.hpp) works wherever heldout takes a
// measure: evaluate, weights of any scale, the aggregator and its intervals, compare,
// identity by parameters, serialisation and evaluate_parallel. Expected values are worked
// by hand from the definition (share of rows with |y - f| > tolerance).
#include "../../examples/custom_measure.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <optional>
#include <span>
#include <vector>

TEST_SUITE("core/custom_measure") {
    using namespace heldout;

    const std::vector<double> y{1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 7.0, 8.0};
    const std::vector<double> f{1.5, 2.0, 1.0, 4.9, 5.0, 9.0, 7.1, 8.0}; // misses at tolerance 0.8: rows 2, 3, 5

    TEST_CASE("evaluate, weights of any scale, bad parameters") {
        const miss_rate m{miss{.tolerance = 0.8}};
        CHECK(evaluate(m, y, f) == doctest::Approx(3.0 / 8.0));
        CHECK(evaluate(miss_rate{miss{.tolerance = 0.4}}, y, f) == doctest::Approx(4.0 / 8.0)); // row 0 too
        const std::vector<double> w{1, 1, 2, 1, 1, 3, 1, 1};
        CHECK(evaluate(m, y, f, w) == doctest::Approx((2.0 + 1.0 + 3.0) / 11.0));
        for (const double c : {1e-300, 1e-150, 1e150, 1e300}) {
            std::vector<double> wc(w);
            for (double& x : wc)
                x *= c;
            CHECK(evaluate(m, y, f, wc) == doctest::Approx((2.0 + 1.0 + 3.0) / 11.0).epsilon(1e-13));
        }
        CHECK(m.name().find("tolerance 0.8") != std::string::npos);
        CHECK_THROWS_AS(evaluate(miss_rate{miss{.tolerance = -1.0}}, y, f), input_error);
    }

    TEST_CASE("aggregator, identity by parameters, compare") {
        const miss_rate tight{miss{.tolerance = 0.4}}, loose{miss{.tolerance = 0.8}};
        const std::size_t n = y.size();
        auto predict = [&](const std::vector<double>& p) {
            return [&p](std::span<const std::size_t>, std::span<const std::size_t> test) {
                std::vector<double> out;
                for (const std::size_t i : test)
                    out.push_back(p[i]);
                return out;
            };
        };
        const auto plan = kfold{.folds = 4, .seed = 3};
        const auto a = evaluate_splits(plan.splits(n), y, predict(f), tight, loose);
        const auto b = evaluate_splits(plan.splits(n), y, predict(y), tight, loose); // a perfect model
        // 4 folds of 2 rows each: the mean of the split values equals the pooled share.
        CHECK(a.estimate(loose).value == doctest::Approx(3.0 / 8.0));
        CHECK(a.estimate(tight).value == doctest::Approx(4.0 / 8.0));
        for (const auto& v : b.split_values(loose)) // every split of the perfect model: 0
            CHECK(v.value == std::optional<double>(0.0));
        // Same type, other parameter: not tracked, refused with the tracked ones listed.
        CHECK_THROWS_AS((void)a.estimate(miss_rate{miss{.tolerance = 0.6}}), input_error);
        const comparison c = compare(a, b, loose);
        CHECK(c.difference == doctest::Approx(3.0 / 8.0));
    }

    TEST_CASE("state as bytes keeps the tolerance; evaluate_parallel") {
        const miss_rate m{miss{.tolerance = 0.8}};
        auto acc = m.accumulator();
        acc.add(y, f);
        const auto bytes = serialize(acc);
        CHECK(deserialize(bytes, m).value() == doctest::Approx(3.0 / 8.0));
        CHECK_THROWS_AS((void)deserialize(bytes, miss_rate{miss{.tolerance = 0.4}}), input_error);
        CHECK(evaluate_parallel(m, y, f, {.threads = 2}) == doctest::Approx(3.0 / 8.0));
    }
}
