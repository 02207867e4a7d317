// heldout/mpi.hpp — heldout over MPI: merge shard states, score sharded test sets, and share
// a resampling plan's fits among ranks. Not part of <heldout/heldout.hpp> (it needs <mpi.h>);
// link the CMake target heldout::mpi (find_package(heldout CONFIG COMPONENTS mpi)).
//
//   auto acc = heldout::measure::auc{}.accumulator();
//   acc.add(my_truth_shard, my_score_shard);
//   auto all = heldout::mpi::merge(acc, MPI_COMM_WORLD);          // same on every rank
//   double auc = heldout::mpi::evaluate(heldout::measure::auc{}, my_truth_shard, my_score_shard,
//                                       MPI_COMM_WORLD);
//   double n10 = heldout::mpi::evaluate(heldout::measure::ndcg{.k = 10},       // <heldout/query.hpp>
//                                       heldout::by_query(my_query_ids, my_relevance), my_scores,
//                                       MPI_COMM_WORLD);               // each query on one rank
//   heldout::aggregator agg = heldout::mpi::evaluate_splits(
//       MPI_COMM_WORLD, heldout::repeated_kfold{.folds = 10, .repeats = 10, .seed = 1}.splits(n), y,
//       fit_predict, heldout::measure::mse{});                      // same on every rank
//
// Every function is collective: call it on every rank of `comm`, with the same measures and
// (for evaluate_splits) the same plan and truth. A fingerprint of those is exchanged first and
// a mismatch is refused on every rank (heldout::state_error, an input_error). An exception on one rank (bad
// input, a failed fit) makes every rank throw heldout::mpi::remote_error naming the failing rank
// and carrying its message, after the ranks have agreed on it — no rank is left waiting.
// evaluate takes every measure family; a query measure's queries must each lie on one rank.
// Layout of what travels and the dispatch protocol: docs/mpi.md.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/measure.hpp>
#include <heldout/core/split.hpp>
#include <heldout/core/values.hpp>
#include <heldout/estimate/aggregator.hpp>
#include <heldout/estimate/evaluate_splits.hpp>
#include <heldout/stream/serialize.hpp>

#include <mpi.h>

#include <algorithm>
#include <climits>
#include <cstddef>
#include <cstdint>
#include <cstring>
#include <exception>
#include <functional>
#include <numeric>
#include <optional>
#include <ranges>
#include <span>
#include <stdexcept>
#include <string>
#include <type_traits>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

namespace mpi {

/// Thrown on every rank when a rank failed: rank() is the failing rank (the lowest one if
/// several failed; for evaluate_splits the rank that ran the earliest failing split),
/// remote_message() its exception's what().
class remote_error : public std::runtime_error {
public:
    remote_error(int rank, std::string message)
        : std::runtime_error("heldout::mpi: rank " + std::to_string(rank) + " failed: " + message), rank_(rank),
          message_(std::move(message)) {}
    int rank() const noexcept { return rank_; }
    static constexpr error_code code() noexcept { return error_code::remote; }
    const std::string& remote_message() const noexcept { return message_; }

private:
    int rank_;
    std::string message_;
};

/// Settings of mpi::evaluate_splits.
struct split_options {
    bool keep_predictions = true; ///< keep the out-of-fold predictions in the aggregator
    bool apparent = true;         ///< bootstrap plans: also fit_predict(all rows, all rows)
    /// Called on rank 0 only, with (splits finished on all ranks, total fits), as fits finish.
    std::function<void(std::size_t done, std::size_t total)> progress{};
};

} // namespace mpi

