// heldout/measure/cross_entropy.hpp — log loss (cross-entropy) of probabilities: binary
// P(y = 1) against 0/1 truth, and class-probability rows against labels 0..k-1.
//
//   using namespace heldout;
//   double ll = evaluate(measure::cross_entropy{}, y, p);              // y in {0,1}, p = P(y = 1)
//   double lc = evaluate(measure::cross_entropy{1e-15}, y, p, w);      // clipped, weighted
//   double lm = evaluate(measure::multiclass_cross_entropy{}, labels, probs);  // probs: n x k
//
// Good (1952), "Rational decisions", JRSS-B 14:107-114: the mean of -log p_{i, y_i}
// (natural log); binary: -[y log p + (1 - y) log(1 - p)], with log(1 - p) computed with
// log1p's accuracy. Weighted: sum w_i l_i / sum w_i.
//
// Clipping policy (member eps, default 0):
//  * eps = 0 (the default): no clipping. A row whose true class has probability exactly 0
//    (binary: p = 0 with truth 1, or p = 1 with truth 0) would have an infinite loss, and a
//    mean of +infinity says nothing about the rest of the rows: add() and add_one() throw
//    heldout::input_error naming the row (argument 'prediction', its index) and the clipping
//    option, whatever the row's weight, and leave the state unchanged. Such probabilities
//    come from hard 0/1 predictions or from rounding.
//  * 0 < eps < 1/2: p is replaced by min(max(p, eps), 1 - eps) before the log (binary),
//    and p_{i, y_i} by the same clamp (multiclass; rows are not renormalised). This is how
//    hard 0/1 probabilities are scored knowingly; common practice is eps = 1e-15, i.e.
//    clipping to [1e-15, 1 - 1e-15]. eps changes results a great deal when p = 0 occurs;
//    report it beside the value.
// Binary rows are computed in one vectorised pass (detail/fast_log.hpp, < 1 ulp; float
// predictions take the log in float, < 1 float ulp, and sum in double), with an AVX2
// clone chosen at run time on x86-64 giving bit-identical results, and on CPUs with
// AVX-512 (GCC builds) an AVX-512 clone whose fused multiply-adds make each term agree
// with the others' to a few ulp instead (the same bits on every run of one machine); rows at
// the clip limits or with p in {0, 1} go through std::log / std::log1p in double.
#pragma once

#include <heldout/core/measure.hpp>
#include <heldout/detail/fast_log.hpp>
#include <heldout/detail/pointwise_pass.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/detail/validate.hpp>

#include <cmath>
#include <cstdint>
#include <limits>
#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace measure {
struct cross_entropy;
}
namespace detail {

/// The message for a row whose true class has probability 0 (log loss infinite without eps).
[[noreturn]] inline void fail_infinite_log_loss(std::string_view who, double p, std::size_t i) {
    fail_at(who, "prediction",
            "probability " + number_text(p) +
                " leaves the true class probability 0, so its log loss is infinite; to score hard 0/1 "
                "probabilities knowingly, set the clipping option eps (common practice: eps = 1e-15, "
                "clipping to [1e-15, 1 - 1e-15])",
            i);
}

/// -log p_y for one binary row, in the form binary_pass wants.
template <class T>
struct log_loss_term : binary_probability_term_base {
    // An infinite term (p = 0 for truth 1, p = 1 for truth 0, no clipping) is an error, found
    // on the pass's exact path only: such rows are outside [lo, hi], so their chunk is redone
    // element by element, which calls report() with the row's index.
    static constexpr bool infinite_ok = false;
    static constexpr bool wide_pass = true; // one log a row: see detail/pointwise_pass.hpp
    T lo; // rows with p < lo or p > hi take the exact path: the clip limits in T, and 0
    T hi; // and 1 themselves (p = 0 for y = 1 would make the log infinite)
    double eps;

    HELDOUT_DETAIL_INLINE T fast(T y, T p) const noexcept {
        const T ny = T(1) - y;
        const T q = ny + (y - ny) * p;       // p (y = 1) or 1 - p (y = 0), exactly rounded
        const T err = ny * ((T(1) - q) - p); // the rounding error of 1 - p, exact; 0 when y = 1
        return -fast_log_normal(q, err);     // log(q + err) = log p or log(1 - p), < 1 ulp
    }
    // lo >= the smallest normal and hi <= the largest T below 1 (see term()), so a row
    // that passes has q = p or 1 - p normal: one range check covers the log's domain too.
    HELDOUT_DETAIL_INLINE same_width_uint<T> flag(T, T p) const noexcept { return outside_bits(p, lo, hi); }
    double exact(double y, double p) const noexcept { return log_loss_exact(y, p, eps); }
    [[noreturn]] void report(std::string_view who, double, double p, std::size_t i) const {
        fail_infinite_log_loss(who, p, i);
    }

