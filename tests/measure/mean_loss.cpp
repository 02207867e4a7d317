// Tests for heldout/measure/mean_loss.hpp: a pointwise loss averaged into an outer measure.
#include <heldout/loss.hpp>
#include <heldout/measure/mean_loss.hpp>

#include "support/reference.hpp"

#include <Eigen/Dense>
#include <doctest/doctest.h>

#include <cmath>
#include <limits>
#include <random>
#include <span>
#include <sstream>
#include <vector>

using heldout::evaluate;
using heldout::measure::mse;

namespace {
// A user's own loss: log-cosh. It satisfies the concepts, so it works like a built-in.
struct log_cosh {
    static constexpr std::string_view name = "log-cosh";
    double value(double y, double f) const { return std::log(std::cosh(f - y)); }
    double derivative(double y, double f) const { return std::tanh(f - y); }
    double second_derivative(double y, double f) const {
        const double t = std::tanh(f - y);
        return 1 - t * t;
    }
};
// A user's own binary loss: the squared hinge, declaring 0/1 truth like the built-in ones.
struct squared_hinge {
    static constexpr std::string_view name = "squared hinge";
    static constexpr heldout::truth_kind truth = heldout::truth_kind::binary;
    double value(double y, double f) const {
        const double m = 1 - (2 * y - 1) * f;
        return m > 0 ? m * m : 0.0;
    }
    double derivative(double y, double f) const {
        const double s = 2 * y - 1, m = 1 - s * f;
        return m > 0 ? -2 * s * m : 0.0;
    }
    double second_derivative(double y, double f) const { return 1 - (2 * y - 1) * f > 0 ? 2.0 : 0.0; }
};
} // namespace

