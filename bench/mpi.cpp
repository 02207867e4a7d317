// Benchmark of heldout::mpi (run with 2 ranks: mpiexec -np 2 bench_mpi). Not a Google
// Benchmark binary: timings need the ranks in step, so it times whole collective calls.
//
// 1. Splits shared out: 10 x 10-fold CV of a model whose fit takes ~10 ms (gradient descent on
//    a least-squares line, a fixed number of passes), evaluate_splits on rank 0 alone (a
//    communicator of one rank) versus on all ranks; prints the ratio (target >= 1.7 on 2 ranks)
//    and checks the two aggregators agree.
// 2. Merge of 64 ranks' AUC states of 1e5 rows each, as every rank does it after the exchange
//    (deserialise 64 states, merge left to right), against scoring the 6.4e6 rows with
//    heldout::evaluate on one machine. On rank 0, in process (the exchange itself is
//    network-bound: its bytes are printed).
// The machine's load averages (/proc/loadavg) are printed beside the timings, before and after
// the CV runs: on a 2-core machine a speed-up measured with a load above ~0.5 before the run is
// another process's share of a core, not the dispatcher's overhead.
#include <heldout/core/random.hpp>
#include <heldout/measure/auc.hpp>
#include <heldout/measure/mean_loss.hpp>
#include <heldout/mpi.hpp>
#include <heldout/plan/repeated_kfold.hpp>
#include <heldout/stream/serialize.hpp>

#include <mpi.h>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <span>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

namespace {

double seconds_since(std::chrono::steady_clock::time_point t0) {
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

/// The machine's load averages over 1, 5 and 15 minutes (/proc/loadavg), and its cores: a
/// speed-up measured while other processes hold cores says little, so it is printed beside.
std::string machine_load() {
    std::ifstream in("/proc/loadavg");
    std::string one, five, fifteen;
    if (!(in >> one >> five >> fifteen))
        return "load unknown (no /proc/loadavg)";
    return "load " + one + " " + five + " " + fifteen + " (1/5/15 min) on " +
           std::to_string(std::thread::hardware_concurrency()) + " cores";
}

struct slow_line {
    const std::vector<double>* x;
    const std::vector<double>* y;
    std::size_t passes;
    std::vector<double> operator()(std::span<const std::size_t> train, std::span<const std::size_t> test) const {
        double a = 0, b = 0;
        const double rate = 0.5 / static_cast<double>(train.size());
        for (std::size_t p = 0; p < passes; ++p) {
            double ga = 0, gb = 0;
            for (std::size_t i : train) {
                const double r = a + b * (*x)[i] - (*y)[i];
                ga += r, gb += r * (*x)[i];
            }
            a -= rate * ga, b -= rate * gb;
        }
        std::vector<double> out;
        for (std::size_t i : test)
            out.push_back(a + b * (*x)[i]);
        return out;
    }
};

} // namespace

int main(int argc, char** argv) {
    MPI_Init(&argc, &argv);
    int rank = 0, ranks = 1;
    MPI_Comm_rank(MPI_COMM_WORLD, &rank);
    MPI_Comm_size(MPI_COMM_WORLD, &ranks);
    const std::size_t passes = argc > 1 ? std::strtoull(argv[1], nullptr, 10)
                                        : 4800; // ~10 ms per fit on an idle core (2.1 us per pass over 3600 rows)

    const std::size_t n = 4000;
    heldout::rng g(3, 0);
    std::vector<double> x(n), y(n);
    for (std::size_t i = 0; i < n; ++i) {
        x[i] = g.uniform();
        y[i] = 1.0 + 2.0 * x[i] + 0.2 * (g.uniform() - 0.5);
    }
    const slow_line model{&x, &y, passes};
    const auto plan = heldout::repeated_kfold{.folds = 10, .repeats = 10, .seed = 1};

    // One rank alone: a communicator holding rank 0 only.
    const std::string load_before = rank == 0 ? machine_load() : std::string();
    MPI_Comm solo;
    MPI_Comm_split(MPI_COMM_WORLD, rank == 0 ? 0 : MPI_UNDEFINED, 0, &solo);
    double t1 = 0;
    std::string one_text;
    if (rank == 0) {
        const auto t0 = std::chrono::steady_clock::now();
        const auto agg = heldout::mpi::evaluate_splits(solo, plan.splits(n), y, model, heldout::measure::mse{});
        t1 = seconds_since(t0);
        std::ostringstream os;
        agg.write_predictions_csv(os);
        one_text = os.str();
        MPI_Comm_free(&solo);
    }
    MPI_Barrier(MPI_COMM_WORLD);
    const auto t0 = std::chrono::steady_clock::now();
    const auto agg = heldout::mpi::evaluate_splits(MPI_COMM_WORLD, plan.splits(n), y, model, heldout::measure::mse{});
    const double tp = seconds_since(t0);
    if (rank == 0) {
        std::ostringstream os;
        agg.write_predictions_csv(os);
        std::printf("10x10-fold CV, %zu rows, ~%.1f ms per fit: 1 rank %.3f s, %d ranks %.3f s, speed-up %.2fx "
                    "(aggregators %s)\n",
                    n, 1000.0 * t1 / 100.0, t1, ranks, tp, t1 / tp, os.str() == one_text ? "identical" : "DIFFER");
        std::printf("machine before: %s; after: %s\n", load_before.c_str(), machine_load().c_str());
    }

    if (rank == 0) {
        const std::size_t shards = 64, rows = 100000;
        std::vector<std::vector<std::byte>> states;
        std::vector<int> all_y;
        std::vector<double> all_s;
        for (std::size_t r = 0; r < shards; ++r) {
            heldout::rng h(8, r);
            std::vector<int> sy(rows);
            std::vector<double> ss(rows);
            for (std::size_t i = 0; i < rows; ++i) {
                const double u = h.uniform();
                sy[i] = h.uniform() < u ? 1 : 0;
                ss[i] = u + 0.3 * h.uniform();
            }
            auto acc = heldout::measure::auc{}.accumulator();
            acc.add(sy, ss);
            states.push_back(heldout::serialize(acc));
            all_y.insert(all_y.end(), sy.begin(), sy.end());
            all_s.insert(all_s.end(), ss.begin(), ss.end());
        }
        std::size_t bytes = 0;
        for (const auto& s : states)
            bytes += s.size();
        auto t = std::chrono::steady_clock::now();
        auto merged = heldout::deserialize<heldout::measure::auc_accumulator>(states[0]);
        for (std::size_t r = 1; r < shards; ++r)
            merged.merge(heldout::deserialize<heldout::measure::auc_accumulator>(states[r]));
        const double merged_auc = merged.value();
        const double t_merge = seconds_since(t);
        t = std::chrono::steady_clock::now();
        const double whole = heldout::evaluate(heldout::measure::auc{}, all_y, all_s);
        const double t_score = seconds_since(t);
        std::printf("merge of 64 AUC states x 1e5 rows (%.1f MB exchanged per rank): deserialise + merge + value "
                    "%.3f s; scoring the 6.4e6 rows on one machine %.3f s; ratio %.2f (AUC %s)\n",
                    static_cast<double>(bytes) / 1e6, t_merge, t_score, t_merge / t_score,
                    merged_auc == whole ? "identical" : "DIFFERS");
    }
    MPI_Finalize();
    return 0;
}
