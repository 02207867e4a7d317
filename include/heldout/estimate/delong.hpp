// heldout/estimate/delong.hpp — the uncertainty of an AUC and of differences of AUCs measured
// on the same cases: DeLong, DeLong & Clarke-Pearson (1988) variance, computed in O(n log n)
// by the midrank method of Sun & Xu (2014) on a radix sort (never the O(n^2) double loop).
//
//   auto e = heldout::delong_auc(truth, scores);              // e.value, e.se, e.lower, e.upper
//   auto w = heldout::delong_auc(truth, scores, 0.9, heldout::auc_interval_method::wald);
//   auto t = heldout::delong_test(truth, scores_a, scores_b); // t.difference = AUC(a) - AUC(b)
//   // t.se, t.z, t.p_value (two-sided), t.lower, t.upper (Wald interval of the difference)
//
//   Eigen::MatrixXd s(n, 3);                                  // one column per model
//   auto c = heldout::delong_covariance(truth, s);            // c.auc, c.covariance (3 x 3)
//   Eigen::MatrixXd L(2, 3);  L << 1, -1, 0,  0, 1, -1;       // H0: all three AUCs equal
//   auto chi = c.test(L);                                     // chi.statistic, chi.df, chi.p_value
//
// Method (DeLong et al. 1988; Sun & Xu 2014). Positives X_i (m of them), negatives Y_j (n). Structural
// components V10(X_i) = (#{Y < X_i} + #{Y = X_i}/2)/n and V01(Y_j) = (#{X > Y_j} + #{X = Y_j}/2)/m,
// which are Sun & Xu's (T_Z - T_X)/n and 1 - (T_Z - T_Y)/m; both come from one sort of the
// pooled scores (positives and negatives tied to each other fall in one tie group). Then
// S10[r,s] = sum_i (V10^r_i - A_r)(V10^s_i - A_s)/(m - 1), S01 likewise over j with n - 1, and
// Cov(A) = S10/m + S01/n.
//  * delong_auc interval: by default logit(A) +- z se/(A(1-A)), transformed back (stays inside
//    (0, 1)); auc_interval_method::wald gives A +- z se (can leave [0, 1]).
//  * delong_test: z = (A_a - A_b)/se, se^2 = S_aa + S_bb - 2 S_ab, two-sided normal p value, and
//    the Wald interval of the difference.
//  * delong_covariance(...).test(L): (L A)' (L S L')^-1 (L A) ~ chi-squared with rank(L) degrees
//    of freedom (Boost.Math chi_squared), for any contrast matrix L with k columns.
// Errors: bad truth/scores as for measure::auc (input_error with the index); a level outside
// (0, 1) -> input_error; one class absent, fewer than 2 positives or 2 negatives (S10 or S01
// divides by m - 1, n - 1), a zero variance (e.g. A = 0 or 1: every V10 equal) or a singular
// L S L' -> undefined_error; the logit interval at A = 0 or 1 is undefined for the same reason.
#pragma once

#include <heldout/core/capabilities.hpp>
#include <heldout/core/config.hpp>
#include <heldout/core/values.hpp>
#include <heldout/detail/deferred.hpp>
#include <heldout/detail/isa.hpp>
#include <heldout/detail/ranks.hpp>

HELDOUT_EXTERNAL_BEGIN
#include <Eigen/Dense>
HELDOUT_EXTERNAL_END
#include <boost/math/distributions/chi_squared.hpp>
#include <boost/math/distributions/normal.hpp>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// How delong_auc builds its interval.
enum class auc_interval_method {
    logit, ///< logit(A) +- z se / (A (1 - A)), back-transformed: stays in (0, 1)
    wald   ///< A +- z se
};

/// An AUC with its DeLong standard error and a confidence interval.
struct auc_estimate {
    double value = 0;
    double se = 0;
    double lower = 0;
    double upper = 0;
    double level = 0;
};

/// The DeLong test of AUC(a) - AUC(b) on the same cases.
struct auc_difference_test {
    double difference = 0; ///< AUC(a) - AUC(b)
    double se = 0;
    double z = 0;
    double p_value = 0; ///< two-sided
    double lower = 0;   ///< Wald interval of the difference
    double upper = 0;
    double level = 0;
};

