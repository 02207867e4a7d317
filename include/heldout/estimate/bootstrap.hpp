// heldout/estimate/bootstrap.hpp — bootstrap percentile and BCa confidence intervals for
// any measure on one test set, resampling the test observations with fixed predictions;
// a paired form for the difference of two models on the same rows; and the lower-level
// interval formulas on given replicates.
//
//   heldout::bootstrap_options o{.replicates = 2000, .seed = 7, .level = 0.95};
//   heldout::bootstrap_result p = heldout::bootstrap_percentile(heldout::measure::mse{}, y, f, o);
//   heldout::bootstrap_result b = heldout::bootstrap_bca(heldout::measure::mse{}, y, f, o);
//   // b.estimate, b.lower, b.upper, b.z0, b.acceleration, b.replicates, b.undefined_replicates
//   auto d = heldout::paired_bootstrap_bca(m, y, f_a, f_b, o);   // value(a) - value(b)
//   auto q = heldout::bca_interval(theta_hat, replicates, jackknife_values, 0.90);
//
// Resampling (frozen; the same seed gives the same interval everywhere): replicate b
// (b = 0..B-1) uses heldout::rng(seed, b) — stream b, so replicates are independent of
// each other and of evaluation order — and makes n draws r = rng.below(n), counting
// counts[r] += 1 (multinomial counts). The replicate value is the measure evaluated with
// the counts as frequency weights (the accumulator's weighted add), which equals the
// measure on the resampled multiset of rows. Paired: both models get the same counts.
// (AUC's fast path reads the same draws as positions in its own order: see below.)
// A replicate whose value is undefined (e.g. AUC of a resample with one class) is left
// out and counted in `undefined_replicates`; if fewer than two replicates remain,
// undefined_error.
//
// Percentile interval: [Q(a/2), Q(1 - a/2)], a = 1 - level, Q the Hyndman-Fan type 7
// quantile of the replicates (linear interpolation at h = (B - 1) p; numpy's default and
// scipy.stats.bootstrap's rule).
// BCa (Efron 1987, JASA 82:171-185; Efron & Tibshirani 1993, Ch. 14):
//   z0 = Phi^-1((#{theta* < theta} + #{theta* = theta}/2) / B)       (ties count half,
//        "equal" meaning |theta* - theta| <= 16 eps |theta|, so rounding in the weighted
//        sums does not split mathematical ties);
//   a  = sum U_i^3 / (6 (sum U_i^2)^{3/2}), U_i = mean(theta_(.)) - theta_(i), where
//        theta_(i) is the measure on the test rows without row i, predictions fixed
//        (the jackknife of test points; the model is not refit);
//   alpha_{1,2} = Phi(z0 + (z0 + z_{a/2, 1-a/2}) / (1 - a (z0 + z_{a/2, 1-a/2}))),
//   interval [Q(alpha_1), Q(alpha_2)].
// Undefined BCa (-> undefined_error): every replicate on one side of theta (z0 infinite),
// all jackknife values equal (a is 0/0), or 1 - a (z0 + z) <= 0.
// The jackknife costs O(n) merges for measures whose accumulator state has fixed size (no
// vectors in visit_state), else n evaluations of n - 1 rows (O(n^2)).
// AUC (measure::auc with float/double scores) takes a fast path: heldout::ranked_sample
// sorts once; replicate b takes the same n draws r = rng(seed, b).below(n) as *positions in
// resampling order* rather than rows — ascending score, within a tie group the negatives
// first, then the positives, each in row order — an equally uniform resample, chosen
// because counting straight into that order avoids a random row lookup per draw and makes
// the tie correction a sum over contiguous ranges — and scores them in one O(n) integer
// pass; the jackknife is closed-form from the tie groups (O(n)). So for AUC the replicate
// values differ from the by-row draws of other measures with the same seed (same
// distribution, deterministic). The paired form keeps by-row draws for both models.
//
// Progress: o.progress(done, replicates), if set, after every replicate (done = 1, 2, ...,
// replicates), on the calling thread; the jackknife of BCa (n leave-one-out values) is not
// counted. Keep it cheap or throttle it: it runs as often as there are replicates.
#pragma once

