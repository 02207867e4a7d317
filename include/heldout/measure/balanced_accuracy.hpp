// heldout/measure/balanced_accuracy.hpp — balanced accuracy: the mean of the per-class
// recalls (Brodersen, Ong, Stephan & Buhmann 2010), for binary and multiclass labels.
//
//   std::vector<int> truth{0, 0, 0, 1}, pred{0, 0, 1, 1};
//   double b = heldout::evaluate(heldout::measure::balanced_accuracy{}, truth, pred);
//   // recalls 2/3 (class 0) and 1/1 (class 1): (2/3 + 1) / 2 = 0.8333...
//
// value = (1/k) sum_i C_ii / sum_j C_ij over the classes 0..k-1 of the confusion table
// (weighted when weights are given); for k = 2 it is (TPR + TNR) / 2. A class with no
// true observations has recall 0/0, so the value is then undefined (undefined_error
// naming the class) — including a class that only the predictions use. Fix the classes
// with `classes` (k) or leave 0 to infer k from the labels.
#pragma once

#include <heldout/measure/table_accumulator.hpp>

#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

/// Mean per-class recall.
struct balanced_accuracy {
    static constexpr direction better = direction::higher_is_better;
    static constexpr prediction_kind kind = prediction_kind::label;
    using capabilities = offers<cap::serialisable>;
    static constexpr std::string_view key = "balanced_accuracy";
    /// Number of classes k; 0 infers it from the labels.
    std::size_t classes = 0;

    bool operator==(const balanced_accuracy&) const = default;
    std::string name() const {
        return detail::with_parameters("balanced accuracy", classes == 0 ? "" : "classes " + std::to_string(classes));
    }
    /// The name in error messages (without the class count).
    std::string message_name() const { return "balanced accuracy"; }
    table_accumulator<balanced_accuracy> accumulator() const { return table_accumulator<balanced_accuracy>(*this); }

    /// The value on a given confusion table (rows = true class, columns = predicted).
    double from_table(const Eigen::MatrixXd& table) const {
        const std::string who = "measure " + message_name();
        const detail::table_view v = detail::view_of_table(who, table);
        return from_view(v, detail::table_margins(v), who);
    }

    std::size_t table_classes() const noexcept { return classes; }
    /// The value from a table and its margins; `who` names the measure in messages.
    double from_view(const detail::table_view& v, const detail::table_margins& m, std::string_view who) const {
        detail::check_table_weight(who, v, m);
        detail::compensated_sum s{};
        for (std::size_t i = 0; i < v.k; ++i) {
            if (!(m.row[i] > 0))
                detail::fail_undefined(who, "true class " + std::to_string(i) +
                                                " is absent (its recall is 0/0); balanced accuracy needs every class "
                                                "in the truth");
            s.add(v(i, i) / m.row[i]);
        }
        return s.value() / static_cast<double>(v.k);
    }

    template <class F>
    void visit_state(F&& f) {
        f(classes);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(classes);
    }
};

} // namespace measure
HELDOUT_NAMESPACE_END