/// A chi-squared test of a contrast of correlated AUCs.
struct auc_contrast_test {
    double statistic = 0;
    double df = 0;
    double p_value = 0;
};

/// The AUCs of k models on the same cases and their DeLong covariance matrix.
struct auc_covariance {
    Eigen::VectorXd auc;
    Eigen::MatrixXd covariance;
    std::size_t positives = 0;
    std::size_t negatives = 0;

    /// Tests H0: L auc = 0 with (L A)'(L S L')^-1 (L A) ~ chi-squared(rank L). L has k columns
    /// and linearly independent rows (input_error otherwise); a singular L S L' is undefined.
    /// A template over the Eigen expression so that the decompositions below are compiled only
    /// in translation units that call it, not in every one that includes heldout.
    template <class Derived>
    auc_contrast_test test(const Eigen::MatrixBase<Derived>& contrast) const {
        using matrix = detail::deferred_t<Eigen::MatrixXd, Derived>;
        using vector = detail::deferred_t<Eigen::VectorXd, Derived>;
        const matrix L = contrast;
        constexpr std::string_view who = "heldout::auc_covariance::test";
        if (L.cols() != auc.size() || L.rows() == 0)
            detail::fail(who, "L",
                         "needs " + std::to_string(auc.size()) + " columns and at least one row, got " +
                             std::to_string(L.rows()) + " x " + std::to_string(L.cols()));
        if (!L.allFinite())
            detail::fail(who, "L", "not finite");
        Eigen::FullPivLU<matrix> lu(L);
        if (lu.rank() < L.rows())
            detail::fail(who, "L",
                         "rows are linearly dependent (rank " + std::to_string(lu.rank()) + " < " +
                             std::to_string(L.rows()) + ")");
        const vector la = L * auc;
        const matrix v = L * covariance * L.transpose();
        Eigen::SelfAdjointEigenSolver<matrix> es(v);
        const double top = es.eigenvalues().cwiseAbs().maxCoeff();
        if (!(es.eigenvalues().minCoeff() > 1e-12 * top) || !(top > 0))
            detail::fail_undefined(who, "L S L' is singular (a contrast with zero variance)");
        const double stat = la.dot(v.ldlt().solve(la));
        const double df = static_cast<double>(L.rows());
        const double p = boost::math::cdf(boost::math::complement(boost::math::chi_squared(df), stat));
        return {stat, df, p};
    }
};

