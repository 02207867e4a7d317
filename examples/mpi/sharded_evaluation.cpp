// Distributed evaluation on MPI: every rank scores its own shard of a test set, streams it
// into accumulators of several measure families, and heldout::mpi::merge (docs/mpi.md) gives
// every rank the states merged in rank order (they travel as heldout::serialize bytes); rank 0
// prints the estimates — then checks them against one machine scoring the whole set, and exits
// non-zero on any mismatch.
//
//   mpirun -np 4 ./example_mpi_sharded_evaluation [rows per rank] [offset]
//
// `offset` (default 0) is added to the regression truth and prediction: at 1e9 the rows share
// a large common part, where a merge of raw sums of squares (or of rounded shard means)
// loses the digits that R-squared needs; heldout's merge keeps them (ctest runs it at 1e9).
// The data are invented for the demo: shard r is drawn from heldout::rng(seed, r) (the rank
// is the stream), so rank 0 can regenerate every shard for the single-machine check.
// Families: pointwise (MSE, R-squared, median absolute error), probabilities (cross-entropy,
// Brier score), labels (classification error, the confusion table), ranking (exact AUC,
// which carries the scores, and the fixed-memory binned AUC with its error bound).
// States travel as serialised bytes: the layout is little-endian and versioned
// (docs/streaming.md), so ranks on different hosts need no shared binary format.
#include <heldout/core/random.hpp>
#include <heldout/measure/auc.hpp>
#include <heldout/measure/binned_auc.hpp>
#include <heldout/measure/brier_score.hpp>
#include <heldout/measure/classification_error.hpp>
#include <heldout/measure/confusion_matrix.hpp>
#include <heldout/measure/cross_entropy.hpp>
#include <heldout/measure/mean_loss.hpp>
#include <heldout/measure/median_absolute_error.hpp>
#include <heldout/measure/r_squared.hpp>
#include <heldout/mpi.hpp>
#include <heldout/stream/serialize.hpp>

#include <mpi.h>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <span>
#include <string>
#include <type_traits>
#include <vector>

namespace {

namespace hm = heldout::measure;
constexpr std::uint64_t seed = 2024;

/// One shard: a regression target with its prediction, and a 0/1 outcome with a
/// predicted probability and the label thresholded from it.
struct shard {
    std::vector<double> y, f, prob;
    std::vector<float> score;
    std::vector<std::uint8_t> outcome, label;
};

shard make_shard(std::size_t rank, std::size_t rows, double offset) {
    heldout::rng g(seed, rank);
    shard s;
    for (std::size_t i = 0; i < rows; ++i) {
        const double x = g.uniform();
        s.y.push_back(offset + (3.0 * x + (g.uniform() - 0.5)));
        s.f.push_back(offset + (3.0 * x - 0.05));
        const double p = 1.0 / (1.0 + std::exp(-6.0 * (x - 0.5)));
        s.outcome.push_back(static_cast<std::uint8_t>(g.uniform() < p));
        // A model that sees x with noise; its probability rounded to 1/4096 (ties, as real
        // models produce), kept strictly inside (0, 1).
        const double q = 1.0 / (1.0 + std::exp(-6.0 * (x + 0.3 * (g.uniform() - 0.5) - 0.5)));
        const double r = std::clamp(std::round(q * 4096.0) / 4096.0, 1.0 / 4096.0, 4095.0 / 4096.0);
        s.prob.push_back(r);
        s.score.push_back(static_cast<float>(r));
        s.label.push_back(static_cast<std::uint8_t>(r >= 0.5));
    }
    return s;
}

/// The accumulators every rank fills.
struct accumulators {
    decltype(hm::mse{}.accumulator()) mse = hm::mse{}.accumulator();
    hm::r_squared_accumulator r2 = hm::r_squared{}.accumulator();
    hm::median_absolute_error_accumulator medae = hm::median_absolute_error{}.accumulator();
    hm::cross_entropy_accumulator log_loss = hm::cross_entropy{}.accumulator();
    hm::brier_score_accumulator brier = hm::brier_score{}.accumulator();
    decltype(hm::classification_error{}.accumulator()) error = hm::classification_error{}.accumulator();
    hm::confusion_accumulator table = hm::confusion_matrix{}.accumulator();
    hm::auc_accumulator auc = hm::auc{}.accumulator();
    hm::binned_auc_accumulator binned = hm::binned_auc{.bins = 1024, .low = 0, .high = 1}.accumulator();

    /// Streams a shard in batches, as a validation loop would.
    void add(const shard& s) {
        constexpr std::size_t batch = 8192;
        for (std::size_t first = 0; first < s.y.size(); first += batch) {
            const std::size_t n = std::min(batch, s.y.size() - first);
            auto part = [&](const auto& v) { return std::span(v).subspan(first, n); };
            mse.add(part(s.y), part(s.f));
            r2.add(part(s.y), part(s.f));
            medae.add(part(s.y), part(s.f));
            log_loss.add(part(s.outcome), part(s.prob));
            brier.add(part(s.outcome), part(s.prob));
            error.add(part(s.outcome), part(s.label));
            table.add(part(s.outcome), part(s.label));
            auc.add(part(s.outcome), part(s.score));
            binned.add(part(s.outcome), part(s.score));
        }
    }

