// heldout/detail/columns.hpp — the recorded columns of an aggregator (truth, predictions):
// rows appended split after split, any row range viewed without a copy. Internal.
//
// A column holds one representation: integral labels (int64), real values (double), or
// class-probability rows (double, k per row). Other families store what their kinds need
// by specialising heldout::column_traits<R> for their input type R (a view of censored
// times, of query ids with relevance, ...): the aggregator stores whatever a column_traits
// names, and a measure reads it as the view type its kind declares. Nothing in the
// aggregator knows the list.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/values.hpp>

#include <cstddef>
#include <cstdint>
#include <memory>
#include <ostream>
#include <span>
#include <string>
#include <string_view>
#include <typeindex>
#include <typeinfo>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

namespace detail {

/// One recorded column, whatever it holds.
class column_base {
public:
    virtual ~column_base() = default;
    /// An empty column of the same layout.
    virtual std::unique_ptr<column_base> empty_copy() const = 0;
    virtual std::unique_ptr<column_base> clone() const = 0;
    virtual std::size_t rows() const noexcept = 0;
    /// "integral labels", "class-probability rows with 3 columns", ...
    virtual std::string describe() const = 0;
    virtual bool same_layout(const column_base& o) const noexcept = 0;
    /// Appends the rows of o (same layout).
    virtual void append(const column_base& o) = 0;
    virtual void clear() noexcept = 0;
    /// The type of view a measure reads (std::span<const std::int64_t>, ...).
    virtual std::type_index view_type() const noexcept = 0;
    /// Writes the view of rows [first, first + count) into *out (of type view_type()).
    virtual void view_into(std::size_t first, std::size_t count, void* out) const = 0;
    /// Cells per row in CSV, and one cell as text.
    virtual std::size_t cells() const noexcept { return 1; }
    virtual void write_cell(std::ostream& os, std::size_t row, std::size_t cell) const = 0;
};

/// The view of type V of rows [first, first + count) of c (c.view_type() must be V).
template <class V>
V view_of(const column_base& c, std::size_t first, std::size_t count) {
    HELDOUT_ASSERT(c.view_type() == std::type_index(typeid(V)));
    V v{};
    c.view_into(first, count, &v);
    return v;
}

/// Integral labels, stored as int64.
class label_column final : public column_base {
public:
    std::vector<std::int64_t> data;

    std::unique_ptr<column_base> empty_copy() const override { return std::make_unique<label_column>(); }
    std::unique_ptr<column_base> clone() const override { return std::make_unique<label_column>(*this); }
    std::size_t rows() const noexcept override { return data.size(); }
    std::string describe() const override { return "integral labels"; }
    bool same_layout(const column_base& o) const noexcept override {
        return dynamic_cast<const label_column*>(&o) != nullptr;
    }
    void append(const column_base& o) override {
        const auto& x = static_cast<const label_column&>(o);
        data.insert(data.end(), x.data.begin(), x.data.end());
    }
    void clear() noexcept override { data.clear(); }
    std::type_index view_type() const noexcept override { return typeid(std::span<const std::int64_t>); }
    void view_into(std::size_t first, std::size_t count, void* out) const override {
        *static_cast<std::span<const std::int64_t>*>(out) = std::span<const std::int64_t>(data).subspan(first, count);
    }
    void write_cell(std::ostream& os, std::size_t row, std::size_t) const override { os << data[row]; }
};

/// Real values, stored as double (floats widen exactly).
class real_column final : public column_base {
public:
    std::vector<double> data;

    std::unique_ptr<column_base> empty_copy() const override { return std::make_unique<real_column>(); }
    std::unique_ptr<column_base> clone() const override { return std::make_unique<real_column>(*this); }
    std::size_t rows() const noexcept override { return data.size(); }
    std::string describe() const override { return "floating-point values"; }
    bool same_layout(const column_base& o) const noexcept override {
        return dynamic_cast<const real_column*>(&o) != nullptr;
    }
    void append(const column_base& o) override {
        const auto& x = static_cast<const real_column&>(o);
        data.insert(data.end(), x.data.begin(), x.data.end());
    }
    void clear() noexcept override { data.clear(); }
    std::type_index view_type() const noexcept override { return typeid(std::span<const double>); }
    void view_into(std::size_t first, std::size_t count, void* out) const override {
        *static_cast<std::span<const double>*>(out) = std::span<const double>(data).subspan(first, count);
    }
    void write_cell(std::ostream& os, std::size_t row, std::size_t) const override { os << number_text(data[row]); }
};

/// Class-probability rows, stored row-major as double with k columns.
class rows_column final : public column_base {
public:
    std::vector<double> data;
    std::size_t cols = 1;