namespace detail {

template <class = void>
double delong_z(std::string_view who, double level) {
    if (!(level > 0 && level < 1))
        fail(who, "level", "must lie in (0, 1), got " + number_text(level));
    return boost::math::quantile(boost::math::normal(), 0.5 + level / 2);
}

inline void check_delong_counts(std::string_view who, std::uint64_t m, std::uint64_t n) {
    check_both_classes(who, static_cast<double>(m), static_cast<double>(n), false);
    if (m < 2 || n < 2)
        fail_undefined(who, "the DeLong variance needs at least 2 positives and 2 negatives (got " + std::to_string(m) +
                                " and " + std::to_string(n) + ")");
}

/// The rows of a sorted order are a random permutation of the cases, so writing a per-case
/// array in that order misses the cache every time; a hint this many rows ahead lets the
/// misses overlap (delong_test on 1e6 cases: about 3.4 -> 3.1 times one AUC).
inline constexpr std::size_t row_prefetch = 16;

/// A tie group of ranks [first, last) in a DeLong walk: its positives and negatives, the
/// doubled counts c10 = 2 #(negatives below) + negatives in the group (V10 = c10 / (2 n) for
/// its positives) and c01 = 2 #(positives above) + positives in the group (V01 = c01 / (2 m)
/// for its negatives), and those components (one multiplication of an exact integer: they
/// round once).
struct delong_group {
    std::size_t first = 0, last = 0;
    std::uint64_t positives = 0, negatives = 0, c10 = 0, c01 = 0;
    double v10 = 0, v01 = 0;
};

/// The label of a default tag (row | label << 31).
struct tag_label {
    std::uint64_t operator()(std::uint32_t tag) const noexcept { return tag >> 31; }
};

/// Walks the tie groups of sorted rows with m positives and nn negatives, calling
/// f(delong_group) for each; label_of(tag) gives a tag's 0/1 label. Returns the doubled
/// Mann-Whitney U.
template <class T, class F, class Label = tag_label>
HELDOUT_DETAIL_INLINE std::uint64_t walk_delong_groups(const sorted_rows<T>& sr, std::uint64_t m, std::uint64_t nn,
                                                       F&& f, Label label_of = {}) {
    const double inv2n = nn ? 0.5 / static_cast<double>(nn) : 0.0;
    const double inv2m = m ? 0.5 / static_cast<double>(m) : 0.0;
    std::uint64_t u2 = 0, neg_below = 0, pos_below = 0;
    const std::size_t n = sr.n;
    delong_group g;
    std::size_t i = 0;
    while (i < n) {
        std::size_t j = i;
        std::uint64_t gp = 0;
        do {
            prefetch_ahead(sr, j);
            gp += label_of(sr.at(j++));
        } while (j < n && sr.same(j));
        const std::uint64_t gn = (j - i) - gp;
        g.first = i;
        g.last = j;
        g.positives = gp;
        g.negatives = gn;
        g.c10 = 2 * neg_below + gn;
        g.c01 = 2 * (m - pos_below - gp) + gp;
        g.v10 = static_cast<double>(g.c10) * inv2n;
        g.v01 = static_cast<double>(g.c01) * inv2m;
        f(static_cast<const delong_group&>(g));
        u2 += gp * g.c10;
        neg_below += gn;
        pos_below += gp;
        i = j;
    }
    return u2;
}

/// Calls f(row, label) for the ranks of a group (default tags), with a prefetch hint for the
/// per-case array `cases` row_prefetch ranks ahead.
template <class T, class C, class F>
HELDOUT_DETAIL_INLINE void visit_ranks(const sorted_rows<T>& sr, const delong_group& g, const C* cases, F&& f) {
    for (std::size_t t = g.first; t < g.last; ++t) {
        const std::uint32_t p = sr.at(t);
        if (t + row_prefetch < sr.n)
            prefetch_hint(cases + (sr.at(t + row_prefetch) & ~label_bit));
        f(p & ~label_bit, p >> 31);
    }
}

/// One model of the k-model route: sorts, writes V10 (positives) / V01 (negatives) into
/// v[row], returns doubled U and the class counts.
template <class T, class L>
rank_sum_counts delong_components(std::string_view who, std::string_view arg, std::span<const L> y,
                                  std::span<const T> s, rank_scratch& sc, double* v) {
    const auto sr = sort_rows(who, s, y, sc, arg);
    const std::uint64_t m = sr.positives, nn = sr.n - m;
    const std::uint64_t u2 = walk_delong_groups(sr, m, nn, [&](const delong_group& g) {
        const double vv[2] = {g.v01, g.v10}; // no branch on the class (see delong_pair)
        visit_ranks(sr, g, v, [&](std::uint32_t row, std::uint32_t pos) { v[row] = vv[pos]; });
    });
    return {u2, m, nn};
}

/// AUCs and DeLong covariance of k models given as spans of scores.
template <class T, class L>
auc_covariance delong_core(std::string_view who, std::span<const L> y, std::span<const std::span<const T>> models,
                           std::span<const std::string> args) {
    const std::size_t k = models.size();
    const std::size_t n = y.size();
    check_nonempty(who, "truth", n);
    check_binary(who, "truth", y);
    auto& sc = thread_scratch();
    double* const v = sc.values.get(k * n);
    Eigen::VectorXd a(static_cast<Eigen::Index>(k));
    std::uint64_t m = 0, nn = 0;
    for (std::size_t r = 0; r < k; ++r) {
        const auto c = delong_components(who, args[r], y, models[r], sc, v + r * n);
        if (r == 0)
            check_delong_counts(who, c.positives, c.negatives);
        m = c.positives;
        nn = c.negatives;
        a[static_cast<Eigen::Index>(r)] =
            static_cast<double>(static_cast<long double>(c.doubled_u) / (2.0L * static_cast<long double>(m) * nn));
    }
    // Centred cross-products, rows in blocks: plain partials inside a block, compensated totals.
    const std::size_t pairs = k * (k + 1) / 2;
    std::vector<compensated_sum> s10(pairs), s01(pairs);
    std::vector<double> b10(pairs), b01(pairs), c(k);
    for (std::size_t start = 0; start < n; start += block_rows) {
        const std::size_t end = std::min(n, start + block_rows);
        std::fill(b10.begin(), b10.end(), 0.0);
        std::fill(b01.begin(), b01.end(), 0.0);
        for (std::size_t i = start; i < end; ++i) {
            for (std::size_t r = 0; r < k; ++r)
                c[r] = v[r * n + i] - a[static_cast<Eigen::Index>(r)];
            auto& b = y[i] ? b10 : b01;
            std::size_t q = 0;
            for (std::size_t r = 0; r < k; ++r)
                for (std::size_t t = r; t < k; ++t)
                    b[q++] += c[r] * c[t];
        }
        for (std::size_t q = 0; q < pairs; ++q) {
            s10[q].add(b10[q]);
            s01[q].add(b01[q]);
        }
    }
    auc_covariance out;
    out.auc = a;
    out.covariance.resize(static_cast<Eigen::Index>(k), static_cast<Eigen::Index>(k));
    out.positives = static_cast<std::size_t>(m);
    out.negatives = static_cast<std::size_t>(nn);
    const double md = static_cast<double>(m), nd = static_cast<double>(nn);
    std::size_t q = 0;
    for (std::size_t r = 0; r < k; ++r)
        for (std::size_t t = r; t < k; ++t, ++q) {
            const double cov = s10[q].value() / (md - 1) / md + s01[q].value() / (nd - 1) / nd;
            out.covariance(static_cast<Eigen::Index>(r), static_cast<Eigen::Index>(t)) = cov;
            out.covariance(static_cast<Eigen::Index>(t), static_cast<Eigen::Index>(r)) = cov;
        }
    return out;
}

/// The DeLong variance of AUC(a) - AUC(b) without the k-model route. Model a is sorted and
/// walked once, writing for each row the doubled count of its structural component with its
/// class folded in: c10 for a positive (at most 2 n), 2 n + 1 + c01 for a negative (at most
/// 2 n + 2 m + 1 < 2^32 rows allowed). Model b is then sorted carrying that code as the rows'
/// tag, so its walk reads a's component in order (no per-row lookups: that pass went from 6.6
/// to about 1.5 ms at 1e6 rows) and forms e = V_a - V_b per row; only the sums of e and e^2 are
/// kept (per class, plain partials in blocks with compensated totals). With delta = A_a - A_b,
/// the mean of e over each class, the centred sum is
///   sum (e - delta)^2 = sum e^2 - delta (2 sum e - count delta),
/// taken in long double; e is centred near delta already (both V's are near their AUCs), so
/// the subtraction loses at most about log10(delta^2 / var(e)) digits of the ~19 (a 0.4 AUC
/// gap over a per-case spread of 0.03 loses 2). V_a is the same product as in the k-model
/// route (code times 1 / (2 n) or 1 / (2 m)), so the two agree to rounding of the sums.
struct pair_variance {
    double auc_a = 0, auc_b = 0, variance = 0;
};

template <class T, class L>
pair_variance delong_pair(std::string_view who, std::span<const L> y, std::span<const T> sa, std::span<const T> sb) {
    auto& sc = thread_scratch();
    std::uint32_t* const code = sc.counts.get(y.size());
    const auto ra = sort_rows(who, sa, y, sc, "scores_a");
    const std::uint64_t m = ra.positives, nn = ra.n - m;
    check_delong_counts(who, m, nn);
    const std::uint64_t two_nn = 2 * nn;
    const std::uint64_t u2a = walk_delong_groups(ra, m, nn, [&](const delong_group& g) {
        const std::uint32_t cc[2] = {static_cast<std::uint32_t>(two_nn + 1 + g.c01), static_cast<std::uint32_t>(g.c10)};
        visit_ranks(ra, g, code, [&](std::uint32_t row, std::uint32_t pos) { code[row] = cc[pos]; });
    });
    const auto auc_of = [&](std::uint64_t u2) {
        return static_cast<double>(static_cast<long double>(u2) / (2.0L * static_cast<long double>(m) * nn));
    };
    const auto sr = sort_rows(who, sb, y, sc, "scores_b", [code](std::size_t i, std::uint32_t) { return code[i]; });
    const auto label_of = [two_nn](std::uint32_t c) { return static_cast<std::uint64_t>(c <= two_nn); };
    // V_a of a code: (code - offset) * scale, by class (a two-entry table: no branch).
    const std::uint64_t offset[2] = {two_nn + 1, 0};
    const double scale[2] = {0.5 / static_cast<double>(m), 0.5 / static_cast<double>(nn)};
    compensated_sum e10, e01, q10, q01; // sum e, sum e^2 by class
    double be10 = 0, be01 = 0, bq10 = 0, bq01 = 0;
    std::size_t in_block = 0;
    const std::uint64_t u2b = walk_delong_groups(
        sr, m, nn,
        [&](const delong_group& g) {
            // No branch on the class (a coin flip in score order, mispredicted half the time):
            // two-entry tables and both sums weighted 1 and 0 (exact).
            const double vv[2] = {g.v01, g.v10};
            for (std::size_t t = g.first; t < g.last; ++t) {
                const std::uint32_t c = sr.at(t);
                const std::size_t pos = c <= two_nn;
                const double e = static_cast<double>(c - offset[pos]) * scale[pos] - vv[pos];
                const double w = static_cast<double>(pos);
                be10 += w * e;
                bq10 += w * (e * e);
                be01 += (1.0 - w) * e;
                bq01 += (1.0 - w) * (e * e);
            }
            in_block += g.last - g.first;
            if (in_block >= block_rows) {
                e10.add(be10);
                q10.add(bq10);
                e01.add(be01);
                q01.add(bq01);
                be10 = be01 = bq10 = bq01 = 0;
                in_block = 0;
            }
        },
        label_of);
    e10.add(be10);
    q10.add(bq10);
    e01.add(be01);
    q01.add(bq01);
    pair_variance out;
    out.auc_a = auc_of(u2a);
    out.auc_b = auc_of(u2b);
    const long double delta = static_cast<long double>(out.auc_a) - static_cast<long double>(out.auc_b);
    const auto centred = [&](const compensated_sum& se, const compensated_sum& sq, std::uint64_t count) {
        const long double q =
            static_cast<long double>(sq.value()) -
            delta * (2.0L * static_cast<long double>(se.value()) - static_cast<long double>(count) * delta);
        return static_cast<double>(q > 0 ? q : 0.0L);
    };
    const double md = static_cast<double>(m), nd = static_cast<double>(nn);
    out.variance = centred(e10, q10, m) / (md - 1) / md + centred(e01, q01, nn) / (nd - 1) / nd;
    return out;
}

/// Value a with standard error sqrt(var) (var > 0) and its interval at z: Wald, a +- z se, or
/// logit, the Wald interval of log(a / (1 - a)) mapped back (needs 0 < a < 1; otherwise
/// undefined, with `logit_needs` as the reason).
inline auc_estimate delong_estimate(std::string_view who, double a, double var, double z, double level,
                                    auc_interval_method method, std::string_view logit_needs) {
    auc_estimate e;
    e.value = a;
    e.se = std::sqrt(var);
    e.level = level;
    if (method == auc_interval_method::wald) {
        e.lower = a - z * e.se;
        e.upper = a + z * e.se;
    } else {
        if (!(a > 0 && a < 1))
            fail_undefined(who, logit_needs);
        const double lc = std::log(a / (1 - a)), h = z * e.se / (a * (1 - a));
        e.lower = 1 / (1 + std::exp(-(lc - h)));
        e.upper = 1 / (1 + std::exp(-(lc + h)));
    }
    return e;
}

} // namespace detail

