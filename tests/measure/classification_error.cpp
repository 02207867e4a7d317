// Tests for heldout/measure/classification_error.hpp: misclassification rate and accuracy.
#include <heldout/measure/classification_error.hpp>
#include <heldout/stream/serialize.hpp>

#include "support/measure_checks.hpp"
#include "support/reference.hpp"

#include <Eigen/Dense>
#include <doctest/doctest.h>

#include <array>
#include <cstdint>
#include <exception>
#include <limits>
#include <random>
#include <span>
#include <string>
#include <vector>

using heldout::evaluate;
using heldout::measure::accuracy;
using heldout::measure::classification_error;

using heldout_test::message_of;

namespace {
// The shared bytes round trip with weights in the second batch, and the exact wording of the
// empty accumulator's message.
template <class M>
void check_bytes_round_trip(const M& m, int bad_label) {
    const std::vector<int> y{0, 1, 2, 2, 1}, f{0, 2, 2, 1, 1};
    const std::vector<int> y2{2, 0}, f2{2, 1};
    const std::vector<double> w2{0.75, 2.5};
    const std::string empty = heldout_test::check_bytes_round_trip(m, y, f, y2, f2, bad_label, w2);
    CHECK(empty == m.message_name().insert(0, "measure ") + ": undefined: no observations");
}
} // namespace

