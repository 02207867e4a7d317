// heldout/measure/precision_recall.hpp — precision, recall, specificity and F-beta
// (van Rijsbergen 1979, Information Retrieval, ch. 7), binary and multiclass.
//
//   using namespace heldout::measure;
//   double p  = heldout::evaluate(precision{}, truth01, pred01);      // positive class 1
//   double r0 = heldout::evaluate(recall{.positive = 0}, truth01, pred01);
//   double f1 = heldout::evaluate(f_beta{1.0}, truth01, pred01, weights);
//   double f2 = heldout::evaluate(f_beta{.beta = 2.0}, truth01, pred01);
//   double mp = heldout::evaluate(precision{.combination = class_combination::mean}, truth, pred);
//
// For a class c of the (weighted) confusion table C (rows = true class): TP = C_cc,
// FP = sum_{i != c} C_ic, FN = sum_{j != c} C_cj, TN = the rest. Then
//   precision = TP / (TP + FP),  recall = TP / (TP + FN),  specificity = TN / (TN + FP),
//   F_beta = (1 + b^2) TP / ((1 + b^2) TP + b^2 FN + FP)   (the count form, = (1+b^2)PR/(b^2 P + R)).
// `combination` says which classes count:
//   binary              labels must be 0 or 1; the value for class `positive` (default 1);
//   one_vs_rest         any number of classes; class `positive` against all the others;
//   mean                unweighted mean of the per-class values over classes 0..k-1
//                       (the "macro" average of the literature);
//   pooled              TP, FP, FN, TN summed over the classes first ("micro"); for
//                       single-label data pooled precision = recall = F = accuracy;
//   prevalence_weighted per-class values weighted by the true-class share C_i. / N
//                       (classes absent from the truth have weight 0 and are skipped).
// Undefined values throw heldout::undefined_error naming the measure, the class and the
// 0/0: precision with TP + FP = 0 (class never predicted), recall with TP + FN = 0 (class
// absent from the truth), specificity with TN + FP = 0, F with TP + FP + FN = 0. Under
// `mean` one undefined class makes the mean undefined.
#pragma once

#include <heldout/measure/table_accumulator.hpp>

#include <cmath>
#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

/// Which classes a per-class measure is computed for, and how they are combined.
enum class class_combination { binary, one_vs_rest, mean, pooled, prevalence_weighted };

} // namespace measure