/// AUC with its DeLong standard error and a level confidence interval (logit by default).
template <label_range T, real_range S>
auc_estimate delong_auc(const T& truth, const S& scores, double level = 0.95,
                        auc_interval_method method = auc_interval_method::logit) {
    constexpr std::string_view who = "heldout::delong_auc";
    using E = element_t<S>;
    static_assert(detail::rankable_score_v<E>, "heldout: ranking measures take float or double scores");
    auto y = values_of(truth, who, "truth");
    auto s = values_of(scores, who, "scores");
    const double z = detail::delong_z(who, level);
    // One model needs no alignment by case: the variances come from the tie groups.
    auto& sc = detail::thread_scratch();
    const auto sr = detail::sort_rows(who, s, y, sc);
    const auto r = detail::doubled_mann_whitney(sr);
    detail::check_delong_counts(who, r.positives, r.negatives);
    const std::uint64_t m = r.positives, nn = r.negatives;
    const double a =
        static_cast<double>(static_cast<long double>(r.doubled_u) / (2.0L * static_cast<long double>(m) * nn));
    detail::compensated_sum s10, s01;
    detail::walk_delong_groups(sr, m, nn, [&](const detail::delong_group& g) {
        const double d10 = g.v10 - a, d01 = g.v01 - a;
        s10.add(static_cast<double>(g.positives) * d10 * d10);
        s01.add(static_cast<double>(g.negatives) * d01 * d01);
    });
    const double md = static_cast<double>(m), nd = static_cast<double>(nn);
    const double var = s10.value() / (md - 1) / md + s01.value() / (nd - 1) / nd;
    if (!(var > 0))
        detail::fail_undefined(who, "the DeLong variance is zero (AUC = " + detail::number_text(a) +
                                        ": every positive outranks, or ties with, the negatives alike)");
    return detail::delong_estimate(who, a, var, z, level, method, "the logit interval needs 0 < AUC < 1");
}