#include <heldout/core/measure.hpp>
#include <heldout/core/random.hpp>
#include <heldout/detail/auc_resampling.hpp>
#include <heldout/estimate/t_interval.hpp>
#include <heldout/measure/auc.hpp>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <functional>
#include <limits>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// Replicate count, seed and level of a bootstrap interval.
struct bootstrap_options {
    std::size_t replicates = 2000;
    std::uint64_t seed = 0;
    double level = 0.95;
    /// Called after every replicate with (replicates done, replicates); may be left empty.
    /// It only observes: the interval is the same with or without it.
    std::function<void(std::size_t done, std::size_t total)> progress{};
};

/// Which bootstrap interval was computed.
enum class bootstrap_method { percentile, bca };

/// A bootstrap interval. For the percentile method z0 and acceleration are 0.
struct bootstrap_result {
    double estimate = 0; ///< the statistic on all rows (paired: value(a) - value(b))
    double lower = 0;
    double upper = 0;
    double level = 0;
    bootstrap_method method = bootstrap_method::percentile;
    std::size_t replicates = 0;           ///< replicates used
    std::size_t undefined_replicates = 0; ///< replicates left out because the measure was undefined
    double z0 = 0;                        ///< BCa bias correction
    double acceleration = 0;              ///< BCa acceleration a
    double lower_probability = 0;         ///< the quantile levels read from the replicates
    double upper_probability = 0;
};

/// Replicate values with the number of undefined replicates left out.
struct bootstrap_replicate_set {
    std::vector<double> values;
    std::size_t undefined = 0;
};

namespace detail {

inline constexpr double bootstrap_tie_ulps = 16.0;

inline bool bootstrap_tied(double x, double theta) {
    return std::abs(x - theta) <= bootstrap_tie_ulps * std::numeric_limits<double>::epsilon() * std::abs(theta);
}

/// Type 7 quantile of an ascending sequence (h = (B - 1) p, linear interpolation).
inline double type7(std::span<const double> sorted, double p) {
    const double h = static_cast<double>(sorted.size() - 1) * p;
    const double fl = std::floor(h);
    const std::size_t j = static_cast<std::size_t>(fl);
    if (j + 1 >= sorted.size())
        return sorted.back();
    const double g = h - fl;
    // numpy's form: a + g (b - a), exact at g = 0.
    return sorted[j] + g * (sorted[j + 1] - sorted[j]);
}

template <class R>
std::vector<double> sorted_replicates(const R& replicates, std::string_view who) {
    auto v = values_of(replicates, who, "replicates");
    if (v.size() < 2)
        fail(who, "replicates", "need at least 2 replicates, got " + std::to_string(v.size()));
    check_finite(who, "replicates", v);
    std::vector<double> s(v.begin(), v.end());
    std::sort(s.begin(), s.end());
    return s;
}

inline double acceleration_of(std::span<const double> jack, std::string_view who) {
    compensated_sum s;
    for (double x : jack)
        s.add(x);
    const double mean = s.value() / static_cast<double>(jack.size());
    compensated_sum s2, s3;
    for (double x : jack) {
        const double u = mean - x;
        s2.add(u * u);
        s3.add(u * u * u);
    }
    const double d = s2.value();
    if (!(d > 0))
        fail_undefined(who, "all jackknife values are equal: the BCa acceleration is 0/0");
    return s3.value() / (6.0 * d * std::sqrt(d));
}

template <class = void>
bootstrap_result bca_from_sorted(double theta, std::span<const double> sorted, std::span<const double> jack,
                                 double level, std::string_view who) {
    std::size_t less = 0, tied = 0;
    for (double x : sorted) {
        if (bootstrap_tied(x, theta))
            ++tied;
        else if (x < theta)
            ++less;
    }
    const double B = static_cast<double>(sorted.size());
    const double prop = (static_cast<double>(less) + 0.5 * static_cast<double>(tied)) / B;
    if (!(prop > 0.0 && prop < 1.0))
        fail_undefined(who, "every bootstrap replicate lies on one side of the estimate: the BCa bias correction is "
                            "infinite");
    const double z0 = normal_quantile(prop);
    const double a = acceleration_of(jack, who);
    const double tail = (1.0 - level) / 2;
    const double zl = normal_quantile(tail);
    const double zu = -zl;
    const double dl = 1.0 - a * (z0 + zl);
    const double du = 1.0 - a * (z0 + zu);
    if (!(dl > 0 && du > 0))
        fail_undefined(who,
                       "1 - a (z0 + z) <= 0: the BCa adjustment breaks down (acceleration " + number_text(a) + ")");
    bootstrap_result r;
    r.estimate = theta;
    r.level = level;
    r.method = bootstrap_method::bca;
    r.replicates = sorted.size();
    r.z0 = z0;
    r.acceleration = a;
    r.lower_probability = normal_cdf(z0 + (z0 + zl) / dl);
    r.upper_probability = normal_cdf(z0 + (z0 + zu) / du);
    r.lower = type7(sorted, r.lower_probability);
    r.upper = type7(sorted, r.upper_probability);
    return r;
}

inline bootstrap_result percentile_from_sorted(double theta, std::span<const double> sorted, double level) {
    bootstrap_result r;
    r.estimate = theta;
    r.level = level;
    r.method = bootstrap_method::percentile;
    r.replicates = sorted.size();
    r.lower_probability = (1.0 - level) / 2;
    r.upper_probability = 1.0 - r.lower_probability;
    r.lower = type7(sorted, r.lower_probability);
    r.upper = type7(sorted, r.upper_probability);
    return r;
}

} // namespace detail

