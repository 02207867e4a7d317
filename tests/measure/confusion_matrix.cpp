// Tests for heldout/measure/confusion_matrix.hpp: the weighted k x k table of class labels.
#include <heldout/detail/label_scan.hpp>
#include <heldout/measure/confusion_accumulator.hpp>
#include <heldout/measure/confusion_matrix.hpp>
#include <heldout/stream/serialize.hpp>

#include "support/measure_checks.hpp"
#include "support/reference.hpp"

#include <Eigen/Dense>
#include <doctest/doctest.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdint>
#include <exception>
#include <limits>
#include <random>
#include <span>
#include <string>
#include <type_traits>
#include <vector>

using heldout::evaluate;
using heldout::measure::confusion_accumulator;
using heldout::measure::confusion_matrix;

using heldout_test::message_of;

namespace {
// The address of the cells buffer, seen through visit_state: equal addresses across
// epochs mean the buffer was reused, not reallocated.
struct cells_address {
    const double* cells = nullptr;
    int vectors = 0;
    template <class X>
    void operator()(const X& x) {
        if constexpr (std::is_same_v<X, std::vector<double>>)
            if (vectors++ == 0)
                cells = x.data();
    }
};
const double* cells_of(const confusion_accumulator& a) {
    cells_address c;
    a.visit_state(c);
    return c.cells;
}
// Self-written brute-force reference: one loop, one cell at a time.
template <class T, class P>
Eigen::MatrixXd brute_table(const std::vector<T>& t, const std::vector<P>& p, std::size_t k,
                            const std::vector<double>* w = nullptr) {
    Eigen::MatrixXd c = Eigen::MatrixXd::Zero(static_cast<Eigen::Index>(k), static_cast<Eigen::Index>(k));
    for (std::size_t i = 0; i < t.size(); ++i)
        c(static_cast<Eigen::Index>(t[i]), static_cast<Eigen::Index>(p[i])) += w ? (*w)[i] : 1.0;
    return c;
}

bool same_table(const Eigen::MatrixXd& a, const Eigen::MatrixXd& b, double rel = 0.0) {
    if (a.rows() != b.rows() || a.cols() != b.cols())
        return false;
    for (Eigen::Index i = 0; i < a.size(); ++i)
        if (!(a.data()[i] == b.data()[i] || heldout_test::close(a.data()[i], b.data()[i], rel)))
            return false;
    return true;
}

using heldout_test::row_major;

// Collects the state through visit_state (the serialisation hook).
struct state_writer {
    std::vector<double> numbers;
    std::vector<std::vector<double>> vectors;
    template <class X>
    void operator()(const X& x) {
        if constexpr (std::is_arithmetic_v<X>)
            numbers.push_back(static_cast<double>(x));
        else
            vectors.emplace_back(x.begin(), x.end());
    }
};
struct state_reader {
    const state_writer* src;
    std::size_t a = 0, b = 0;
    template <class X>
    void operator()(X& x) {
        if constexpr (std::is_arithmetic_v<X>)
            x = static_cast<X>(src->numbers[a++]);
        else {
            const auto& v = src->vectors[b++];
            x.assign(v.begin(), v.end());
        }
    }
};
} // namespace