/// The DeLong interval of a two-sample U statistic (the ROC AUC, or any measure with
/// cap::case_components) from its structural components: Var = S10/m + S01/n with
/// S10 = sum (V10_i - A)^2/(m - 1) over the m cases and S01 likewise over the n controls
/// (DeLong, DeLong & Clarke-Pearson 1988); logit interval by default, as delong_auc.
template <class Components = case_components>
auc_estimate delong_interval(const Components& c, double level = 0.95,
                             auc_interval_method method = auc_interval_method::logit) {
    constexpr std::string_view who = "heldout::delong_interval";
    const double z = detail::delong_z(who, level);
    detail::check_delong_counts(who, c.cases.size(), c.controls.size());
    const double a = c.value;
    detail::compensated_sum s10, s01;
    for (const double v : c.cases)
        s10.add((v - a) * (v - a));
    for (const double v : c.controls)
        s01.add((v - a) * (v - a));
    const double md = static_cast<double>(c.cases.size()), nd = static_cast<double>(c.controls.size());
    const double var = s10.value() / (md - 1) / md + s01.value() / (nd - 1) / nd;
    if (!(var > 0))
        detail::fail_undefined(who, "the DeLong variance is zero (value " + detail::number_text(a) +
                                        ": every case outranks, or ties with, the controls alike)");
    return detail::delong_estimate(who, a, var, z, level, method,
                                   "the logit interval needs a value strictly between 0 and 1");
}

