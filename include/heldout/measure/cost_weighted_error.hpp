// heldout/measure/cost_weighted_error.hpp — the mean misclassification cost under a user's
// k x k cost matrix (Elkan 2001, "The foundations of cost-sensitive learning", IJCAI).
//
//   Eigen::MatrixXd costs(2, 2);
//   costs << 0, 1,    // true 0: predicted 0 costs 0, predicted 1 (a false positive) costs 1
//            5, 0;    // true 1: predicted 0 (a false negative) costs 5
//   double c = heldout::evaluate(heldout::measure::cost_weighted_error{costs}, truth, pred);
//
// value = sum_ij costs(i, j) C_ij / sum_ij C_ij, with C the (weighted) confusion table;
// rows of `costs` are the true class, columns the predicted class, as in the table. The
// costs must be square, finite and non-negative (checked when the measure is made); they
// fix the number of classes k, so a label >= k is an input_error. A default-constructed
// cost_weighted_error{} has no costs and refuses to score (input_error naming "costs");
// it exists for deserialize(), which reads the costs from the bytes.
#pragma once

#include <heldout/measure/table_accumulator.hpp>

#include <string>
#include <string_view>
#include <utility>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

/// Mean cost of the predictions under a k x k cost matrix (row = true, column = predicted).
class cost_weighted_error {
public:
    static constexpr direction better = direction::lower_is_better;
    static constexpr prediction_kind kind = prediction_kind::label;
    using capabilities = offers<cap::serialisable>;
    static constexpr std::string_view key = "cost_weighted_error";

    /// No costs: cannot score (add, value and from_table refuse it with an input_error); it
    /// exists so that deserialize() can build the accumulator and then read the costs.
    cost_weighted_error() = default;
    /// costs(i, j) is the cost of predicting class j when the true class is i.
    explicit cost_weighted_error(Eigen::MatrixXd costs) : costs_(std::move(costs)) {
        if (costs_.size() == 0)
            detail::fail("measure " + message_name(), "costs", "empty cost matrix");
        check_costs();
    }

    /// Same costs (same size, equal entries).
    bool operator==(const cost_weighted_error& o) const {
        return costs_.rows() == o.costs_.rows() && costs_.cols() == o.costs_.cols() && costs_ == o.costs_;
    }
    /// "cost-weighted error (costs [0 1; 5 0])": the costs are part of what is measured.
    std::string name() const {
        std::string c;
        for (Eigen::Index i = 0; i < costs_.rows(); ++i) {
            c += i == 0 ? "costs [" : "; ";
            for (Eigen::Index j = 0; j < costs_.cols(); ++j) {
                // appended piece by piece: g++ 12 -O3 warns (-Wrestrict, a false positive) on
                // "literal" + std::string here, which failed the release build of the demo
                if (j > 0)
                    c += ' ';
                c += detail::number_text(costs_(i, j));
            }
        }
        if (!c.empty())
            c += "]";
        return detail::with_parameters("cost-weighted error", c);
    }
    /// The name in error messages (without the costs).
    std::string message_name() const { return "cost-weighted error"; }
    table_accumulator<cost_weighted_error> accumulator() const { return table_accumulator<cost_weighted_error>(*this); }

    /// The cost matrix (k x k; empty for a default-constructed measure).
    const Eigen::MatrixXd& costs() const noexcept { return costs_; }

    /// The value on a given confusion table of the same size as the costs.
    double from_table(const Eigen::MatrixXd& table) const {
        const std::string who = "measure " + message_name();
        check_usable(who);
        const detail::table_view v = detail::view_of_table(who, table);
        if (v.k != static_cast<std::size_t>(costs_.rows()))
            detail::fail(who, "table",
                         std::to_string(v.k) + " classes, but the cost matrix has " + std::to_string(costs_.rows()));
        return from_view(v, detail::table_margins(v), who);
    }

    /// Refuses a measure without costs (default-constructed).
    void check_usable(std::string_view who) const {
        if (costs_.size() == 0)
            detail::fail(who, "costs",
                         "empty cost matrix (a default cost_weighted_error has no costs: give the k x k costs)");
    }

    std::size_t table_classes() const noexcept { return static_cast<std::size_t>(costs_.rows()); }
    /// The value from a table and its margins; `who` names the measure in messages.
    double from_view(const detail::table_view& v, const detail::table_margins& m, std::string_view who) const {
        check_usable(who);
        detail::check_table_weight(who, v, m);
        detail::compensated_sum s{};
        for (std::size_t i = 0; i < v.k; ++i)
            for (std::size_t j = 0; j < v.k; ++j)
                s.add(costs_(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)) * v(i, j));
        return s.value() / m.total;
    }

    // The cost matrix is the measure's whole state; read from bytes, it is checked as the
    // constructor checks it (an empty matrix stays the default measure).
    template <class F>
    void visit_state(F&& f) {
        f(costs_);
        check_costs();
    }
    template <class F>
    void visit_state(F&& f) const {
        f(costs_);
    }

private:
    /// Square, at most max_classes, finite and non-negative (an empty matrix passes).
    void check_costs() const {
        if (costs_.size() == 0 && costs_.rows() == costs_.cols())
            return;
        const std::string who = "measure " + message_name();
        if (costs_.rows() != costs_.cols())
            detail::fail(who, "costs",
                         "must be square (rows = true class, columns = predicted class), got " +
                             std::to_string(costs_.rows()) + " x " + std::to_string(costs_.cols()));
        if (static_cast<std::size_t>(costs_.rows()) > max_classes)
            detail::fail(who, "costs", "more than " + std::to_string(max_classes) + " classes");
        for (Eigen::Index i = 0; i < costs_.rows(); ++i)
            for (Eigen::Index j = 0; j < costs_.cols(); ++j) {
                const double c = costs_(i, j);
                if (!std::isfinite(c) || c < 0)
                    detail::fail(who, "costs",
                                 (std::isfinite(c) ? "negative cost " + detail::number_text(c)
                                                   : std::string("cost not finite")) +
                                     " at row " + std::to_string(i) + ", column " + std::to_string(j));
            }
    }

    Eigen::MatrixXd costs_;
};

} // namespace measure
HELDOUT_NAMESPACE_END