namespace detail {

enum class class_rate { precision, recall, specificity, f };

struct class_counts {
    double tp = 0, fp = 0, fn = 0, tn = 0;
};

/// TP, FP, FN, TN of class c, each as a sum of non-negative cells (exact zeros stay zero).
inline class_counts counts_of(const table_view& v, std::size_t c) {
    class_counts r;
    if (c >= v.k)
        return r;
    compensated_sum fp{}, fn{}, tn{};
    for (std::size_t i = 0; i < v.k; ++i) {
        if (i == c)
            continue;
        fp.add(v(i, c));
        fn.add(v(c, i));
        for (std::size_t j = 0; j < v.k; ++j)
            if (j != c)
                tn.add(v(i, j));
    }
    r.tp = v(c, c);
    r.fp = fp.value();
    r.fn = fn.value();
    r.tn = tn.value();
    return r;
}

/// The rate of one class (or of pooled counts); `defined` false for 0/0, with the reason.
inline double rate_of(class_rate q, const class_counts& n, double beta, bool& defined, const char*& reason) {
    double num = 0, den = 0;
    switch (q) {
    case class_rate::precision:
        num = n.tp;
        den = n.tp + n.fp;
        reason = "no predicted positive (TP + FP = 0)";
        break;
    case class_rate::recall:
        num = n.tp;
        den = n.tp + n.fn;
        reason = "no true positive in the data (TP + FN = 0)";
        break;
    case class_rate::specificity:
        num = n.tn;
        den = n.tn + n.fp;
        reason = "no true negative in the data (TN + FP = 0)";
        break;
    case class_rate::f: {
        const double b2 = beta * beta;
        num = (1 + b2) * n.tp;
        den = (1 + b2) * n.tp + b2 * n.fn + n.fp;
        reason = "TP + FP + FN = 0";
        break;
    }
    }
    defined = den > 0;
    return defined ? num / den : 0.0;
}

/// The measure q under combination `how` on table v; throws undefined_error for 0/0.
inline double combined_rate(std::string_view who, class_rate q, measure::class_combination how, std::size_t positive,
                            double beta, const table_view& v, const table_margins& m) {
    using measure::class_combination;
    check_table_weight(who, v, m);
    bool defined = true;
    const char* reason = "";
    if (how == class_combination::binary && v.k != 2)
        fail(who, "table", "binary combination needs a 2 x 2 table, got " + std::to_string(v.k) + " classes");
    switch (how) {
    case class_combination::binary:
    case class_combination::one_vs_rest: {
        const double r = rate_of(q, counts_of(v, positive), beta, defined, reason);
        if (!defined)
            fail_undefined(who, std::string(reason) + " for class " + std::to_string(positive));
        return r;
    }
    case class_combination::pooled: {
        class_counts s;
        compensated_sum fp{}, fn{}, tn{}, tp{};
        for (std::size_t c = 0; c < v.k; ++c) {
            const class_counts n = counts_of(v, c);
            tp.add(n.tp);
            fp.add(n.fp);
            fn.add(n.fn);
            tn.add(n.tn);
        }
        s.tp = tp.value();
        s.fp = fp.value();
        s.fn = fn.value();
        s.tn = tn.value();
        const double r = rate_of(q, s, beta, defined, reason);
        if (!defined)
            fail_undefined(who, std::string(reason) + " in the counts pooled over the classes");
        return r;
    }
    case class_combination::mean:
    case class_combination::prevalence_weighted: {
        compensated_sum s{};
        for (std::size_t c = 0; c < v.k; ++c) {
            const double share = how == class_combination::mean ? 1.0 : m.row[c];
            if (share == 0)
                continue; // prevalence weight 0: the class does not enter the weighted mean
            const double r = rate_of(q, counts_of(v, c), beta, defined, reason);
            if (!defined)
                fail_undefined(who, std::string(reason) + " for class " + std::to_string(c));
            s.add(share * r);
        }
        return s.value() / (how == class_combination::mean ? static_cast<double>(v.k) : m.total);
    }
    }
    return 0.0; // unreachable: every enumerator returns above
}

/// The name of measure `base` under a combination ("precision", "mean recall over classes", ...).
inline std::string combined_name(const std::string& base, measure::class_combination how, std::size_t positive) {
    using measure::class_combination;
    switch (how) {
    case class_combination::binary:
        return positive == 1 ? base : base + " (positive class " + std::to_string(positive) + ")";
    case class_combination::one_vs_rest:
        return base + " of class " + std::to_string(positive);
    case class_combination::mean:
        return "mean " + base + " over classes";
    case class_combination::pooled:
        return "pooled " + base;
    case class_combination::prevalence_weighted:
        return "prevalence-weighted " + base;
    }
    return base;
}
inline std::string combined_name(const std::string& base, measure::class_combination how, std::size_t positive,
                                 std::size_t classes) {
    return with_parameters(combined_name(base, how, positive),
                           classes == 0 ? "" : "classes " + std::to_string(classes));
}

/// Checks the parameters shared by the per-class measures; returns the table's fixed k.
inline std::size_t combined_classes(const std::string& who, measure::class_combination how, std::size_t positive,
                                    std::size_t classes) {
    if (how == measure::class_combination::binary) {
        if (classes != 0 && classes != 2)
            fail(who, "classes",
                 "binary combination needs the classes 0 and 1, got classes = " + std::to_string(classes) +
                     "; choose another class_combination for multiclass labels");
        if (positive > 1)
            fail(who, "positive", "binary positive class must be 0 or 1, got " + std::to_string(positive));
        return 2;
    }
    if (how == measure::class_combination::one_vs_rest && classes != 0 && positive >= classes)
        fail(who, "positive",
             "class " + std::to_string(positive) + " outside the classes 0.." + std::to_string(classes - 1));
    return classes;
}

} // namespace detail