/// The DeLong test of the difference of two U statistics on the same cases, from the two
/// models' structural components (cases and controls aligned): z = (A_a - A_b)/se with
/// se^2 = Var_a + Var_b - 2 Cov_ab, and the Wald interval of the difference.
template <class Components = case_components>
auc_difference_test delong_components_test(const Components& a, const Components& b, double level = 0.95) {
    constexpr std::string_view who = "heldout::delong_components_test";
    const double z = detail::delong_z(who, level);
    if (a.cases.size() != b.cases.size() || a.controls.size() != b.controls.size())
        detail::fail(who, "b", "the two models' components cover different cases");
    detail::check_delong_counts(who, a.cases.size(), a.controls.size());
    detail::compensated_sum s10, s01;
    for (std::size_t i = 0; i < a.cases.size(); ++i) {
        const double d = (a.cases[i] - a.value) - (b.cases[i] - b.value);
        s10.add(d * d);
    }
    for (std::size_t j = 0; j < a.controls.size(); ++j) {
        const double d = (a.controls[j] - a.value) - (b.controls[j] - b.value);
        s01.add(d * d);
    }
    const double md = static_cast<double>(a.cases.size()), nd = static_cast<double>(a.controls.size());
    const double var = s10.value() / (md - 1) / md + s01.value() / (nd - 1) / nd;
    auc_difference_test t;
    t.difference = a.value - b.value;
    if (!(var > 0))
        detail::fail_undefined(who, "the variance of the difference is zero (e.g. both values are 1, or the two "
                                    "models rank the cases alike)");
    t.se = std::sqrt(var);
    t.z = t.difference / t.se;
    t.p_value = 2 * boost::math::cdf(boost::math::complement(boost::math::normal(), std::abs(t.z)));
    t.lower = t.difference - z * t.se;
    t.upper = t.difference + z * t.se;
    t.level = level;
    return t;
}