TEST_SUITE("measure/mean_loss") {
    TEST_CASE("MSE of a worked example: (0.25+0.25+0.25+0.25+1)/5 = 0.4") {
        // Arithmetic visible: errors 0.5, -0.5, 0.5, -0.5, 1.0.
        const std::vector<double> y{1.5, 2.0, 3.5, 4.0, 6.0};
        const std::vector<double> f{1.0, 2.5, 3.0, 4.5, 5.0};
        CHECK(evaluate(mse{}, y, f) == doctest::Approx(0.4).epsilon(1e-15));
        // weights 1,0,0,0,2: (0.25 + 2*1)/3 = 0.75
        const std::vector<double> w{1, 0, 0, 0, 2};
        CHECK(evaluate(mse{}, y, f, w) == doctest::Approx(0.75).epsilon(1e-15));
    }
    TEST_CASE("mse is mean_loss<loss::squared> and is a measure") {
        CHECK(std::is_same_v<mse, heldout::measure::mean_loss<heldout::loss::squared>>);
        CHECK(heldout::outer_measure<mse>);
        CHECK(mse{}.name() == "MSE");
        CHECK(mse::better == heldout::direction::lower_is_better);
        CHECK(mse::kind == heldout::prediction_kind::real);
    }
    TEST_CASE("live reference: numpy.mean / numpy.average on random data with ties and weights") {
        heldout_test::reference_table ref("ref_mean_loss");
        for (int c = 0; c < 5; ++c) {
            const std::string k = "case" + std::to_string(c) + ".";
            const auto y = ref.get(k + "truth");
            const auto f = ref.get(k + "prediction");
            const auto w = ref.get(k + "weights");
            CHECK(heldout_test::close(evaluate(mse{}, y, f), ref.scalar(k + "mse")));
            CHECK(heldout_test::close(evaluate(mse{}, y, f, w), ref.scalar(k + "wmse")));
        }
    }
    TEST_CASE("a user's own loss works everywhere a built-in one does") {
        static_assert(heldout::differentiable_loss<log_cosh>);
        using M = heldout::measure::mean_loss<log_cosh>;
        CHECK(M{}.name() == "mean log-cosh loss");
        const std::vector<double> y{0.0, 1.0};
        const std::vector<double> f{0.0, 2.0};
        CHECK(evaluate(M{}, y, f) == doctest::Approx(std::log(std::cosh(1.0)) / 2).epsilon(1e-14));
    }
    TEST_CASE("Eigen vectors, spans and floats are accepted without copies") {
        Eigen::VectorXd y(3), f(3);
        y << 1, 2, 3;
        f << 1, 2, 4;
        CHECK(evaluate(mse{}, y, f) == doctest::Approx(1.0 / 3));
        std::vector<float> yf{1.f, 2.f}, ff{2.f, 2.f};
        CHECK(evaluate(mse{}, std::span<const float>(yf), ff) == 0.5);
        std::vector<int> yi{1, 2};
        CHECK(evaluate(mse{}, yi, ff) == 0.5); // integer truth, real prediction: fine for regression
    }
    TEST_CASE("batches, single observations and merges give the same value") {
        std::mt19937_64 g(1); // test data only; the library never uses <random> engines
        std::normal_distribution<double> d;
        std::vector<double> y(5000), f(5000);
        for (std::size_t i = 0; i < y.size(); ++i) {
            y[i] = d(g);
            f[i] = d(g);
        }
        const double whole = evaluate(mse{}, y, f);
        auto a = mse{}.accumulator();
        auto b = mse{}.accumulator();
        a.add(std::span(y).first(1234), std::span(f).first(1234));
        b.add(std::span(y).subspan(1234), std::span(f).subspan(1234));
        a.merge(b);
        CHECK(a.value() == doctest::Approx(whole).epsilon(1e-15));
        auto c = mse{}.accumulator();
        for (std::size_t i = 0; i < y.size(); ++i)
            c.add_one(y[i], f[i]);
        CHECK(c.value() == doctest::Approx(whole).epsilon(1e-15));
        c.reset();
        CHECK_THROWS_AS((void)c.value(), heldout::undefined_error);
    }
    TEST_CASE("1e8 observations lose no digits (against long double)") {
        // 100 batches of 1e6 rows streamed into one accumulator; long double is the reference.
        const std::size_t batch = 1'000'000, batches = 100;
        std::vector<float> y(batch), f(batch, 0.0f);
        long double ref = 0;
        for (std::size_t i = 0; i < batch; ++i) {
            y[i] = 1.0f + static_cast<float>(i % 1000) * 1e-3f;
            const long double e = static_cast<long double>(static_cast<double>(y[i]));
            ref += e * e;
        }
        auto acc = mse{}.accumulator();
        for (std::size_t b = 0; b < batches; ++b)
            acc.add(y, f);
        const double expect = static_cast<double>(ref / batch);
        CHECK(std::abs(acc.value() - expect) <= 1e-14 * expect); // 15 significant digits kept
        float fs = 0; // a plain float accumulation over the same 1e8 terms, for contrast
        for (std::size_t b = 0; b < batches; ++b)
            for (std::size_t i = 0; i < batch; ++i)
                fs += y[i] * y[i];
        CHECK(std::abs(static_cast<double>(fs) / (batch * batches) - expect) > 1e-3 * expect);
    }
    TEST_CASE("bad input names the measure, the argument and the index") {
        const std::vector<double> y{1, 2, 3};
        std::vector<double> f{1, std::numeric_limits<double>::quiet_NaN(), 3};
        CHECK_THROWS_WITH_AS(evaluate(mse{}, y, f), "measure MSE: argument 'prediction': not finite (nan) at index 1",
                             heldout::input_error);
        f[1] = std::numeric_limits<double>::infinity();
        CHECK_THROWS_WITH_AS(evaluate(mse{}, y, f), "measure MSE: argument 'prediction': not finite (inf) at index 1",
                             heldout::input_error);
        const std::vector<double> short_f{1, 2};
        CHECK_THROWS_WITH_AS(evaluate(mse{}, y, short_f),
                             "measure MSE: argument 'prediction': size 2 differs from size 3 of 'truth'",
                             heldout::input_error);
        const std::vector<double> empty;
        CHECK_THROWS_WITH_AS(evaluate(mse{}, empty, empty), "measure MSE: argument 'truth': empty input",
                             heldout::input_error);
        const std::vector<double> ok{1, 2, 3};
        const std::vector<double> w{1, -1, 1};
        CHECK_THROWS_WITH_AS(evaluate(mse{}, y, ok, w),
                             "measure MSE: argument 'weights': negative weight -1 at index 1", heldout::input_error);
        const std::vector<double> w0{0, 0, 0};
        CHECK_THROWS_WITH_AS(evaluate(mse{}, y, ok, w0), "measure MSE: undefined: total weight is zero",
                             heldout::undefined_error);
    }
    TEST_CASE("live reference: pinball, Huber, Poisson, logistic, hinge and 0-1 through mean_loss") {
        using heldout::measure::mean_loss;
        namespace loss = heldout::loss;
        heldout_test::reference_table ref("ref_mean_loss");
        for (int c = 0; c < 5; ++c) {
            const std::string k = "case" + std::to_string(c) + ".";
            const auto y = ref.get(k + "truth");
            const auto f = ref.get(k + "prediction");
            const auto w = ref.get(k + "weights");
            for (double tau : {0.1, 0.5, 0.9}) {
                std::ostringstream name;
                name << tau;
                const mean_loss<loss::pinball> m{{tau}};
                // numpy.maximum(tau e, (tau - 1) e), numpy.average (ref_mean_loss.py)
                CHECK(heldout_test::close(evaluate(m, y, f), ref.scalar(k + "pinball" + name.str())));
                CHECK(heldout_test::close(evaluate(m, y, f, w), ref.scalar(k + "wpinball" + name.str())));
            }
            const mean_loss<loss::huber> hub{{0.7}}; // numpy.where form of Huber (1964)
            CHECK(heldout_test::close(evaluate(hub, y, f), ref.scalar(k + "huber")));
            CHECK(heldout_test::close(evaluate(hub, y, f, w), ref.scalar(k + "whuber")));
            const auto counts = ref.get(k + "counts"), eta = ref.get(k + "logmean");
            // 2 [xlogy(y, y) - xlogy(y, mu) - (y - mu)] with scipy.special.xlogy
            CHECK(heldout_test::close(evaluate(mean_loss<loss::poisson>{}, counts, eta), ref.scalar(k + "poisson")));
            CHECK(
                heldout_test::close(evaluate(mean_loss<loss::poisson>{}, counts, eta, w), ref.scalar(k + "wpoisson")));
            const auto label = ref.get_as<int>(k + "label");
            const auto logit = ref.get(k + "logit");
            // -(y log_expit(f) + (1 - y) log_expit(-f)) with scipy.special.log_expit
            CHECK(heldout_test::close(evaluate(mean_loss<loss::logistic>{}, label, logit), ref.scalar(k + "logistic")));
            CHECK(heldout_test::close(evaluate(mean_loss<loss::logistic>{}, label, logit, w),
                                      ref.scalar(k + "wlogistic")));
            CHECK(heldout_test::close(evaluate(mean_loss<loss::hinge>{}, label, logit), ref.scalar(k + "hinge")));
            CHECK(heldout_test::close(evaluate(mean_loss<loss::hinge>{}, label, logit, w), ref.scalar(k + "whinge")));
            CHECK(heldout_test::close(evaluate(mean_loss<loss::zero_one>{}, label, logit), ref.scalar(k + "zero_one")));
            CHECK(heldout_test::close(evaluate(mean_loss<loss::zero_one>{}, label, logit, w),
                                      ref.scalar(k + "wzero_one")));
        }
    }
    TEST_CASE("pinball through mean_loss: worked by hand from the definitions values") {
        // worked by hand from the definitions (a self-written implementation of Koenker &
        // Bassett 1978): errors e = 0.5, -0.5, 0.5, -0.5, 1.0. tau = 0.1: (0.05 + 0.45 + 0.05 +
        // 0.45 + 0.1) / 5 = 0.22; tau = 0.9: (0.45 + 0.05 + 0.45 + 0.05 + 0.9) / 5 = 0.38.
        using M = heldout::measure::mean_loss<heldout::loss::pinball>;
        const std::vector<double> y{1.5, 2.0, 3.5, 4.0, 6.0};
        const std::vector<double> f{1.0, 2.5, 3.0, 4.5, 5.0};
        CHECK(evaluate(M{{0.1}}, y, f) == doctest::Approx(0.22).epsilon(1e-15));
        CHECK(evaluate(M{{0.5}}, y, f) == doctest::Approx(0.30).epsilon(1e-15));
        CHECK(evaluate(M{{0.9}}, y, f) == doctest::Approx(0.38).epsilon(1e-15));
    }
    TEST_CASE("a user's own binary loss gets the 0/1 truth checks") {
        using M = heldout::measure::mean_loss<squared_hinge>;
        static_assert(heldout::differentiable_loss<squared_hinge>);
        CHECK(M::kind == heldout::prediction_kind::score);
        const std::vector<int> y{1, 0};
        const std::vector<double> f{0.5, 0.5}; // margins 0.5 and -0.5: (0.25 + 2.25) / 2
        CHECK(evaluate(M{}, y, f) == 1.25);
        const std::vector<int> bad{1, 3};
        CHECK_THROWS_WITH_AS(evaluate(M{}, bad, f),
                             "measure mean squared hinge loss: argument 'truth': label 3 outside the classes 0..1 at "
                             "index 1",
                             heldout::input_error);
    }
    TEST_CASE("the baseline and AVX2 clones give bit-identical sums; the AVX-512 wide pass agrees to 1e-15") {
        std::mt19937_64 g(11);
        std::normal_distribution<double> d;
        std::vector<float> y(10007), f(10007);
        for (std::size_t i = 0; i < y.size(); ++i) {
            y[i] = static_cast<float>(d(g));
            f[i] = static_cast<float>(d(g));
        }
        using heldout::detail::isa;
        auto a = mse{}.accumulator();
        a.add_using(isa::baseline, y, f);
        for (isa clone : {isa::avx2, isa::avx512}) {
            if (!heldout::detail::isa_supported(clone))
                continue;
            auto b = mse{}.accumulator();
            b.add_using(clone, y, f);
            if (clone == isa::avx2) { // the same arithmetic, more rows an instruction
                CHECK(a.value() == b.value());
                double sa = 0, sb = 0;
                a.visit_state([&](double x) { sa += x; });
                b.visit_state([&](double x) { sb += x; });
                CHECK(sa == sb);
            } else { // fused multiply-adds and 32 lanes in the wide pass: a few ulp per term
                CHECK(heldout_test::close(b.value(), a.value(), 1e-15, 0));
            }
        }
        // Weighted: the wide pass sums terms and weights in 32 lanes (4 vectors) per chunk.
        std::vector<double> w(y.size());
        std::uniform_real_distribution<double> u(0, 3);
        for (double& x : w)
            x = u(g);
        auto aw = mse{}.accumulator();
        aw.add_using(isa::baseline, y, f, w);
        for (isa clone : {isa::avx2, isa::avx512}) {
            if (!heldout::detail::isa_supported(clone))
                continue;
            auto bw = mse{}.accumulator();
            bw.add_using(clone, y, f, w);
            if (clone == isa::avx2)
                CHECK(aw.value() == bw.value());
            else
                CHECK(heldout_test::close(bw.value(), aw.value(), 1e-15, 0));
        }
    }
    TEST_CASE("a failed batch leaves the state untouched; overflow is reported") {
        auto acc = mse{}.accumulator();
        const std::vector<double> y{1, 2}, f{1, 3};
        acc.add(y, f);
        const std::vector<double> bad{1, NAN};
        CHECK_THROWS_AS(acc.add(y, bad), heldout::input_error);
        CHECK(acc.value() == 0.5);
        CHECK(acc.count() == 2);
        const std::vector<double> big{1e200, 0}, small{-1e200, 0};
        CHECK_THROWS_WITH_AS(acc.add(big, small),
                             "measure MSE: argument 'prediction': loss not finite at truth 1e+200, "
                             "prediction -1e+200 (overflow, or outside the loss's domain) at index 0",
                             heldout::input_error);
        CHECK_THROWS_WITH_AS(acc.add_one(1.0, NAN), "measure MSE: argument 'prediction': not finite (nan) at index 0",
                             heldout::input_error);
    }
}