namespace measure {

/// Precision, recall or specificity: the one-class rate `Rate` of the confusion table, for the
/// classes `combination` says (see the header comment). Use the names below.
template <detail::class_rate Rate>
struct class_rate_measure {
    static constexpr direction better = direction::higher_is_better;
    static constexpr prediction_kind kind = prediction_kind::label;
    using capabilities = offers<cap::serialisable>;
    static constexpr std::string_view key = Rate == detail::class_rate::precision ? "precision"
                                            : Rate == detail::class_rate::recall  ? "recall"
                                                                                  : "specificity";
    static_assert(Rate != detail::class_rate::f, "F-beta is f_beta (it has a parameter of its own)");
    /// Which classes count (binary: labels 0/1 and class `positive`).
    class_combination combination = class_combination::binary;
    /// The class reported under binary and one_vs_rest.
    std::size_t positive = 1;
    /// Number of classes k; 0 infers it from the labels (binary: always 2).
    std::size_t classes = 0;

    bool operator==(const class_rate_measure&) const = default;
    /// "precision (positive class 0, classes 2)": parameters that are not the default show.
    std::string name() const { return detail::combined_name(std::string(key), combination, positive, classes); }
    /// The name in error messages (without the class count).
    std::string message_name() const { return detail::combined_name(std::string(key), combination, positive); }
    table_accumulator<class_rate_measure> accumulator() const { return table_accumulator<class_rate_measure>(*this); }
    /// The value on a given confusion table (rows = true class, columns = predicted).
    double from_table(const Eigen::MatrixXd& table) const {
        const std::string who = "measure " + message_name();
        const detail::table_view v = detail::view_of_table(who, table);
        return from_view(v, detail::table_margins(v), who);
    }
    std::size_t table_classes() const {
        return detail::combined_classes("measure " + message_name(), combination, positive, classes);
    }
    /// The value from a table and its margins; `who` names the measure in messages.
    double from_view(const detail::table_view& v, const detail::table_margins& m, std::string_view who) const {
        return detail::combined_rate(who, Rate, combination, positive, 1.0, v, m);
    }

    template <class F>
    void visit_state(F&& f) {
        f(combination);
        f(positive);
        f(classes);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(combination);
        f(positive);
        f(classes);
    }
};

/// Precision (positive predictive value): TP / (TP + FP).
using precision = class_rate_measure<detail::class_rate::precision>;
/// Recall (sensitivity, true positive rate): TP / (TP + FN).
using recall = class_rate_measure<detail::class_rate::recall>;
/// Specificity (true negative rate): TN / (TN + FP).
using specificity = class_rate_measure<detail::class_rate::specificity>;

/// F-beta: (1 + b^2) TP / ((1 + b^2) TP + b^2 FN + FP); beta > 0 weighs recall beta times
/// as much as precision (F1: beta = 1).
struct f_beta {
    static constexpr direction better = direction::higher_is_better;
    static constexpr prediction_kind kind = prediction_kind::label;
    using capabilities = offers<cap::serialisable>;
    static constexpr std::string_view key = "f_beta";
    double beta = 1.0;
    class_combination combination = class_combination::binary;
    std::size_t positive = 1;
    std::size_t classes = 0;

    bool operator==(const f_beta&) const = default;
    std::string name() const {
        return detail::combined_name("F" + detail::number_text(beta), combination, positive, classes);
    }
    /// The name in error messages (without the class count).
    std::string message_name() const {
        return detail::combined_name("F" + detail::number_text(beta), combination, positive);
    }
    table_accumulator<f_beta> accumulator() const { return table_accumulator<f_beta>(*this); }
    double from_table(const Eigen::MatrixXd& table) const {
        const std::string who = "measure " + message_name();
        const detail::table_view v = detail::view_of_table(who, table);
        return from_view(v, detail::table_margins(v), who);
    }
    std::size_t table_classes() const {
        if (!(std::isfinite(beta) && beta > 0))
            detail::fail("measure " + message_name(), "beta",
                         "must be finite and positive, got " + detail::number_text(beta));
        return detail::combined_classes("measure " + message_name(), combination, positive, classes);
    }
    /// The value from a table and its margins; `who` names the measure in messages.
    double from_view(const detail::table_view& v, const detail::table_margins& m, std::string_view who) const {
        if (!(std::isfinite(beta) && beta > 0))
            detail::fail(who, "beta", "must be finite and positive, got " + detail::number_text(beta));
        return detail::combined_rate(who, detail::class_rate::f, combination, positive, beta, v, m);
    }

    template <class F>
    void visit_state(F&& f) {
        f(beta);
        f(combination);
        f(positive);
        f(classes);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(beta);
        f(combination);
        f(positive);
        f(classes);
    }
};

} // namespace measure
HELDOUT_NAMESPACE_END