/// Hyndman-Fan type 7 quantile of replicates (any order), p in [0, 1].
template <value_range R>
double replicate_quantile(const R& replicates, double p) {
    constexpr std::string_view who = "heldout::replicate_quantile";
    if (!(p >= 0.0 && p <= 1.0))
        detail::fail(who, "p", "probability " + detail::number_text(p) + " outside [0, 1]");
    auto v = values_of(replicates, who, "replicates");
    detail::check_nonempty(who, "replicates", v.size());
    detail::check_finite(who, "replicates", v);
    std::vector<double> s(v.begin(), v.end());
    std::sort(s.begin(), s.end());
    return detail::type7(s, p);
}

/// BCa acceleration a = sum U^3 / (6 (sum U^2)^{3/2}) from jackknife values.
template <value_range J>
double jackknife_acceleration(const J& jackknife) {
    constexpr std::string_view who = "heldout::jackknife_acceleration";
    auto v = values_of(jackknife, who, "jackknife");
    if (v.size() < 2)
        detail::fail(who, "jackknife", "need at least 2 jackknife values, got " + std::to_string(v.size()));
    detail::check_finite(who, "jackknife", v);
    std::vector<double> j(v.begin(), v.end());
    return detail::acceleration_of(j, who);
}

/// Percentile interval from given replicates.
template <value_range R>
bootstrap_result percentile_interval(double estimate, const R& replicates, double level = 0.95) {
    constexpr std::string_view who = "heldout::percentile_interval";
    detail::check_level(who, level);
    if (!std::isfinite(estimate))
        detail::fail(who, "estimate", "not finite");
    const auto s = detail::sorted_replicates(replicates, who);
    return detail::percentile_from_sorted(estimate, s, level);
}

/// BCa interval from given replicates and jackknife values.
template <value_range R, value_range J>
bootstrap_result bca_interval(double estimate, const R& replicates, const J& jackknife, double level = 0.95) {
    constexpr std::string_view who = "heldout::bca_interval";
    detail::check_level(who, level);
    if (!std::isfinite(estimate))
        detail::fail(who, "estimate", "not finite");
    const auto s = detail::sorted_replicates(replicates, who);
    auto jv = values_of(jackknife, who, "jackknife");
    if (jv.size() < 2)
        detail::fail(who, "jackknife", "need at least 2 jackknife values, got " + std::to_string(jv.size()));
    detail::check_finite(who, "jackknife", jv);
    std::vector<double> j(jv.begin(), jv.end());
    return detail::bca_from_sorted(estimate, s, j, level, who);
}

namespace detail {
/// n draws of rng(seed, replicate).below(n); draw r increments counts[r].
} // namespace detail

/// The documented resampling: counts[r] = how often row r is among n draws of
/// rng(seed, replicate).below(n).
inline void bootstrap_counts(std::span<std::uint32_t> counts, std::uint64_t seed, std::uint64_t replicate) {
    if (counts.empty())
        detail::fail("heldout::bootstrap_counts", "counts", "empty input");
    detail::draw_counts(counts, seed, replicate);
}

