// Checks shared by the measure tests: the message of a throwing call, the bytes round trip of
// an accumulator, a confusion table expanded into rows, and the merge checks of the measures
// that carry their rows (the ranking measures).
//
//   CHECK(heldout_test::message_of([&] { acc.add_one(9, 0); }).rfind("measure MCC:", 0) == 0);
//   heldout_test::check_bytes_round_trip(mcc{}, y, f, y2, f2, 9);
//   const auto rows = heldout_test::expand(table);     // rows.truth, rows.prediction
//   heldout_test::check_fresh_merges(auc{}, y, s, w);
#pragma once

#include <heldout/core/measure.hpp>
#include <heldout/stream/serialize.hpp>

#include <Eigen/Core>
#include <doctest/doctest.h>

#include <cstddef>
#include <exception>
#include <span>
#include <string>
#include <vector>

namespace heldout_test {

// The message of the exception fn throws ("" when it throws none).
template <class Fn>
inline std::string message_of(Fn fn) {
    try {
        fn();
    } catch (const std::exception& e) {
        return e.what();
    }
    return "";
}

// deserialize(serialize(a)) holds the same value and the same parameters: the same rows
// added afterwards (y2, f2 and, if given, their weights) give the same value on both, and the
// same bad label (and the empty accumulator) give the same message, which names the measure.
// Returns the empty accumulator's message, for callers that check its wording.
template <class M, class T, class P, class... Weights>
std::string check_bytes_round_trip(const M& m, const T& y, const P& f, const T& y2, const P& f2, int bad_label,
                                   const Weights&... w2) {
    using A = decltype(m.accumulator());
    auto a = m.accumulator();
    a.add(y, f);
    A b = heldout::deserialize<A>(heldout::serialize(a));
    CHECK(b.value() == a.value());
    CHECK(b.count() == a.count());
    a.add(y2, f2, w2...);
    b.add(y2, f2, w2...);
    CHECK(b.value() == a.value());
    CHECK(heldout::serialize(b) == heldout::serialize(a));
    // Messages name the measure without parameters that only show in its printed name
    // (message_name, where a measure has one).
    std::string base = m.name();
    if constexpr (requires { m.message_name(); })
        base = m.message_name();
    const std::string who = "measure " + base + ":";
    const std::string bad = message_of([&] { a.add_one(bad_label, 0); });
    CHECK(bad.rfind(who, 0) == 0);
    CHECK(message_of([&] { b.add_one(bad_label, 0); }) == bad);
    a.reset();
    b.reset();
    const std::string empty = message_of([&] { (void)a.value(); });
    CHECK(empty.rfind(who, 0) == 0);
    CHECK(message_of([&] { (void)b.value(); }) == empty);
    return empty;
}

struct expanded {
    std::vector<int> truth, prediction;
};
inline expanded expand(const Eigen::MatrixXd& c) {
    expanded e;
    for (Eigen::Index i = 0; i < c.rows(); ++i)
        for (Eigen::Index j = 0; j < c.cols(); ++j)
            for (int n = 0; n < static_cast<int>(c(i, j)); ++n) {
                e.truth.push_back(static_cast<int>(i));
                e.prediction.push_back(static_cast<int>(j));
            }
    return e;
}
// Merges into a fresh accumulator, add_one with a non-unit first weight and a self-merge must
// keep every row, weight and score: each equals one accumulator fed all the rows in one batch.
template <class M, class S>
void check_fresh_merges(const M& m, const std::vector<int>& y, const std::vector<S>& s, const std::vector<double>& w) {
    const std::size_t n = y.size();
    const double plain = heldout::evaluate(m, y, s), weighted = heldout::evaluate(m, y, s, w);
    auto full = m.accumulator();
    full.add(y, s);
    auto fresh = m.accumulator();
    fresh.merge(full);
    CHECK(fresh.count() == n);
    CHECK(fresh.value() == plain);
    auto wfull = m.accumulator();
    wfull.add(y, s, w);
    auto wfresh = m.accumulator();
    wfresh.merge(wfull);
    CHECK(wfresh.count() == n);
    CHECK(wfresh.value() == weighted);
    wfresh.merge(m.accumulator()); // an empty other changes nothing
    CHECK(wfresh.count() == n);
    CHECK(wfresh.value() == weighted);
    auto one = m.accumulator();
    for (std::size_t i = 0; i < n; ++i)
        one.add_one(y[i], s[i], w[i]);
    CHECK(one.value() == weighted);
    // an unweighted first shard, then a weighted one, both merged into a fresh accumulator
    auto h1 = m.accumulator();
    auto h2 = m.accumulator();
    h1.add(std::span(y).first(1), std::span(s).first(1));
    h2.add(std::span(y).subspan(1), std::span(s).subspan(1), std::span(w).subspan(1));
    auto mixed = m.accumulator();
    mixed.merge(h1);
    mixed.merge(h2);
    std::vector<double> w1(w);
    w1[0] = 1;
    CHECK(mixed.value() == heldout::evaluate(m, y, s, w1));
    // self-merge = every row twice
    std::vector<int> y2(y);
    y2.insert(y2.end(), y.begin(), y.end());
    std::vector<S> s2(s);
    s2.insert(s2.end(), s.begin(), s.end());
    std::vector<double> w2(w);
    w2.insert(w2.end(), w.begin(), w.end());
    full.merge(full);
    CHECK(full.count() == 2 * n);
    CHECK(full.value() == heldout::evaluate(m, y2, s2));
    wfull.merge(wfull);
    CHECK(wfull.count() == 2 * n);
    CHECK(wfull.value() == heldout::evaluate(m, y2, s2, w2));
}
// A k x k matrix from its entries in row-major order (cost matrices written as they read).
inline Eigen::MatrixXd row_major(const std::vector<double>& flat, std::size_t k) {
    Eigen::MatrixXd c(static_cast<Eigen::Index>(k), static_cast<Eigen::Index>(k));
    for (std::size_t i = 0; i < k; ++i)
        for (std::size_t j = 0; j < k; ++j)
            c(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)) = flat[i * k + j];
    return c;
}

} // namespace heldout_test
