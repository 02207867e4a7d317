// heldout/detail/tracks.hpp — what an aggregator keeps for one tracked measure, and the typed
// work the interval methods ask of it. Internal.
//
// A track is found by identity (type and parameters: heldout::same_measure), never by name.
// It keeps per split the value (or why it is undefined), for a measure with cap::row_losses
// the value of every recorded row, and the pooled state over all test rows; and it does
// the computations that need the measure's type on recorded columns (bootstrap replicates,
// jackknife values, DeLong components, the .632+ no-information error).
#pragma once

#include <heldout/core/measure.hpp>
#include <heldout/detail/columns.hpp>
#include <heldout/detail/sum.hpp>
#include <heldout/estimate/bootstrap.hpp>
#include <heldout/estimate/bootstrap_632.hpp>
#include <heldout/loss/squared.hpp>
#include <heldout/measure/mean_loss.hpp>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <memory>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>
#include <typeindex>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace detail {

template <class... V>
struct type_list {};

/// The view types a measure can read recorded columns as: the classic three, plus the views
/// of its own kinds when they declare one.
template <class K>
struct kind_view_list {
    using type = type_list<>;
};
template <class K>
requires requires { typename K::view; }
struct kind_view_list<K> {
    using type = type_list<typename K::view>;
};

template <class... A, class... B>
type_list<A..., B...> concat(type_list<A...>, type_list<B...>);

template <class M>
using view_candidates =
    decltype(concat(concat(type_list<std::span<const std::int64_t>, std::span<const double>, row_matrix<double>>{},
                           typename kind_view_list<truth_kind_t<M>>::type{}),
                    typename kind_view_list<prediction_kind_t<M>>::type{}));

/// Calls f(view) with c's rows [first, first + count) as the candidate view type it holds;
/// false when none matches.
template <class F, class... V>
bool with_view(const column_base& c, std::size_t first, std::size_t count, type_list<V...>, F&& f) {
    const std::type_index t = c.view_type();
    return ((t == std::type_index(typeid(V)) ? (f(view_of<V>(c, first, count)), true) : false) || ...);
}

/// The kind of prediction measure M takes matches P (the same rule as heldout::evaluate).
template <class M, class P>
constexpr bool prediction_fits() {
    using K = prediction_kind_t<M>;
    if constexpr (std::is_same_v<K, kinds::label>)
        return label_range<P>;
    else if constexpr (std::is_same_v<K, kinds::class_probabilities>)
        return probability_rows<P>;
    else if constexpr (std::is_same_v<K, kinds::real> || std::is_same_v<K, kinds::score> ||
                       std::is_same_v<K, kinds::probability>)
        return real_range<P>;
    else
        return true; // a kind of another family: the measure's add decides
}

template <class M, class T, class P>
inline constexpr bool pairing_ok = !probability_rows<T> && prediction_fits<M, P>() && scores<M, T, P>;

/// The readable refusal of a pairing that measure M cannot score.
template <class M>
[[noreturn]] void refuse_pairing(const M& m, const column_base& t, const column_base& p, std::string_view who) {
    fail(who, "predictions",
         "measure " + m.name() + " (needs " + std::string(prediction_kind_t<M>::name) + " predictions and " +
             std::string(truth_kind_t<M>::name) + " truth) cannot score " + p.describe() + " against truth given as " +
             t.describe());
}

/// Calls f(typed_truth, typed_prediction) on rows [first, first + count) when M can score the
/// pairing; refuses otherwise.
template <class M, class F>
void with_pairing(const M& m, const column_base& t, const column_base& p, std::size_t first, std::size_t count,
                  std::string_view who, F&& f) {
    bool done = false;
    with_view(t, first, count, view_candidates<M>{}, [&](const auto& tt) {
        with_view(p, first, count, view_candidates<M>{}, [&](const auto& pp) {
            using TT = std::remove_cvref_t<decltype(tt)>;
            using PP = std::remove_cvref_t<decltype(pp)>;
            if constexpr (pairing_ok<M, TT, PP>) {
                f(tt, pp);
                done = true;
            }
        });
    });
    if (!done)
        refuse_pairing(m, t, p, who);
}