TEST_SUITE("measure/classification_error") {
    TEST_CASE("worked example: 2 mismatches out of 5, weighted 5 out of 15") {
        // mismatches at indices 1 and 4
        const std::vector<int> y{0, 1, 2, 1, 2};
        const std::vector<int> f{0, 2, 2, 1, 0};
        CHECK(evaluate(classification_error{}, y, f) == doctest::Approx(0.4).epsilon(1e-15));
        CHECK(evaluate(accuracy{}, y, f) == doctest::Approx(0.6).epsilon(1e-15));
        // weights 1..5: mismatch weight 2 + 5 = 7 out of 15
        const std::vector<double> w{1, 2, 3, 4, 5};
        CHECK(evaluate(classification_error{}, y, f, w) == doctest::Approx(7.0 / 15).epsilon(1e-15));
        CHECK(evaluate(accuracy{}, y, f, w) == doctest::Approx(8.0 / 15).epsilon(1e-15));
        CHECK(classification_error{}.name() == "classification error");
        CHECK(accuracy{}.name() == "accuracy");
        CHECK(classification_error::better == heldout::direction::lower_is_better);
        CHECK(accuracy::better == heldout::direction::higher_is_better);
        CHECK(accuracy::kind == heldout::prediction_kind::label);
        CHECK(heldout::outer_measure<accuracy>);
        CHECK(heldout::outer_measure<classification_error>);
    }

    TEST_CASE("check value: accuracy 0.85 for TP = 20, FN = 10, FP = 5, TN = 65") {
        // Binary check of worked by hand from the published formula (self-written reference of the count formula):
        // accuracy = (20 + 65) / 100.
        std::vector<int> y, f;
        auto put = [&](int t, int p, int n) {
            for (int i = 0; i < n; ++i) {
                y.push_back(t);
                f.push_back(p);
            }
        };
        put(1, 1, 20);
        put(1, 0, 10);
        put(0, 1, 5);
        put(0, 0, 65);
        CHECK(evaluate(accuracy{}, y, f) == doctest::Approx(0.85).epsilon(1e-15));
        CHECK(evaluate(classification_error{}, y, f) == doctest::Approx(0.15).epsilon(1e-15));
    }

    TEST_CASE("live reference: numpy.average of the mismatch vector, random labels with weights") {
        heldout_test::reference_table ref("ref_labels");
        const int cases = static_cast<int>(ref.scalar("cases"));
        for (int c = 0; c < cases; ++c) {
            const std::string p = "case" + std::to_string(c) + ".";
            const auto yi = ref.get_as<int>(p + "truth");
            const auto fi = ref.get_as<int>(p + "prediction");
            const auto y8 = ref.get_as<std::uint8_t>(p + "truth");
            const auto f8 = ref.get_as<std::uint8_t>(p + "prediction");
            const auto w = ref.get(p + "weights");
            // numpy.average(y != f) and numpy.average(y != f, weights=w)
            CHECK(heldout_test::close(evaluate(classification_error{}, yi, fi), ref.scalar(p + "u.error")));
            CHECK(heldout_test::close(evaluate(classification_error{}, y8, f8), ref.scalar(p + "u.error")));
            CHECK(heldout_test::close(evaluate(accuracy{}, y8, fi), ref.scalar(p + "u.accuracy")));
            CHECK(heldout_test::close(evaluate(classification_error{}, y8, f8, w), ref.scalar(p + "w.error")));
            CHECK(heldout_test::close(evaluate(accuracy{.classes = 5}, yi, f8, w), ref.scalar(p + "w.accuracy")));
        }
    }

    TEST_CASE("the byte-lane path equals a plain loop across block boundaries (self-written reference)") {
        std::mt19937_64 g(3); // test data only
        std::uniform_int_distribution<int> d(0, 4);
        for (std::size_t n : {1u, 31u, 32u, 33u, 8160u, 8161u, 16320u, 40000u}) {
            std::vector<std::uint8_t> y(n), f(n);
            std::vector<std::int8_t> ys(n), fs(n);
            std::size_t mism = 0;
            for (std::size_t i = 0; i < n; ++i) {
                ys[i] = static_cast<std::int8_t>(y[i] = static_cast<std::uint8_t>(d(g)));
                fs[i] = static_cast<std::int8_t>(f[i] = static_cast<std::uint8_t>(i % 3 ? y[i] : d(g)));
                mism += y[i] != f[i];
            }
            const double expect = static_cast<double>(mism) / static_cast<double>(n);
            auto a = classification_error{}.accumulator();
            a.add(y, f);
            CHECK(a.mismatch_weight() == static_cast<double>(mism)); // exact count
            CHECK(a.value() == doctest::Approx(expect).epsilon(1e-15));
            CHECK(evaluate(classification_error{.classes = 5}, ys, fs) == doctest::Approx(expect).epsilon(1e-15));
            CHECK(evaluate(classification_error{}, ys, f) == doctest::Approx(expect).epsilon(1e-15));
        }
    }

    TEST_CASE("labels of any integral type; no table, so any number of classes") {
        const std::array<bool, 4> yb{true, false, true, true};
        const std::array<bool, 4> fb{true, true, false, true};
        CHECK(evaluate(accuracy{}, yb, fb) == 0.5);
        const std::vector<std::int64_t> big{1'000'000'000'000, 7, 3};
        const std::vector<std::int64_t> big2{1'000'000'000'000, 8, 3};
        CHECK(evaluate(classification_error{}, big, big2) == doctest::Approx(1.0 / 3));
        Eigen::VectorXi yv(3), fv(3);
        yv << 0, 1, 2;
        fv << 0, 1, 1;
        CHECK(evaluate(accuracy{}, yv, fv) == doctest::Approx(2.0 / 3));
        const std::vector<std::uint16_t> u16{0, 65535};
        CHECK(evaluate(accuracy{}, u16, u16) == 1.0);
    }

    TEST_CASE("batches, single observations and merges give the same value") {
        std::mt19937_64 g(5);
        std::uniform_int_distribution<int> d(0, 2);
        std::uniform_real_distribution<double> u(0.0, 3.0);
        const std::size_t n = 3000;
        std::vector<int> y(n), f(n);
        std::vector<double> w(n);
        for (std::size_t i = 0; i < n; ++i) {
            y[i] = d(g);
            f[i] = d(g);
            w[i] = u(g);
        }
        const double whole = evaluate(classification_error{}, y, f, w);
        auto a = classification_error{}.accumulator();
        auto b = classification_error{}.accumulator();
        a.add(std::span(y).first(999), std::span(f).first(999), std::span(w).first(999));
        b.add(std::span(y).subspan(999), std::span(f).subspan(999), std::span(w).subspan(999));
        a.merge(b);
        CHECK(a.value() == doctest::Approx(whole).epsilon(1e-15));
        auto c = accuracy{}.accumulator();
        for (std::size_t i = 0; i < n; ++i)
            c.add_one(y[i], f[i], w[i]);
        CHECK(c.value() == doctest::Approx(1 - whole).epsilon(1e-14));
        CHECK(c.count() == n);
        c.reset();
        CHECK_THROWS_WITH_AS((void)c.value(), "measure accuracy: undefined: no observations", heldout::undefined_error);
    }

    TEST_CASE("bad input and undefined values") {
        using heldout::input_error;
        const std::vector<int> y{0, 1, 2};
        const std::vector<int> two{0, 1};
        CHECK_THROWS_WITH_AS(
            evaluate(classification_error{}, y, two),
            "measure classification error: argument 'prediction': size 2 differs from size 3 of 'truth'", input_error);
        const std::vector<int> empty;
        CHECK_THROWS_WITH_AS(evaluate(accuracy{}, empty, empty), "measure accuracy: argument 'truth': empty input",
                             input_error);
        const std::vector<int> neg{0, -1, 2};
        CHECK_THROWS_WITH_AS(evaluate(accuracy{}, y, neg),
                             "measure accuracy: argument 'prediction': label -1 is negative at index 1", input_error);
        const std::vector<std::int8_t> neg8{0, 1, -3};
        CHECK_THROWS_WITH_AS(evaluate(accuracy{}, neg8, neg8),
                             "measure accuracy: argument 'truth': label -3 is negative at index 2", input_error);
        CHECK_THROWS_WITH_AS(evaluate(classification_error{.classes = 2}, y, y),
                             "measure classification error: argument 'truth': label 2 outside the classes 0..1 at "
                             "index 2",
                             input_error);
        const std::vector<std::uint8_t> y8{0, 1, 1};
        const std::vector<std::uint8_t> f8{0, 1, 9};
        CHECK_THROWS_WITH_AS(evaluate(classification_error{.classes = 2}, y8, f8, std::vector<double>{1, 1, 1}),
                             "measure classification error: argument 'prediction': label 9 outside the classes 0..1 "
                             "at index 2",
                             input_error);
        CHECK_THROWS_WITH_AS(evaluate(accuracy{}, y, y, std::vector<double>{1, 1, -2}),
                             "measure accuracy: argument 'weights': negative weight -2 at index 2", input_error);
        CHECK_THROWS_WITH_AS(
            evaluate(accuracy{}, y, y, std::vector<double>{std::numeric_limits<double>::infinity(), 1, 1}),
            "measure accuracy: argument 'weights': not finite (inf) at index 0", input_error);
        auto acc = accuracy{.classes = 3}.accumulator();
        CHECK_THROWS_WITH_AS(acc.add_one(3, 0),
                             "measure accuracy: argument 'truth': label 3 outside the classes 0..2 at index 0",
                             input_error);
        CHECK_THROWS_AS(acc.add_one(0, 0, std::numeric_limits<double>::quiet_NaN()), input_error);
        CHECK_THROWS_WITH_AS(evaluate(accuracy{}, y, y, std::vector<double>{0, 0, 0}),
                             "measure accuracy: undefined: total weight is zero", heldout::undefined_error);
    }

    TEST_CASE("serialize / deserialize keep the value, the classes and the name") {
        // self-consistency: the copy from bytes behaves as the original on the same rows
        check_bytes_round_trip(classification_error{}, -1);
        check_bytes_round_trip(accuracy{}, -1);
        check_bytes_round_trip(classification_error{.classes = 3}, 3); // 3 stays outside the classes
        check_bytes_round_trip(accuracy{.classes = 3}, 3);
        // the two share a layout but not a key: bytes of one are refused as the other
        auto a = accuracy{}.accumulator();
        a.add_one(1, 1);
        using error_acc = decltype(classification_error{}.accumulator());
        CHECK_THROWS_WITH_AS((void)heldout::deserialize<error_acc>(heldout::serialize(a)),
                             "heldout::deserialize: argument 'bytes': the bytes hold the state of 'accuracy', not "
                             "of 'classification_error'",
                             heldout::input_error);
    }
}
