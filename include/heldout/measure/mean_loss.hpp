// heldout/measure/mean_loss.hpp — a pointwise loss averaged over a set: the bridge from an
// inner loss to an outer measure.
//
//   using heldout::measure::mean_loss;
//   double mse = heldout::evaluate(mean_loss<heldout::loss::squared>{}, y, f);  // == measure::mse
//   double q90 = heldout::evaluate(mean_loss<heldout::loss::pinball>{{0.9}}, y, f, w);
//   double hub = heldout::evaluate(mean_loss<heldout::loss::huber>{{1.5}}, y, f);
//
// value = sum_i w_i L(y_i, f_i) / sum_i w_i, accumulated in fixed-order blocks of
// compensated double sums (detail/pointwise_pass.hpp: one fused, vectorised pass that
// also validates, with a runtime AVX2 clone giving bit-identical results, and for real
// truth an AVX-512 one within a few ulp per term where the CPU has it), so the result
// does not depend on how the data are batched beyond the last bits, and 1e8 rows lose no
// digits. Truth is real, or 0/1 for losses that declare truth_kind::binary; predictions
// are floating point; every term is computed in double.
//
// Optional members of a loss that mean_loss uses:
//  * `static constexpr std::string_view measure_name` — the measure's name ("MSE");
//  * `void validate(std::string_view who) const` — checks the loss's parameters
//    (huber's delta, pinball's tau), called when an accumulator is made;
//  * `static constexpr bool propagates_non_finite = true` — a NaN or infinite input always
//    gives a non-finite value, so the pass need not check inputs separately (faster);
//  * `static constexpr std::string_view truth_domain` — named in the message when the loss
//    is not finite on finite inputs (poisson: "y >= 0").
#pragma once

#include <heldout/core/loss.hpp>
#include <heldout/core/measure.hpp>
#include <heldout/detail/pointwise_pass.hpp>
#include <heldout/detail/state_checks.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/detail/validate.hpp>
#include <heldout/loss/squared.hpp>

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdint>
#include <span>
#include <string>
#include <type_traits>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

template <pointwise_loss L>
struct mean_loss;

namespace detail_mean_loss {
/// The per-row term of mean_loss<L> for detail::pointwise_pass.
template <class L>
struct loss_term {
    static constexpr bool infinite_ok = false;
    static constexpr bool binary = loss_truth_v<L> == truth_kind::binary;
    // Real truth (MSE, MAE, ...): the wide pass measured 0.72x -> 1.03x of a plain float sum
    // of the same 1e7 float rows; binary-truth losses (Brier) ran slower in it (1.3x -> 10x
    // the baseline's time), so they keep the plain AVX2 pass.
    static constexpr bool wide_pass = !binary;
    static constexpr bool binary_truth = binary; // 0/1 truth, checked by the pass
    L loss;

    template <class Y, class P>
    using truth_buffer = std::conditional_t<std::is_floating_point_v<Y>, Y, double>;

    template <class Y, class P>
    HELDOUT_DETAIL_INLINE double fast(Y y, P f) const {
        return loss.value(static_cast<double>(y), static_cast<double>(f));
    }
    template <class Y, class P>
    HELDOUT_DETAIL_INLINE detail::same_width_uint<P> flag(Y y, P f) const noexcept {
        using U = detail::same_width_uint<P>;
        U r = 0;
        if constexpr (!loss_traits<L>::propagates_non_finite)
            r = detail::flag_as<U>(detail::non_finite_flag(y)) | detail::non_finite_flag(f);
        return r;
    }
    template <class Y, class P>
    void check(std::string_view who, Y y, P f, std::size_t i) const {
        detail::check_finite_at(who, "truth", y, i);
        detail::check_finite_at(who, "prediction", f, i);
        if constexpr (binary)
            detail::check_binary_truth_at(who, y, i);
    }
    double exact(double y, double f) const { return loss.value(y, f); }
    [[noreturn]] void report(std::string_view who, double y, double f, std::size_t i) const {
        std::string problem = "loss not finite at truth " + detail::number_text(y) + ", prediction " +
                              detail::number_text(f) + " (overflow, or outside the loss's domain";
        if constexpr (!loss_traits<L>::truth_domain().empty()) {
            problem += ": ";
            problem += loss_traits<L>::truth_domain();
        }
        problem += ")";
        detail::fail_at(who, "prediction", problem, i);
    }
};
} // namespace detail_mean_loss

