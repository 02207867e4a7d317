// heldout/measure/confusion_matrix.hpp — the weighted k x k confusion table of class labels,
// and the accumulator every label measure is built on.
//
//   std::vector<std::uint8_t> truth{0, 1, 2, 1}, pred{0, 2, 2, 1};
//   Eigen::MatrixXd c = heldout::evaluate(heldout::measure::confusion_matrix{}, truth, pred);
//   // c(i, j) = total weight of observations with true class i predicted as class j:
//   // [[1, 0, 0], [0, 1, 1], [0, 0, 1]]
//
//   auto acc = heldout::measure::confusion_matrix{.classes = 3}.accumulator();
//   acc.add(truth, pred, weights);  acc.add_one(2, 0);  acc.merge(other);
//   double tp = acc(1, 1);  Eigen::MatrixXd table = acc.table();
//
// Conventions:
//  * rows are the true class, columns the predicted class; classes are 0..k-1;
//  * `classes` fixes k (labels >= k are an input_error); classes = 0 infers k as one more
//    than the largest label seen in truth or prediction, growing as labels arrive, and two
//    inferred accumulators merge into the larger k (missing rows/columns are zero);
//  * at most measure::max_classes (1024) classes, so that a stray label cannot ask for a
//    huge table;
//  * cells hold total weights (counts when no weights are given) as compensated double
//    sums: counts are exact up to 2^53; weights are summed in blocks of rows whose totals
//    are added with Neumaier compensation, so the error does not grow with n.
//
// A confusion table has no single value and no direction, so confusion_matrix is not an
// outer_measure: heldout::evaluate(confusion_matrix, ...) returns the table itself.
#pragma once

#include <heldout/core/config.hpp>
#include <heldout/core/measure.hpp>
#include <heldout/measure/confusion_accumulator.hpp>
#include <heldout/measure/table_accumulator.hpp>

HELDOUT_EXTERNAL_BEGIN
#include <Eigen/Core>
HELDOUT_EXTERNAL_END

#include <cstddef>
#include <string>

HELDOUT_NAMESPACE_BEGIN

namespace measure {

/// The weighted k x k confusion table (rows = true class, columns = predicted class).
struct confusion_matrix {
    static constexpr prediction_kind kind = prediction_kind::label;
    /// Number of classes k; 0 infers it from the labels (largest label + 1).
    std::size_t classes = 0;

    std::string name() const { return "confusion matrix"; }
    confusion_accumulator accumulator() const { return confusion_accumulator(classes, "measure " + name()); }
};

} // namespace measure

/// The confusion table of a whole set (rows = true class, columns = predicted class).
template <class T, class P>
Eigen::MatrixXd evaluate(const measure::confusion_matrix& m, const T& truth, const P& prediction) {
    detail::check_prediction_type<measure::confusion_matrix, P>();
    static_assert(label_range<T>, "heldout: a confusion matrix needs class labels (integral elements) as truth");
    auto acc = m.accumulator();
    acc.add(truth, prediction);
    return acc.table();
}

/// The weighted confusion table of a whole set.
template <class T, class P, class W>
Eigen::MatrixXd evaluate(const measure::confusion_matrix& m, const T& truth, const P& prediction, const W& weights) {
    detail::check_prediction_type<measure::confusion_matrix, P>();
    static_assert(label_range<T>, "heldout: a confusion matrix needs class labels (integral elements) as truth");
    static_assert(weight_range<W>, "heldout: weights are a contiguous range of numbers");
    auto acc = m.accumulator();
    acc.add(truth, prediction, weights);
    return acc.table();
}

HELDOUT_NAMESPACE_END
