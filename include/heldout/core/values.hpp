// heldout/core/values.hpp — what heldout accepts as input data, without copying it.
//
//   std::vector<double> y = ...;             // any contiguous, sized range
//   std::span<const float> s = ...;
//   Eigen::VectorXd v = ...;                 // Eigen dense vectors (inner stride 1)
//   auto view = heldout::values_of(v, "mse", "truth");   // std::span<const double>
//
//   Eigen::MatrixXd p(n, k);                 // class-probability rows (any storage order)
//   auto rows = heldout::rows_of(p);         // heldout::row_matrix<double>
//   auto rows2 = heldout::rows(flat, k);     // a row-major flat range with k columns
//
// Concepts: value_range (contiguous numbers), label_range (integral elements, class
// labels 0..k-1, bool included), real_range (floating-point elements: values, scores,
// probabilities), probability_rows (an n x k matrix of floating-point class probabilities).
// Labels and real values are told apart by element type: a label measure given float
// scores does not compile, which is why scores become labels only through an explicit
// threshold (heldout::labels_at).
#pragma once

#include <heldout/core/error.hpp>

#include <concepts>
#include <cstddef>
#include <cstdint>
#include <ranges>
#include <span>
#include <string_view>
#include <type_traits>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

namespace detail {

// Eigen is detected by shape, not by including Eigen, so that headers which only need
// spans (plans) stay light.
template <class R>
concept eigen_dense_vector = requires(const R& r) {
    typename R::Scalar;
    requires R::IsVectorAtCompileTime == 1;
    { r.data() } -> std::convertible_to<const typename R::Scalar*>;
    { r.size() } -> std::convertible_to<std::ptrdiff_t>;
    { r.innerStride() } -> std::convertible_to<std::ptrdiff_t>;
};

template <class R>
concept eigen_dense_matrix = requires(const R& r) {
    typename R::Scalar;
    { r.data() } -> std::convertible_to<const typename R::Scalar*>;
    { r.rows() } -> std::convertible_to<std::ptrdiff_t>;
    { r.cols() } -> std::convertible_to<std::ptrdiff_t>;
    { r.rowStride() } -> std::convertible_to<std::ptrdiff_t>;
    { r.colStride() } -> std::convertible_to<std::ptrdiff_t>;
};

template <class R>
struct element_of {
    using type = std::remove_cv_t<std::ranges::range_value_t<const R&>>;
};
template <class R>
requires eigen_dense_vector<R>
struct element_of<R> {
    using type = std::remove_cv_t<typename R::Scalar>;
};

template <class T>
inline constexpr bool is_number_v = std::is_arithmetic_v<T> && !std::is_same_v<T, char>;

} // namespace detail

/// Any contiguous, sized range of numbers (std::vector, std::array, std::span, C arrays,
/// Eigen dense vectors with inner stride 1).
template <class R>
concept value_range = (detail::eigen_dense_vector<std::remove_cvref_t<R>> ||
                       (std::ranges::contiguous_range<const std::remove_cvref_t<R>&> &&
                        std::ranges::sized_range<const std::remove_cvref_t<R>&>)) &&
                      detail::is_number_v<typename detail::element_of<std::remove_cvref_t<R>>::type>;

/// Element type of a value_range.
template <value_range R>
using element_t = typename detail::element_of<std::remove_cvref_t<R>>::type;

/// Class labels: integral elements (int, std::uint8_t, bool, ...), classes numbered 0..k-1.
template <class R>
concept label_range = value_range<R> && std::integral<element_t<R>>;

/// Real values, scores or probabilities: floating-point elements.
template <class R>
concept real_range = value_range<R> && std::floating_point<element_t<R>>;

/// Observation weights: any numbers, checked finite and non-negative at run time.
template <class R>
concept weight_range = value_range<R>;

/// A non-owning view of a value_range; `who` and `arg` name the caller in errors
/// (an Eigen vector with a runtime inner stride other than 1 is refused).
template <value_range R>
std::span<const element_t<R>> values_of(const R& r, std::string_view who = "heldout", std::string_view arg = "values") {
    using T = element_t<R>;
    using Rr = std::remove_cvref_t<R>;
    if constexpr (detail::eigen_dense_vector<Rr>) {
        if (r.size() > 1 && r.innerStride() != 1)
            detail::fail(who, arg, "Eigen vector with inner stride != 1; pass a contiguous copy");
        return std::span<const T>(r.data(), static_cast<std::size_t>(r.size()));
    } else {
        return std::span<const T>(std::ranges::data(r), std::ranges::size(r));
    }
}

