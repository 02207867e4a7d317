// Tests for the checks of loaded state (stream/serialize.hpp version 2): the identity key in
// the header, the typed load deserialize(bytes, m), every accumulator's check_state() on bytes
// with a right checksum but inconsistent content, and merges of differently configured
// accumulators. Each case here failed (or crashed under ASan) before the checks existed.
#include "stream/state_samples.hpp"

#include <heldout/measure/calibration_error.hpp>
#include <heldout/measure/mae.hpp>
#include <heldout/measure/mean_loss.hpp>
#include <heldout/measure/median_absolute_error.hpp>
#include <heldout/measure/multiclass_auc.hpp>
#include <heldout/measure/thresholded.hpp>
#include <heldout/stream/serialize.hpp>

#include "support/text.hpp"
#include <doctest/doctest.h>

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

namespace {
namespace hm = heldout::measure;
using namespace stream_cases;

/// Two accumulators of the same type but other parameters, each fed a few rows: merge must
/// refuse (heldout::input_error), and leave the target as it was.
template <input K, class M>
void check_merge_refused(const M& a, const M& b) {
    const data d(30, 9);
    auto x = a.accumulator();
    auto y = b.accumulator();
    feed<K>(x, d, 0, d.n, false);
    feed<K>(y, d, 0, d.n, false);
    const auto before = heldout::serialize(x);
    INFO(a.name() << " <- " << b.name());
    CHECK_THROWS_AS(x.merge(y), heldout::input_error);
    CHECK(heldout::serialize(x) == before);
}

/// Bytes of `mirror` (a struct visiting the same fields as an accumulator) carrying `key`,
/// with a valid checksum: what a corrupted or hostile sender could produce.
template <class Mirror>
std::vector<std::byte> forge(const Mirror& mirror, std::string_view key) {
    const auto plain = heldout::serialize(mirror); // empty key: header is 12 + 4 bytes
    std::vector<std::byte> out(plain.begin(), plain.begin() + 8);
    heldout::detail::put_u32(out, static_cast<std::uint32_t>(key.size()));
    for (char c : key)
        out.push_back(static_cast<std::byte>(c));
    out.insert(out.end(), plain.begin() + 12, plain.end() - 8);
    const std::uint64_t h = heldout::detail::fnv1a(out);
    for (int k = 0; k < 8; ++k)
        out.push_back(static_cast<std::byte>((h >> (8 * k)) & 0xFF));
    return out;
}

struct multiclass_auc_mirror {
    std::uint8_t method = 0;
    std::uint64_t classes = 3;
    std::vector<double> probs{0.2, 0.3, 0.5, 0.6, 0.2, 0.2};
    std::vector<std::uint32_t> labels{2, 0};
    std::vector<double> weights;
    template <class F>
    void visit_state(F&& f) const {
        f(method), f(classes), f(probs), f(labels), f(weights);
    }
};

struct median_mirror {
    std::vector<double> errors{0.5, 1.0, 2.0};
    std::vector<double> weights{1.0, 1.0, 1.0};
    template <class F>
    void visit_state(F&& f) const {
        f(errors), f(weights);
    }
};

struct calibration_mirror {
    std::uint64_t bins = 15;
    std::uint8_t rule = 0, variant = 0, statistic = 0;
    bool multiclass = false;
    std::uint64_t count = 1;
    double weight = 1, carry = 0;
    std::vector<double> bin_state = std::vector<double>(6 * 15, 0.0);
    std::vector<double> conf, hit, row_weight;
    template <class F>
    void visit_state(F&& f) const {
        f(bins), f(rule), f(variant), f(statistic), f(multiclass), f(count), f(weight), f(carry), f(bin_state), f(conf),
            f(hit), f(row_weight);
    }
};

template <class A>
std::string load_error(const std::vector<std::byte>& bytes) {
    try {
        (void)heldout::deserialize<A>(bytes);
    } catch (const heldout::input_error& e) {
        return e.what();
    }
    return "no error";
}
using heldout_test::has;
} // namespace