/// Running state of mean_loss<L>: weighted loss sum, weight sum, row count.
template <pointwise_loss L>
class mean_loss_accumulator {
public:
    mean_loss_accumulator() { validate(); }
    explicit mean_loss_accumulator(const L& l) : loss_(l) { validate(); }

    /// Adds a batch: truth (real, or 0/1 for binary losses) and floating-point predictions.
    template <value_range T, real_range P>
    void add(const T& truth, const P& prediction) {
        add_impl(truth, prediction, static_cast<const void*>(nullptr), 0, detail::best_isa());
    }

    /// Adds a weighted batch (weights finite and non-negative).
    template <value_range T, real_range P, weight_range W>
    void add(const T& truth, const P& prediction, const W& weights) {
        auto w = values_of(weights, who(), "weights");
        add_impl(truth, prediction, w.data(), w.size(), detail::best_isa());
    }

    /// Adds one observation.
    void add_one(double y, double f, double w = 1.0) {
        const detail_mean_loss::loss_term<L> term{loss_};
        term.check(who(), y, f, 0);
        detail::check_weight_at(who(), w, 0);
        const double v = loss_.value(y, f);
        if (!std::isfinite(v))
            term.report(who(), y, f, 0);
        // A weight far from 1 is kept in units of its own power of two (see add_impl).
        const std::int32_t unit =
            ordinary_weight(w) ? 0 : static_cast<std::int32_t>(-std::ilogb(detail::unit_scale(w)));
        const double ws = unit == 0 ? w : w * detail::unit_scale(w);
        detail::pass_totals one;
        one.loss.add(ws * v);
        one.weight.add(ws);
        combine(one, unit);
        ++count_;
    }

    /// Combines two shards; both must be of the same measure (equal loss parameters).
    void merge(const mean_loss_accumulator& o) {
        if (!same_measure(measure(), o.measure()))
            detail::fail_state(who(), "other",
                               "cannot merge " + o.measure().name() + " into " + measure().name() +
                                   ": the loss parameters differ");
        detail::pass_totals other;
        other.loss = o.loss_sum_;
        other.weight = o.weight_sum_;
        combine(other, o.unit_);
        count_ += o.count_;
    }

    double value() const {
        if (count_ == 0)
            detail::fail_undefined(who(), "no observations");
        const double w = weight_sum_.value();
        if (!(w > 0))
            detail::fail_undefined(who(), "total weight is zero");
        return loss_sum_.value() / w;
    }

    void reset() noexcept {
        loss_sum_.reset();
        weight_sum_.reset();
        unit_ = 0;
        count_ = 0;
    }

    std::uint64_t count() const noexcept { return count_; }
    double total_weight() const noexcept { return std::ldexp(weight_sum_.value(), unit_); }
    const L& loss() const noexcept { return loss_; }
    /// The measure this state belongs to (its parameters included).
    mean_loss<L> measure() const { return mean_loss<L>{loss_}; }

    // A loss with parameters (Huber delta, pinball tau, ...) exposes them through its own
    // visit_state; they come first, so deserialised bytes restore them.
    template <class F>
    void visit_state(F&& f) {
        if constexpr (loss_traits<L>::has_parameters)
            f(loss_); // checked by check_state() once everything is read
        loss_sum_.visit_state(f);
        weight_sum_.visit_state(f);
        f(unit_);
        f(count_);
    }
    template <class F>
    void visit_state(F&& f) const {
        if constexpr (loss_traits<L>::has_parameters)
            f(loss_);
        loss_sum_.visit_state(f);
        weight_sum_.visit_state(f);
        f(unit_);
        f(count_);
    }