namespace detail::mpi_impl {

inline void check(int rc, const char* what) {
    if (rc != MPI_SUCCESS)
        throw std::runtime_error(std::string("heldout::mpi: ") + what + " failed (MPI error " + std::to_string(rc) +
                                 ")");
}

inline int rank_of(MPI_Comm comm) {
    int r = 0;
    check(MPI_Comm_rank(comm, &r), "MPI_Comm_rank");
    return r;
}

inline int size_of(MPI_Comm comm) {
    int s = 0;
    check(MPI_Comm_size(comm, &s), "MPI_Comm_size");
    return s;
}

inline void put_u64(std::vector<std::byte>& out, std::uint64_t v) {
    for (int i = 0; i < 8; ++i)
        out.push_back(static_cast<std::byte>((v >> (8 * i)) & 0xffu));
}

inline std::uint64_t get_u64(std::span<const std::byte> in, std::size_t& at) {
    if (in.size() - at < 8)
        throw std::runtime_error("heldout::mpi: truncated message");
    std::uint64_t v = 0;
    for (int i = 0; i < 8; ++i)
        v |= static_cast<std::uint64_t>(in[at + static_cast<std::size_t>(i)]) << (8 * i);
    at += 8;
    return v;
}

/// Every rank's bytes on every rank, in rank order (sizes first, then MPI_Allgatherv).
inline std::vector<std::vector<std::byte>> all_gather(std::span<const std::byte> mine, MPI_Comm comm) {
    const int p = size_of(comm);
    const auto n = static_cast<std::size_t>(p);
    unsigned long long size = mine.size();
    std::vector<unsigned long long> sizes(n);
    check(MPI_Allgather(&size, 1, MPI_UNSIGNED_LONG_LONG, sizes.data(), 1, MPI_UNSIGNED_LONG_LONG, comm),
          "MPI_Allgather");
    std::vector<int> counts(n), offsets(n);
    unsigned long long total = 0;
    for (std::size_t r = 0; r < n; ++r) {
        // MPI counts are int: one exchange carries at most 2 GiB - 1. Every rank sees the same
        // sizes, so every rank refuses together.
        if (total + sizes[r] > static_cast<unsigned long long>(INT_MAX))
            throw input_error(error_details{error_code::bad_argument,
                                            "heldout::mpi",
                                            "state",
                                            "the ranks' bytes add up to more than 2 GiB in one exchange",
                                            {}});
        counts[r] = static_cast<int>(sizes[r]);
        offsets[r] = static_cast<int>(total);
        total += sizes[r];
    }
    std::vector<std::byte> all(static_cast<std::size_t>(total));
    check(MPI_Allgatherv(mine.data(), static_cast<int>(mine.size()), MPI_BYTE, all.data(), counts.data(),
                         offsets.data(), MPI_BYTE, comm),
          "MPI_Allgatherv");
    std::vector<std::vector<std::byte>> out(n);
    for (std::size_t r = 0; r < n; ++r)
        out[r].assign(all.begin() + offsets[r], all.begin() + offsets[r] + counts[r]);
    return out;
}

inline std::vector<std::byte> bytes_of(std::string_view s) {
    std::vector<std::byte> b(s.size());
    if (!s.empty())
        std::memcpy(b.data(), s.data(), s.size());
    return b;
}

/// The agreement step: every rank says whether it failed (and why); if any did, every rank
/// throws remote_error for the lowest failing rank. Collective.
inline void agree(std::optional<std::string> my_failure, MPI_Comm comm) {
    int failed = my_failure ? 1 : 0, any = 0;
    check(MPI_Allreduce(&failed, &any, 1, MPI_INT, MPI_MAX, comm), "MPI_Allreduce");
    if (!any)
        return;
    const auto all = all_gather(bytes_of(my_failure ? "1" + *my_failure : std::string("0")), comm);
    for (std::size_t r = 0; r < all.size(); ++r)
        if (!all[r].empty() && all[r][0] == std::byte{'1'})
            throw mpi::remote_error(static_cast<int>(r),
                                    std::string(reinterpret_cast<const char*>(all[r].data()) + 1, all[r].size() - 1));
}

/// Runs f on this rank, then agrees with the others (see agree). Returns f's result.
template <class F>
auto guarded(MPI_Comm comm, F&& f) {
    using R = std::invoke_result_t<F&>;
    std::optional<std::string> failure;
    if constexpr (std::is_void_v<R>) {
        try {
            f();
        } catch (const std::exception& e) {
            failure = e.what();
        } catch (...) {
            failure = "unknown exception";
        }
        agree(std::move(failure), comm);
    } else {
        std::optional<R> out;
        try {
            out.emplace(f());
        } catch (const std::exception& e) {
            failure = e.what();
        } catch (...) {
            failure = "unknown exception";
        }
        agree(std::move(failure), comm);
        return std::move(*out);
    }
}

/// Refuses (on every rank) if the ranks' fingerprints differ; `what` says what differs.
inline void same_everywhere(std::uint64_t fingerprint, std::string_view who, std::string_view what, MPI_Comm comm) {
    const auto n = static_cast<std::size_t>(size_of(comm));
    unsigned long long mine = fingerprint;
    std::vector<unsigned long long> all(n);
    check(MPI_Allgather(&mine, 1, MPI_UNSIGNED_LONG_LONG, all.data(), 1, MPI_UNSIGNED_LONG_LONG, comm),
          "MPI_Allgather");
    for (std::size_t r = 1; r < n; ++r)
        if (all[r] != all[0])
            throw state_error(error_details{error_code::state_mismatch,
                                            std::string(who),
                                            std::string(what),
                                            "differs between rank 0 and rank " + std::to_string(r) +
                                                " (every rank must pass the same)",
                                            {}});
}

/// FNV-1a over more data, continuing from h.
inline std::uint64_t hash_more(std::uint64_t h, const void* p, std::size_t n) {
    const auto* b = static_cast<const unsigned char*>(p);
    for (std::size_t i = 0; i < n; ++i) {
        h ^= b[i];
        h *= fnv_prime;
    }
    return h;
}

inline std::uint64_t hash_u64(std::uint64_t h, std::uint64_t v) {
    unsigned char b[8];
    for (int i = 0; i < 8; ++i)
        b[i] = static_cast<unsigned char>((v >> (8 * i)) & 0xffu);
    return hash_more(h, b, 8);
}

/// A measure's identity: its name and its fresh accumulator's serialised state (which carries
/// the parameters, see stream/serialize.hpp).
template <class M>
std::uint64_t measure_fingerprint(std::uint64_t h, const M& m) {
    const std::string name = m.name();
    h = hash_more(h, name.data(), name.size());
    const auto bytes = serialize(m.accumulator());
    return hash_more(h, bytes.data(), bytes.size());
}

/// Rows of a truth shard: a range of numbers, or a family's truth view with size()
/// (heldout::by_query judgements, heldout::censored times).
template <class T>
std::size_t truth_rows(const T& truth) {
    if constexpr (requires { truth.size(); } && !value_range<T>)
        return truth.size();
    else
        return values_of(truth, "heldout::mpi::evaluate", "truth_shard").size();
}

/// A rank may hold no rows: its shard is skipped (an empty accumulator), where add() would
/// refuse an empty input. A non-empty prediction beside empty truth still goes to add().
template <class T, class P>
bool empty_shard(const T& truth, const P& prediction) {
    if (truth_rows(truth) != 0)
        return false;
    if constexpr (requires { prediction.size(); })
        return prediction.size() == 0;
    else if constexpr (probability_rows<P>)
        return rows_of(prediction).rows == 0;
    else
        return false;
}

/// Query accumulators (query/accumulator.hpp) keep one value per query, and a query id met
/// again in another shard counts as another query; one process over the concatenated shards
/// would pool its rows into one query instead. So a query must lie on one rank: an id held by
/// two ranks is refused (the smallest such id, with the two lowest ranks holding it). Every
/// rank runs this on the same states, so every rank refuses together.
template <class A>
void check_queries_on_one_rank(const std::vector<A>& states) {
    if constexpr (requires(const A& a) {
                      a.per_query();
                      a.skipped();
                  }) {
        std::vector<std::pair<std::int64_t, std::size_t>> ids; // (query, rank)
        for (std::size_t r = 0; r < states.size(); ++r) {
            for (const auto& q : states[r].per_query())
                ids.emplace_back(q.query, r);
            for (const std::int64_t q : states[r].skipped())
                ids.emplace_back(q, r);
        }
        std::sort(ids.begin(), ids.end());
        for (std::size_t i = 1; i < ids.size(); ++i)
            if (ids[i].first == ids[i - 1].first && ids[i].second != ids[i - 1].second)
                detail::fail("heldout::mpi::evaluate", "truth_shard",
                             "query " + std::to_string(ids[i].first) + " has rows on rank " +
                                 std::to_string(ids[i - 1].second) + " and rank " + std::to_string(ids[i].second) +
                                 ": each query must lie whole on one rank (a query id on two shards would be "
                                 "two queries)");
    }
}

/// The states of every rank, merged left to right (rank 0's first) after `check` saw them
/// all. Collective; the fingerprint check of merge() comes first.
template <class A, class Check>
A merge_checked(const A& acc, MPI_Comm comm, std::string_view who, Check&& check_states) {
    // The same measure and parameters everywhere: the state of a reset copy keeps only those.
    const auto fingerprint = guarded(comm, [&] {
        A empty = acc;
        empty.reset();
        const auto b = serialize(empty);
        return fnv1a(b);
    });
    same_everywhere(fingerprint, who, "acc", comm);
    const auto mine = guarded(comm, [&] { return serialize(acc); });
    const auto all = all_gather(mine, comm);
    auto states = guarded(comm, [&] {
        std::vector<A> v;
        v.reserve(all.size());
        for (const auto& b : all)
            v.push_back(deserialize<A>(b));
        return v;
    });
    // Every rank holds the same states here: the check throws on every rank or on none, so it
    // throws its own error (an input_error) rather than a remote_error.
    check_states(std::as_const(states));
    return guarded(comm, [&] {
        A out = std::move(states[0]);
        for (std::size_t r = 1; r < states.size(); ++r)
            out.merge(states[r]);
        return out;
    });
}

/// evaluate's body: the shard into a fresh accumulator (add_shard), merged over the ranks.
template <class M, class T, class P, class Add>
double evaluate_shards(const M& m, const T& truth_shard, const P& prediction_shard, MPI_Comm comm, Add&& add_shard) {
    same_everywhere(guarded(comm, [&] { return measure_fingerprint(fnv_offset, m); }), "heldout::mpi::evaluate", "m",
                    comm);
    auto acc = m.accumulator();
    guarded(comm, [&] {
        if (!empty_shard(truth_shard, prediction_shard))
            add_shard(acc);
    });
    const auto all = merge_checked(acc, comm, "heldout::mpi::evaluate",
                                   [](const auto& states) { check_queries_on_one_rank(states); });
    return guarded(comm, [&] { return all.value(); });
}

// Messages of the split dispatcher.
inline constexpr int tag_request = 7301; // worker -> rank 0: {failed, tasks finished}
inline constexpr int tag_task = 7302;    // rank 0 -> worker: task index, or -1 for "stop"

} // namespace detail::mpi_impl

