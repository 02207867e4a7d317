// Tests for heldout/stream/serialize.hpp: portable state bytes, exact merges across shards,
// for every accumulator of every measure family.
#include "stream/cases.hpp"

#include <heldout/loss/hinge.hpp>
#include <heldout/loss/huber.hpp>
#include <heldout/loss/logistic.hpp>
#include <heldout/loss/pinball.hpp>
#include <heldout/loss/poisson.hpp>
#include <heldout/loss/zero_one.hpp>
#include <heldout/measure/auc.hpp>
#include <heldout/measure/average_precision.hpp>
#include <heldout/measure/balanced_accuracy.hpp>
#include <heldout/measure/binned_auc.hpp>
#include <heldout/measure/brier_score.hpp>
#include <heldout/measure/calibration_error.hpp>
#include <heldout/measure/classification_error.hpp>
#include <heldout/measure/cohen_kappa.hpp>
#include <heldout/measure/confusion_matrix.hpp>
#include <heldout/measure/cost_weighted_error.hpp>
#include <heldout/measure/cross_entropy.hpp>
#include <heldout/measure/mae.hpp>
#include <heldout/measure/max_absolute_error.hpp>
#include <heldout/measure/mcc.hpp>
#include <heldout/measure/mean_loss.hpp>
#include <heldout/measure/median_absolute_error.hpp>
#include <heldout/measure/multiclass_auc.hpp>
#include <heldout/measure/partial_auc.hpp>
#include <heldout/measure/precision_recall.hpp>
#include <heldout/measure/r_squared.hpp>
#include <heldout/measure/rmse.hpp>
#include <heldout/stream/serialize.hpp>

#include <doctest/doctest.h>

#include <cmath>
#include <cstring>
#include <random>
#include <span>
#include <string>
#include <vector>

namespace {
struct inner {
    std::vector<float> xs;
    std::int32_t k = -3;
    template <class F>
    void visit_state(F&& f) {
        f(xs);
        f(k);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(xs);
        f(k);
    }
};
struct every_field { // one member of each supported kind
    bool b = true;
    std::uint8_t u = 200;
    std::int64_t i = -5;
    float f = 1.5f;
    double d = -0.1;
    std::string s = "x,y";
    std::vector<double> v{1, 2, 3};
    std::vector<inner> nested{inner{{1.f}, 1}, inner{{}, 2}};
    template <class F>
    void visit_state(F&& fn) {
        fn(b), fn(u), fn(i), fn(f), fn(d), fn(s), fn(v), fn(nested);
    }
    template <class F>
    void visit_state(F&& fn) const {
        fn(b), fn(u), fn(i), fn(f), fn(d), fn(s), fn(v), fn(nested);
    }
};
} // namespace

