// Checks of <heldout/mpi.hpp>, run by ctest under mpiexec with 1, 2, 3 and 4 ranks (label mpi).
// Every rank regenerates every shard (shard r from heldout::rng(seed, r)), so each rank can
// compare the distributed result byte for byte with one process doing the same work.
// Prints "heldout::mpi checks passed" on rank 0 and exits 0 only if every check held on every rank.
#include <heldout/censored.hpp>
#include <heldout/core/random.hpp>
#include <heldout/estimate.hpp>
#include <heldout/measure.hpp>
#include <heldout/mpi.hpp>
#include <heldout/plan.hpp>
#include <heldout/query.hpp>
#include <heldout/stream/serialize.hpp>

#include <mpi.h>

#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstring>
#include <span>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

namespace {

namespace hm = heldout::measure;
int failures = 0;
int my_rank = 0;

void expect(bool ok, const std::string& what) {
    if (!ok) {
        ++failures;
        std::fprintf(stderr, "rank %d: FAILED: %s\n", my_rank, what.c_str());
    }
}

struct shard {
    std::vector<double> y, f, prob;
    std::vector<int> outcome;
};

// Shard r: its size varies with r (rank 1 is empty when there are 3 or more ranks).
shard make_shard(std::size_t r, std::size_t ranks, double offset) {
    const std::size_t rows = (r == 1 && ranks >= 3) ? 0 : 300 + 97 * r;
    heldout::rng g(11, r);
    shard s;
    for (std::size_t i = 0; i < rows; ++i) {
        const double x = g.uniform();
        s.y.push_back(offset + 3.0 * x + (g.uniform() - 0.5));
        s.f.push_back(offset + 3.0 * x - 0.05);
        s.outcome.push_back(g.uniform() < x ? 1 : 0);
        s.prob.push_back(std::round((0.2 + 0.6 * x) * 64.0) / 64.0); // ties across shards
    }
    return s;
}

template <class A>
bool same_bytes(const A& a, const A& b) {
    return heldout::serialize(a) == heldout::serialize(b);
}

template <class M, class Add>
void check_merge(const M& m, MPI_Comm comm, std::size_t ranks, std::size_t rank, Add add, const char* name) {
    auto mine = m.accumulator();
    const shard s = make_shard(rank, ranks, 1e9);
    if (!s.y.empty()) // an empty shard: the empty accumulator (add refuses empty input)
        add(mine, s);
    const auto merged = heldout::mpi::merge(mine, comm);
    auto single = m.accumulator();
    add(single, make_shard(0, ranks, 1e9));
    for (std::size_t r = 1; r < ranks; ++r) {
        auto part = m.accumulator();
        const shard p = make_shard(r, ranks, 1e9);
        if (!p.y.empty())
            add(part, p);
        single.merge(part);
    }
    expect(same_bytes(merged, single), std::string("merge of ") + name + " equals the left-to-right merge");
}

// A model that takes the train rows' least-squares line y ~ x, with busy work whose length
// varies by split (dynamic hand-out must still record in plan order).
struct line_model {
    const std::vector<double>* x;
    const std::vector<double>* y;
    std::vector<double> operator()(std::span<const std::size_t> train, std::span<const std::size_t> test) const {
        double sx = 0, sy = 0, sxx = 0, sxy = 0;
        for (std::size_t i : train) {
            sx += (*x)[i], sy += (*y)[i], sxx += (*x)[i] * (*x)[i], sxy += (*x)[i] * (*y)[i];
        }
        const double n = static_cast<double>(train.size());
        const double b = (sxy - sx * sy / n) / (sxx - sx * sx / n), a = (sy - b * sx) / n;
        std::vector<double> out;
        for (std::size_t i : test)
            out.push_back(a + b * (*x)[i]);
        return out;
    }
};

std::string describe(const heldout::aggregator& agg, const auto&... ms) {
    std::ostringstream os;
    agg.write_predictions_csv(os);
    auto one = [&](const auto& m) {
        for (const auto& v : agg.split_values(m)) {
            os << v.index << ' ' << v.repeat << ' ' << v.fold << ' ' << v.train_size << ' ' << v.test_size << ' ';
            if (v.value) {
                unsigned long long bits = 0;
                std::memcpy(&bits, &*v.value, sizeof bits);
                os << bits;
            }
            os << v.undefined_reason << '\n';
        }
        os << agg.estimate(m, heldout::ci::naive_t) << '\n';
    };
    (one(ms), ...);
    os << agg.skipped() << '\n';
    return os.str();
}

// Query shard r: 8 + r queries with ids 1000 r + j (each query whole on its rank), 1 to 12
// rows each, rows of two queries interleaved, graded relevance 0..3 (some queries with no
// relevant item), scores on a coarse grid (ties), per-query weights. Rank 1 is empty with 3
// or more ranks.
struct query_shard {
    std::vector<long> query;
    std::vector<int> relevance;
    std::vector<double> score, weight;
};

query_shard make_query_shard(std::size_t r, std::size_t ranks) {
    query_shard s;
    if (r == 1 && ranks >= 3)
        return s;
    heldout::rng g(23, r);
    const std::size_t queries = 8 + r;
    for (std::size_t j = 0; j < queries; ++j) {
        const auto rows = 1 + static_cast<std::size_t>(g.uniform() * 12.0);
        const bool none_relevant = j % 4 == 3;
        for (std::size_t i = 0; i < rows; ++i) {
            // Odd queries take their rows in turn with the query before them.
            const auto id = static_cast<long>(1000 * r + ((j % 2 == 1 && i % 2 == 0) ? j - 1 : j));
            const double u = g.uniform();
            s.query.push_back(id);
            s.relevance.push_back(none_relevant ? 0 : static_cast<int>(u * 4.0));
            s.score.push_back(std::round((u + 0.5 * g.uniform()) * 6.0) / 6.0);
            s.weight.push_back(0);
        }
    }
    // One weight per query (equal on its rows).
    for (std::size_t i = 0; i < s.query.size(); ++i)
        s.weight[i] = 0.25 * static_cast<double>(s.query[i] % 7 + 1);
    return s;
}

// Censored shard r: times on a grid (tied times, across shards too), about a third censored,
// a risk score, the survival probability at t = 2 and curves at t = 1, 2, 4.
struct censored_shard {
    std::vector<double> time, risk, surv2, curves;
    std::vector<int> event;
};

censored_shard make_censored_shard(std::size_t r, std::size_t ranks) {
    censored_shard s;
    const std::size_t rows = (r == 1 && ranks >= 3) ? 0 : 60 + 17 * r;
    heldout::rng g(31, r);
    for (std::size_t i = 0; i < rows; ++i) {
        const double x = g.uniform();
        s.time.push_back(std::round((0.2 + 5.0 * g.uniform() * (1.2 - x)) * 8.0) / 8.0);
        s.event.push_back(g.uniform() < 0.67 ? 1 : 0);
        s.risk.push_back(std::round(x * 20.0) / 20.0);
        const double s1 = std::exp(-0.2 * (0.5 + x)), s2 = s1 * s1, s4 = s2 * s2;
        s.surv2.push_back(s2);
        s.curves.insert(s.curves.end(), {s1, s2, s4});
    }
    return s;
}

// mpi::evaluate of m on this rank's shard, against heldout::evaluate on the concatenation.
template <class M, class Shard, class Distributed, class One>
void check_family(const M& m, const Shard& mine, const Shard& all, Distributed dist, One one) {
    const double d = dist(m, mine);
    const double o = one(m, all);
    expect(std::memcmp(&d, &o, sizeof d) == 0, "evaluate " + m.name() + " = one process bit for bit (" +
                                                   std::to_string(d) + " vs " + std::to_string(o) + ")");
}

} // namespace