/// An n x k matrix of class probabilities viewed through strides (no copy).
template <class T>
struct row_matrix {
    const T* data = nullptr;
    std::size_t rows = 0;
    std::size_t cols = 0;
    std::ptrdiff_t row_stride = 0; // elements between (i, j) and (i + 1, j)
    std::ptrdiff_t col_stride = 1; // elements between (i, j) and (i, j + 1)

    T operator()(std::size_t i, std::size_t j) const noexcept {
        return data[static_cast<std::ptrdiff_t>(i) * row_stride + static_cast<std::ptrdiff_t>(j) * col_stride];
    }
    /// Rows first..first+count as a view of the same storage.
    row_matrix slice(std::size_t first, std::size_t count) const noexcept {
        return {data + static_cast<std::ptrdiff_t>(first) * row_stride, count, cols, row_stride, col_stride};
    }
};

/// A row-major flat range with k columns seen as class-probability rows.
template <real_range R>
row_matrix<element_t<R>> rows(const R& flat, std::size_t k) {
    auto s = values_of(flat, "heldout::rows", "flat");
    if (k == 0)
        detail::fail("heldout::rows", "k", "number of columns must be positive");
    if (s.size() % k != 0)
        detail::fail("heldout::rows", "flat",
                     "size " + std::to_string(s.size()) + " is not a multiple of k = " + std::to_string(k));
    return {s.data(), s.size() / k, k, static_cast<std::ptrdiff_t>(k), 1};
}

/// Class-probability rows: an Eigen dense matrix of floating point, or a row_matrix.
template <class P>
concept probability_rows = (detail::eigen_dense_matrix<std::remove_cvref_t<P>> &&
                            !detail::eigen_dense_vector<std::remove_cvref_t<P>> &&
                            std::floating_point<typename std::remove_cvref_t<P>::Scalar>) ||
                           (std::same_as<std::remove_cvref_t<P>, row_matrix<float>> ||
                            std::same_as<std::remove_cvref_t<P>, row_matrix<double>>);

/// The row_matrix view of class-probability rows.
template <probability_rows P>
auto rows_of(const P& p) {
    using Pr = std::remove_cvref_t<P>;
    if constexpr (detail::eigen_dense_matrix<Pr>) {
        using T = std::remove_cv_t<typename Pr::Scalar>;
        return row_matrix<T>{p.data(), static_cast<std::size_t>(p.rows()), static_cast<std::size_t>(p.cols()),
                             static_cast<std::ptrdiff_t>(p.rowStride()), static_cast<std::ptrdiff_t>(p.colStride())};
    } else {
        return p;
    }
}

namespace detail {
// Rows [first, first + count) of a prediction: a value range or class-probability rows.
template <class P>
auto prediction_slice(const P& p, std::size_t first, std::size_t count) {
    if constexpr (probability_rows<P>)
        return rows_of(p).slice(first, count);
    else
        return values_of(p).subspan(first, count);
}

/// Number of predictions (rows for class-probability rows).
template <class P>
std::size_t prediction_rows(const P& p) {
    if constexpr (probability_rows<P>)
        return rows_of(p).rows;
    else
        return values_of(p).size();
}
} // namespace detail

/// Scores become labels only through an explicit threshold: label 1 where score >= t.
/// A NaN threshold would silently label every row 0 (every comparison false), an infinite
/// one every row alike: both are input_error.
template <real_range R>
std::vector<std::uint8_t> labels_at(const R& scores, double threshold) {
    if (threshold != threshold)
        detail::fail("heldout::labels_at", "threshold", "not finite (nan)");
    if (threshold - threshold != 0.0) // inf - inf is NaN (no <cmath> in this light header)
        detail::fail("heldout::labels_at", "threshold", "not finite (inf)");
    auto s = values_of(scores, "heldout::labels_at", "scores");
    std::vector<std::uint8_t> out(s.size());
    for (std::size_t i = 0; i < s.size(); ++i) {
        if (s[i] != s[i])
            detail::fail_at("heldout::labels_at", "scores", "NaN", i);
        out[i] = static_cast<std::uint8_t>(static_cast<double>(s[i]) >= threshold);
    }
    return out;
}

HELDOUT_NAMESPACE_END