namespace {
using namespace stream_cases;
namespace hm = heldout::measure;

/// How the value of shards merged after a byte round trip compares with one accumulator
/// fed every row (the merge after bytes always equals the merge in memory bit for bit).
void check_agreement(const std::vector<double>& got, const std::vector<double>& want, bool exact) {
    REQUIRE(got.size() == want.size());
    for (std::size_t i = 0; i < got.size(); ++i) {
        if (exact)
            CHECK(got[i] == want[i]);
        else
            CHECK(got[i] == doctest::Approx(want[i]).epsilon(1e-12));
    }
}

/// The message an accumulator gives for an empty batch (it names the measure).
template <input K, class Acc>
std::string empty_batch_message(Acc& acc, const data& d) {
    try {
        feed<K>(acc, d, 0, 0, false);
    } catch (const heldout::input_error& e) {
        return e.what();
    }
    return "no error";
}

/// Three uneven shards, each serialised, deserialised with deserialize<A>(bytes) and merged:
/// the state equals the in-memory merge byte for byte, the value equals one accumulator fed
/// every row (per `how`), and the parameters travel in the bytes (a deserialised
/// accumulator, reset and fed again, equals a fresh one made by the measure).
template <input K, class M>
void check_round_trip(const std::string& label, const M& m, const data& d, agree how) {
    using A = decltype(m.accumulator());
    static_assert(std::default_initializable<A>, "deserialize<A> needs a default-constructible accumulator");
    for (const bool weighted : {false, true}) {
        INFO("measure: " << label << std::string(weighted ? ", weighted" : ""));
        const std::size_t cut[4] = {0, d.n / 3, d.n / 3 + d.n / 5 + 1, d.n};
        std::vector<A> parts;
        std::vector<std::vector<std::byte>> bytes;
        for (std::size_t s = 0; s < 3; ++s) {
            parts.push_back(m.accumulator());
            feed<K>(parts.back(), d, cut[s], cut[s + 1] - cut[s], weighted);
            bytes.push_back(heldout::serialize(parts.back()));
        }
        A in_memory = parts[0];
        A shipped = heldout::deserialize<A>(bytes[0]);
        for (std::size_t s = 1; s < 3; ++s) {
            in_memory.merge(parts[s]);
            shipped.merge(heldout::deserialize<A>(bytes[s]));
        }
        CHECK(heldout::serialize(shipped) == heldout::serialize(in_memory));
        CHECK(read(shipped) == read(in_memory));
        A whole = m.accumulator();
        feed<K>(whole, d, 0, d.n, weighted);
        check_agreement(read(shipped), read(whole),
                        how == agree::exact || (how == agree::exact_unweighted && !weighted));

        CHECK(heldout::serialize(heldout::deserialize<A>(bytes[0])) == bytes[0]);
        A back = heldout::deserialize<A>(bytes[1]);
        A fresh = m.accumulator();
        back.reset();
        feed<K>(back, d, 0, cut[1], weighted);
        feed<K>(fresh, d, 0, cut[1], weighted);
        CHECK(heldout::serialize(back) == heldout::serialize(fresh));
        CHECK(read(back) == read(fresh));
        CHECK(empty_batch_message<K>(back, d) == empty_batch_message<K>(fresh, d));
    }
}

/// The receiving side's usual start: a fresh accumulator, into which every shard's
/// deserialised state is merged. Equal to the shard itself.
template <input K, class M>
void check_merge_into_fresh(const std::string& label, const M& m, const data& d) {
    using A = decltype(m.accumulator());
    for (const bool weighted : {false, true}) {
        INFO("measure: " << label << std::string(weighted ? ", weighted" : ""));
        A shard = m.accumulator();
        feed<K>(shard, d, 0, d.n, weighted);
        A total = m.accumulator();
        total.merge(heldout::deserialize<A>(heldout::serialize(shard)));
        CHECK(heldout::serialize(total) == heldout::serialize(shard));
        CHECK(read(total) == read(shard));
    }
}
} // namespace