/// Everything recorded for one measure; the typed part lives in measure_track<M>.
struct track_base {
    std::string name;
    bool row_losses = false;
    bool case_components = false;
    bool weighted_add = false;
    bool lower_is_better = false;
    bool fitted_se = false;
    std::vector<std::optional<double>> values; // per split
    std::vector<std::string> reasons;          // per split, why undefined
    std::vector<double> losses;                // row_losses: per recorded test row, in record order
    bool has_apparent = false;
    std::optional<double> apparent; // the measure on all rows, model fit on all rows
    std::string apparent_reason;    // why apparent is undefined
    std::vector<double> apparent_losses;

    virtual ~track_base() = default;
    virtual std::unique_ptr<track_base> clone() const = 0;
    /// Scores rows [first, first + count) of (t, p) into the pending slot (may throw
    /// input_error; no state changes).
    virtual void prepare(const column_base& t, const column_base& p, std::size_t first, std::size_t count) = 0;
    /// Stores the pending split and adds its rows to the pooled state (cannot fail: the same
    /// rows passed prepare()).
    virtual void commit(const column_base& t, const column_base& p, std::size_t first, std::size_t count) = 0;
    virtual void set_apparent(const column_base& t, const column_base& p) = 0;
    /// The measure over all test rows so far, or empty with the reason.
    virtual std::optional<double> pooled(std::string& reason) const = 0;

    /// Bootstrap replicates of the measure on rows [first, first + count) (model fixed), and
    /// the jackknife values when `jackknife` is given (BCa).
    virtual bootstrap_replicate_set replicates(const column_base& t, const column_base& p, std::size_t first,
                                               std::size_t count, const bootstrap_options& o,
                                               std::vector<double>* jackknife) const = 0;
    /// Paired bootstrap replicates of value(A) - value(B) on the same rows (this track is A).
    virtual bootstrap_replicate_set paired_replicates(const column_base& t, const column_base& pa,
                                                      const column_base& pb, std::size_t first, std::size_t count,
                                                      const bootstrap_options& o,
                                                      std::vector<double>* jackknife_difference) const = 0;
    /// DeLong components on rows [first, first + count).
    virtual heldout::case_components components(const column_base& t, const column_base& p, std::size_t first,
                                                std::size_t count) const = 0;
    /// The no-information error of Efron & Tibshirani (1997) on the apparent fit.
    virtual double no_information(const column_base& t, const column_base& p) const = 0;
    /// The fitted value and its inverse-information se on rows [first, first + count) (cap::fitted_se).
    virtual heldout::fitted_value fitted(const column_base& t, const column_base& p, std::size_t first,
                                         std::size_t count) const = 0;
};

inline std::string undefined_reason(const undefined_error& e) { return e.problem(); }

/// m.row_losses(...) through a call with dependent arguments: clang looks members up in a
/// discarded `if constexpr` branch of a generic lambda when the object's type is not
/// dependent, and refused measures without row_losses.
template <class M, class T, class P>
void row_losses_of(const M& m, const T& t, const P& p, std::span<double> out) {
    m.row_losses(t, p, out);
}

/// Gamma of Efron & Tibshirani (1997): the mean loss over all pairs (truth y_i, prediction
/// f_j) of the apparent fit. Squared error in closed form; label truth and predictions from
/// the k x k table of class pairs (exact, O(n + k^2)); otherwise the O(n^2) sum of row values.
template <class M>
double no_information_of(const M& m, const column_base& t, const column_base& p, std::string_view who);

template <class M>
struct measure_track final : track_base {
    using acc_t = accumulator_t<M>;
    M measure;
    acc_t scratch;
    acc_t all;
    std::optional<double> pending_value;
    std::string pending_reason;
    std::vector<double> pending_losses;

    static constexpr std::string_view who = "heldout::aggregator::record";

    explicit measure_track(const M& m) : measure(m), scratch(m.accumulator()), all(m.accumulator()) {
        name = m.name();
        row_losses = offers_v<M, cap::row_losses>;
        case_components = offers_v<M, cap::case_components>;
        lower_is_better = M::better == direction::lower_is_better;
        fitted_se = offers_v<M, cap::fitted_se>;
    }
    std::unique_ptr<track_base> clone() const override { return std::make_unique<measure_track>(*this); }