/// DeLong test of AUC(a) - AUC(b), both models scored on the same cases.
template <label_range T, real_range Sa, real_range Sb>
auc_difference_test delong_test(const T& truth, const Sa& scores_a, const Sb& scores_b, double level = 0.95) {
    constexpr std::string_view who = "heldout::delong_test";
    static_assert(std::is_same_v<element_t<Sa>, element_t<Sb>>,
                  "heldout::delong_test: both models' scores need the same floating-point type");
    using E = element_t<Sa>;
    static_assert(detail::rankable_score_v<E>, "heldout: ranking measures take float or double scores");
    auto y = values_of(truth, who, "truth");
    const std::span<const E> ms[2] = {values_of(scores_a, who, "scores_a"), values_of(scores_b, who, "scores_b")};
    const double z = detail::delong_z(who, level);
    detail::check_nonempty(who, "truth", y.size());
    const auto c = detail::delong_pair<E>(who, y, ms[0], ms[1]);
    auc_difference_test t;
    t.difference = c.auc_a - c.auc_b;
    const double var = c.variance;
    if (!(var > 0))
        detail::fail_undefined(who, "the variance of the difference is zero (e.g. both AUCs are 1, or the two "
                                    "models rank the cases alike)");
    t.se = std::sqrt(var);
    t.z = t.difference / t.se;
    t.p_value = 2 * boost::math::cdf(boost::math::complement(boost::math::normal(), std::abs(t.z)));
    t.lower = t.difference - z * t.se;
    t.upper = t.difference + z * t.se;
    t.level = level;
    return t;
}

/// AUCs and DeLong covariance of k models: scores is an n x k Eigen matrix (a column per model).
template <label_range T, class M>
requires detail::eigen_dense_matrix<std::remove_cvref_t<M>> auc_covariance delong_covariance(const T& truth,
                                                                                             const M& scores) {
    constexpr std::string_view who = "heldout::delong_covariance";
    using E = std::remove_cv_t<typename std::remove_cvref_t<M>::Scalar>;
    static_assert(detail::rankable_score_v<E>, "heldout: ranking measures take float or double scores");
    auto y = values_of(truth, who, "truth");
    const row_matrix<E> p{scores.data(), static_cast<std::size_t>(scores.rows()),
                          static_cast<std::size_t>(scores.cols()), static_cast<std::ptrdiff_t>(scores.rowStride()),
                          static_cast<std::ptrdiff_t>(scores.colStride())};
    if (p.cols == 0)
        detail::fail(who, "scores", "no columns (one column per model)");
    detail::check_same_size(who, "scores", y.size(), p.rows);
    // Columns copied to contiguous storage (any Eigen layout); the cost is small next to the sorts.
    std::vector<E> cols(p.rows * p.cols);
    std::vector<std::span<const E>> ms;
    std::vector<std::string> args;
    for (std::size_t j = 0; j < p.cols; ++j) {
        for (std::size_t i = 0; i < p.rows; ++i)
            cols[j * p.rows + i] = p(i, j);
        ms.emplace_back(cols.data() + j * p.rows, p.rows);
        args.push_back("scores column " + std::to_string(j));
    }
    return detail::delong_core<E>(who, y, ms, args);
}

HELDOUT_NAMESPACE_END