namespace detail {

// Whether an accumulator's state (as visit_state shows it) has a fixed size: no vectors.
struct fixed_state_probe {
    bool fixed = true;
    template <class X>
    void operator()(const X& x) {
        if constexpr (std::is_arithmetic_v<X> || std::is_enum_v<X>) {
        } else if constexpr (requires { x.visit_state(*this); }) {
            x.visit_state(*this);
        } else {
            fixed = false; // a vector (or anything else that can grow)
        }
    }
};

template <class A>
bool has_fixed_state(const A& a) {
    if constexpr (requires(fixed_state_probe & p) { a.visit_state(p); }) {
        fixed_state_probe p;
        a.visit_state(p);
        return p.fixed;
    } else {
        return false;
    }
}

/// The value of an accumulator, or false when it is undefined.
template <class A>
bool try_value(const A& a, double& out) {
    try {
        out = a.value();
        return true;
    } catch (const undefined_error&) {
        return false;
    }
}

/// One model's data for resampling: measure, truth, prediction, and a scratch accumulator.
template <class M, class T, class P>
struct resample_engine {
    const M& measure;
    std::span<const element_t<T>> truth;
    const P& prediction;
    accumulator_t<M> acc;

    resample_engine(const M& m, const T& t, const P& p, std::string_view who)
        : measure(m), truth(values_of(t, who, "truth")), prediction(p), acc(m.accumulator()) {
        check_nonempty(who, "truth", truth.size());
        check_same_size(who, "prediction", truth.size(), prediction_rows(p));
    }

    double full() {
        acc.reset();
        acc.add(truth, prediction);
        return acc.value(); // undefined on the whole set: the caller's undefined_error
    }

    std::vector<std::uint32_t> counts;

    /// Replicate b: the documented by-row counts as frequency weights.
    bool replicate(std::uint64_t seed, std::uint64_t b, double& out) {
        counts.resize(truth.size());
        draw_counts(counts, seed, b);
        return with_counts(counts, out);
    }

    bool with_counts(std::span<const std::uint32_t> c, double& out) {
        acc.reset();
        acc.add(truth, prediction, c);
        return try_value(acc, out);
    }
    bool with_row_counts(std::span<const std::uint32_t> c, double& out) { return with_counts(c, out); }

    void add_rows(accumulator_t<M>& a, std::size_t first, std::size_t count) const {
        if (count > 0)
            a.add(truth.subspan(first, count), prediction_slice(prediction, first, count));
    }

    /// theta_(i), the value without row i, for every i; false when any is undefined.
    bool jackknife(std::vector<double>& out) {
        const std::size_t n = truth.size();
        out.assign(n, 0.0);
        using A = accumulator_t<M>;
        const A empty = measure.accumulator();
        if (!has_fixed_state(empty)) {
            A a = empty;
            for (std::size_t i = 0; i < n; ++i) {
                a.reset();
                add_rows(a, 0, i);
                add_rows(a, i + 1, n - i - 1);
                if (!try_value(a, out[i]))
                    return false;
            }
            return true;
        }
        // Square-root blocking: "all but block b" from block prefixes and suffixes, then
        // "block b without row i" from in-block prefixes and suffixes: O(n) merges.
        std::size_t s = static_cast<std::size_t>(std::sqrt(static_cast<double>(n)));
        if (s < 1)
            s = 1;
        const std::size_t nb = (n + s - 1) / s;
        std::vector<A> blocks(nb, empty);
        for (std::size_t b = 0; b < nb; ++b)
            add_rows(blocks[b], b * s, std::min(s, n - b * s));
        std::vector<A> before(nb, empty); // blocks 0..b-1
        for (std::size_t b = 1; b < nb; ++b) {
            before[b] = before[b - 1];
            before[b].merge(blocks[b - 1]);
        }
        A after = empty; // blocks b+1..nb-1
        std::vector<A> prefix;
        prefix.reserve(s);
        for (std::size_t bb = nb; bb-- > 0;) {
            const std::size_t first = bb * s;
            const std::size_t len = std::min(s, n - first);
            A others = before[bb];
            others.merge(after);
            prefix.assign(len, empty); // prefix[j]: rows first..first+j-1
            for (std::size_t j = 1; j < len; ++j) {
                prefix[j] = prefix[j - 1];
                add_rows(prefix[j], first + j - 1, 1);
            }
            A suffix = empty; // rows first+j+1..first+len-1
            for (std::size_t j = len; j-- > 0;) {
                A a = others;
                a.merge(prefix[j]);
                a.merge(suffix);
                if (!try_value(a, out[first + j]))
                    return false;
                add_rows(suffix, first + j, 1);
            }
            after.merge(blocks[bb]);
        }
        return true;
    }
};

template <class M, class T, class P>
auto make_engine(const M& m, const T& t, const P& p, std::string_view who) {
    if constexpr (offers_v<M, cap::resampling>)
        return m.resampler(t, p, who);
    else
        return resample_engine<M, T, P>(m, t, p, who);
}

inline void check_bootstrap_options(std::string_view who, const bootstrap_options& o) {
    check_level(who, o.level);
    if (o.replicates < 2)
        fail(who, "replicates", "need at least 2 replicates, got " + std::to_string(o.replicates));
}

template <class Engine>
bootstrap_replicate_set run_replicates(const bootstrap_options& o, Engine& e) {
    bootstrap_replicate_set set;
    set.values.reserve(o.replicates);
    for (std::size_t b = 0; b < o.replicates; ++b) {
        double v = 0;
        if (e.replicate(o.seed, b, v))
            set.values.push_back(v);
        else
            ++set.undefined;
        if (o.progress)
            o.progress(b + 1, o.replicates);
    }
    return set;
}

inline std::vector<double> usable_sorted(bootstrap_replicate_set& set, std::string_view who) {
    if (set.values.size() < 2)
        fail_undefined(who, std::to_string(set.undefined) + " of " + std::to_string(set.undefined + set.values.size()) +
                                " bootstrap replicates are undefined; fewer than 2 remain");
    std::vector<double> s = std::move(set.values);
    std::sort(s.begin(), s.end());
    return s;
}

template <class M, class T, class P>
void check_bootstrap_pairing() {
    check_prediction_type<M, P>();
    static_assert(scores<M, T, P>, "heldout: this measure cannot score this truth/prediction pairing");
    static_assert(scores_weighted<M, T, P, std::span<const std::uint32_t>>,
                  "heldout: the bootstrap needs the measure's weighted add (counts as frequency weights)");
}

} // namespace detail