    // Value on a set, and the per-row values of a measure with cap::row_losses.
    void score(const column_base& t, const column_base& p, std::size_t first, std::size_t count,
               std::optional<double>& value, std::string& reason, std::vector<double>& rows) {
        with_pairing(measure, t, p, first, count, who, [&](const auto& tt, const auto& pp) {
            using TT = std::remove_cvref_t<decltype(tt)>;
            using PP = std::remove_cvref_t<decltype(pp)>;
            weighted_add = scores_weighted<M, TT, PP, std::span<const std::uint32_t>>;
            scratch.reset();
            scratch.add(tt, pp); // bad input throws here, naming the measure
            try {
                value = scratch.value();
                reason.clear();
            } catch (const undefined_error& e) {
                value.reset();
                reason = undefined_reason(e);
            }
            rows.clear();
            if constexpr (offers_v<M, cap::row_losses>) {
                rows.resize(count);
                measure.row_losses(tt, pp, std::span<double>(rows));
            }
        });
    }

    void prepare(const column_base& t, const column_base& p, std::size_t first, std::size_t count) override {
        score(t, p, first, count, pending_value, pending_reason, pending_losses);
    }
    void commit(const column_base& t, const column_base& p, std::size_t first, std::size_t count) override {
        values.push_back(pending_value);
        reasons.push_back(pending_reason);
        losses.insert(losses.end(), pending_losses.begin(), pending_losses.end());
        with_pairing(measure, t, p, first, count, who, [&](const auto& tt, const auto& pp) { all.add(tt, pp); });
    }
    void set_apparent(const column_base& t, const column_base& p) override {
        score(t, p, 0, t.rows(), apparent, apparent_reason, apparent_losses);
        has_apparent = true;
    }
    std::optional<double> pooled(std::string& reason) const override {
        try {
            return all.value();
        } catch (const undefined_error& e) {
            reason = undefined_reason(e);
            return std::nullopt;
        }
    }

    bootstrap_replicate_set replicates(const column_base& t, const column_base& p, std::size_t first, std::size_t count,
                                       const bootstrap_options& o, std::vector<double>* jackknife) const override {
        constexpr std::string_view w = "heldout::aggregator::estimate";
        bootstrap_replicate_set set;
        with_pairing(measure, t, p, first, count, w, [&](const auto& tt, const auto& pp) {
            using TT = std::remove_cvref_t<decltype(tt)>;
            using PP = std::remove_cvref_t<decltype(pp)>;
            if constexpr (scores_weighted<M, TT, PP, std::span<const std::uint32_t>>) {
                set = bootstrap_replicates(measure, tt, pp, o);
                if (jackknife)
                    *jackknife = jackknife_values(measure, tt, pp);
            } else {
                fail(w, "method", "measure " + name + " has no weighted add, which the bootstrap needs");
            }
        });
        return set;
    }

    bootstrap_replicate_set paired_replicates(const column_base& t, const column_base& pa, const column_base& pb,
                                              std::size_t first, std::size_t count, const bootstrap_options& o,
                                              std::vector<double>* jackknife_difference) const override {
        constexpr std::string_view w = "heldout::compare";
        bootstrap_replicate_set set;
        with_pairing(measure, t, pa, first, count, w, [&](const auto& tt, const auto& a) {
            with_pairing(measure, t, pb, first, count, w, [&](const auto&, const auto& b) {
                using TT = std::remove_cvref_t<decltype(tt)>;
                using PA = std::remove_cvref_t<decltype(a)>;
                using PB = std::remove_cvref_t<decltype(b)>;
                if constexpr (std::is_same_v<PA, PB> && scores_weighted<M, TT, PA, std::span<const std::uint32_t>>) {
                    set = paired_bootstrap_replicates(measure, tt, a, b, o);
                    if (jackknife_difference) {
                        *jackknife_difference = jackknife_values(measure, tt, a);
                        const auto jb = jackknife_values(measure, tt, b);
                        for (std::size_t i = 0; i < jb.size(); ++i)
                            (*jackknife_difference)[i] -= jb[i];
                    }
                } else {
                    fail(w, "method",
                         "the paired bootstrap needs the weighted add of measure " + name +
                             " and the same kind of predictions from both models");
                }
            });
        });
        return set;
    }

