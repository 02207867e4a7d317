// heldout/measure/mcc.hpp — the Matthews correlation coefficient (Matthews 1975), binary
// and in the multiclass R_K form of Gorodkin (2004).
//
//   std::vector<int> truth{1, 1, 0, 0, 0}, pred{1, 0, 0, 0, 1};
//   double m = heldout::evaluate(heldout::measure::mcc{}, truth, pred);
//   // TP = 1, FN = 1, FP = 1, TN = 2: (1*2 - 1*1) / sqrt(2 * 2 * 3 * 3) = 1/6
//
// k = 2: (TP TN - FP FN) / (sqrt((TP+FP)(TP+FN)) sqrt((TN+FP)(TN+FN))), the Pearson
// correlation of the two 0/1 vectors (class 1 positive; the value is the same with class
// 0 positive). k > 2: with c = trace, s = N, t_k = true totals, p_k = predicted totals,
//   R_K = (c s - sum_k p_k t_k) / sqrt((s^2 - sum_k p_k^2)(s^2 - sum_k t_k^2)),
// which equals the binary form at k = 2. The denominator is built from products of
// doubles, each factor written as a sum of non-negative terms (s^2 - sum t_k^2 =
// sum_k t_k (s - t_k)), so counts of any size neither overflow nor cancel; the products are
// formed in units of the total weight, so any scale of the weights gives the same value. When a margin
// is empty (all truth, or all predictions, in one class) the value is 0/0: undefined_error.
#pragma once

#include <heldout/measure/table_accumulator.hpp>

#include <cmath>
#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

/// Matthews correlation coefficient (binary) / Gorodkin's R_K (multiclass).
struct mcc {
    static constexpr direction better = direction::higher_is_better;
    static constexpr prediction_kind kind = prediction_kind::label;
    using capabilities = offers<cap::serialisable>;
    static constexpr std::string_view key = "mcc";
    /// Number of classes k; 0 infers it from the labels (k = 2: the binary form).
    std::size_t classes = 0;

    bool operator==(const mcc&) const = default;
    std::string name() const {
        return detail::with_parameters("MCC", classes == 0 ? "" : "classes " + std::to_string(classes));
    }
    /// The name in error messages (without the class count).
    std::string message_name() const { return "MCC"; }
    table_accumulator<mcc> accumulator() const { return table_accumulator<mcc>(*this); }
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
        // Every cell and margin in units of the total weight (a power of two, exact): the
        // products below neither overflow nor underflow at any scale of the weights, and the
        // ratio keeps every bit.
        const double u = detail::unit_scale(m.total);
        if (v.k == 2) {
            const double tp = v(1, 1) * u, tn = v(0, 0) * u, fp = v(0, 1) * u, fn = v(1, 0) * u;
            const double pp = m.col[1] * u, pn = m.col[0] * u, ap = m.row[1] * u, an = m.row[0] * u;
            if (!(pp > 0))
                detail::fail_undefined(who, "empty margin: no predicted positive (TP + FP = 0)");
            if (!(pn > 0))
                detail::fail_undefined(who, "empty margin: no predicted negative (TN + FN = 0)");
            if (!(ap > 0))
                detail::fail_undefined(who, "empty margin: no true positive in the data (TP + FN = 0)");
            if (!(an > 0))
                detail::fail_undefined(who, "empty margin: no true negative in the data (TN + FP = 0)");
            return (tp * tn - fp * fn) / (std::sqrt(pp * ap) * std::sqrt(pn * an));
        }
        // Gorodkin's R_K; every factor of the denominator is a sum of non-negative terms.
        const double s = m.total * u;
        detail::compensated_sum pt{}, dp{}, dt{};
        for (std::size_t k = 0; k < v.k; ++k) {
            const double c = m.col[k] * u, r = m.row[k] * u;
            pt.add(c * r);
            dp.add(c * (s - c));
            dt.add(r * (s - r));
        }
        const double var_p = dp.value(), var_t = dt.value();
        if (!(var_p > 0))
            detail::fail_undefined(who, "empty margin: every prediction is one class (s^2 - sum p_k^2 = 0)");
        if (!(var_t > 0))
            detail::fail_undefined(who, "empty margin: every true label is one class (s^2 - sum t_k^2 = 0)");
        return (m.trace * u * s - pt.value()) / (std::sqrt(var_p) * std::sqrt(var_t));
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