/// Bootstrap replicate values of measure m over the test rows (predictions fixed).
template <outer_measure M, class T, class P>
bootstrap_replicate_set bootstrap_replicates(const M& m, const T& truth, const P& prediction,
                                             const bootstrap_options& o = {}) {
    constexpr std::string_view who = "heldout::bootstrap_replicates";
    detail::check_bootstrap_pairing<M, T, P>();
    detail::check_bootstrap_options(who, o);
    auto e = detail::make_engine(m, truth, prediction, who);
    (void)e.full(); // validates the data once, and refuses a measure undefined on all rows
    return detail::run_replicates(o, e);
}

/// Jackknife values theta_(i): measure m on the test rows without row i (predictions fixed).
template <outer_measure M, class T, class P>
std::vector<double> jackknife_values(const M& m, const T& truth, const P& prediction) {
    constexpr std::string_view who = "heldout::jackknife_values";
    detail::check_bootstrap_pairing<M, T, P>();
    auto e = detail::make_engine(m, truth, prediction, who);
    (void)e.full();
    std::vector<double> out;
    if (!e.jackknife(out))
        detail::fail_undefined(who, "the measure is undefined with one row left out");
    return out;
}

/// Bootstrap percentile interval of measure m on one test set.
template <outer_measure M, class T, class P>
bootstrap_result bootstrap_percentile(const M& m, const T& truth, const P& prediction,
                                      const bootstrap_options& o = {}) {
    constexpr std::string_view who = "heldout::bootstrap_percentile";
    detail::check_bootstrap_pairing<M, T, P>();
    detail::check_bootstrap_options(who, o);
    auto e = detail::make_engine(m, truth, prediction, who);
    const double theta = e.full();
    auto set = detail::run_replicates(o, e);
    const std::size_t undefined = set.undefined;
    const auto s = detail::usable_sorted(set, who);
    auto r = detail::percentile_from_sorted(theta, s, o.level);
    r.undefined_replicates = undefined;
    return r;
}

/// Bootstrap BCa interval of measure m on one test set (jackknife over test rows).
template <outer_measure M, class T, class P>
bootstrap_result bootstrap_bca(const M& m, const T& truth, const P& prediction, const bootstrap_options& o = {}) {
    constexpr std::string_view who = "heldout::bootstrap_bca";
    detail::check_bootstrap_pairing<M, T, P>();
    detail::check_bootstrap_options(who, o);
    auto e = detail::make_engine(m, truth, prediction, who);
    const double theta = e.full();
    std::vector<double> jack;
    if (!e.jackknife(jack))
        detail::fail_undefined(who, "the measure is undefined with one row left out, so the jackknife "
                                    "acceleration is undefined");
    auto set = detail::run_replicates(o, e);
    const std::size_t undefined = set.undefined;
    const auto s = detail::usable_sorted(set, who);
    auto r = detail::bca_from_sorted(theta, s, jack, o.level, who);
    r.undefined_replicates = undefined;
    return r;
}

