// heldout/measure/cohen_kappa.hpp — Cohen's kappa (Cohen 1960) and its weighted form
// (Cohen 1968) with linear or quadratic disagreement weights, for class labels.
//
//   using heldout::measure::cohen_kappa;
//   double k  = heldout::evaluate(cohen_kappa{}, truth, pred);
//   double kq = heldout::evaluate(cohen_kappa{heldout::measure::kappa_weighting::quadratic}, truth, pred);
//
// With the (weighted) confusion table C, N = total, r_i = true totals, c_j = predicted
// totals: p_o = trace / N, p_e = sum_i r_i c_i / N^2 and kappa = (p_o - p_e) / (1 - p_e).
// Weighted: kappa_w = 1 - sum_ij w_ij C_ij / sum_ij w_ij E_ij with E_ij = r_i c_j / N and
// w_ij = |i - j| / (k - 1) (linear) or (i - j)^2 / (k - 1)^2 (quadratic), k the table size.
// The scale of w cancels, so empty classes beyond the largest label seen do not change the
// value. When the chance disagreement is zero (p_e = 1: both sides put everything in one
// and the same class) kappa is 0/0: undefined_error. 1 - p_e is computed as the sum of
// non-negative terms sum_i r_i (N - c_i) / N^2, so that "zero" is exact.
#pragma once

#include <heldout/measure/table_accumulator.hpp>

#include <cmath>
#include <cstdlib>
#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

/// Disagreement weights of Cohen's kappa.
enum class kappa_weighting { unweighted, linear, quadratic };

/// Cohen's kappa, unweighted or with linear / quadratic weights.
struct cohen_kappa {
    static constexpr direction better = direction::higher_is_better;
    static constexpr prediction_kind kind = prediction_kind::label;
    using capabilities = offers<cap::serialisable>;
    static constexpr std::string_view key = "cohen_kappa";
    kappa_weighting weighting = kappa_weighting::unweighted;
    /// Number of classes k; 0 infers it from the labels.
    std::size_t classes = 0;

    bool operator==(const cohen_kappa&) const = default;
    std::string name() const {
        return detail::with_parameters(message_name(), classes == 0 ? "" : "classes " + std::to_string(classes));
    }
    /// The name in error messages (without the class count).
    std::string message_name() const {
        switch (weighting) {
        case kappa_weighting::linear:
            return "linear-weighted kappa";
        case kappa_weighting::quadratic:
            return "quadratic-weighted kappa";
        case kappa_weighting::unweighted:
            break;
        }
        return "Cohen's kappa";
    }
    table_accumulator<cohen_kappa> accumulator() const { return table_accumulator<cohen_kappa>(*this); }
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
        // Margins, cells and total in units of the total weight (a power of two, exact): the
        // products neither overflow nor underflow at any scale of the weights, and the ratios
        // keep every bit.
        const double u = detail::unit_scale(m.total);
        const double n = m.total * u;
        const char* const reason = "chance disagreement is zero (p_e = 1: both sides put every observation in one "
                                   "and the same class)";
        if (weighting == kappa_weighting::unweighted || v.k < 2) {
            detail::compensated_sum agree{}, chance{};
            for (std::size_t i = 0; i < v.k; ++i) {
                const double r = m.row[i] * u, c = m.col[i] * u;
                agree.add(r * c);
                chance.add(r * (n - c));
            }
            const double den = chance.value(); // N^2 (1 - p_e)
            if (!(den > 0))
                detail::fail_undefined(who, reason);
            return (m.trace * u * n - agree.value()) / den; // N^2 (p_o - p_e) / N^2 (1 - p_e)
        }
        const double scale = static_cast<double>(v.k - 1);
        detail::compensated_sum observed{}, expected{};
        for (std::size_t i = 0; i < v.k; ++i)
            for (std::size_t j = 0; j < v.k; ++j) {
                const double d = std::abs(static_cast<double>(i) - static_cast<double>(j)) / scale;
                const double w = weighting == kappa_weighting::linear ? d : d * d;
                observed.add(w * (v(i, j) * u));
                expected.add(w * (m.row[i] * u) * (m.col[j] * u));
            }
        const double den = expected.value(); // N * sum w E
        if (!(den > 0))
            detail::fail_undefined(who, reason);
        return 1.0 - n * observed.value() / den;
    }

    template <class F>
    void visit_state(F&& f) {
        f(weighting);
        f(classes);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(weighting);
        f(classes);
    }
};

} // namespace measure
HELDOUT_NAMESPACE_END
