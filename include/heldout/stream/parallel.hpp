// heldout/stream/parallel.hpp — one large prediction array scored on several threads, with a
// result that does not depend on the thread count.
//
//   double v = heldout::evaluate_parallel(heldout::measure::mse{}, truth, prediction, {.threads = 2});
//   double w = heldout::evaluate_parallel(m, truth, prediction, weights, {.threads = 4});
//
// Why the result is the same for any thread count: the rows are cut into fixed chunks of
// `chunk` rows (independent of `threads`), each chunk goes into its own accumulator, and
// the chunk accumulators are merged in chunk order on the calling thread. Threads only
// decide who computes which chunk. For measures whose state is exact (counts, carried
// scores: confusion-matrix measures, AUC) the value also equals evaluate() bit for bit;
// for floating-point sums it equals evaluate() up to the last bits of the compensated sum.
// std::thread only (libc++ 14 has no std::jthread); no OpenMP.
// Progress: o.progress(done, chunks), if set, after every chunk is scored, in chunks; called
// from the workers, one call at a time, done increasing by one per call up to chunks. It
// only observes: the value is the same with or without it.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/measure.hpp>
#include <heldout/core/values.hpp>

#include <algorithm>
#include <cstddef>
#include <exception>
#include <functional>
#include <mutex>
#include <span>
#include <string>
#include <string_view>
#include <thread>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// Options of evaluate_parallel.
struct parallel_options {
    std::size_t threads = 0;      ///< worker threads; 0 = std::thread::hardware_concurrency()
    std::size_t chunk = 1u << 16; ///< rows per chunk: fixes the reduction order
    /// Called after every chunk with (chunks done, chunks); may be left empty.
    std::function<void(std::size_t done, std::size_t total)> progress{};
};

namespace detail {

/// Runs body(chunk_index) for every chunk on `threads` workers; rethrows the first
/// exception (by chunk order) after all workers joined.
template <class Body>
void for_each_chunk(std::size_t chunks, std::size_t threads, Body&& body) {
    std::vector<std::exception_ptr> errors(chunks);
    auto work = [&](std::size_t t, std::size_t stride) {
        for (std::size_t c = t; c < chunks; c += stride) {
            try {
                body(c);
            } catch (...) {
                errors[c] = std::current_exception();
            }
        }
    };
    const std::size_t workers = std::max<std::size_t>(1, std::min(threads, chunks));
    std::vector<std::thread> pool;
    pool.reserve(workers - 1);
    for (std::size_t t = 1; t < workers; ++t)
        pool.emplace_back(work, t, workers);
    work(0, workers);
    for (auto& th : pool)
        th.join();
    for (auto& e : errors)
        if (e)
            std::rethrow_exception(e);
}

template <class M, class T, class P, class W>
double evaluate_chunked(const M& m, const T& truth, const P& prediction, const W* weights, const parallel_options& o) {
    constexpr std::string_view who = "heldout::evaluate_parallel";
    if (o.chunk == 0)
        fail(who, "chunk", "must be positive");
    const auto t = values_of(truth, who, "truth");
    const std::size_t n = t.size();
    if (n == 0)
        fail(who, "truth", "empty input");
    if (prediction_rows(prediction) != n)
        fail(who, "prediction",
             "size " + std::to_string(prediction_rows(prediction)) + " differs from size " + std::to_string(n) +
                 " of 'truth'");
    std::span<const element_t<W>> w;
    if (weights) {
        w = values_of(*weights, who, "weights");
        if (w.size() != n)
            fail(who, "weights",
                 "size " + std::to_string(w.size()) + " differs from size " + std::to_string(n) + " of 'truth'");
    }
    const std::size_t chunks = (n + o.chunk - 1) / o.chunk;
    const std::size_t threads = o.threads ? o.threads : std::max(1u, std::thread::hardware_concurrency());
    using A = accumulator_t<M>;
    std::vector<A> parts(chunks, m.accumulator());
    std::mutex progress_lock;
    std::size_t chunks_done = 0;
    for_each_chunk(chunks, threads, [&](std::size_t c) {
        const std::size_t first = c * o.chunk;
        const std::size_t count = std::min(o.chunk, n - first);
        try {
            if (weights)
                parts[c].add(t.subspan(first, count), prediction_slice(prediction, first, count),
                             w.subspan(first, count));
            else
                parts[c].add(t.subspan(first, count), prediction_slice(prediction, first, count));
        } catch (const input_error& e) {
            rethrow_shifted(e, first); // the index of the whole input, not of the chunk
        }
        if (o.progress) {
            std::lock_guard<std::mutex> g(progress_lock);
            o.progress(++chunks_done, chunks);
        }
    });
    // Chunk 0 is the start (no copy of it, no merge into an empty accumulator); the others
    // merge in chunk order.
    A total = std::move(parts[0]);
    for (std::size_t c = 1; c < chunks; ++c)
        total.merge(parts[c]);
    return total.value();
}

} // namespace detail

/// evaluate(m, truth, prediction) on several threads; the value does not depend on o.threads.
template <outer_measure M, class T, class P>
double evaluate_parallel(const M& m, const T& truth, const P& prediction, parallel_options o = {}) {
    detail::check_prediction_type<M, P>();
    return detail::evaluate_chunked<M, T, P, T>(m, truth, prediction, nullptr, o);
}

/// Weighted evaluate_parallel.
template <outer_measure M, class T, class P, weight_range W>
double evaluate_parallel(const M& m, const T& truth, const P& prediction, const W& weights, parallel_options o = {}) {
    detail::check_prediction_type<M, P>();
    return detail::evaluate_chunked<M, T, P, W>(m, truth, prediction, &weights, o);
}

HELDOUT_NAMESPACE_END