    heldout::case_components components(const column_base& t, const column_base& p, std::size_t first,
                                        std::size_t count) const override {
        heldout::case_components c;
        if constexpr (offers_v<M, cap::case_components>) {
            with_pairing(measure, t, p, first, count, "heldout::aggregator::estimate",
                         [&](const auto& tt, const auto& pp) { c = measure.case_components(tt, pp); });
        } else {
            HELDOUT_ASSERT(false);
        }
        return c;
    }

    heldout::fitted_value fitted(const column_base& t, const column_base& p, std::size_t first,
                                 std::size_t count) const override {
        heldout::fitted_value f;
        if constexpr (offers_v<M, cap::fitted_se>) {
            with_pairing(measure, t, p, first, count, "heldout::aggregator::estimate",
                         [&](const auto& tt, const auto& pp) { f = measure.fitted(tt, pp); });
        } else {
            HELDOUT_ASSERT(false);
        }
        return f;
    }

    double no_information(const column_base& t, const column_base& p) const override {
        return no_information_of(measure, t, p, "heldout::aggregator::estimate");
    }
};

template <class M>
double no_information_of(const M& m, const column_base& t, const column_base& p, std::string_view who) {
    const std::size_t n = t.rows();
    double gamma = 0;
    with_pairing(m, t, p, 0, n, who, [&](const auto& tt, const auto& pp) {
        using TT = std::remove_cvref_t<decltype(tt)>;
        using PP = std::remove_cvref_t<decltype(pp)>;
        if constexpr (std::is_same_v<M, measure::mean_loss<loss::squared>> &&
                      std::is_same_v<PP, std::span<const double>>) {
            std::vector<double> y(tt.begin(), tt.end());
            gamma = no_information_squared_error(y, pp);
        } else if constexpr (offers_v<M, cap::row_losses> && std::is_same_v<TT, std::span<const std::int64_t>> &&
                             std::is_same_v<PP, std::span<const std::int64_t>>) {
            // Label truth and label predictions: the k x k table of class pairs.
            std::vector<std::int64_t> classes(tt.begin(), tt.end());
            classes.insert(classes.end(), pp.begin(), pp.end());
            std::sort(classes.begin(), classes.end());
            classes.erase(std::unique(classes.begin(), classes.end()), classes.end());
            const std::size_t k = classes.size();
            std::vector<double> pt(k, 0.0), pq(k, 0.0);
            auto at = [&](std::int64_t c) {
                return static_cast<std::size_t>(std::lower_bound(classes.begin(), classes.end(), c) - classes.begin());
            };
            for (std::size_t i = 0; i < n; ++i) {
                pt[at(tt[i])] += 1.0;
                pq[at(pp[i])] += 1.0;
            }
            compensated_sum s;
            double v = 0;
            for (std::size_t a = 0; a < k; ++a)
                for (std::size_t b = 0; b < k; ++b) {
                    if (pt[a] == 0 || pq[b] == 0)
                        continue;
                    const std::int64_t ya = classes[a], fb = classes[b];
                    row_losses_of(m, TT(&ya, 1), PP(&fb, 1), std::span<double>(&v, 1));
                    s.add(pt[a] * pq[b] * v);
                }
            gamma = s.value() / (static_cast<double>(n) * static_cast<double>(n));
        } else if constexpr (offers_v<M, cap::row_losses>) {
            // Every pair (truth i, prediction j): one row-value call per truth row over all predictions.
            std::vector<double> v(n);
            std::vector<std::remove_cv_t<typename TT::element_type>> y(n);
            compensated_sum s;
            for (std::size_t i = 0; i < n; ++i) {
                std::fill(y.begin(), y.end(), tt[i]);
                m.row_losses(TT(y), pp, std::span<double>(v));
                double row = 0;
                for (const double x : v)
                    row += x;
                s.add(row);
            }
            if (!std::isfinite(s.value()))
                fail(who, "predictions", "the loss is not finite for some pair (y_i, f_j) of the apparent fit");
            gamma = s.value() / (static_cast<double>(n) * static_cast<double>(n));
        } else {
            fail(who, "method", "the no-information error needs per-row values (cap::row_losses)");
        }
    });
    return gamma;
}

} // namespace detail
HELDOUT_NAMESPACE_END