namespace mpi {

/// The merged accumulator of every rank's `acc`, on every rank: bit for bit what merging the
/// shards left to right on one machine gives (rank 0's first). Collective.
template <class A>
requires detail::visitable_state<A> A merge(const A& acc, MPI_Comm comm) {
    return detail::mpi_impl::merge_checked(acc, comm, "heldout::mpi::merge", [](const auto&) {});
}

/// The measure on the union of every rank's shard (rank order), on every rank, bit for bit
/// the one-process value over the concatenated shards (rank 0's first). Every measure family:
/// truth and prediction as the measure takes them (numbers; heldout::by_query judgements with
/// scores; heldout::censored times with risks, survival probabilities or heldout::rows curves).
/// Query measures: each query lies whole on one rank (an id on two ranks: input_error naming
/// it). Collective.
template <outer_measure M, class T, class P>
requires scores<M, T, P>
double evaluate(const M& m, const T& truth_shard, const P& prediction_shard, MPI_Comm comm) {
    return detail::mpi_impl::evaluate_shards(m, truth_shard, prediction_shard, comm,
                                             [&](auto& acc) { acc.add(truth_shard, prediction_shard); });
}

/// The same with per-row weights (query measures: per-query weights, equal on a query's rows).
template <outer_measure M, class T, class P, class W>
requires scores_weighted<M, T, P, W>
double evaluate(const M& m, const T& truth_shard, const P& prediction_shard, const W& weight_shard, MPI_Comm comm) {
    return detail::mpi_impl::evaluate_shards(m, truth_shard, prediction_shard, comm,
                                             [&](auto& acc) { acc.add(truth_shard, prediction_shard, weight_shard); });
}

/// Shares the plan's fits among the ranks (rank 0 hands out the next split to whichever rank
/// asks, and fits splits itself between requests); every rank returns the same aggregator,
/// identical to heldout::evaluate_splits on one process (splits recorded in plan order).
/// fit_predict must return a contiguous range of numbers (one prediction per test row).
/// Collective: every rank passes the same plan, truth and measures (checked).
template <std::ranges::input_range Splits, value_range T, class F, outer_measure... Ms>
requires std::invocable<F&, std::span<const std::size_t>, std::span<const std::size_t>>
    aggregator evaluate_splits(MPI_Comm comm, Splits&& splits, const T& truth, F&& fit_predict,
                               const split_options& options, const Ms&... measures) {
    namespace impl = detail::mpi_impl;
    constexpr std::string_view who = "heldout::mpi::evaluate_splits";
    using E = element_t<T>;
    using R = detail::fit_result_t<F>;
    static_assert(value_range<R>, "heldout::mpi::evaluate_splits: fit_predict must return a contiguous range of "
                                  "numbers (std::vector<double>, std::span, an Eigen vector)");
    using V = element_t<R>;
    const int rank = impl::rank_of(comm);
    const int ranks = impl::size_of(comm);

    // 1. Every rank computes the whole plan (cheap next to the fits) and checks it.
    struct plan_state {
        std::vector<owned_split> all;
        bool bootstrap = false;
        std::size_t bootstrap_rows = 0;
    };
    const auto y = impl::guarded(comm, [&] { return values_of(truth, who, "truth"); });
    plan_state plan = impl::guarded(comm, [&] {
        detail::check_nonempty(who, "truth", y.size());
        plan_state p;
        for (const split& s : splits) {
            detail::check_rows(s.train, y.size(), "split.train");
            detail::check_rows(s.test, y.size(), "split.test");
            if (!s.counts.empty()) {
                p.bootstrap = true;
                p.bootstrap_rows = s.counts.size();
            }
            p.all.emplace_back(s);
        }
        if (p.bootstrap && options.apparent && p.bootstrap_rows != y.size())
            detail::fail(who, "truth",
                         "the bootstrap splits cover " + std::to_string(p.bootstrap_rows) + " rows, truth has " +
                             std::to_string(y.size()));
        return p;
    });

    // 2. The same plan, truth, measures and options on every rank, or none runs.
    {
        std::uint64_t h = detail::fnv_offset;
        h = impl::hash_u64(h, plan.all.size());
        for (const owned_split& s : plan.all) {
            h = impl::hash_u64(h, s.train.size());
            h = impl::hash_more(h, s.train.data(), s.train.size() * sizeof(std::size_t));
            h = impl::hash_u64(h, s.test.size());
            h = impl::hash_more(h, s.test.data(), s.test.size() * sizeof(std::size_t));
            h = impl::hash_more(h, s.counts.data(), s.counts.size() * sizeof(std::uint32_t));
            h = impl::hash_u64(h, s.repeat * 1000003u + s.fold);
        }
        impl::same_everywhere(h, who, "splits", comm);
        std::uint64_t t = impl::hash_u64(detail::fnv_offset, y.size());
        t = impl::hash_more(t, y.data(), y.size() * sizeof(E));
        impl::same_everywhere(t, who, "truth", comm);
        std::uint64_t m = impl::hash_u64(detail::fnv_offset, sizeof...(Ms));
        m = impl::guarded(comm, [&] {
            std::uint64_t mm = m;
            ((mm = impl::measure_fingerprint(mm, measures)), ...);
            mm = impl::hash_u64(mm, (options.keep_predictions ? 1u : 0u) + (options.apparent ? 2u : 0u));
            return mm;
        });
        impl::same_everywhere(m, who, "measures", comm);
    }

    // Tasks: the splits in plan order, then the apparent fit of a bootstrap plan.
    const std::size_t n_splits = plan.all.size();
    const bool apparent = plan.bootstrap && options.apparent;
    const std::size_t tasks = n_splits + (apparent ? 1 : 0);
    auto no_out_of_bag = [](const owned_split& s) { return s.test.empty() && !s.counts.empty(); };
    std::vector<std::size_t> all_rows;
    if (apparent) {
        all_rows.resize(y.size());
        std::iota(all_rows.begin(), all_rows.end(), std::size_t{0});
    }

    // What this rank produced: per task, its predictions as bytes, or its failure.
    std::vector<std::byte> done_bytes;
    std::size_t finished = 0;
    bool failed = false;
    std::size_t failed_task = 0;
    std::string failure;
    auto run_task = [&](std::size_t task) {
        if (failed)
            return;
        try {
            std::vector<V> pred;
            if (task < n_splits) {
                const owned_split& s = plan.all[task];
                if (!no_out_of_bag(s)) {
                    const auto r =
                        fit_predict(std::span<const std::size_t>(s.train), std::span<const std::size_t>(s.test));
                    const auto v = values_of(r, who, "fit_predict result");
                    pred.assign(v.begin(), v.end());
                }
            } else {
                const auto r =
                    fit_predict(std::span<const std::size_t>(all_rows), std::span<const std::size_t>(all_rows));
                const auto v = values_of(r, who, "fit_predict result");
                pred.assign(v.begin(), v.end());
            }
            impl::put_u64(done_bytes, task);
            impl::put_u64(done_bytes, pred.size());
            const std::size_t at = done_bytes.size();
            done_bytes.resize(at + pred.size() * sizeof(V));
            if (!pred.empty())
                std::memcpy(done_bytes.data() + at, pred.data(), pred.size() * sizeof(V));
        } catch (const std::exception& e) {
            failed = true;
            failed_task = task;
            failure = e.what();
        } catch (...) {
            failed = true;
            failed_task = task;
            failure = "unknown exception";
        }
        ++finished;
    };

    // 3. Dynamic hand-out. Worker w starts on task w - 1 without asking (nobody waits for
    //    rank 0's first fit); rank 0 keeps the counter from there, fits too, and answers
    //    requests between its own fits. Each worker asks for its next task before fitting the
    //    current one, so the answer is waiting when it finishes as long as rank 0's fits are
    //    not longer than the worker's. Only (task, count) pairs travel until the end.
    std::size_t reported = 0;
    if (ranks == 1) {
        for (std::size_t t = 0; t < tasks && !failed; ++t) {
            run_task(t);
            if (options.progress && !failed)
                options.progress(reported = finished, tasks);
        }
    } else if (rank == 0) {
        const auto workers = static_cast<std::size_t>(ranks - 1);
        std::size_t next = std::min(workers, tasks); // tasks 0 .. ranks - 2 went to the workers
        bool stop = false;
        // A worker without a first task sends no request: it is stopped from the start.
        auto stopped_workers = static_cast<int>(workers - next);
        std::vector<std::size_t> worker_done(static_cast<std::size_t>(ranks), 0);
        auto report = [&] {
            std::size_t d = finished;
            for (std::size_t w : worker_done)
                d += w;
            if (options.progress && d != reported) {
                reported = d;
                options.progress(d, tasks);
            }
        };
        auto answer = [&](const MPI_Status& st, const long long(&msg)[2]) {
            if (msg[0] != 0)
                stop = true; // a failed worker: hand out nothing more, to anyone
            worker_done[static_cast<std::size_t>(st.MPI_SOURCE)] = static_cast<std::size_t>(msg[1]);
            long long task = -1;
            if (!stop && next < tasks)
                task = static_cast<long long>(next++);
            if (task < 0)
                ++stopped_workers;
            impl::check(MPI_Send(&task, 1, MPI_LONG_LONG, st.MPI_SOURCE, impl::tag_task, comm), "MPI_Send");
            report();
        };
        // A probe that finds nothing is asked once more: an implementation may match only
        // what its progress engine had already pulled in before the probe, and pull in the
        // waiting request during the probe that reports none (measured with Open MPI 4.1:
        // with one probe, a worker's request sent at the start of its fit was seen only after
        // two of rank 0's fits, and the worker fitted 34 of 100 splits instead of 50).
        auto serve_pending = [&] {
            for (;;) {
                int flag = 0;
                MPI_Status st;
                for (int probe = 0; probe < 2 && !flag; ++probe)
                    impl::check(MPI_Iprobe(MPI_ANY_SOURCE, impl::tag_request, comm, &flag, &st), "MPI_Iprobe");
                if (!flag)
                    return;
                long long msg[2];
                impl::check(MPI_Recv(msg, 2, MPI_LONG_LONG, st.MPI_SOURCE, impl::tag_request, comm, &st), "MPI_Recv");
                answer(st, msg);
            }
        };
        for (;;) {
            serve_pending();
            if (failed)
                stop = true;
            if (stop || next >= tasks)
                break;
            run_task(next++);
            report();
        }
        while (stopped_workers < ranks - 1) {
            long long msg[2];
            MPI_Status st;
            impl::check(MPI_Recv(msg, 2, MPI_LONG_LONG, MPI_ANY_SOURCE, impl::tag_request, comm, &st), "MPI_Recv");
            answer(st, msg);
        }
    } else {
        auto request = [&] {
            long long msg[2] = {failed ? 1 : 0, static_cast<long long>(finished)};
            impl::check(MPI_Send(msg, 2, MPI_LONG_LONG, 0, impl::tag_request, comm), "MPI_Send");
        };
        const auto first = static_cast<std::size_t>(rank - 1);
        long long task = first < tasks ? static_cast<long long>(first) : -1;
        while (task >= 0) {
            request(); // ask for the next one now: its answer waits while this one is fitted
            run_task(static_cast<std::size_t>(task));
            impl::check(MPI_Recv(&task, 1, MPI_LONG_LONG, 0, impl::tag_task, comm, MPI_STATUS_IGNORE), "MPI_Recv");
        }
    }

    // 4. Every rank's results on every rank; the earliest failing task's error wins.
    {
        std::vector<std::byte> fail_bytes;
        if (failed) {
            impl::put_u64(fail_bytes, failed_task);
            const auto b = impl::bytes_of(failure);
            fail_bytes.insert(fail_bytes.end(), b.begin(), b.end());
        }
        const auto fails = impl::all_gather(fail_bytes, comm);
        std::optional<std::pair<std::size_t, int>> first; // (task, rank)
        for (std::size_t r = 0; r < fails.size(); ++r)
            if (!fails[r].empty()) {
                std::size_t at = 0;
                const std::size_t task = impl::get_u64(fails[r], at);
                if (!first || task < first->first)
                    first = std::pair{task, static_cast<int>(r)};
            }
        if (first) {
            const auto& f = fails[static_cast<std::size_t>(first->second)];
            throw remote_error(first->second, std::string(reinterpret_cast<const char*>(f.data()) + 8, f.size() - 8));
        }
    }
    const auto results = impl::all_gather(done_bytes, comm);
    std::vector<std::span<const std::byte>> by_task(tasks);
    std::vector<char> seen(tasks, 0);
    for (const auto& b : results) {
        std::size_t at = 0;
        while (at < b.size()) {
            const std::size_t task = impl::get_u64(b, at);
            const std::size_t count = impl::get_u64(b, at);
            if (task >= tasks || seen[task] || count > (b.size() - at) / sizeof(V))
                throw std::runtime_error("heldout::mpi::evaluate_splits: inconsistent results from the ranks");
            seen[task] = 1;
            by_task[task] = std::span<const std::byte>(b).subspan(at, count * sizeof(V));
            at += count * sizeof(V);
        }
    }
    if (std::find(seen.begin(), seen.end(), 0) != seen.end())
        throw std::runtime_error("heldout::mpi::evaluate_splits: a split's result is missing");
    // A worker's last request went out before its last fit: the final count comes from here.
    if (rank == 0 && options.progress && reported != tasks)
        options.progress(tasks, tasks);

    // 5. Record in plan order, exactly as the one-process loop does (same on every rank).
    aggregator agg(measures...);
    agg.keep_predictions(options.keep_predictions);
    std::vector<E> test_truth;
    std::vector<V> pred;
    auto unpack = [&](std::span<const std::byte> b) {
        pred.resize(b.size() / sizeof(V));
        if (!pred.empty())
            std::memcpy(pred.data(), b.data(), b.size());
    };
    for (std::size_t i = 0; i < n_splits; ++i) {
        const split v = plan.all[i].view();
        if (no_out_of_bag(plan.all[i])) {
            agg.record(v, std::span<const E>(), std::span<const double>());
            continue;
        }
        detail::gather_truth(y, v.test, test_truth, "split.test");
        unpack(by_task[i]);
        agg.record(v, test_truth, pred);
    }
    if (apparent) {
        unpack(by_task[n_splits]);
        agg.record_apparent(y, pred);
    }
    return agg;
}

/// The same with default options.
template <std::ranges::input_range Splits, value_range T, class F, outer_measure... Ms>
requires std::invocable<F&, std::span<const std::size_t>, std::span<const std::size_t>>
    aggregator evaluate_splits(MPI_Comm comm, Splits&& splits, const T& truth, F&& fit_predict, const Ms&... measures) {
    return mpi::evaluate_splits(comm, std::forward<Splits>(splits), truth, std::forward<F>(fit_predict),
                                split_options{}, measures...);
}

} // namespace mpi

HELDOUT_NAMESPACE_END