    /// Every rank's accumulators merged in rank order, on every rank (collective).
    void merge_into(accumulators& out, MPI_Comm comm) const {
        out.mse = heldout::mpi::merge(mse, comm);
        out.r2 = heldout::mpi::merge(r2, comm);
        out.medae = heldout::mpi::merge(medae, comm);
        out.log_loss = heldout::mpi::merge(log_loss, comm);
        out.brier = heldout::mpi::merge(brier, comm);
        out.error = heldout::mpi::merge(error, comm);
        out.table = heldout::mpi::merge(table, comm);
        out.auc = heldout::mpi::merge(auc, comm);
        out.binned = heldout::mpi::merge(binned, comm);
    }

    /// Calls f(acc) on each accumulator in a fixed order.
    template <class F>
    void each(F&& f) {
        f(mse), f(r2), f(medae), f(log_loss), f(brier), f(error), f(table), f(auc), f(binned);
    }
};

int failures = 0;

void compare(const char* name, double merged, double single, bool exact) {
    const double diff = std::abs(merged - single);
    const bool ok = exact ? merged == single : diff <= 1e-12 * std::max(1.0, std::abs(single));
    std::printf("  %-26s %.12f   single machine %.12f   %s\n", name, merged, single,
                ok ? (merged == single ? "equal" : "agree to 1e-12") : "MISMATCH");
    failures += !ok;
}

} // namespace

int main(int argc, char** argv) {
    MPI_Init(&argc, &argv);
    int rank = 0, ranks = 1;
    MPI_Comm_rank(MPI_COMM_WORLD, &rank);
    MPI_Comm_size(MPI_COMM_WORLD, &ranks);
    const std::size_t rows = argc > 1 ? std::strtoull(argv[1], nullptr, 10) : 100000;
    const double offset = argc > 2 ? std::strtod(argv[2], nullptr) : 0.0;

    int status = 0;
    try {
        // 1. Each rank scores its shard.
        accumulators mine;
        mine.add(make_shard(static_cast<std::size_t>(rank), rows, offset));
        // 2. Every rank gets the states merged in rank order (heldout::mpi::merge).
        accumulators merged;
        std::size_t bytes = 0;
        mine.each([&](const auto& acc) { bytes += heldout::serialize(acc).size(); });
        unsigned long long mine_bytes = bytes, all_bytes = 0;
        MPI_Reduce(&mine_bytes, &all_bytes, 1, MPI_UNSIGNED_LONG_LONG, MPI_SUM, 0, MPI_COMM_WORLD);
        bytes = static_cast<std::size_t>(all_bytes);
        mine.merge_into(merged, MPI_COMM_WORLD);

        if (rank == 0) {
            std::printf("heldout on MPI: %d ranks x %zu rows (regression offset %g), %zu bytes of state gathered\n",
                        ranks, rows, offset, bytes);

            // 3. The same measures on one machine, all shards in rank order.
            accumulators single;
            for (int r = 0; r < ranks; ++r)
                single.add(make_shard(static_cast<std::size_t>(r), rows, offset));

            compare("MSE", merged.mse.value(), single.mse.value(), false);
            compare("R-squared", merged.r2.value(), single.r2.value(), false);
            compare("median absolute error", merged.medae.value(), single.medae.value(), true);
            compare("cross-entropy", merged.log_loss.value(), single.log_loss.value(), false);
            compare("Brier score", merged.brier.value(), single.brier.value(), false);
            compare("classification error", merged.error.value(), single.error.value(), true);
            for (std::size_t i = 0; i < 2; ++i)
                for (std::size_t j = 0; j < 2; ++j) {
                    const std::string cell = "confusion (" + std::to_string(i) + ", " + std::to_string(j) + ")";
                    compare(cell.c_str(), merged.table(i, j), single.table(i, j), true);
                }
            compare("AUC (exact)", merged.auc.value(), single.auc.value(), true);
            compare("binned AUC (1024 bins)", merged.binned.value(), single.binned.value(), true);
            const double gap = std::abs(merged.binned.value() - single.auc.value());
            const bool within = gap <= merged.binned.error_bound();
            std::printf("  binned AUC - exact AUC = %.3g, within its bound %.3g: %s\n", gap,
                        merged.binned.error_bound(), within ? "yes" : "NO");
            failures += !within;
            if (failures == 0)
                std::printf("all shards merged into the single-machine result\n");
            else
                std::printf("%d MISMATCHES\n", failures);
            status = failures == 0 ? 0 : 1;
        }
    } catch (const std::exception& e) {
        std::fprintf(stderr, "rank %d: %s\n", rank, e.what());
        MPI_Abort(MPI_COMM_WORLD, 2);
    }
    MPI_Bcast(&status, 1, MPI_INT, 0, MPI_COMM_WORLD);
    MPI_Finalize();
    return status;
}