    static double log_loss_exact(double y, double p, double eps) noexcept {
        const double c = p < eps ? eps : (p > 1.0 - eps ? 1.0 - eps : p);
        return y == 1.0 ? -std::log(c) : -std::log1p(-c);
    }
};

/// The smallest T >= x (for the lower clip limit) / the largest T <= x (upper).
template <class T>
T round_up_to(double x) {
    T t = static_cast<T>(x);
    if (static_cast<double>(t) < x)
        t = std::nextafter(t, std::numeric_limits<T>::infinity());
    return t;
}
template <class T>
T round_down_to(double x) {
    T t = static_cast<T>(x);
    if (static_cast<double>(t) > x)
        t = std::nextafter(t, -std::numeric_limits<T>::infinity());
    return t;
}

struct cross_entropy_policy {
    static constexpr std::string_view name = "cross-entropy";
    double eps = 0.0;

    template <class T>
    log_loss_term<T> term() const {
        log_loss_term<T> t;
        const T lo = round_up_to<T>(eps), hi = round_down_to<T>(1.0 - eps);
        const T min_normal = std::numeric_limits<T>::min(), below_one = std::nextafter(T(1), T(0));
        t.lo = lo > min_normal ? lo : min_normal;
        t.hi = hi < below_one ? hi : below_one;
        t.eps = eps;
        return t;
    }
    /// One row (add_one): an infinite loss is refused as in add().
    double exact(double y, double p) const {
        const double v = log_loss_term<double>::log_loss_exact(y, p, eps);
        if (v == std::numeric_limits<double>::infinity())
            fail_infinite_log_loss("measure " + std::string(name), p, 0);
        return v;
    }
    bool operator==(const cross_entropy_policy&) const = default;
    measure::cross_entropy measure() const;
    void validate(std::string_view who) const {
        if (!(eps >= 0 && eps < 0.5))
            fail(who, "eps", "clipping must lie in [0, 0.5), got " + number_text(eps));
    }
    template <class F>
    void visit_state(F&& f) {
        f(eps);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(eps);
    }
};

} // namespace detail

namespace measure {

/// Running state of cross_entropy (binary rows).
using cross_entropy_accumulator = detail::binary_mean_accumulator<detail::cross_entropy_policy>;

/// Binary cross-entropy (log loss) of P(y = 1) against 0/1 truth; eps: see the header.
struct cross_entropy {
    static constexpr direction better = direction::lower_is_better;
    static constexpr prediction_kind kind = prediction_kind::probability;
    using capabilities = offers<cap::row_losses, cap::serialisable>;
    static constexpr std::string_view key = "cross_entropy";

    double eps = 0.0;

    bool operator==(const cross_entropy&) const = default;
    /// "cross-entropy", or "cross-entropy (clipped at 1e-15)" when eps > 0.
    std::string name() const {
        return detail::with_parameters("cross-entropy", eps == 0 ? "" : "clipped at " + detail::number_text(eps));
    }
    /// -log of the probability of the observed class, clipped to [eps, 1 - eps] (rows that
    /// add() accepted).
    template <value_range T, real_range P>
    void row_losses(const T& truth, const P& prediction, std::span<double> out) const {
        auto t = values_of(truth);
        auto p = values_of(prediction);
        for (std::size_t i = 0; i < out.size(); ++i)
            out[i] = detail::log_loss_term<double>::log_loss_exact(static_cast<double>(t[i]), static_cast<double>(p[i]),
                                                                   eps);
    }
    cross_entropy_accumulator accumulator() const {
        return cross_entropy_accumulator(detail::cross_entropy_policy{eps});
    }
};

struct multiclass_cross_entropy;

/// Running state of multiclass_cross_entropy.
class multiclass_cross_entropy_accumulator {
public:
    multiclass_cross_entropy_accumulator() = default;
    explicit multiclass_cross_entropy_accumulator(double eps) : eps_(eps) {
        detail::cross_entropy_policy{eps}.validate(who());
    }

    /// Adds labels 0..k-1 and n x k class-probability rows (each row sums to 1).
    template <label_range T, probability_rows P>
    void add(const T& truth, const P& prediction) {
        add_impl(truth, prediction, static_cast<const double*>(nullptr), false);
    }
    template <label_range T, probability_rows P, weight_range W>
    void add(const T& truth, const P& prediction, const W& weights) {
        auto w = values_of(weights, who(), "weights");
        detail::check_same_size(who(), "weights", values_of(truth, who(), "truth").size(), w.size());
        detail::check_weights(who(), w);
        add_impl(truth, prediction, w.data(), true);
    }
    void merge(const multiclass_cross_entropy_accumulator& o) {
        if (eps_ != o.eps_)
            detail::fail_state(who(), "other",
                               "cannot merge a state clipped at " + detail::number_text(o.eps_) +
                                   " into one clipped at " + detail::number_text(eps_));
        loss_.merge(o.loss_);
        weight_.merge(o.weight_);
        infinite_weight_ += o.infinite_weight_;
        count_ += o.count_;
    }
    double value() const {
        if (count_ == 0)
            detail::fail_undefined(who(), "no observations");
        if (!(weight_.value() + infinite_weight_ > 0))
            detail::fail_undefined(who(), "total weight is zero");
        if (infinite_weight_ > 0)
            return std::numeric_limits<double>::infinity();
        return loss_.value() / weight_.value();
    }
    void reset() noexcept {
        loss_.reset();
        weight_.reset();
        infinite_weight_ = 0;
        count_ = 0;
    }
    std::uint64_t count() const noexcept { return count_; }
    /// The measure this state belongs to (its clipping included).
    multiclass_cross_entropy measure() const;