    std::unique_ptr<column_base> empty_copy() const override {
        auto c = std::make_unique<rows_column>();
        c->cols = cols;
        return c;
    }
    std::unique_ptr<column_base> clone() const override { return std::make_unique<rows_column>(*this); }
    std::size_t rows() const noexcept override { return data.size() / cols; }
    std::string describe() const override { return "class-probability rows with " + std::to_string(cols) + " columns"; }
    bool same_layout(const column_base& o) const noexcept override {
        const auto* x = dynamic_cast<const rows_column*>(&o);
        return x != nullptr && x->cols == cols;
    }
    void append(const column_base& o) override {
        const auto& x = static_cast<const rows_column&>(o);
        data.insert(data.end(), x.data.begin(), x.data.end());
    }
    void clear() noexcept override { data.clear(); }
    std::type_index view_type() const noexcept override { return typeid(row_matrix<double>); }
    void view_into(std::size_t first, std::size_t count, void* out) const override {
        *static_cast<row_matrix<double>*>(out) =
            row_matrix<double>{data.data() + first * cols, count, cols, static_cast<std::ptrdiff_t>(cols), 1};
    }
    std::size_t cells() const noexcept override { return cols; }
    void write_cell(std::ostream& os, std::size_t row, std::size_t cell) const override {
        os << number_text(data[row * cols + cell]);
    }
};

} // namespace detail

/// How input type R is recorded: `column` (a detail::column_base) and
/// `static void append(column&, const R&, std::string_view who, std::string_view arg)`.
/// Specialised here for labels, real values and class-probability rows; other families
/// specialise it for their own input views.
template <class R, class = void>
struct column_traits;

template <class R>
struct column_traits<R, std::enable_if_t<probability_rows<R>>> {
    using column = detail::rows_column;
    static std::size_t columns(const R& r) { return rows_of(r).cols; }
    static void append(column& c, const R& r, std::string_view, std::string_view) {
        const auto m = rows_of(r);
        c.cols = m.cols;
        c.data.reserve(c.data.size() + m.rows * m.cols);
        for (std::size_t i = 0; i < m.rows; ++i)
            for (std::size_t j = 0; j < m.cols; ++j)
                c.data.push_back(static_cast<double>(m(i, j)));
    }
};

template <class R>
struct column_traits<R, std::enable_if_t<!probability_rows<R> && label_range<R>>> {
    using column = detail::label_column;
    static void append(column& c, const R& r, std::string_view who, std::string_view arg) {
        auto v = values_of(r, who, arg);
        c.data.reserve(c.data.size() + v.size());
        for (std::size_t i = 0; i < v.size(); ++i) {
            if constexpr (std::is_unsigned_v<element_t<R>> && sizeof(element_t<R>) >= sizeof(std::int64_t))
                if (v[i] > static_cast<element_t<R>>(INT64_MAX))
                    detail::fail_at(who, arg, "label too large", i);
            c.data.push_back(static_cast<std::int64_t>(v[i]));
        }
    }
};

template <class R>
struct column_traits<R, std::enable_if_t<!probability_rows<R> && real_range<R>>> {
    using column = detail::real_column;
    static void append(column& c, const R& r, std::string_view who, std::string_view arg) {
        auto v = values_of(r, who, arg);
        c.data.insert(c.data.end(), v.begin(), v.end());
    }
};

/// Input types the aggregator can record.
template <class R>
concept recordable = requires {
    typename column_traits<std::remove_cvref_t<R>>::column;
};

namespace detail {

/// The rows of r as a new column (nothing else changes if r is refused).
template <class R>
std::unique_ptr<column_base> make_column(const R& r, std::string_view who, std::string_view arg) {
    using traits = column_traits<std::remove_cvref_t<R>>;
    auto c = std::make_unique<typename traits::column>();
    traits::append(*c, r, who, arg);
    return c;
}

/// Number of rows of an input (rows for class-probability rows).
template <class R>
std::size_t input_rows(const R& r) {
    if constexpr (probability_rows<R>)
        return rows_of(r).rows;
    else if constexpr (value_range<R>)
        return values_of(r).size();
    else
        return r.size();
}

} // namespace detail

HELDOUT_NAMESPACE_END
