// Shared by tests/stream/state_mutation.cpp and tests/fuzz/state_fuzz.cpp: one valid state of
// every serialisable accumulator (unweighted and weighted), a byte mutator that keeps the
// checksum right, and a loader that reads bytes as accumulator number i and uses the result
// (value, merge, serialize), so that a state passing deserialize's checks is exercised too.
// The only exception a load or a use may throw is heldout::input_error.
#pragma once

#include "stream/cases.hpp"

#include <heldout/loss/huber.hpp>
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
#include <heldout/measure/thresholded.hpp>
#include <heldout/stream/serialize.hpp>

#include <cstddef>
#include <cstdint>
#include <limits>
#include <random>
#include <vector>

namespace state_samples {
using namespace stream_cases;
namespace hm = heldout::measure;

/// Calls f(kind<K>{}, m) for every serialisable measure m fed with inputs of kind K.
template <class F>
void for_each_case(F&& f) {
    f(kind<input::real>{}, hm::mse{});
    f(kind<input::real>{}, hm::mae{});
    f(kind<input::real>{}, hm::rmse{});
    f(kind<input::real>{}, hm::r_squared{});
    f(kind<input::real>{}, hm::max_absolute_error{});
    f(kind<input::real>{}, hm::median_absolute_error{});
    f(kind<input::real>{}, hm::mean_loss<heldout::loss::huber>{{1.5}});
    f(kind<input::real>{}, hm::mean_loss<heldout::loss::pinball>{{0.9}});
    f(kind<input::counts>{}, hm::mean_loss<heldout::loss::poisson>{});
    f(kind<input::margin>{}, hm::mean_loss<heldout::loss::zero_one>{{0.2}});
    f(kind<input::probability>{}, hm::brier_score{});
    f(kind<input::probability>{}, hm::cross_entropy{1e-12});
    f(kind<input::probability>{}, hm::calibration_error{.bins = 12});
    f(kind<input::probability>{}, hm::calibration_error{.bins = 10, .binning = hm::bin_rule::equal_count});
    f(kind<input::rows3>{}, hm::multiclass_brier_score{});
    f(kind<input::rows3>{}, hm::multiclass_cross_entropy{1e-9});
    f(kind<input::rows3>{}, hm::multiclass_calibration_error{.bins = 8});
    f(kind<input::rows3>{}, hm::multiclass_auc{});
    f(kind<input::labels3>{}, hm::classification_error{});
    f(kind<input::labels3>{}, hm::accuracy{.classes = 3});
    f(kind<input::labels3>{}, hm::balanced_accuracy{});
    f(kind<input::labels3>{}, hm::f_beta{.beta = 2, .combination = hm::class_combination::mean});
    f(kind<input::labels2>{}, hm::mcc{});
    f(kind<input::labels2>{}, hm::precision{});
    f(kind<input::labels3>{}, hm::recall{.combination = hm::class_combination::one_vs_rest, .positive = 2});
    f(kind<input::labels2>{}, hm::specificity{});
    f(kind<input::labels3>{}, hm::cohen_kappa{hm::kappa_weighting::quadratic});
    Eigen::MatrixXd costs(3, 3);
    costs << 0, 1, 2, 5, 0, 1, 9, 3, 0;
    f(kind<input::labels3>{}, hm::cost_weighted_error{costs});
    f(kind<input::score>{}, hm::auc{});
    f(kind<input::score_wide>{}, hm::auc{});
    f(kind<input::score>{}, hm::binned_auc{.bins = 64});
    f(kind<input::score>{}, hm::average_precision{});
    f(kind<input::score>{}, hm::auprc{hm::pr_start::first_precision});
    f(kind<input::score>{}, hm::partial_auc{.fpr_low = 0.05, .fpr_high = 0.3, .standardized = true});
    f(kind<input::score>{}, heldout::at_threshold(hm::classification_error{}, 0.5));
}

/// The number of cases in for_each_case.
inline std::size_t case_count() {
    std::size_t n = 0;
    for_each_case([&](auto, const auto&) { ++n; });
    return n;
}

/// Valid states of case i: a small unweighted and a small weighted shard, and an empty one.
inline std::vector<std::vector<std::byte>> seeds(std::size_t i) {
    static const data d(24, 5);
    std::vector<std::vector<std::byte>> out;
    std::size_t at = 0;
    for_each_case([&](auto k, const auto& m) {
        if (at++ != i)
            return;
        constexpr input K = decltype(k)::value;
        for (const bool weighted : {false, true}) {
            auto acc = m.accumulator();
            feed<K>(acc, d, 0, d.n, weighted);
            out.push_back(heldout::serialize(acc));
        }
        out.push_back(heldout::serialize(m.accumulator()));
    });
    return out;
}

/// Recomputes the trailing checksum of bytes (whose body may have been changed).
inline void reseal(std::vector<std::byte>& bytes) {
    if (bytes.size() < 8)
        return;
    const std::uint64_t h = heldout::detail::fnv1a(std::span<const std::byte>(bytes).first(bytes.size() - 8));
    for (int k = 0; k < 8; ++k)
        bytes[bytes.size() - 8 + static_cast<std::size_t>(k)] = static_cast<std::byte>((h >> (8 * k)) & 0xFF);
}

/// A random change to the fields of a valid state (the header stays, the checksum is
/// recomputed): a bit flip, a byte, a special double or a large count written over 8 bytes,
/// bytes removed or repeated.
inline void mutate(std::vector<std::byte>& bytes, std::mt19937_64& g) {
    const std::size_t k = static_cast<std::size_t>(bytes[8]) | (static_cast<std::size_t>(bytes[9]) << 8);
    const std::size_t first = 16 + k; // the schema length field onwards
    if (bytes.size() < first + 8 + 1)
        return;
    const std::size_t end = bytes.size() - 8;
    std::uniform_int_distribution<std::size_t> pos(first, end - 1);
    const std::size_t at = pos(g);
    const auto put8 = [&](std::uint64_t x) {
        for (std::size_t b = 0; b < 8 && at + b < end; ++b)
            bytes[at + b] = static_cast<std::byte>((x >> (8 * b)) & 0xFF);
    };
    static const double specials[] = {std::numeric_limits<double>::quiet_NaN(),
                                      std::numeric_limits<double>::infinity(),
                                      -std::numeric_limits<double>::infinity(),
                                      -1.0,
                                      1e308,
                                      -0.0,
                                      5e-324,
                                      2.0,
                                      0.5};
    static const std::uint64_t counts[] = {0, 1, 2, 3, 7, 255, 65536, 0x7fffffffULL, 0xffffffffULL, ~0ULL};
    switch (g() % 6) {
    case 0:
        bytes[at] ^= static_cast<std::byte>(1u << (g() % 8));
        break;
    case 1:
        bytes[at] = static_cast<std::byte>(g() & 0xFF);
        break;
    case 2:
        put8(std::bit_cast<std::uint64_t>(specials[g() % std::size(specials)]));
        break;
    case 3:
        put8(counts[g() % std::size(counts)]);
        break;
    case 4: {
        const std::size_t n = std::min<std::size_t>(1 + g() % 16, end - at);
        bytes.erase(bytes.begin() + static_cast<std::ptrdiff_t>(at),
                    bytes.begin() + static_cast<std::ptrdiff_t>(at + n));
        break;
    }
    default: {
        const std::size_t n = std::min<std::size_t>(1 + g() % 16, end - at);
        std::vector<std::byte> copy(bytes.begin() + static_cast<std::ptrdiff_t>(at),
                                    bytes.begin() + static_cast<std::ptrdiff_t>(at + n));
        bytes.insert(bytes.begin() + static_cast<std::ptrdiff_t>(at), copy.begin(), copy.end());
        break;
    }
    }
    reseal(bytes);
}

/// Reads bytes as the accumulator of case i and uses it: value, a merge with a copy, a
/// serialisation. Throws what these throw (only heldout::input_error is allowed).
inline void load_and_use(std::size_t i, std::span<const std::byte> bytes) {
    std::size_t at = 0;
    for_each_case([&](auto, const auto& m) {
        if (at++ != i)
            return;
        using A = heldout::accumulator_t<std::remove_cvref_t<decltype(m)>>;
        A acc = heldout::deserialize<A>(bytes);
        const A copy = acc;
        (void)heldout::serialize(acc);
        try {
            (void)read(acc);
        } catch (const heldout::undefined_error&) {
        }
        acc.merge(copy);
        try {
            (void)read(acc);
        } catch (const heldout::undefined_error&) {
        }
    });
}

} // namespace state_samples