int main(int argc, char** argv) {
    MPI_Init(&argc, &argv);
    MPI_Comm comm = MPI_COMM_WORLD;
    int rank_i = 0, ranks_i = 1;
    MPI_Comm_rank(comm, &rank_i);
    MPI_Comm_size(comm, &ranks_i);
    my_rank = rank_i;
    const auto rank = static_cast<std::size_t>(rank_i), ranks = static_cast<std::size_t>(ranks_i);

    try {
        // merge: bit for bit the one-machine left-to-right merge, for several families.
        check_merge(
            hm::mse{}, comm, ranks, rank, [](auto& a, const shard& s) { a.add(s.y, s.f); }, "MSE");
        check_merge(
            hm::r_squared{}, comm, ranks, rank, [](auto& a, const shard& s) { a.add(s.y, s.f); }, "R2");
        check_merge(
            hm::median_absolute_error{}, comm, ranks, rank, [](auto& a, const shard& s) { a.add(s.y, s.f); },
            "median absolute error");
        check_merge(
            hm::auc{}, comm, ranks, rank, [](auto& a, const shard& s) { a.add(s.outcome, s.prob); }, "AUC");
        check_merge(
            hm::average_precision{}, comm, ranks, rank, [](auto& a, const shard& s) { a.add(s.outcome, s.prob); },
            "average precision");
        check_merge(
            hm::brier_score{}, comm, ranks, rank, [](auto& a, const shard& s) { a.add(s.outcome, s.prob); }, "Brier");

        // evaluate: the union of the shards, compared with one process on the concatenation.
        {
            shard all;
            for (std::size_t r = 0; r < ranks; ++r) {
                const shard s = make_shard(r, ranks, 1e9);
                all.y.insert(all.y.end(), s.y.begin(), s.y.end());
                all.f.insert(all.f.end(), s.f.begin(), s.f.end());
                all.prob.insert(all.prob.end(), s.prob.begin(), s.prob.end());
                all.outcome.insert(all.outcome.end(), s.outcome.begin(), s.outcome.end());
            }
            const shard s = make_shard(rank, ranks, 1e9);
            const double auc = heldout::mpi::evaluate(hm::auc{}, s.outcome, s.prob, comm);
            expect(auc == heldout::evaluate(hm::auc{}, all.outcome, all.prob), "evaluate AUC = one process");
            const double ap = heldout::mpi::evaluate(hm::average_precision{}, s.outcome, s.prob, comm);
            expect(ap == heldout::evaluate(hm::average_precision{}, all.outcome, all.prob),
                   "evaluate average precision = one process");
            const double r2 = heldout::mpi::evaluate(hm::r_squared{}, s.y, s.f, comm);
            const double r2_one = heldout::evaluate(hm::r_squared{}, all.y, all.f);
            // Shards merged vs one pass: the same sums in another order, so agreement to 1e-12
            // (at offset 1e9 a raw sum of squares would lose every digit).
            expect(std::abs(r2 - r2_one) <= 1e-12 * std::abs(r2_one), "evaluate R2 at offset 1e9 = one process");
            const std::vector<double> w(s.y.size(), 2.0), w_all(all.y.size(), 2.0);
            const double mae = heldout::mpi::evaluate(hm::mae{}, s.y, s.f, w, comm);
            const double mae_one = heldout::evaluate(hm::mae{}, all.y, all.f, w_all);
            expect(std::abs(mae - mae_one) <= 1e-12 * mae_one, "weighted evaluate MAE = one process");
        }

        // evaluate, query family: each query on one rank; bit for bit one process.
        {
            query_shard all;
            for (std::size_t r = 0; r < ranks; ++r) {
                const query_shard q = make_query_shard(r, ranks);
                all.query.insert(all.query.end(), q.query.begin(), q.query.end());
                all.relevance.insert(all.relevance.end(), q.relevance.begin(), q.relevance.end());
                all.score.insert(all.score.end(), q.score.begin(), q.score.end());
                all.weight.insert(all.weight.end(), q.weight.begin(), q.weight.end());
            }
            const query_shard mine = make_query_shard(rank, ranks);
            auto dist = [&](const auto& m, const query_shard& q) {
                return heldout::mpi::evaluate(m, heldout::by_query(q.query, q.relevance), q.score, comm);
            };
            auto one = [](const auto& m, const query_shard& q) {
                return heldout::evaluate(m, heldout::by_query(q.query, q.relevance), q.score);
            };
            auto dist_w = [&](const auto& m, const query_shard& q) {
                return heldout::mpi::evaluate(m, heldout::by_query(q.query, q.relevance), q.score, q.weight, comm);
            };
            auto one_w = [](const auto& m, const query_shard& q) {
                return heldout::evaluate(m, heldout::by_query(q.query, q.relevance), q.score, q.weight);
            };
            check_family(hm::ndcg{.k = 10}, mine, all, dist, one);
            check_family(hm::ndcg{.k = 3, .gain = heldout::gain::linear, .no_relevant = heldout::if_no_relevant::zero},
                         mine, all, dist, one);
            check_family(hm::dcg{.k = 0}, mine, all, dist, one);
            check_family(hm::precision_at{.k = 3}, mine, all, dist, one);
            check_family(hm::recall_at{.k = 5}, mine, all, dist, one);
            check_family(hm::reciprocal_rank{}, mine, all, dist, one);
            check_family(hm::average_precision_at{.k = 0}, mine, all, dist, one);
            check_family(hm::ndcg{.k = 5}, mine, all, dist_w, one_w);
            check_family(hm::average_precision_at{.k = 4}, mine, all, dist_w, one_w);

            // merge of query states: the left-to-right merge of the shards' states.
            auto acc = hm::ndcg{.k = 10}.accumulator();
            if (!mine.query.empty())
                acc.add(heldout::by_query(mine.query, mine.relevance), mine.score);
            const auto merged = heldout::mpi::merge(acc, comm);
            auto single = hm::ndcg{.k = 10}.accumulator();
            for (std::size_t r = 0; r < ranks; ++r) {
                const query_shard q = make_query_shard(r, ranks);
                auto part = hm::ndcg{.k = 10}.accumulator();
                if (!q.query.empty())
                    part.add(heldout::by_query(q.query, q.relevance), q.score);
                single.merge(part);
            }
            expect(same_bytes(merged, single), "merge of NDCG states equals the left-to-right merge");

            // A query id on two ranks (rank 0's first query again on the last rank) is an
            // input_error on every rank naming the query and both ranks.
            if (ranks > 1) {
                query_shard q = make_query_shard(rank, ranks);
                if (rank + 1 == ranks) {
                    q.query.push_back(0);
                    q.relevance.push_back(1);
                    q.score.push_back(0.5);
                }
                std::string message;
                try {
                    (void)heldout::mpi::evaluate(hm::ndcg{}, heldout::by_query(q.query, q.relevance), q.score, comm);
                } catch (const heldout::input_error& e) {
                    message = e.what();
                }
                expect(message.find("query 0 has rows on rank 0 and rank " + std::to_string(ranks - 1)) !=
                           std::string::npos,
                       "a query split over two ranks is refused naming it (got: " + message + ")");
            }
        }

        // evaluate, censored family: bit for bit one process on the concatenated rows.
        {
            censored_shard all;
            for (std::size_t r = 0; r < ranks; ++r) {
                const censored_shard c = make_censored_shard(r, ranks);
                all.time.insert(all.time.end(), c.time.begin(), c.time.end());
                all.event.insert(all.event.end(), c.event.begin(), c.event.end());
                all.risk.insert(all.risk.end(), c.risk.begin(), c.risk.end());
                all.surv2.insert(all.surv2.end(), c.surv2.begin(), c.surv2.end());
                all.curves.insert(all.curves.end(), c.curves.begin(), c.curves.end());
            }
            const censored_shard mine = make_censored_shard(rank, ranks);
            auto risk_d = [&](const auto& m, const censored_shard& c) {
                return heldout::mpi::evaluate(m, heldout::censored(c.time, c.event), c.risk, comm);
            };
            auto risk_1 = [](const auto& m, const censored_shard& c) {
                return heldout::evaluate(m, heldout::censored(c.time, c.event), c.risk);
            };
            check_family(hm::harrell_c{}, mine, all, risk_d, risk_1);
            check_family(hm::uno_c{.horizon = 3.0}, mine, all, risk_d, risk_1);
            check_family(hm::auc_at{.time = 2.0}, mine, all, risk_d, risk_1);
            check_family(
                hm::brier_at{.time = 2.0}, mine, all,
                [&](const auto& m, const censored_shard& c) {
                    return heldout::mpi::evaluate(m, heldout::censored(c.time, c.event), c.surv2, comm);
                },
                [](const auto& m, const censored_shard& c) {
                    return heldout::evaluate(m, heldout::censored(c.time, c.event), c.surv2);
                });
            check_family(
                hm::brier_over{.times = {1.0, 2.0, 4.0}}, mine, all,
                [&](const auto& m, const censored_shard& c) {
                    return heldout::mpi::evaluate(m, heldout::censored(c.time, c.event), heldout::rows(c.curves, 3),
                                                  comm);
                },
                [](const auto& m, const censored_shard& c) {
                    return heldout::evaluate(m, heldout::censored(c.time, c.event), heldout::rows(c.curves, 3));
                });
        }

        // evaluate_splits: the same aggregator as one process, k-fold and bootstrap plans.
        {
            heldout::rng g(5, 0);
            const std::size_t n = 240;
            std::vector<double> x(n), y(n);
            std::vector<int> yb(n);
            for (std::size_t i = 0; i < n; ++i) {
                x[i] = g.uniform();
                y[i] = 2.0 * x[i] + 0.3 * (g.uniform() - 0.5);
                yb[i] = y[i] > 1.0 ? 1 : 0;
            }
            line_model model{&x, &y};
            const auto plan = heldout::repeated_kfold{.folds = 5, .repeats = 3, .seed = 9};
            std::size_t reported = 0;
            heldout::mpi::split_options opt;
            opt.progress = [&](std::size_t done, std::size_t total) {
                expect(done <= total && done >= reported, "progress counts up");
                reported = done;
            };
            const auto dist = heldout::mpi::evaluate_splits(comm, plan.splits(n), y, model, opt, hm::mse{}, hm::mae{});
            const auto one = heldout::evaluate_splits(plan.splits(n), y, model, hm::mse{}, hm::mae{});
            expect(describe(dist, hm::mse{}, hm::mae{}) == describe(one, hm::mse{}, hm::mae{}),
                   "evaluate_splits (k-fold) = one process");
            if (rank == 0)
                expect(reported == 15, "progress reached 15 of 15 on rank 0");

            // Fewer splits than workers (2 splits, up to 3 workers): a worker without a first
            // split stops at once, and the result is still the one-process aggregator.
            const auto two = heldout::kfold{.folds = 2, .seed = 6};
            expect(describe(heldout::mpi::evaluate_splits(comm, two.splits(n), y, model, hm::mse{}), hm::mse{}) ==
                       describe(heldout::evaluate_splits(two.splits(n), y, model, hm::mse{}), hm::mse{}),
                   "evaluate_splits with fewer splits than ranks = one process");

            auto prob = [&](std::span<const std::size_t> train, std::span<const std::size_t> test) {
                auto f = model(train, test);
                for (double& v : f)
                    v = std::clamp(v / 2.0, 0.01, 0.99);
                return f;
            };
            const auto boot = heldout::bootstrap{.replicates = 12, .seed = 4};
            const auto dist_b =
                heldout::mpi::evaluate_splits(comm, boot.splits(n), yb, prob, hm::brier_score{}, hm::auc{});
            const auto one_b = heldout::evaluate_splits(boot.splits(n), yb, prob, hm::brier_score{}, hm::auc{});
            expect(describe(dist_b, hm::brier_score{}, hm::auc{}) == describe(one_b, hm::brier_score{}, hm::auc{}),
                   "evaluate_splits (bootstrap, apparent fit) = one process");

            // A fit that throws on split 7: every rank throws remote_error with its message.
            auto failing = [&](std::span<const std::size_t> train, std::span<const std::size_t> test) {
                if (train.size() + test.size() == n && test.size() > 0 && test[0] == one.test_rows(7)[0] &&
                    test.size() == one.test_rows(7).size())
                    throw std::runtime_error("the fit of split 7 diverged");
                return model(train, test);
            };
            bool thrown = false;
            try {
                (void)heldout::mpi::evaluate_splits(comm, plan.splits(n), y, failing, hm::mse{});
            } catch (const heldout::mpi::remote_error& e) {
                thrown = std::string(e.what()).find("the fit of split 7 diverged") != std::string::npos &&
                         std::string(e.what()).find("rank " + std::to_string(e.rank())) != std::string::npos;
            }
            expect(thrown, "a failed fit throws remote_error on every rank");

            // A fit that fails on the last rank only (whatever it fits). Each worker starts on a
            // split of its own without asking (worker w on split w - 1), so the last rank fits
            // one however late it starts; the others' fits are slowed (50 ms each) as well.
            auto fails_last = [&](std::span<const std::size_t> train, std::span<const std::size_t> test) {
                if (rank + 1 == ranks)
                    throw std::runtime_error("out of memory on this host");
                std::this_thread::sleep_for(std::chrono::milliseconds(50));
                return model(train, test);
            };
            thrown = false;
            try {
                (void)heldout::mpi::evaluate_splits(comm, plan.splits(n), y, fails_last, hm::mse{});
            } catch (const heldout::mpi::remote_error& e) {
                thrown = e.rank() == ranks_i - 1 && e.remote_message() == "out of memory on this host";
            }
            expect(thrown, "a rank whose fits fail is named on every rank");

            // Different seeds on different ranks are refused everywhere.
            if (ranks > 1) {
                const auto odd =
                    heldout::repeated_kfold{.folds = 5, .repeats = 3, .seed = rank + 1 == ranks ? 10u : 9u};
                bool refused = false;
                try {
                    (void)heldout::mpi::evaluate_splits(comm, odd.splits(n), y, model, hm::mse{});
                } catch (const heldout::state_error& e) {
                    refused = std::string(e.what()).find("splits") != std::string::npos;
                }
                expect(refused, "a seed that differs on one rank is refused on every rank");
            }
        }

        // Bad input on one rank: every rank throws remote_error naming it.
        {
            shard s = make_shard(0, 1, 0.0);
            if (rank + 1 == ranks)
                s.f[3] = std::nan("");
            bool thrown = false;
            try {
                (void)heldout::mpi::evaluate(hm::mse{}, s.y, s.f, comm);
            } catch (const heldout::mpi::remote_error& e) {
                thrown = e.rank() == ranks_i - 1 && e.remote_message().find("index 3") != std::string::npos;
            }
            expect(thrown, "bad input on one rank throws remote_error on every rank");
        }

        // Different measure parameters are refused (merge and evaluate).
        if (ranks > 1) {
            const hm::binned_auc m{.bins = rank == 0 ? 512u : 1024u, .low = 0, .high = 1};
            const shard s = make_shard(rank, ranks, 0.0);
            bool refused = false;
            try {
                (void)heldout::mpi::evaluate(m, s.outcome, s.prob, comm);
            } catch (const heldout::state_error&) {
                refused = true;
            }
            expect(refused, "evaluate with different bins on different ranks is refused");
            auto acc = m.accumulator();
            refused = false;
            try {
                (void)heldout::mpi::merge(acc, comm);
            } catch (const heldout::state_error&) {
                refused = true;
            }
            expect(refused, "merge of differently binned states is refused");
        }
    } catch (const std::exception& e) {
        std::fprintf(stderr, "rank %d: unexpected exception: %s\n", rank_i, e.what());
        ++failures;
    }
    int total = 0;
    MPI_Allreduce(&failures, &total, 1, MPI_INT, MPI_SUM, comm);
    if (rank == 0 && total == 0)
        std::printf("heldout::mpi checks passed on %d ranks\n", ranks_i);
    MPI_Finalize();
    return total == 0 ? 0 : 1;
}