    /// After a load (stream/serialize.hpp): loss parameters checked like given ones, finite
    /// sums, weight sum >= 0, the unit a binary exponent a weight can have.
    void check_state() const {
        if constexpr (loss_traits<L>::has_parameters)
            detail::check_loaded_parameters("loss", [&] { loss_traits<L>::validate(loss_, who()); });
        loss_sum_.check_loaded("loss sum");
        weight_sum_.check_loaded("weight sum");
        if (weight_sum_.value() < 0)
            detail::fail_loaded("weight sum", "is negative");
        if (unit_ < -1100 || unit_ > 1100)
            detail::fail_loaded("unit", "exponent " + std::to_string(unit_) + " outside the range of a double");
    }

    /// For tests and benchmarks: a batch through a chosen clone of the pass (baseline and
    /// AVX2 agree bit for bit; the AVX-512 wide pass to a few ulp per term).
    template <value_range T, real_range P>
    void add_using(detail::isa which, const T& truth, const P& prediction) {
        add_impl(truth, prediction, static_cast<const void*>(nullptr), 0, which);
    }
    template <value_range T, real_range P, weight_range W>
    void add_using(detail::isa which, const T& truth, const P& prediction, const W& weights) {
        auto w = values_of(weights, who(), "weights");
        add_impl(truth, prediction, w.data(), w.size(), which);
    }

private:
    static const std::string& who() {
        static const std::string w = "measure " + loss_traits<L>::measure_name(); // once: no allocation per batch
        return w;
    }
    void validate() const {
        static_assert(loss_traits<L>::check());
        loss_traits<L>::validate(loss_, who());
    }

    template <class T, class P, class W>
    void add_impl(const T& truth, const P& prediction, const W* w, std::size_t wn, detail::isa which) {
        auto t = values_of(truth, who(), "truth");
        auto p = values_of(prediction, who(), "prediction");
        detail::check_nonempty(who(), "truth", t.size());
        detail::check_same_size(who(), "prediction", t.size(), p.size());
        if constexpr (!std::is_void_v<W>)
            detail::check_same_size(who(), "weights", t.size(), wn);
        detail::pass_totals local; // the state changes only when the whole batch is valid
        const detail_mean_loss::loss_term<L> term{loss_};
        std::int32_t unit = 0;
        if constexpr (std::is_void_v<W>) {
            detail::pointwise_pass<W>(who(), term, t, p, w, local, which);
        } else {
            // The mean is the same for any common scale of the weights, but the products w L
            // overflow or underflow (silently losing digits in subnormals) when the weights
            // are far from 1. Such a batch is taken again with its weights scaled by the power
            // of two that brings the largest to [1, 2) (exact), its sums kept in that unit. It
            // is found from the pass's own weight total, or from its overflow error, so
            // ordinary weights cost nothing more.
            bool again = false;
            try {
                detail::pointwise_pass<W>(who(), term, t, p, w, local, which);
                again = !ordinary_weight(local.weight.value());
            } catch (const input_error&) {
                const std::span<const W> ws(w, wn);
                detail::check_weights(who(), ws); // a bad weight: the same message as the pass
                double top = 0;
                for (const W x : ws)
                    top = std::max(top, static_cast<double>(x));
                if (detail::unit_scale(top) == 1.0)
                    throw; // weights near 1: the error is the data's
                again = true;
            }
            if (again) {
                double top = 0;
                for (std::size_t i = 0; i < wn; ++i)
                    top = std::max(top, static_cast<double>(w[i]));
                const double scale = detail::unit_scale(top);
                unit = static_cast<std::int32_t>(-std::ilogb(scale));
                auto& scaled = scaled_weights();
                scaled.resize(wn);
                for (std::size_t i = 0; i < wn; ++i)
                    scaled[i] = static_cast<double>(w[i]) * scale;
                local = {};
                detail::pointwise_pass<double>(who(), term, t, p, scaled.data(), local, which);
            }
        }
        combine(local, unit);
        count_ += t.size();
    }