    template <class F>
    void visit_state(F&& f) {
        f(eps_);
        loss_.visit_state(f);
        weight_.visit_state(f);
        f(infinite_weight_);
        f(count_);
    }
    template <class F>
    void visit_state(F&& f) const {
        f(eps_);
        loss_.visit_state(f);
        weight_.visit_state(f);
        f(infinite_weight_);
        f(count_);
    }

    /// After a load (stream/serialize.hpp): eps in range, finite sums, weights >= 0.
    void check_state() const {
        detail::check_loaded_parameters("eps", [&] { detail::cross_entropy_policy{eps_}.validate(who()); });
        loss_.check_loaded("loss sum");
        weight_.check_loaded("weight sum");
        if (weight_.value() < 0)
            detail::fail_loaded("weight sum", "is negative");
        detail::check_loaded_nonnegative("infinite weight", infinite_weight_);
    }

private:
    static std::string_view who() { return "measure multiclass cross-entropy"; }

    template <class T, class P, class W>
    void add_impl(const T& truth, const P& prediction, const W* w, bool weighted) {
        auto t = values_of(truth, who(), "truth");
        const auto rows = rows_of(prediction);
        detail::check_nonempty(who(), "truth", t.size());
        detail::check_same_size(who(), "prediction", t.size(), rows.rows);
        detail::check_probability_rows(who(), "prediction", rows);
        detail::check_labels(who(), "truth", t, rows.cols);
        detail::compensated_sum loss, weight;
        for (std::size_t i = 0; i < t.size(); ++i) {
            const double wi = weighted ? static_cast<double>(w[i]) : 1.0;
            const double p = static_cast<double>(rows(i, static_cast<std::size_t>(t[i])));
            const double c = p < eps_ ? eps_ : (p > 1.0 - eps_ ? 1.0 - eps_ : p);
            const double l = -std::log(c);
            if (l == std::numeric_limits<double>::infinity())
                detail::fail_infinite_log_loss(who(), p, i); // see the header: clip with eps
            weight.add(wi);
            if (wi > 0)
                loss.add(wi * l);
        }
        loss_.merge(loss);
        weight_.merge(weight);
        count_ += t.size();
    }

    double eps_ = 0.0;
    detail::compensated_sum loss_{};
    detail::compensated_sum weight_{};
    double infinite_weight_ = 0.0; // 0: rows of infinite loss are refused (kept in the layout)
    std::uint64_t count_ = 0;
};

/// Multiclass cross-entropy: mean of -log p_{i, y_i} over class-probability rows.
struct multiclass_cross_entropy {
    static constexpr direction better = direction::lower_is_better;
    static constexpr prediction_kind kind = prediction_kind::class_probabilities;
    using capabilities = offers<cap::row_losses, cap::serialisable>;
    static constexpr std::string_view key = "multiclass_cross_entropy";

    double eps = 0.0;

    bool operator==(const multiclass_cross_entropy&) const = default;
    std::string name() const {
        return detail::with_parameters("multiclass cross-entropy",
                                       eps == 0 ? "" : "clipped at " + detail::number_text(eps));
    }
    /// -log of the clipped probability of the observed class (rows that add() accepted).
    template <label_range T, probability_rows P>
    void row_losses(const T& truth, const P& prediction, std::span<double> out) const {
        auto t = values_of(truth);
        const auto rows = rows_of(prediction);
        for (std::size_t i = 0; i < out.size(); ++i) {
            const double p = static_cast<double>(rows(i, static_cast<std::size_t>(t[i])));
            out[i] = -std::log(p < eps ? eps : (p > 1.0 - eps ? 1.0 - eps : p));
        }
    }
    multiclass_cross_entropy_accumulator accumulator() const { return multiclass_cross_entropy_accumulator(eps); }
};

inline multiclass_cross_entropy multiclass_cross_entropy_accumulator::measure() const { return {eps_}; }

} // namespace measure

inline measure::cross_entropy detail::cross_entropy_policy::measure() const { return {eps}; }

namespace measure {} // namespace measure
HELDOUT_NAMESPACE_END