TEST_SUITE("stream/serialize") {
    TEST_CASE("the documented layout: magic, version, schema, little-endian fields, hash") {
        // MSE's state: loss sum 1, carry 0, weight sum 1, carry 0, the unit of weight (the
        // exponent e of 2^e in which the sums are kept: 0 here; added with the weight-scale
        // fix, so the schema gained its 'i'), count 1.
        auto acc = heldout::measure::mse{}.accumulator();
        acc.add_one(1.0, 0.0);
        const auto bytes = heldout::serialize(acc);
        // Version 2: the key "mean_loss<...>" of MSE (its measure's `key`) after the version.
        const std::string_view key = heldout::measure::mse::key;
        const std::size_t k = key.size();
        REQUIRE(bytes.size() == 4 + 2 + 2 + 4 + k + 4 + 6 + 6 * 8 + 8);
        CHECK(std::memcmp(bytes.data(), "HDST", 4) == 0);
        CHECK(bytes[4] == std::byte{2});
        CHECK(bytes[8] == std::byte(k));
        CHECK(std::memcmp(bytes.data() + 12, key.data(), k) == 0);
        CHECK(bytes[12 + k] == std::byte{6}); // schema length 6: "ddddiu"
        CHECK(std::memcmp(bytes.data() + 16 + k, "ddddiu", 6) == 0);
        // first field: 1.0 as binary64 little-endian = 00 00 00 00 00 00 F0 3F (IEEE 754)
        const std::size_t at = 22 + k;
        CHECK(bytes[at + 6] == std::byte{0xF0});
        CHECK(bytes[at + 7] == std::byte{0x3F});
        CHECK(bytes[at + 32] == std::byte{0}); // unit = 0
        CHECK(bytes[at + 40] == std::byte{1}); // count = 1, low byte first
    }
    TEST_CASE("every supported field kind round-trips") {
        every_field e;
        e.nested[1].xs = {2.f, 3.f};
        const auto back = heldout::deserialize<every_field>(heldout::serialize(e));
        CHECK(back.b == e.b);
        CHECK(back.u == e.u);
        CHECK(back.i == e.i);
        CHECK(back.f == e.f);
        CHECK(back.d == e.d);
        CHECK(back.s == e.s);
        CHECK(back.v == e.v);
        REQUIRE(back.nested.size() == 2);
        CHECK(back.nested[1].xs == std::vector<float>{2.f, 3.f});
        CHECK(back.nested[1].k == 2);
    }
    TEST_CASE("shards serialised, deserialised and merged equal one machine's result") {
        std::mt19937_64 g(11);
        std::normal_distribution<double> d;
        std::vector<double> y(3000), f(3000);
        for (std::size_t i = 0; i < y.size(); ++i) {
            y[i] = d(g);
            f[i] = d(g);
        }
        auto whole = heldout::measure::mse{}.accumulator();
        whole.add(y, f);
        auto a = heldout::measure::mse{}.accumulator();
        auto b = heldout::measure::mse{}.accumulator();
        a.add(std::span(y).first(1000), std::span(f).first(1000));
        b.add(std::span(y).subspan(1000), std::span(f).subspan(1000));
        using A = decltype(a);
        auto a2 = heldout::deserialize<A>(heldout::serialize(a));
        auto b2 = heldout::deserialize<A>(heldout::serialize(b));
        a.merge(b);
        a2.merge(b2);
        CHECK(a2.value() == a.value()); // bit-identical to merging in memory
        CHECK(a2.value() == doctest::Approx(whole.value()).epsilon(1e-15));
    }
    TEST_CASE("pointwise accumulators: shards merged after bytes equal one machine") {
        const data d(3000);
        check_round_trip<input::real>("MSE", hm::mse{}, d, agree::close);
        check_round_trip<input::real>("MAE", hm::mae{}, d, agree::close);
        check_round_trip<input::real>("RMSE", hm::rmse{}, d, agree::close);
        check_round_trip<input::real>("R-squared", hm::r_squared{}, d, agree::close);
        check_round_trip<input::real>("max absolute error", hm::max_absolute_error{}, d, agree::exact);
        check_round_trip<input::real>("median absolute error", hm::median_absolute_error{}, d, agree::exact);
        check_round_trip<input::counts>("mean Poisson", hm::mean_loss<heldout::loss::poisson>{}, d, agree::close);
        check_round_trip<input::margin>("mean logistic", hm::mean_loss<heldout::loss::logistic>{}, d, agree::close);
        check_round_trip<input::margin>("mean hinge", hm::mean_loss<heldout::loss::hinge>{}, d, agree::close);
        check_round_trip<input::real>("mean Huber", hm::mean_loss<heldout::loss::huber>{{1.5}}, d, agree::close);
        check_round_trip<input::real>("mean pinball", hm::mean_loss<heldout::loss::pinball>{{0.9}}, d, agree::close);
        check_round_trip<input::margin>("mean 0-1", hm::mean_loss<heldout::loss::zero_one>{{0.2}}, d,
                                        agree::exact_unweighted);
    }
    TEST_CASE("probability accumulators: shards merged after bytes equal one machine") {
        const data d(3000);
        check_round_trip<input::probability>("Brier", hm::brier_score{}, d, agree::close);
        check_round_trip<input::probability>("cross-entropy", hm::cross_entropy{1e-12}, d, agree::close);
        check_round_trip<input::probability>("ECE equal width", hm::calibration_error{.bins = 12}, d, agree::close);
        check_round_trip<input::probability>("ECE equal count",
                                             hm::calibration_error{.bins = 10, .binning = hm::bin_rule::equal_count}, d,
                                             agree::exact);
        check_round_trip<input::probability>("MCE top label",
                                             hm::calibration_error{.variant = hm::calibration_variant::top_label,
                                                                   .statistic = hm::calibration_statistic::maximum},
                                             d, agree::close);
        check_round_trip<input::rows3>("multiclass Brier", hm::multiclass_brier_score{}, d, agree::close);
        check_round_trip<input::rows3>("multiclass cross-entropy", hm::multiclass_cross_entropy{1e-9}, d, agree::close);
        check_round_trip<input::rows3>("multiclass ECE", hm::multiclass_calibration_error{.bins = 8}, d, agree::close);
    }
    TEST_CASE("label accumulators: shards merged after bytes equal one machine") {
        const data d(3000);
        check_round_trip<input::labels3>("confusion matrix", hm::confusion_matrix{}, d, agree::exact_unweighted);
        check_round_trip<input::labels3>("classification error", hm::classification_error{}, d,
                                         agree::exact_unweighted);
        check_round_trip<input::labels3>("confusion matrix, 4 classes", hm::confusion_matrix{.classes = 4}, d,
                                         agree::exact_unweighted);
        check_round_trip<input::labels3>("accuracy", hm::accuracy{}, d, agree::exact_unweighted);
        check_round_trip<input::labels3>("balanced accuracy", hm::balanced_accuracy{}, d, agree::exact_unweighted);
        check_round_trip<input::labels3>("F2", hm::f_beta{.beta = 2, .combination = hm::class_combination::mean}, d,
                                         agree::exact_unweighted);
        check_round_trip<input::labels2>("MCC", hm::mcc{}, d, agree::exact_unweighted);
        check_round_trip<input::labels2>("precision", hm::precision{}, d, agree::exact_unweighted);
        check_round_trip<input::labels3>(
            "specificity of class 2", hm::specificity{.combination = hm::class_combination::one_vs_rest, .positive = 2},
            d, agree::exact_unweighted);
        check_round_trip<input::labels3>("quadratic kappa", hm::cohen_kappa{hm::kappa_weighting::quadratic}, d,
                                         agree::exact_unweighted);
        Eigen::MatrixXd costs(3, 3);
        costs << 0, 1, 2, 5, 0, 1, 9, 3, 0;
        check_round_trip<input::labels3>("cost-weighted error", hm::cost_weighted_error{costs}, d,
                                         agree::exact_unweighted);
    }
    TEST_CASE("ranking accumulators: shards merged after bytes equal one machine") {
        const data d(3000);
        check_round_trip<input::score>("AUC", hm::auc{}, d, agree::exact);
        check_round_trip<input::score>("binned AUC", hm::binned_auc{.bins = 64}, d, agree::exact_unweighted);
        check_round_trip<input::score>("average precision", hm::average_precision{}, d, agree::exact);
        check_round_trip<input::score>("PR AUC", hm::auprc{hm::pr_start::first_precision}, d, agree::exact);
        check_round_trip<input::score>(
            "partial AUC", hm::partial_auc{.fpr_low = 0.05, .fpr_high = 0.3, .standardized = true}, d, agree::exact);
        check_round_trip<input::score_wide>("AUC, double scores", hm::auc{}, d, agree::exact);
        check_round_trip<input::score_wide>("average precision, double scores", hm::average_precision{}, d,
                                            agree::exact);
        check_round_trip<input::score_wide>("partial AUC, double scores", hm::partial_auc{.fpr_high = 0.5}, d,
                                            agree::exact);
        check_round_trip<input::rows3>("multiclass AUC", hm::multiclass_auc{}, d, agree::exact);
        check_round_trip<input::rows3>("multiclass AUC one-vs-rest",
                                       hm::multiclass_auc{hm::multiclass_auc_method::one_vs_rest_weighted}, d,
                                       agree::exact);
    }
    TEST_CASE("a shard merged into a fresh accumulator equals the shard") {
        const data d(2000);
        check_merge_into_fresh<input::real>("MSE", hm::mse{}, d);
        check_merge_into_fresh<input::real>("R-squared", hm::r_squared{}, d);
        check_merge_into_fresh<input::real>("median absolute error", hm::median_absolute_error{}, d);
        check_merge_into_fresh<input::probability>("cross-entropy", hm::cross_entropy{}, d);
        check_merge_into_fresh<input::probability>("ECE equal count",
                                                   hm::calibration_error{.binning = hm::bin_rule::equal_count}, d);
        check_merge_into_fresh<input::labels3>("confusion matrix", hm::confusion_matrix{}, d);
        check_merge_into_fresh<input::labels3>("classification error", hm::classification_error{}, d);
        check_merge_into_fresh<input::score>("binned AUC", hm::binned_auc{}, d);
        check_merge_into_fresh<input::score>("AUC", hm::auc{}, d);
        check_merge_into_fresh<input::score_wide>("AUC, double scores", hm::auc{}, d);
        check_merge_into_fresh<input::score_wide>("average precision", hm::average_precision{}, d);
        check_merge_into_fresh<input::rows3>("multiclass AUC", hm::multiclass_auc{}, d);
    }
    TEST_CASE("binned AUC after bytes stays within its bound of the exact AUC") {
        const data d(5000);
        for (const bool weighted : {false, true}) {
            auto exact = hm::auc{}.accumulator();
            feed<input::score>(exact, d, 0, d.n, weighted);
            using B = hm::binned_auc_accumulator;
            B total = heldout::deserialize<B>(heldout::serialize(hm::binned_auc{.bins = 32}.accumulator()));
            for (std::size_t first = 0; first < d.n; first += 1250) {
                auto shard = hm::binned_auc{.bins = 32}.accumulator();
                feed<input::score>(shard, d, first, 1250, weighted);
                total.merge(heldout::deserialize<B>(heldout::serialize(shard)));
            }
            // The bound is the binned AUC's own (measure/binned_auc.hpp): sum_b P_b N_b / (2 P N).
            CHECK(std::abs(total.value() - exact.value()) <= total.error_bound());
            CHECK(total.error_bound() > 0); // the grid of 1/256 puts several scores in each of 32 bins
        }
    }
    TEST_CASE("corrupt, truncated or foreign bytes are refused with a reason") {
        auto acc = heldout::measure::mse{}.accumulator();
        acc.add_one(2.0, 1.0);
        auto bytes = heldout::serialize(acc);
        using A = decltype(acc);
        auto flipped = bytes;
        flipped[20] ^= std::byte{1};
        CHECK_THROWS_WITH_AS(heldout::deserialize<A>(flipped),
                             "heldout::deserialize: argument 'bytes': checksum mismatch (corrupted or truncated state)",
                             heldout::input_error);
        CHECK_THROWS_AS(heldout::deserialize<A>(std::span(bytes).first(10)), heldout::input_error);
        auto magic = bytes;
        magic[0] = std::byte{'X'};
        CHECK_THROWS_WITH_AS(heldout::deserialize<A>(magic),
                             "heldout::deserialize: argument 'bytes': not a heldout state (bad magic)",
                             heldout::input_error);
        const auto other = heldout::serialize(every_field{});
        CHECK_THROWS_AS(heldout::deserialize<A>(other), heldout::input_error);
    }
}