    /// A positive weight total (or weight) in [2^-256, 2^256], or zero: its products with
    /// losses in [2^-766, 2^766] are normal doubles, so it is summed as it is.
    static bool ordinary_weight(double w) noexcept { return w == 0 || (w >= 0x1p-256 && w <= 0x1p256); }

    /// The scaled weights of a batch taken again (thread scratch: no allocation after the first).
    static std::vector<double>& scaled_weights() {
        thread_local std::vector<double> v;
        return v;
    }

    /// x 2^k for k <= 0 (exact unless the result is subnormal: a part 2^1000 times lighter).
    static void shift(detail::compensated_sum& s, std::int64_t k) noexcept {
        if (k != 0) {
            s.sum = std::ldexp(s.sum, static_cast<int>(k));
            s.carry = std::ldexp(s.carry, static_cast<int>(k));
        }
    }

    /// Adds totals kept in units of 2^unit, in the larger of the two units.
    void combine(detail::pass_totals b, std::int32_t unit) {
        if (b.weight.value() == 0 && b.loss.value() == 0)
            unit = unit_; // nothing to align (rows of weight 0)
        else if (weight_sum_.value() == 0 && loss_sum_.value() == 0)
            unit_ = unit; // nothing kept yet
        const std::int32_t u = std::max(unit_, unit);
        shift(loss_sum_, std::int64_t{unit_} - u);
        shift(weight_sum_, std::int64_t{unit_} - u);
        shift(b.loss, std::int64_t{unit} - u);
        shift(b.weight, std::int64_t{unit} - u);
        unit_ = u;
        loss_sum_.merge(b.loss);
        weight_sum_.merge(b.weight);
    }

    L loss_{};
    detail::compensated_sum loss_sum_{};
    detail::compensated_sum weight_sum_{};
    std::int32_t unit_ = 0; // the sums are in units of 2^unit_ (0 unless weights were far from 1)
    std::uint64_t count_ = 0;
};

namespace detail_mean_loss {
inline constexpr std::string_view key_prefix = "mean_loss/";
}

/// The mean of loss L over the observations (weighted mean when weights are given).
template <pointwise_loss L>
struct mean_loss {
    static constexpr direction better = direction::lower_is_better;
    static constexpr prediction_kind kind =
        loss_truth_v<L> == truth_kind::binary ? prediction_kind::score : prediction_kind::real;
    using capabilities = offers<cap::row_losses, cap::serialisable>;
    static constexpr std::string_view key = detail::joined_v<detail_mean_loss::key_prefix, L::name>;

    L loss{};

    bool operator==(const mean_loss& o) const {
        if constexpr (loss_traits<L>::has_parameters)
            return loss == o.loss;
        else
            return (void)o, true;
    }
    /// "MSE", "mean Huber loss (delta 2)": parameters show when they are not the default.
    std::string name() const {
        return detail::with_parameters(loss_traits<L>::measure_name(), loss_traits<L>::parameters_text(loss));
    }
    mean_loss_accumulator<L> accumulator() const { return mean_loss_accumulator<L>(loss); }

    /// The loss of each row (rows that add() accepted): out[i] = L(truth[i], prediction[i]).
    template <value_range T, real_range P>
    void row_losses(const T& truth, const P& prediction, std::span<double> out) const {
        auto t = values_of(truth);
        auto p = values_of(prediction);
        for (std::size_t i = 0; i < out.size(); ++i)
            out[i] = loss.value(static_cast<double>(t[i]), static_cast<double>(p[i]));
    }
};

/// Mean squared error: mean_loss<loss::squared> itself.
using mse = mean_loss<loss::squared>;

} // namespace measure
HELDOUT_NAMESPACE_END