TEST_SUITE("measure/confusion_matrix") {
    TEST_CASE("worked example: rows are the true class, columns the predicted class") {
        // obs: (0,0) (1,2) (2,2) (1,1) (2,0): one observation in each of five cells.
        const std::vector<std::uint8_t> y{0, 1, 2, 1, 2};
        const std::vector<std::uint8_t> f{0, 2, 2, 1, 0};
        Eigen::MatrixXd expect(3, 3);
        expect << 1, 0, 0, //
            0, 1, 1,       //
            1, 0, 1;
        CHECK(same_table(evaluate(confusion_matrix{}, y, f), expect));
        // weights 1, 2, 3, 4, 5 land in the same cells: C(1,2) = 2, C(2,2) = 3, C(1,1) = 4, C(2,0) = 5.
        const std::vector<double> w{1, 2, 3, 4, 5};
        Eigen::MatrixXd wexpect(3, 3);
        wexpect << 1, 0, 0, //
            0, 4, 2,        //
            5, 0, 3;
        CHECK(same_table(evaluate(confusion_matrix{}, y, f, w), wexpect));
        auto acc = confusion_matrix{}.accumulator();
        acc.add(y, f, w);
        CHECK(acc.classes() == 3);
        CHECK(acc.count() == 5);
        CHECK(acc.total_weight() == 15.0);
        CHECK(acc(2, 0) == 5.0);
        CHECK(acc(7, 7) == 0.0); // outside the table: no weight
        CHECK(acc.true_totals().isApprox(Eigen::Vector3d(1, 6, 8)));
        CHECK(acc.predicted_totals().isApprox(Eigen::Vector3d(6, 4, 5)));
        CHECK(same_table(acc.value(), wexpect));
        CHECK(confusion_matrix{}.name() == "confusion matrix");
        CHECK(confusion_matrix::kind == heldout::prediction_kind::label);
    }

    TEST_CASE("live reference: numpy.bincount / numpy.add.at tables of random labels with weights") {
        heldout_test::reference_table ref("ref_labels");
        const int cases = static_cast<int>(ref.scalar("cases"));
        REQUIRE(cases == 6);
        for (int c = 0; c < cases; ++c) {
            const std::string p = "case" + std::to_string(c) + ".";
            const auto k = static_cast<std::size_t>(ref.scalar(p + "k"));
            const auto yi = ref.get_as<int>(p + "truth");
            const auto fi = ref.get_as<int>(p + "prediction");
            const auto y8 = ref.get_as<std::uint8_t>(p + "truth");
            const auto f8 = ref.get_as<std::uint8_t>(p + "prediction");
            const auto w = ref.get(p + "weights");
            const Eigen::MatrixXd counts = row_major(ref.get(p + "table"), k);  // numpy.bincount
            const Eigen::MatrixXd wtable = row_major(ref.get(p + "wtable"), k); // numpy.add.at
            CHECK(same_table(evaluate(confusion_matrix{}, yi, fi), counts));    // exact counts
            CHECK(same_table(evaluate(confusion_matrix{}, y8, f8), counts));    // byte-lane path
            CHECK(same_table(evaluate(confusion_matrix{}, yi, f8), counts));    // mixed label types
            CHECK(same_table(evaluate(confusion_matrix{.classes = 7}, y8, fi).topLeftCorner(k, k), counts));
            CHECK(same_table(evaluate(confusion_matrix{}, y8, f8, w), wtable, 1e-12));
            const std::vector<float> wf(w.begin(), w.end()); // float weights, summed in double
            const std::vector<double> wd(wf.begin(), wf.end());
            CHECK(same_table(evaluate(confusion_matrix{}, yi, fi, wf), brute_table(yi, fi, k, &wd), 1e-12));
        }
    }

    TEST_CASE("any integral labels: bool, int8, int64, Eigen vectors and spans") {
        const std::array<bool, 4> yb{true, false, true, true};
        const std::array<bool, 4> fb{true, true, false, true};
        Eigen::MatrixXd e(2, 2);
        e << 0, 1, //
            1, 2;
        CHECK(same_table(evaluate(confusion_matrix{}, yb, fb), e));
        const std::vector<std::int8_t> y8{1, 0, 1, 1};
        const std::vector<std::int64_t> f64{1, 1, 0, 1};
        CHECK(same_table(evaluate(confusion_matrix{}, y8, f64), e));
        Eigen::VectorXi yv(4), fv(4);
        yv << 1, 0, 1, 1;
        fv << 1, 1, 0, 1;
        CHECK(same_table(evaluate(confusion_matrix{}, yv, fv), e));
        CHECK(same_table(evaluate(confusion_matrix{}, std::span<const std::int8_t>(y8), std::span(f64)), e));
    }

    TEST_CASE("fast paths equal a brute-force count across block boundaries (self-written reference)") {
        std::mt19937_64 g(7); // test data only
        for (std::size_t k : {1u, 2u, 3u, 4u, 5u, 6u, 7u, 8u, 9u, 16u, 64u, 65u, 200u}) {
            for (std::size_t n : {1u, 31u, 32u, 33u, 8160u, 8161u, 20011u}) {
                std::uniform_int_distribution<int> d(0, static_cast<int>(k) - 1);
                std::vector<std::uint8_t> y(n), f(n);
                std::vector<int> yi(n), fi(n);
                for (std::size_t i = 0; i < n; ++i) {
                    yi[i] = y[i] = static_cast<std::uint8_t>(d(g));
                    fi[i] = f[i] = static_cast<std::uint8_t>(d(g));
                }
                const auto ref = brute_table(y, f, k);
                auto acc = confusion_matrix{.classes = k}.accumulator();
                acc.add(y, f);
                CHECK(same_table(acc.table(), ref));
                auto acc2 = confusion_matrix{.classes = k}.accumulator();
                acc2.add(yi, fi);
                CHECK(same_table(acc2.table(), ref));
            }
        }
    }

    TEST_CASE("each clone of the byte-lane cell counter equals a brute-force count; labels >= k are refused") {
        using heldout::detail::isa;
        std::mt19937_64 g(71); // test data only
        auto run = [&](auto k_const) {
            constexpr std::size_t K = decltype(k_const)::value;
            for (isa clone : {isa::baseline, isa::avx2}) {
                if (!heldout::detail::isa_supported(clone))
                    continue;
                // block edges of both clones: 255 steps of 16 and of 32 rows
                for (std::size_t n : {0u, 15u, 16u, 4080u, 4081u, 8160u, 8161u, 30000u}) {
                    std::vector<std::uint8_t> y(n), f(n);
                    for (std::size_t i = 0; i < n; ++i) {
                        y[i] = static_cast<std::uint8_t>(g() % K);
                        f[i] = static_cast<std::uint8_t>(g() % K);
                    }
                    std::vector<std::uint64_t> got(K * K), expect(K * K, 0);
                    for (std::size_t i = 0; i < n; ++i)
                        ++expect[y[i] * K + f[i]];
                    CAPTURE(K);
                    CAPTURE(n);
                    CHECK(heldout::detail::count_bytes_small<K>(y.data(), f.data(), n, got.data(), clone));
                    CHECK(got == expect);
                    if (n > 100) {
                        for (std::uint8_t bad : {static_cast<std::uint8_t>(K), std::uint8_t{15}, std::uint8_t{16},
                                                 std::uint8_t{0x35}, std::uint8_t{255}}) {
                            auto y2 = y;
                            y2[n / 2] = bad; // inside a block: counted by no cell, or (>= 16) aliasing one
                            CHECK_FALSE(
                                heldout::detail::count_bytes_small<K>(y2.data(), f.data(), n, got.data(), clone));
                            auto f2 = f;
                            f2[n - 1] = bad; // in the scalar tail or the last block
                            CHECK_FALSE(
                                heldout::detail::count_bytes_small<K>(y.data(), f2.data(), n, got.data(), clone));
                        }
                    }
                }
            }
        };
        run(std::integral_constant<std::size_t, 3>{});
        run(std::integral_constant<std::size_t, 4>{});
        run(std::integral_constant<std::size_t, 5>{});
        run(std::integral_constant<std::size_t, 8>{});
    }

    TEST_CASE("each clone of the byte-label scan equals a brute-force count (mismatches, 0/1 sums, largest label)") {
        using heldout::detail::isa;
        std::mt19937_64 g(73); // test data only
        for (isa clone : {isa::baseline, isa::avx2}) {
            if (!heldout::detail::isa_supported(clone))
                continue;
            // block edges of both clones: 255 steps of 32 and of 64 rows, and the scalar tail
            for (std::size_t n : {0u, 31u, 32u, 63u, 64u, 8160u, 8161u, 16320u, 16383u, 40000u}) {
                for (unsigned top : {1u, 2u, 200u}) { // 0/1 labels, 3 classes, bytes up to 200
                    std::vector<std::uint8_t> y(n), f(n);
                    for (std::size_t i = 0; i < n; ++i) {
                        y[i] = static_cast<std::uint8_t>(g() % (top + 1));
                        f[i] = g() % 4 == 0 ? static_cast<std::uint8_t>(g() % (top + 1)) : y[i];
                    }
                    std::uint64_t mis = 0, st = 0, sp = 0, stp = 0, mt = 0, mp = 0;
                    for (std::size_t i = 0; i < n; ++i) {
                        mis += y[i] != f[i];
                        st += y[i];
                        sp += f[i];
                        stp += y[i] & f[i];
                        mt = std::max<std::uint64_t>(mt, y[i]);
                        mp = std::max<std::uint64_t>(mp, f[i]);
                    }
                    CAPTURE(n);
                    CAPTURE(top);
                    const std::span<const std::uint8_t> ys(y), fs(f);
                    const auto a = heldout::detail::scan_labels<false>(ys, fs, clone);
                    CHECK(a.mismatches == mis);
                    CHECK(a.max_t == mt);
                    CHECK(a.max_p == mp);
                    const auto b = heldout::detail::scan_labels<true>(ys, fs, clone);
                    if (top == 1) { // the sums are kept in byte lanes for 0/1 labels only (the
                                    // caller uses them only when both largest labels are <= 1)
                        CHECK(b.sum_t == st);
                        CHECK(b.sum_p == sp);
                        CHECK(b.sum_tp == stp);
                    }
                    CHECK(b.max_t == mt);
                    CHECK(b.max_p == mp);
                }
            }
        }
    }

    TEST_CASE("k inferred: the table grows with the labels seen, and merges into the larger k") {
        auto a = confusion_matrix{}.accumulator();
        CHECK(a.classes() == 0);
        const std::vector<int> y0{0, 0}, f0{0, 0};
        a.add(y0, f0);
        CHECK(a.classes() == 1); // only class 0 seen so far
        const std::vector<int> y1{1, 0}, f1{1, 1};
        a.add(y1, f1);
        CHECK(a.classes() == 2);
        a.add_one(4, 3); // a class 4 appears: 5 x 5, old cells kept
        CHECK(a.classes() == 5);
        CHECK(a(0, 0) == 2.0);
        CHECK(a(1, 1) == 1.0);
        CHECK(a(0, 1) == 1.0);
        CHECK(a(4, 3) == 1.0);
        CHECK(a.count() == 5);
        auto b = confusion_matrix{}.accumulator();
        const std::vector<std::uint8_t> y2{6, 2}, f2{6, 1};
        b.add(y2, f2);
        CHECK(b.classes() == 7);
        a.merge(b);
        CHECK(a.classes() == 7);
        CHECK(a(6, 6) == 1.0);
        CHECK(a(2, 1) == 1.0);
        CHECK(a(0, 0) == 2.0);
        CHECK(a.total_weight() == 7.0);
        a.reset();
        CHECK(a.classes() == 0);
        CHECK(a.count() == 0);
        a.add(y0, f0); // after a reset the table starts from what it sees again
        CHECK(a.classes() == 1);
        CHECK(a(0, 0) == 2.0);
    }

    TEST_CASE("labels beyond the k counted so far are caught inside the byte-lane pass, then counted") {
        // The byte kernel for k <= 8 codes a row as (t << 4) | p: labels 5..15 match no cell
        // and labels >= 16 alias one; both must be detected and the batch recounted.
        std::mt19937_64 g(9);
        for (int big : {5, 9, 15, 16, 21, 200}) {
            std::uniform_int_distribution<int> d(0, 4);
            const std::size_t n = 5000;
            std::vector<std::uint8_t> y(n), f(n);
            for (std::size_t i = 0; i < n; ++i) {
                y[i] = static_cast<std::uint8_t>(d(g));
                f[i] = static_cast<std::uint8_t>(d(g));
            }
            auto acc = confusion_matrix{}.accumulator();
            acc.add(y, f); // k = 5 learnt; the next batch is counted with k = 5 first
            REQUIRE(acc.classes() == 5);
            acc.reset();
            f[4321] = static_cast<std::uint8_t>(big);
            acc.add(y, f);
            CHECK(acc.classes() == static_cast<std::size_t>(big) + 1);
            CHECK(same_table(acc.table(), brute_table(y, f, static_cast<std::size_t>(big) + 1)));
            auto fixed = confusion_matrix{.classes = 5}.accumulator();
            CHECK_THROWS_WITH_AS(fixed.add(y, f),
                                 ("measure confusion matrix: argument 'prediction': label " + std::to_string(big) +
                                  " outside the classes 0..4 at index 4321")
                                     .c_str(),
                                 heldout::input_error);
            CHECK(fixed.count() == 0);
        }
    }

    TEST_CASE("batches, single observations and merges give the same table; weights are compensated") {
        std::mt19937_64 g(11);
        std::uniform_int_distribution<int> d(0, 3);
        std::uniform_real_distribution<double> u(0.0, 2.0);
        const std::size_t n = 5000;
        std::vector<std::uint8_t> y(n), f(n);
        std::vector<double> w(n);
        for (std::size_t i = 0; i < n; ++i) {
            y[i] = static_cast<std::uint8_t>(d(g));
            f[i] = static_cast<std::uint8_t>(d(g));
            w[i] = u(g);
        }
        const Eigen::MatrixXd whole = evaluate(confusion_matrix{}, y, f, w);
        CHECK(same_table(whole, brute_table(y, f, 4, &w), 1e-13));
        auto a = confusion_matrix{}.accumulator();
        auto b = confusion_matrix{}.accumulator();
        a.add(std::span(y).first(1234), std::span(f).first(1234), std::span(w).first(1234));
        b.add(std::span(y).subspan(1234), std::span(f).subspan(1234), std::span(w).subspan(1234));
        a.merge(b);
        CHECK(same_table(a.table(), whole, 1e-14));
        auto twice = a;
        twice.merge(twice); // merging with itself doubles every cell
        CHECK(same_table(twice.table(), 2 * whole, 1e-14));
        CHECK(twice.count() == 2 * n);
        auto c = confusion_matrix{}.accumulator();
        for (std::size_t i = 0; i < n; ++i)
            c.add_one(y[i], f[i], w[i]);
        CHECK(same_table(c.table(), whole, 1e-14));
        auto u1 = confusion_matrix{}.accumulator();
        u1.add(y, f);
        auto u2 = confusion_matrix{}.accumulator();
        for (std::size_t i = 0; i < n; ++i)
            u2.add_one(y[i], f[i]);
        CHECK(same_table(u1.table(), u2.table())); // counts are exact
        CHECK(same_table(u1.table(), brute_table(y, f, 4)));
    }

    TEST_CASE("weighted cells keep their digits over 4e6 rows (against long double)") {
        // 40 batches of 1e5 rows, weights 0.1 .. 0.9; long double sums are the reference.
        const std::size_t batch = 100'000, batches = 40;
        std::vector<std::uint8_t> y(batch), f(batch);
        std::vector<double> w(batch);
        std::array<long double, 4> ref{};
        for (std::size_t i = 0; i < batch; ++i) {
            y[i] = static_cast<std::uint8_t>(i % 2);
            f[i] = static_cast<std::uint8_t>((i / 2) % 2);
            w[i] = 0.1 * static_cast<double>(1 + i % 9);
            ref[y[i] * 2 + f[i]] += static_cast<long double>(w[i]);
        }
        auto acc = confusion_matrix{}.accumulator();
        for (std::size_t b = 0; b < batches; ++b)
            acc.add(y, f, w);
        for (std::size_t c = 0; c < 4; ++c) {
            const double expect = static_cast<double>(ref[c] * batches);
            CHECK(std::abs(acc(c / 2, c % 2) - expect) <= 1e-15 * expect);
        }
    }

    TEST_CASE("visit_state round-trips the table; a reset accumulator equals a fresh one") {
        const std::vector<int> y{0, 1, 2, 2}, f{1, 1, 2, 0};
        const std::vector<double> w{0.5, 1.5, 2.0, 0.25};
        auto a = confusion_matrix{}.accumulator();
        a.add(y, f, w);
        state_writer out;
        a.visit_state(out);
        REQUIRE(out.numbers.size() == 3); // fixed classes, k, count
        REQUIRE(out.vectors.size() == 3); // name, cells, carries (row-major k*k)
        CHECK(out.numbers[0] == 0.0);
        CHECK(out.numbers[1] == 3.0);
        CHECK(out.vectors[1].size() == 9);
        CHECK(out.vectors[1][2 * 3 + 0] == 0.25); // cell (2, 0), row-major
        auto b = confusion_matrix{}.accumulator();
        state_reader in{&out};
        b.visit_state(in);
        CHECK(same_table(b.table(), a.table()));
        CHECK(b.count() == 4);
        a.reset();
        state_writer r, fresh;
        a.visit_state(r);
        confusion_matrix{}.accumulator().visit_state(fresh);
        CHECK(r.numbers == fresh.numbers);
        CHECK(r.vectors == fresh.vectors);
    }

    TEST_CASE("bad input names the measure, the argument and the index") {
        using heldout::input_error;
        const std::vector<int> y{0, 1, 2};
        const std::vector<int> two{0, 1};
        CHECK_THROWS_WITH_AS(evaluate(confusion_matrix{}, y, two),
                             "measure confusion matrix: argument 'prediction': size 2 differs from size 3 of 'truth'",
                             input_error);
        const std::vector<int> empty;
        CHECK_THROWS_WITH_AS(evaluate(confusion_matrix{}, empty, empty),
                             "measure confusion matrix: argument 'truth': empty input", input_error);
        const std::vector<int> neg{0, 1, -2};
        CHECK_THROWS_WITH_AS(evaluate(confusion_matrix{}, y, neg),
                             "measure confusion matrix: argument 'prediction': label -2 is negative at index 2",
                             input_error);
        const std::vector<std::int8_t> neg8{0, -1, 0};
        CHECK_THROWS_WITH_AS(evaluate(confusion_matrix{}, neg8, neg8),
                             "measure confusion matrix: argument 'truth': label -1 is negative at index 1",
                             input_error);
        const std::vector<std::uint8_t> y8{0, 1, 3};
        CHECK_THROWS_WITH_AS(evaluate(confusion_matrix{.classes = 3}, y8, y),
                             "measure confusion matrix: argument 'truth': label 3 outside the classes 0..2 at index 2",
                             input_error);
        CHECK_THROWS_WITH_AS(evaluate(confusion_matrix{.classes = 2}, y, y),
                             "measure confusion matrix: argument 'truth': label 2 outside the classes 0..1 at index 2",
                             input_error);
        const std::vector<int> big{5000, 0, 0};
        CHECK_THROWS_WITH_AS(evaluate(confusion_matrix{}, big, y),
                             "measure confusion matrix: argument 'truth': label 5000 exceeds the largest supported "
                             "class 1023 (at most 1024 classes) at index 0",
                             input_error);
        CHECK_THROWS_WITH_AS(evaluate(confusion_matrix{.classes = 5000}, y, y),
                             "measure confusion matrix: argument 'classes': 5000 exceeds the largest supported 1024",
                             input_error);
        CHECK_THROWS_WITH_AS(evaluate(confusion_matrix{}, y, y, std::vector<double>{1, -1, 1}),
                             "measure confusion matrix: argument 'weights': negative weight -1 at index 1",
                             input_error);
        CHECK_THROWS_WITH_AS(
            evaluate(confusion_matrix{}, y, y, std::vector<double>{1, 1, std::numeric_limits<double>::quiet_NaN()}),
            "measure confusion matrix: argument 'weights': not finite (nan) at index 2", input_error);
        CHECK_THROWS_WITH_AS(evaluate(confusion_matrix{}, y, y, std::vector<double>{1, 1}),
                             "measure confusion matrix: argument 'weights': size 2 differs from size 3 of 'truth'",
                             input_error);
        // a weighted batch with a bad label is refused before any weight is added
        auto acc = confusion_matrix{.classes = 2}.accumulator();
        CHECK_THROWS_AS(acc.add(y, y, std::vector<double>{1, 1, 1}), input_error);
        CHECK(acc.count() == 0);
        CHECK(acc.total_weight() == 0.0);
        CHECK_THROWS_WITH_AS(acc.add_one(0, 2),
                             "measure confusion matrix: argument 'prediction': label 2 outside the classes 0..1 at "
                             "index 0",
                             input_error);
        CHECK_THROWS_WITH_AS(acc.add_one(0, 1, -0.5),
                             "measure confusion matrix: argument 'weights': weight must be finite and non-negative, "
                             "got -0.5",
                             input_error);
        auto wide = confusion_matrix{}.accumulator();
        wide.add_one(2, 2);
        CHECK_THROWS_WITH_AS(acc.merge(wide),
                             "measure confusion matrix: argument 'other': cannot merge a table of 3 classes into one "
                             "fixed at 2",
                             input_error);
    }

    TEST_CASE("serialize / deserialize keep the fixed k, the name and the table") {
        // self-consistency: the copy from bytes behaves as the original on the same rows
        const std::vector<int> y{0, 1, 2, 2, 3}, f{1, 1, 2, 0, 3};
        const std::vector<double> w{0.5, 1.5, 2.0, 0.25, 1.0};
        auto a = confusion_matrix{.classes = 4}.accumulator();
        a.add(y, f, w);
        auto b = heldout::deserialize<confusion_accumulator>(heldout::serialize(a));
        CHECK(same_table(b.table(), a.table()));
        CHECK(b.fixed_classes() == 4);
        CHECK(b.who() == "measure confusion matrix");
        CHECK(b.count() == a.count());
        a.add_one(3, 0, 2.0);
        b.add_one(3, 0, 2.0);
        CHECK(same_table(b.table(), a.table()));
        // label 4 is outside the fixed classes on both (an inferred table would accept it)
        const std::string bad = message_of([&] { a.add_one(4, 0); });
        CHECK(bad == "measure confusion matrix: argument 'truth': label 4 outside the classes 0..3 at index 0");
        CHECK(message_of([&] { b.add_one(4, 0); }) == bad);
        b.reset();
        CHECK(b.classes() == 4); // a fixed k survives reset(), as before the bytes

        // an inferred k stays inferred and grows on both alike
        auto c = confusion_matrix{}.accumulator();
        c.add(y, f);
        auto d = heldout::deserialize<confusion_accumulator>(heldout::serialize(c));
        CHECK(d.fixed_classes() == 0);
        c.add_one(5, 1);
        d.add_one(5, 1);
        CHECK(d.classes() == 6);
        CHECK(same_table(d.table(), c.table()));

        // the name travels too
        const confusion_accumulator named(3, "measure my table");
        CHECK(heldout::deserialize<confusion_accumulator>(heldout::serialize(named)).who() == "measure my table");
    }

    TEST_CASE("an inferred k grows in place: cells move to their rows, and a second epoch reuses the buffers") {
        // reference: brute_table, a self-written one-cell-at-a-time count of all rows
        const std::vector<int> y1{1, 0, 1}, f1{0, 0, 1};
        const std::vector<double> w1{2.0, 0.5, 1.25};
        const std::vector<int> y2{2, 0, 1, 2}, f2{1, 2, 2, 2};
        const std::vector<int> y3{6, 3, 0, 5}, f3{0, 6, 4, 5};
        std::vector<int> all_y, all_f;
        std::vector<double> all_w;
        for (std::size_t i = 0; i < y1.size(); ++i) {
            all_y.push_back(y1[i]);
            all_f.push_back(f1[i]);
            all_w.push_back(w1[i]);
        }
        for (std::size_t i = 0; i < y2.size(); ++i) {
            all_y.push_back(y2[i]);
            all_f.push_back(f2[i]);
            all_w.push_back(1.0);
        }
        all_y.push_back(4);
        all_f.push_back(1);
        all_w.push_back(3.0);
        for (std::size_t i = 0; i < y3.size(); ++i) {
            all_y.push_back(y3[i]);
            all_f.push_back(f3[i]);
            all_w.push_back(1.0);
        }
        const Eigen::MatrixXd expected = brute_table(all_y, all_f, 7, &all_w);
        auto a = confusion_matrix{}.accumulator();
        const double* first = nullptr;
        for (int epoch = 0; epoch < 2; ++epoch) {
            a.reset();
            a.add(y1, f1, w1);    // k = 2
            a.add(y2, f2);        // k = 3
            a.add_one(4, 1, 3.0); // k = 5
            a.add(y3, f3);        // k = 7
            CHECK(a.classes() == 7);
            CHECK(same_table(a.table(), expected));
            if (epoch == 0)
                first = cells_of(a);
            else
                CHECK(cells_of(a) == first); // the buffer of the first epoch, not a new one
        }
    }
}