namespace detail {
template <class M, class T, class P>
struct paired_engine {
    decltype(make_engine(std::declval<const M&>(), std::declval<const T&>(), std::declval<const P&>(),
                         std::string_view{})) a,
        b;
    std::size_t rows;
    paired_engine(const M& m, const T& t, const P& pa, const P& pb, std::string_view who)
        : a(make_engine(m, t, pa, who)), b(make_engine(m, t, pb, who)), rows(prediction_rows(pa)) {}
    double full() { return a.full() - b.full(); }
    std::vector<std::uint32_t> counts;
    // One by-row draw for both models (an AUC model gathers it into its resampling order).
    bool replicate(std::uint64_t seed, std::uint64_t rep, double& v) {
        counts.resize(rows);
        draw_counts(counts, seed, rep);
        return with_counts(counts, v);
    }
    bool with_counts(std::span<const std::uint32_t> c, double& v) {
        double va = 0, vb = 0;
        if (!a.with_row_counts(c, va) || !b.with_row_counts(c, vb))
            return false;
        v = va - vb;
        return true;
    }
};
} // namespace detail

/// Paired bootstrap replicates of value(a) - value(b): the same resamples for both models.
template <outer_measure M, class T, class P>
bootstrap_replicate_set paired_bootstrap_replicates(const M& m, const T& truth, const P& prediction_a,
                                                    const P& prediction_b, const bootstrap_options& o = {}) {
    constexpr std::string_view who = "heldout::paired_bootstrap_replicates";
    detail::check_bootstrap_pairing<M, T, P>();
    detail::check_bootstrap_options(who, o);
    detail::paired_engine<M, T, P> e(m, truth, prediction_a, prediction_b, who);
    (void)e.full();
    return detail::run_replicates(o, e);
}

/// Paired bootstrap percentile interval of value(a) - value(b) on the same test rows.
template <outer_measure M, class T, class P>
bootstrap_result paired_bootstrap_percentile(const M& m, const T& truth, const P& prediction_a, const P& prediction_b,
                                             const bootstrap_options& o = {}) {
    constexpr std::string_view who = "heldout::paired_bootstrap_percentile";
    detail::check_bootstrap_pairing<M, T, P>();
    detail::check_bootstrap_options(who, o);
    detail::paired_engine<M, T, P> e(m, truth, prediction_a, prediction_b, who);
    const double theta = e.full();
    auto set = detail::run_replicates(o, e);
    const std::size_t undefined = set.undefined;
    const auto s = detail::usable_sorted(set, who);
    auto r = detail::percentile_from_sorted(theta, s, o.level);
    r.undefined_replicates = undefined;
    return r;
}

/// Paired bootstrap BCa interval of value(a) - value(b); the jackknife leaves row i out of both.
template <outer_measure M, class T, class P>
bootstrap_result paired_bootstrap_bca(const M& m, const T& truth, const P& prediction_a, const P& prediction_b,
                                      const bootstrap_options& o = {}) {
    constexpr std::string_view who = "heldout::paired_bootstrap_bca";
    detail::check_bootstrap_pairing<M, T, P>();
    detail::check_bootstrap_options(who, o);
    detail::paired_engine<M, T, P> e(m, truth, prediction_a, prediction_b, who);
    const double theta = e.full();
    std::vector<double> ja, jb;
    if (!e.a.jackknife(ja) || !e.b.jackknife(jb))
        detail::fail_undefined(who, "the measure is undefined with one row left out, so the jackknife "
                                    "acceleration is undefined");
    for (std::size_t i = 0; i < ja.size(); ++i)
        ja[i] -= jb[i];
    auto set = detail::run_replicates(o, e);
    const std::size_t undefined = set.undefined;
    const auto s = detail::usable_sorted(set, who);
    auto r = detail::bca_from_sorted(theta, s, ja, o.level, who);
    r.undefined_replicates = undefined;
    return r;
}

HELDOUT_NAMESPACE_END