TEST_SUITE("stream/state_checks") {
    TEST_CASE("the header carries the measure's key: an MSE state is refused as MAE") {
        auto mse = hm::mse{}.accumulator();
        mse.add_one(2.0, 1.0);
        const auto bytes = heldout::serialize(mse);
        const std::string e = load_error<heldout::accumulator_t<hm::mae>>(bytes);
        CHECK(has(e, "heldout::deserialize"));
        CHECK(has(e, hm::mse::key));
        CHECK(has(e, hm::mae::key));
        CHECK(load_error<heldout::accumulator_t<hm::mse>>(bytes) == "no error");
    }
    TEST_CASE("typed load refuses other parameters: calibration error with 10 bins read as 15") {
        auto acc = hm::calibration_error{.bins = 10}.accumulator();
        acc.add_one(1.0, 0.7);
        const auto bytes = heldout::serialize(acc);
        const auto back = heldout::deserialize(bytes, hm::calibration_error{.bins = 10});
        CHECK(back.value() == acc.value());
        try {
            (void)heldout::deserialize(bytes, hm::calibration_error{.bins = 15});
            FAIL("accepted 10 bins as 15");
        } catch (const heldout::input_error& e) {
            const std::string text = e.what();
            CHECK(has(text, hm::calibration_error{.bins = 10}.name()));
            CHECK(has(text, hm::calibration_error{.bins = 15}.name()));
        }
        // Another measure altogether: refused by its key first.
        CHECK_THROWS_AS((void)heldout::deserialize(bytes, hm::multiclass_calibration_error{.bins = 10}),
                        heldout::input_error);
    }
    TEST_CASE("multiclass AUC: a label >= classes, a short probability row, short weights") {
        using A = heldout::accumulator_t<hm::multiclass_auc>;
        CHECK(load_error<A>(forge(multiclass_auc_mirror{}, hm::multiclass_auc::key)) == "no error");
        multiclass_auc_mirror m;
        m.labels[1] = 7; // heap overflow in value() before the check
        CHECK(has(load_error<A>(forge(m, hm::multiclass_auc::key)), "'labels'"));
        m = {};
        m.probs.pop_back();
        CHECK(has(load_error<A>(forge(m, hm::multiclass_auc::key)), "'probabilities'"));
        m = {};
        m.weights = {1.0};
        CHECK(has(load_error<A>(forge(m, hm::multiclass_auc::key)), "'weights'"));
        m = {};
        m.weights = {1.0, -2.0};
        CHECK(has(load_error<A>(forge(m, hm::multiclass_auc::key)), "'weights'"));
        m = {};
        m.classes = 1;
        CHECK(has(load_error<A>(forge(m, hm::multiclass_auc::key)), "'classes'"));
    }
    TEST_CASE("median absolute error: weights shorter than errors, negative or non-finite errors") {
        using A = heldout::accumulator_t<hm::median_absolute_error>;
        CHECK(load_error<A>(forge(median_mirror{}, hm::median_absolute_error::key)) == "no error");
        median_mirror m;
        m.weights.pop_back(); // read past the end in value() before the check
        CHECK(has(load_error<A>(forge(m, hm::median_absolute_error::key)), "'weights'"));
        m = {};
        m.errors[0] = -1;
        CHECK(has(load_error<A>(forge(m, hm::median_absolute_error::key)), "'errors'"));
        m = {};
        m.weights[2] = std::numeric_limits<double>::quiet_NaN();
        CHECK(has(load_error<A>(forge(m, hm::median_absolute_error::key)), "'weights'"));
    }
    TEST_CASE("calibration error: a bin count that differs from the stored bins, bad sums, bad rows") {
        using A = heldout::accumulator_t<hm::calibration_error>;
        CHECK(load_error<A>(forge(calibration_mirror{}, hm::calibration_error::key)) == "no error");
        calibration_mirror m;
        m.bins = 40; // value() read 40 bins out of 15 before the check
        CHECK(has(load_error<A>(forge(m, hm::calibration_error::key)), "'bins'"));
        m = {};
        m.bins = 0;
        CHECK(has(load_error<A>(forge(m, hm::calibration_error::key)), "'bins'"));
        m = {};
        m.bin_state[0] = -1;
        CHECK(has(load_error<A>(forge(m, hm::calibration_error::key)), "'bin sums'"));
        m = {};
        m.weight = std::numeric_limits<double>::infinity();
        CHECK(has(load_error<A>(forge(m, hm::calibration_error::key)), "'weight'"));
        m = {};
        m.rule = 1; // equal count: rows must match the count
        m.bin_state.clear();
        m.conf = {0.5};
        m.hit = {1};
        CHECK(has(load_error<A>(forge(m, hm::calibration_error::key)), "'row weights'"));
        m.row_weight = {1};
        CHECK(load_error<A>(forge(m, hm::calibration_error::key)) == "no error");
        m.hit = {3};
        CHECK(has(load_error<A>(forge(m, hm::calibration_error::key)), "'hits'"));
    }
    TEST_CASE("merging differently configured accumulators is an input_error") {
        auto a = hm::calibration_error{.bins = 10}.accumulator();
        auto b = hm::calibration_error{.bins = 15}.accumulator();
        a.add_one(1.0, 0.3);
        b.add_one(1.0, 0.3);
        CHECK_THROWS_AS(a.merge(b), heldout::input_error);
        auto c = hm::multiclass_auc{hm::multiclass_auc_method::one_vs_rest_weighted}.accumulator();
        auto d = hm::multiclass_auc{}.accumulator();
        const std::vector<int> y{0, 1, 2};
        const std::vector<double> p{0.5, 0.3, 0.2, 0.1, 0.8, 0.1, 0.2, 0.2, 0.6};
        c.add(y, heldout::rows(p, 3));
        d.add(y, heldout::rows(p, 3));
        CHECK_THROWS_AS(c.merge(d), heldout::input_error);
    }
    TEST_CASE("every differently configured pair of accumulators refuses to merge") {
        check_merge_refused<input::real>(hm::mean_loss<heldout::loss::huber>{{1.5}},
                                         hm::mean_loss<heldout::loss::huber>{{1.0}});
        check_merge_refused<input::real>(hm::mean_loss<heldout::loss::pinball>{{0.9}},
                                         hm::mean_loss<heldout::loss::pinball>{{0.5}});
        check_merge_refused<input::margin>(hm::mean_loss<heldout::loss::zero_one>{{0.2}},
                                           hm::mean_loss<heldout::loss::zero_one>{{0.0}});
        check_merge_refused<input::probability>(hm::cross_entropy{1e-12}, hm::cross_entropy{1e-15});
        check_merge_refused<input::rows3>(hm::multiclass_cross_entropy{1e-9}, hm::multiclass_cross_entropy{0});
        check_merge_refused<input::probability>(hm::calibration_error{.bins = 10}, hm::calibration_error{.bins = 15});
        check_merge_refused<input::probability>(hm::calibration_error{},
                                                hm::calibration_error{.binning = hm::bin_rule::equal_count});
        check_merge_refused<input::probability>(hm::calibration_error{},
                                                hm::calibration_error{.variant = hm::calibration_variant::top_label});
        check_merge_refused<input::probability>(hm::calibration_error{},
                                                hm::calibration_error{.statistic = hm::calibration_statistic::maximum});
        check_merge_refused<input::rows3>(hm::multiclass_calibration_error{.bins = 8},
                                          hm::multiclass_calibration_error{.bins = 9});
        check_merge_refused<input::rows3>(hm::multiclass_auc{},
                                          hm::multiclass_auc{hm::multiclass_auc_method::one_vs_rest_weighted});
        check_merge_refused<input::labels3>(hm::classification_error{}, hm::classification_error{.classes = 3});
        check_merge_refused<input::labels3>(hm::accuracy{}, hm::accuracy{.classes = 4});
        check_merge_refused<input::labels3>(hm::balanced_accuracy{}, hm::balanced_accuracy{.classes = 3});
        check_merge_refused<input::labels3>(hm::f_beta{.beta = 2, .combination = hm::class_combination::mean},
                                            hm::f_beta{.beta = 1, .combination = hm::class_combination::mean});
        check_merge_refused<input::labels3>(
            hm::recall{.combination = hm::class_combination::one_vs_rest, .positive = 2},
            hm::recall{.combination = hm::class_combination::one_vs_rest, .positive = 1});
        check_merge_refused<input::labels2>(hm::precision{}, hm::precision{.positive = 0});
        check_merge_refused<input::labels2>(hm::mcc{}, hm::mcc{.classes = 2});
        check_merge_refused<input::labels3>(hm::cohen_kappa{hm::kappa_weighting::quadratic},
                                            hm::cohen_kappa{hm::kappa_weighting::linear});
        Eigen::MatrixXd c1(3, 3), c2(3, 3);
        c1 << 0, 1, 2, 5, 0, 1, 9, 3, 0;
        c2 << 0, 1, 2, 5, 0, 1, 9, 4, 0;
        check_merge_refused<input::labels3>(hm::cost_weighted_error{c1}, hm::cost_weighted_error{c2});
        check_merge_refused<input::score>(hm::binned_auc{.bins = 64}, hm::binned_auc{.bins = 32});
        check_merge_refused<input::score>(hm::auprc{hm::pr_start::first_precision}, hm::auprc{});
        check_merge_refused<input::score>(hm::partial_auc{.fpr_high = 0.3}, hm::partial_auc{.fpr_high = 0.4});
        check_merge_refused<input::score>(heldout::at_threshold(hm::classification_error{}, 0.5),
                                          heldout::at_threshold(hm::classification_error{}, 0.3));
    }
}
