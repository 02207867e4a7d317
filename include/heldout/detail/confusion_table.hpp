// heldout/detail/confusion_table.hpp — read-only views of a k x k confusion table (an
// accumulator's cells, or a user's Eigen matrix) and their margins, from which the label
// measures compute their values. Internal: include the public headers instead.
#pragma once

#include <heldout/core/config.hpp>
#include <heldout/core/error.hpp>
#include <heldout/detail/labels.hpp>
#include <heldout/detail/sum.hpp>

HELDOUT_EXTERNAL_BEGIN
#include <Eigen/Core>
HELDOUT_EXTERNAL_END

#include <cmath>
#include <cstddef>
#include <limits>
#include <span>
#include <string>
#include <string_view>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

namespace detail {

/// A read-only k x k view of a confusion table: cell (i, j) = a[o] (+ b[o] if b), with
/// o = i * row_stride + j * col_stride. Label measures compute their value from it.
struct table_view {
    std::size_t k = 0;
    const double* a = nullptr;
    const double* b = nullptr;
    std::ptrdiff_t row_stride = 0;
    std::ptrdiff_t col_stride = 1;

    double operator()(std::size_t i, std::size_t j) const noexcept {
        const std::ptrdiff_t o =
            static_cast<std::ptrdiff_t>(i) * row_stride + static_cast<std::ptrdiff_t>(j) * col_stride;
        return b ? a[o] + b[o] : a[o];
    }
};

/// Checks a user-given table (square, finite, non-negative) and views it.
inline table_view view_of_table(std::string_view who, const Eigen::MatrixXd& c) {
    if (c.rows() != c.cols())
        fail(who, "table",
             "must be square (rows = true class, columns = predicted class), got " + std::to_string(c.rows()) + " x " +
                 std::to_string(c.cols()));
    if (static_cast<std::size_t>(c.rows()) > measure::max_classes)
        fail(who, "table", "more than " + std::to_string(measure::max_classes) + " classes");
    const std::span<const double> cells(c.data(), static_cast<std::size_t>(c.size()));
    for (std::size_t o = 0; o < cells.size(); ++o) {
        const double x = cells[o];
        if (!std::isfinite(x) || x < 0) {
            const std::size_t r = o % static_cast<std::size_t>(c.rows()), col = o / static_cast<std::size_t>(c.rows());
            fail(who, "table",
                 (std::isfinite(x) ? "negative cell " + number_text(x) : std::string("cell not finite")) + " at row " +
                     std::to_string(r) + ", column " + std::to_string(col));
        }
    }
    return {static_cast<std::size_t>(c.rows()), c.data(), nullptr, 1, static_cast<std::ptrdiff_t>(c.rows())};
}

/// Row (true-class) and column (predicted-class) totals and the grand total of a table.
/// compute() reuses the buffers, so a kept table_margins allocates only when k grows.
struct table_margins {
    std::vector<double> row, col;
    double total = 0;
    double trace = 0;

    table_margins() = default;
    explicit table_margins(const table_view& v) { compute(v); }

    void compute(const table_view& v) {
        row.assign(v.k, 0.0);
        col.assign(v.k, 0.0);
        colsum_.assign(v.k, compensated_sum{});
        compensated_sum n{}, d{};
        for (std::size_t i = 0; i < v.k; ++i) {
            compensated_sum r{};
            for (std::size_t j = 0; j < v.k; ++j) {
                const double x = v(i, j);
                r.add(x);
                colsum_[j].add(x);
                n.add(x);
            }
            row[i] = r.value();
            d.add(v(i, i));
        }
        for (std::size_t j = 0; j < v.k; ++j)
            col[j] = colsum_[j].value();
        total = n.value();
        trace = d.value();
    }

private:
    std::vector<compensated_sum> colsum_;
};

/// One table_margins per thread for the accumulators' value(): after the first value() of
/// a given k nothing is allocated (fresh accumulators included), copies of an accumulator
/// carry no scratch, and value() on one object from several threads does not race.
inline table_margins& margins_scratch() {
    thread_local table_margins m;
    return m;
}

/// Checks that a table holds some weight; the one message for an empty table.
inline void check_table_weight(std::string_view who, const table_view& v, const table_margins& m) {
    if (v.k == 0)
        fail_undefined(who, "no observations");
    // First: an overflowed compensated sum reads NaN (inf - inf in its carry), not > 0.
    if (!(m.total <= std::numeric_limits<double>::max()))
        fail(who, "weights", "the total weight overflows double (beyond 1.8e308): scale the weights down");
    if (!(m.total > 0))
        fail_undefined(who, "total weight is zero");
}

} // namespace detail

HELDOUT_NAMESPACE_END
