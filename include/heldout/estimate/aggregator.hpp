// heldout/estimate/aggregator.hpp — records what each train/test split gave, and turns it
// into estimates with honest intervals.
//
//   heldout::aggregator agg(heldout::measure::mse{}, heldout::measure::mae{});
//   for (const heldout::split& s : heldout::repeated_kfold{.folds = 10, .repeats = 10}.splits(n)) {
//       std::vector<double> f = fit_predict(s.train, s.test);    // predictions for s.test, in order
//       agg.record(s, gather(y, s.test), f);                     // truth of the test rows, predictions
//   }
//   heldout::estimate e = agg.estimate(heldout::measure::mse{});  // corrected t: the valid default here
//   auto naive = agg.estimate(heldout::measure::mse{}, heldout::ci::naive_t);   // for contrast
//   std::cout << e << '\n';
//
// What is recorded per split: index, repeat, fold, train and test sizes, the test row
// numbers; per registered measure its value on the split (an undefined value is caught as
// heldout::undefined_error and kept with its reason), for pointwise measures the loss of
// every test row, and the pooled state over all test rows; and, unless
// keep_predictions(false), the truth and predictions of the test rows (the out-of-fold
// predictions), so that any measure can be estimated afterwards and one-test-set methods
// that need them (bootstrap, BCa, DeLong) can run.
//
// Predictions are stored as given: integral labels, real values, or class-probability rows
// (Eigen matrix or heldout::rows). A measure that cannot score what was recorded is refused
// at record() (or estimate()) with input_error — the check the compiler makes for
// heldout::evaluate happens here at run time, since the aggregator holds any measure.
//
// Pointwise measures: a measure whose value is the mean of its values on single rows
// (mean_loss<L>, and any measure that declares `static constexpr bool pointwise = true`,
// or for which heldout::enable_pointwise_losses<M> is specialised to true). Their per-row
// losses are what the t, binomial and .632 methods use.
//
// Methods and what they need (see ci.hpp): one split -> t, wilson, clopper_pearson,
// agresti_coull, bootstrap_percentile, bca, delong; several splits without replacement ->
// corrected_t (n_train, n_test = the mean recorded train and test sizes), naive_t; bootstrap
// plans (splits with counts) -> bootstrap_632, bootstrap_632_plus, which also need the
// apparent (resubstitution) result from record_apparent(). Anything else is refused with
// input_error saying why. Measures are identified by name().
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/measure.hpp>
#include <heldout/core/split.hpp>
#include <heldout/core/values.hpp>
#include <heldout/estimate/binomial_interval.hpp>
#include <heldout/estimate/bootstrap.hpp>
#include <heldout/estimate/bootstrap_632.hpp>
#include <heldout/estimate/ci.hpp>
#include <heldout/estimate/corrected_t.hpp>
#include <heldout/estimate/delong.hpp>
#include <heldout/estimate/estimate.hpp>
#include <heldout/estimate/t_interval.hpp>
#include <heldout/loss/squared.hpp>
#include <heldout/measure/auc.hpp>
#include <heldout/measure/classification_error.hpp>
#include <heldout/measure/mean_loss.hpp>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <memory>
#include <optional>
#include <ostream>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

namespace detail {
template <class M>
struct is_mean_loss : std::false_type {};
template <class L>
struct is_mean_loss<measure::mean_loss<L>> : std::true_type {};

template <class M>
constexpr bool declares_pointwise() {
    if constexpr (requires { M::pointwise; })
        return static_cast<bool>(M::pointwise);
    else
        return false;
}
} // namespace detail

/// Opt-in: measure M is the mean of its values on single rows (so per-row losses exist).
template <class M>
inline constexpr bool enable_pointwise_losses = detail::is_mean_loss<M>::value || detail::declares_pointwise<M>();

/// Classification error and accuracy are means of 0/1 per-row values.
template <>
inline constexpr bool enable_pointwise_losses<measure::classification_error> = true;
template <>
inline constexpr bool enable_pointwise_losses<measure::accuracy> = true;

/// Opt-in: measure M is the ROC AUC, for which ci::delong applies.
template <class M>
inline constexpr bool enable_delong = std::is_same_v<M, measure::auc>;

namespace detail {

/// What one column of recorded data holds.
enum class column_type : unsigned char { none, integral, real, rows };

inline std::string_view column_text(column_type c) {
    switch (c) {
    case column_type::integral:
        return "integral labels";
    case column_type::real:
        return "floating-point values";
    case column_type::rows:
        return "class-probability rows";
    case column_type::none:
        break;
    }
    return "nothing";
}

/// A read-only view of recorded rows of one column.
struct column_view {
    column_type type = column_type::none;
    std::size_t cols = 1;
    std::span<const std::int64_t> ints{};
    std::span<const double> reals{};

    std::size_t rows() const noexcept { return type == column_type::integral ? ints.size() : reals.size() / cols; }
    column_view slice(std::size_t first, std::size_t count) const noexcept {
        column_view v = *this;
        if (type == column_type::integral)
            v.ints = ints.subspan(first, count);
        else
            v.reals = reals.subspan(first * cols, count * cols);
        return v;
    }
};

/// Growing storage of one column (labels as int64, values and probability rows as double).
struct column_store {
    column_type type = column_type::none;
    std::size_t cols = 1;
    std::vector<std::int64_t> ints;
    std::vector<double> reals;

    std::size_t rows() const noexcept { return type == column_type::integral ? ints.size() : reals.size() / cols; }
    column_view view() const noexcept { return {type, cols, ints, reals}; }
    void clear() noexcept {
        ints.clear();
        reals.clear();
    }
};

/// Appends a truth or prediction range to a store (converting to int64 / double exactly).
template <class R>
void append_column(column_store& s, const R& r, std::string_view who, std::string_view arg) {
    column_type t = column_type::none;
    std::size_t cols = 1;
    if constexpr (probability_rows<R>) {
        t = column_type::rows;
        cols = rows_of(r).cols;
    } else if constexpr (label_range<R>) {
        t = column_type::integral;
    } else if constexpr (real_range<R>) {
        t = column_type::real;
    } else {
        static_assert(real_range<R>, "heldout::aggregator: truth and predictions are contiguous ranges of numbers, "
                                     "or class-probability rows (an Eigen matrix or heldout::rows)");
    }
    if (s.type != column_type::none && (s.type != t || s.cols != cols))
        fail(who, arg,
             std::string(column_text(t)) +
                 (t == column_type::rows ? " with " + std::to_string(cols) + " columns" : "") + " differ from the " +
                 std::string(column_text(s.type)) +
                 (s.type == column_type::rows ? " with " + std::to_string(s.cols) + " columns" : "") +
                 " recorded before");
    s.type = t;
    s.cols = cols;
    if constexpr (probability_rows<R>) {
        const auto m = rows_of(r);
        s.reals.reserve(s.reals.size() + m.rows * m.cols);
        for (std::size_t i = 0; i < m.rows; ++i)
            for (std::size_t j = 0; j < m.cols; ++j)
                s.reals.push_back(static_cast<double>(m(i, j)));
    } else if constexpr (label_range<R>) {
        auto v = values_of(r, who, arg);
        s.ints.reserve(s.ints.size() + v.size());
        for (std::size_t i = 0; i < v.size(); ++i) {
            if constexpr (std::is_unsigned_v<element_t<R>> && sizeof(element_t<R>) >= sizeof(std::int64_t))
                if (v[i] > static_cast<element_t<R>>(INT64_MAX))
                    fail_at(who, arg, "label too large", i);
            s.ints.push_back(static_cast<std::int64_t>(v[i]));
        }
    } else {
        auto v = values_of(r, who, arg);
        s.reals.insert(s.reals.end(), v.begin(), v.end());
    }
}

template <class R>
std::size_t range_rows(const R& r) {
    if constexpr (probability_rows<R>)
        return rows_of(r).rows;
    else
        return values_of(r).size();
}

/// Calls f with the typed view of a column: span<const int64>, span<const double> or row_matrix<double>.
template <class F>
void with_typed(const column_view& c, F&& f) {
    switch (c.type) {
    case column_type::integral:
        f(c.ints);
        return;
    case column_type::real:
        f(c.reals);
        return;
    case column_type::rows:
        f(row_matrix<double>{c.reals.data(), c.rows(), c.cols, static_cast<std::ptrdiff_t>(c.cols), 1});
        return;
    case column_type::none:
        break;
    }
    HELDOUT_ASSERT(false);
}

/// The kind of prediction measure M takes matches P (the same rule as heldout::evaluate).
template <class M, class P>
constexpr bool prediction_fits() {
    if constexpr (M::kind == prediction_kind::label)
        return label_range<P>;
    else if constexpr (M::kind == prediction_kind::class_probabilities)
        return probability_rows<P>;
    else
        return real_range<P>;
}

template <class M, class T, class P>
inline constexpr bool pairing_ok = !probability_rows<T> && prediction_fits<M, P>() && scores<M, T, P>;

template <class M>
[[noreturn]] void refuse_pairing(const M& m, const column_view& t, const column_view& p, std::string_view who) {
    fail(who, "predictions",
         "measure " + m.name() + " (needs " + std::string(to_string(M::kind)) + " predictions) cannot score " +
             std::string(column_text(p.type)) + " against truth given as " + std::string(column_text(t.type)));
}

/// Calls f(typed_truth, typed_prediction) when M can score that pairing; refuses otherwise.
template <class M, class F>
void with_pairing(const M& m, const column_view& t, const column_view& p, std::string_view who, F&& f) {
    with_typed(t, [&](const auto& tt) {
        with_typed(p, [&](const auto& pp) {
            using TT = std::remove_cvref_t<decltype(tt)>;
            using PP = std::remove_cvref_t<decltype(pp)>;
            if constexpr (pairing_ok<M, TT, PP>)
                f(tt, pp);
            else
                refuse_pairing(m, t, p, who);
        });
    });
}

/// "measure AUC: undefined: only one class" -> "only one class".
inline std::string undefined_reason(const undefined_error& e) {
    const std::string_view s = e.what();
    const auto k = s.find("undefined: ");
    return std::string(k == std::string_view::npos ? s : s.substr(k + 11));
}

/// Everything recorded for one measure; the typed part lives in measure_track<M>.
struct track_base {
    std::string name;
    bool pointwise = false;
    std::vector<std::optional<double>> values; // per split
    std::vector<std::string> reasons;          // per split, why undefined
    std::vector<double> losses;                // pointwise: per recorded test row, in record order
    bool has_apparent = false;
    std::optional<double> apparent; // measure on all rows, model fit on all rows
    std::string apparent_reason;    // why apparent is undefined
    std::vector<double> apparent_losses;

    virtual ~track_base() = default;
    virtual std::unique_ptr<track_base> clone() const = 0;
    /// Scores one split into the pending slot (may throw input_error; no state changes).
    virtual void prepare(const column_view& t, const column_view& p) = 0;
    /// Stores the pending split and adds its rows to the pooled state (cannot fail: the
    /// same rows passed prepare()).
    virtual void commit(const column_view& t, const column_view& p) = 0;
    virtual void set_apparent(const column_view& t, const column_view& p) = 0;
    /// The measure over all test rows so far, or empty with the reason.
    virtual std::optional<double> pooled(std::string& reason) const = 0;
};

template <class M>
struct measure_track final : track_base {
    using acc_t = accumulator_t<M>;
    M measure;
    acc_t scratch;
    acc_t all;
    std::optional<double> pending_value;
    std::string pending_reason;
    std::vector<double> pending_losses;

    explicit measure_track(const M& m) : measure(m), scratch(m.accumulator()), all(m.accumulator()) {
        name = m.name();
        pointwise = enable_pointwise_losses<M>;
    }
    std::unique_ptr<track_base> clone() const override { return std::make_unique<measure_track>(*this); }

    static constexpr std::string_view who = "heldout::aggregator::record";

    // Value on a set, per-row losses for pointwise measures.
    void score(const column_view& t, const column_view& p, std::optional<double>& value, std::string& reason,
               std::vector<double>& row_losses) {
        with_pairing(measure, t, p, who, [&](const auto& tt, const auto& pp) {
            scratch.reset();
            scratch.add(tt, pp); // bad input throws here, naming the measure
            try {
                value = scratch.value();
                reason.clear();
            } catch (const undefined_error& e) {
                value.reset();
                reason = undefined_reason(e);
            }
            row_losses.clear();
            if constexpr (enable_pointwise_losses<M>) {
                const std::size_t n = t.rows();
                row_losses.resize(n);
                if constexpr (is_mean_loss<M>::value) {
                    for (std::size_t i = 0; i < n; ++i)
                        row_losses[i] = measure.loss.value(static_cast<double>(tt[i]), static_cast<double>(pp[i]));
                } else {
                    // The measure on one row is that row's loss (the measure is a mean).
                    for (std::size_t i = 0; i < n; ++i) {
                        scratch.reset();
                        const column_view ti = t.slice(i, 1), pi = p.slice(i, 1);
                        with_pairing(measure, ti, pi, who, [&](const auto& t1, const auto& p1) {
                            scratch.add(t1, p1);
                            row_losses[i] = scratch.value();
                        });
                    }
                }
            }
        });
    }

    void prepare(const column_view& t, const column_view& p) override {
        score(t, p, pending_value, pending_reason, pending_losses);
    }
    void commit(const column_view& t, const column_view& p) override {
        values.push_back(pending_value);
        reasons.push_back(pending_reason);
        losses.insert(losses.end(), pending_losses.begin(), pending_losses.end());
        with_pairing(measure, t, p, who, [&](const auto& tt, const auto& pp) { all.add(tt, pp); });
    }
    void set_apparent(const column_view& t, const column_view& p) override {
        score(t, p, apparent, apparent_reason, apparent_losses);
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
};

} // namespace detail

namespace detail {

/// Gamma of Efron & Tibshirani (1997): the mean loss over all pairs (truth y_i, prediction
/// f_j) of the apparent fit. Squared error in closed form; label measures from the k x k
/// table of class pairs (exact, O(n + k^2)); other pointwise measures by the O(n^2) sum.
template <class M>
double no_information_of(const M& m, const column_view& t, const column_view& p) {
    constexpr std::string_view who = "heldout::aggregator::estimate";
    const std::size_t n = t.rows();
    double gamma = 0;
    if constexpr (is_mean_loss<M>::value) {
        with_pairing(m, t, p, who, [&](const auto& tt, const auto& pp) {
            std::vector<double> y(tt.begin(), tt.end());
            if constexpr (std::is_same_v<std::remove_cvref_t<decltype(m.loss)>, loss::squared>)
                gamma = no_information_squared_error(y, pp);
            else
                gamma = no_information_error(m.loss, y, pp);
        });
    } else if constexpr (M::kind == prediction_kind::label) {
        if (t.type != column_type::integral || p.type != column_type::integral)
            refuse_pairing(m, t, p, who);
        std::vector<std::int64_t> classes(t.ints.begin(), t.ints.end());
        classes.insert(classes.end(), p.ints.begin(), p.ints.end());
        std::sort(classes.begin(), classes.end());
        classes.erase(std::unique(classes.begin(), classes.end()), classes.end());
        const std::size_t k = classes.size();
        std::vector<double> pt(k, 0.0), pp(k, 0.0);
        auto at = [&](std::int64_t c) {
            return static_cast<std::size_t>(std::lower_bound(classes.begin(), classes.end(), c) - classes.begin());
        };
        for (std::size_t i = 0; i < n; ++i) {
            pt[at(t.ints[i])] += 1.0;
            pp[at(p.ints[i])] += 1.0;
        }
        auto acc = m.accumulator();
        compensated_sum s;
        for (std::size_t a = 0; a < k; ++a)
            for (std::size_t b = 0; b < k; ++b) {
                if (pt[a] == 0 || pp[b] == 0)
                    continue;
                const std::int64_t ya = classes[a], fb = classes[b];
                acc.reset();
                acc.add(std::span<const std::int64_t>(&ya, 1), std::span<const std::int64_t>(&fb, 1));
                s.add(pt[a] * pp[b] * acc.value());
            }
        gamma = s.value() / (static_cast<double>(n) * static_cast<double>(n));
    } else {
        auto acc = m.accumulator();
        compensated_sum s;
        for (std::size_t i = 0; i < n; ++i) {
            double row = 0;
            const column_view ti = t.slice(i, 1);
            for (std::size_t j = 0; j < n; ++j)
                with_pairing(m, ti, p.slice(j, 1), who, [&](const auto& t1, const auto& p1) {
                    acc.reset();
                    acc.add(t1, p1);
                    row += acc.value();
                });
            s.add(row);
        }
        gamma = s.value() / (static_cast<double>(n) * static_cast<double>(n));
    }
    return gamma;
}

} // namespace detail

/// Per-split bookkeeping: what the split was.
struct split_record {
    std::size_t index = 0;
    std::size_t repeat = 0;
    std::size_t fold = 0;
    std::size_t train_size = 0;
    std::size_t test_size = 0;
    bool bootstrap = false; ///< the split carried draw counts (a bootstrap plan)
    std::size_t rows = 0;   ///< bootstrap: n, the size of counts (rows of the data set)
    std::size_t offset = 0; ///< first position of this split's test rows in the recorded rows
};

/// Per-row losses of a pointwise measure on one split: row numbers and losses, aligned.
struct row_losses {
    std::span<const std::size_t> rows;
    std::span<const double> losses;
};

/// Kept truth or predictions of one split: integral labels in `labels`, or floating-point
/// values in `values` (class-probability rows: row-major, `cols` per row).
struct recorded_column {
    std::span<const std::int64_t> labels;
    std::span<const double> values;
    std::size_t cols = 1;
    bool integral() const noexcept { return !labels.empty(); }
};

/// What the recorded splits look like (which methods apply).
struct plan_shape {
    std::size_t splits = 0;
    std::size_t repeats = 0; ///< distinct repeat numbers
    bool bootstrap = false;  ///< some split carried draw counts
    double mean_train = 0;   ///< mean train size
    double mean_test = 0;    ///< mean test size
    bool sizes_vary = false; ///< train or test sizes differ between splits
};

/// Records splits and makes estimates; see the header comment.
class aggregator {
public:
    aggregator() = default;

    /// An aggregator tracking these measures from the first record on.
    template <outer_measure... Ms>
    explicit aggregator(const Ms&... ms) {
        (add_measure(ms), ...);
    }

    aggregator(const aggregator& o)
        : splits_(o.splits_), rows_(o.rows_), truth_(o.truth_), pred_(o.pred_), apparent_truth_(o.apparent_truth_),
          apparent_pred_(o.apparent_pred_), has_apparent_(o.has_apparent_), keep_(o.keep_), skipped_(o.skipped_) {
        for (const auto& t : o.tracks_)
            tracks_.push_back(t->clone());
    }
    aggregator& operator=(const aggregator& o) {
        if (this != &o) {
            aggregator c(o);
            *this = std::move(c);
        }
        return *this;
    }
    aggregator(aggregator&&) noexcept = default;
    aggregator& operator=(aggregator&&) noexcept = default;
    ~aggregator() = default;

    /// Tracks one more measure; splits recorded so far are replayed from the kept predictions.
    template <outer_measure M>
    void add_measure(const M& m) {
        constexpr std::string_view who = "heldout::aggregator::add_measure";
        const std::string name = m.name();
        if (find(name))
            detail::fail(who, "measure",
                         "a measure named '" + name + "' is already tracked (measures are identified by name())");
        if (!splits_.empty() && !keep_)
            detail::fail(who, "measure",
                         "splits were recorded without keeping predictions, so measure " + name +
                             " cannot be computed on them");
        auto tr = std::make_unique<detail::measure_track<M>>(m);
        replay(*tr);
        tracks_.push_back(std::move(tr));
    }

    /// Whether truth and predictions of the test rows are kept (default true); set it before
    /// the first record. Without them, estimates need measures tracked before recording, and
    /// the bootstrap and DeLong methods are refused.
    void keep_predictions(bool keep) {
        if (!splits_.empty() && keep != keep_)
            detail::fail("heldout::aggregator::keep_predictions", "keep",
                         "set before the first record (" + std::to_string(splits_.size()) + " splits recorded)");
        keep_ = keep;
    }
    bool keeps_predictions() const noexcept { return keep_; }

    /// Records one split: the truth of its test rows and the predictions for them, in the
    /// order of split.test (values, labels, or class-probability rows).
    template <class T, class P>
    void record(const split& s, const T& truth_of_test_rows, const P& predictions) {
        constexpr std::string_view who = "heldout::aggregator::record";
        const std::size_t n = s.test.size();
        if (n == 0 && !s.counts.empty()) {
            // A bootstrap replicate that drew every row has no out-of-bag rows: nothing to score.
            ++skipped_;
            return;
        }
        detail::check_nonempty(who, "split.test", n);
        detail::check_same_size(who, "truth", n, detail::range_rows(truth_of_test_rows), "split.test");
        detail::check_same_size(who, "predictions", n, detail::range_rows(predictions), "split.test");
        if (!s.counts.empty())
            for (std::size_t i = 0; i < n; ++i)
                if (s.test[i] >= s.counts.size())
                    detail::fail_at(who, "split.test",
                                    "row " + std::to_string(s.test[i]) + " outside the " +
                                        std::to_string(s.counts.size()) + " rows of split.counts",
                                    i);
        // Convert into scratch stores first: nothing changes if anything below throws.
        detail::column_store t, p;
        t.type = truth_.type;
        t.cols = truth_.cols;
        p.type = pred_.type;
        p.cols = pred_.cols;
        detail::append_column(t, truth_of_test_rows, who, "truth");
        detail::append_column(p, predictions, who, "predictions");
        if (t.type == detail::column_type::rows)
            detail::fail(who, "truth", "truth must be values or labels, not class-probability rows");
        for (auto& tr : tracks_)
            tr->prepare(t.view(), p.view());
        split_record r;
        r.index = s.index;
        r.repeat = s.repeat;
        r.fold = s.fold;
        r.train_size = s.train.size();
        r.test_size = n;
        r.bootstrap = !s.counts.empty();
        r.rows = s.counts.size();
        r.offset = rows_.size();
        for (auto& tr : tracks_)
            tr->commit(t.view(), p.view());
        splits_.push_back(r);
        rows_.insert(rows_.end(), s.test.begin(), s.test.end());
        truth_.type = t.type;
        truth_.cols = t.cols;
        pred_.type = p.type;
        pred_.cols = p.cols;
        if (keep_) {
            truth_.ints.insert(truth_.ints.end(), t.ints.begin(), t.ints.end());
            truth_.reals.insert(truth_.reals.end(), t.reals.begin(), t.reals.end());
            pred_.ints.insert(pred_.ints.end(), p.ints.begin(), p.ints.end());
            pred_.reals.insert(pred_.reals.end(), p.reals.begin(), p.reals.end());
        }
    }

    /// Records the apparent (resubstitution) result: the model fit on all n rows, scored on
    /// all n rows in row order. The .632 estimators need it.
    template <class T, class P>
    void record_apparent(const T& truth, const P& predictions) {
        constexpr std::string_view who = "heldout::aggregator::record_apparent";
        const std::size_t n = detail::range_rows(truth);
        detail::check_nonempty(who, "truth", n);
        detail::check_same_size(who, "predictions", n, detail::range_rows(predictions));
        detail::column_store t, p;
        t.type = truth_.type;
        t.cols = truth_.cols;
        p.type = pred_.type;
        p.cols = pred_.cols;
        detail::append_column(t, truth, who, "truth");
        detail::append_column(p, predictions, who, "predictions");
        std::vector<std::unique_ptr<detail::track_base>> copies;
        for (auto& tr : tracks_) {
            copies.push_back(tr->clone());
            copies.back()->set_apparent(t.view(), p.view());
        }
        tracks_ = std::move(copies);
        has_apparent_ = true;
        // Kept whatever keep_predictions says: one copy of n rows, and the .632+
        // no-information error is computed from it.
        apparent_truth_ = std::move(t);
        apparent_pred_ = std::move(p);
    }

    /// Number of splits recorded.
    std::size_t size() const noexcept { return splits_.size(); }
    bool empty() const noexcept { return splits_.empty(); }
    const std::vector<split_record>& splits() const noexcept { return splits_; }
    /// Test row numbers of split i, in record order.
    std::span<const std::size_t> test_rows(std::size_t i) const {
        const auto& r = splits_.at(i);
        return std::span<const std::size_t>(rows_).subspan(r.offset, r.test_size);
    }
    /// Names of the tracked measures, in the order they were added.
    std::vector<std::string> measures() const {
        std::vector<std::string> v;
        for (const auto& t : tracks_)
            v.push_back(t->name);
        return v;
    }
    bool has_apparent() const noexcept { return has_apparent_; }
    /// Kept truth of split i's test rows (input_error when predictions were not kept).
    recorded_column truth_of(std::size_t i) const { return kept(truth_, i, "truth_of"); }
    /// Kept predictions for split i's test rows, in test-row order.
    recorded_column predictions_of(std::size_t i) const { return kept(pred_, i, "predictions_of"); }
    /// Bootstrap splits skipped because they had no out-of-bag rows.
    std::size_t skipped() const noexcept { return skipped_; }

    /// What the recorded splits look like.
    plan_shape shape() const {
        plan_shape sh;
        sh.splits = splits_.size();
        if (splits_.empty())
            return sh;
        std::vector<std::size_t> reps;
        double tr = 0, te = 0;
        for (const auto& s : splits_) {
            reps.push_back(s.repeat);
            tr += static_cast<double>(s.train_size);
            te += static_cast<double>(s.test_size);
            sh.bootstrap = sh.bootstrap || s.bootstrap;
            sh.sizes_vary =
                sh.sizes_vary || s.train_size != splits_[0].train_size || s.test_size != splits_[0].test_size;
        }
        std::sort(reps.begin(), reps.end());
        sh.repeats = static_cast<std::size_t>(std::unique(reps.begin(), reps.end()) - reps.begin());
        sh.mean_train = tr / static_cast<double>(splits_.size());
        sh.mean_test = te / static_cast<double>(splits_.size());
        return sh;
    }

    /// Per-split values of measure m (absent where undefined, with the reason).
    template <outer_measure M>
    std::vector<split_value> split_values(const M& m) const {
        const auto held = track_for(m, "heldout::aggregator::split_values");
        return per_split(*held.get());
    }

    /// Per-row losses of pointwise measure m on split i (rows and losses aligned).
    template <outer_measure M>
    row_losses losses(const M& m, std::size_t i) const {
        constexpr std::string_view who = "heldout::aggregator::losses";
        static_assert(enable_pointwise_losses<M>, "heldout::aggregator::losses: the measure is not pointwise (not a "
                                                  "mean of per-row losses)");
        const auto* t = find(m.name());
        if (!t)
            detail::fail(who, "measure",
                         "measure " + m.name() + " is not tracked (per-row losses are kept for tracked measures)");
        const auto& r = splits_.at(i);
        return {std::span<const std::size_t>(rows_).subspan(r.offset, r.test_size),
                std::span<const double>(t->losses).subspan(r.offset, r.test_size)};
    }

    /// The estimate of measure m by method at the given level (see ci.hpp for the methods).
    template <outer_measure M>
    heldout::estimate estimate(const M& m, ci::method method = ci::automatic, double level = 0.95) const;

    /// The out-of-fold predictions as CSV: split,repeat,fold,row,truth,prediction (one
    /// prediction column per class for probability rows). Needs kept predictions.
    void write_predictions_csv(std::ostream& os) const {
        if (!keep_)
            detail::fail("heldout::aggregator::write_predictions_csv", "", "predictions were not kept");
        os << "split,repeat,fold,row,truth";
        if (pred_.type == detail::column_type::rows)
            for (std::size_t j = 0; j < pred_.cols; ++j)
                os << ",prediction_" << j;
        else
            os << ",prediction";
        os << '\n';
        for (const auto& s : splits_)
            for (std::size_t i = 0; i < s.test_size; ++i) {
                const std::size_t k = s.offset + i;
                os << s.index << ',' << s.repeat << ',' << s.fold << ',' << rows_[k] << ',' << cell(truth_, k, 0);
                for (std::size_t j = 0; j < pred_.cols; ++j)
                    os << ',' << cell(pred_, k, j);
                os << '\n';
            }
    }

private:
    static std::string cell(const detail::column_store& c, std::size_t row, std::size_t col) {
        if (c.type == detail::column_type::integral)
            return std::to_string(c.ints[row]);
        return detail::shortest_text(c.reals[row * c.cols + col]);
    }

    recorded_column kept(const detail::column_store& c, std::size_t i, std::string_view fn) const {
        if (!keep_)
            detail::fail("heldout::aggregator::" + std::string(fn), "", "predictions were not kept");
        const auto& r = splits_.at(i);
        const auto v = c.view().slice(r.offset, r.test_size);
        return {v.ints, v.reals, c.cols};
    }

    /// Feeds a new track every kept split (and the apparent result).
    void replay(detail::track_base& tr) const {
        for (const auto& s : splits_) {
            const auto tv = truth_.view().slice(s.offset, s.test_size);
            const auto pv = pred_.view().slice(s.offset, s.test_size);
            tr.prepare(tv, pv);
            tr.commit(tv, pv);
        }
        if (has_apparent_)
            tr.set_apparent(apparent_truth_.view(), apparent_pred_.view());
    }

    const detail::track_base* find(const std::string& name) const {
        for (const auto& t : tracks_)
            if (t->name == name)
                return t.get();
        return nullptr;
    }

    /// The track of m: the tracked one, or one replayed from the kept predictions.
    template <outer_measure M>
    std::shared_ptr<const detail::track_base> track_for(const M& m, std::string_view who) const;

    std::vector<split_value> per_split(const detail::track_base& t) const {
        std::vector<split_value> v;
        v.reserve(splits_.size());
        for (std::size_t i = 0; i < splits_.size(); ++i) {
            const auto& s = splits_[i];
            v.push_back({s.index, s.repeat, s.fold, s.train_size, s.test_size, t.values[i], t.reasons[i]});
        }
        return v;
    }

    std::vector<std::unique_ptr<detail::track_base>> tracks_;
    std::vector<split_record> splits_;
    std::vector<std::size_t> rows_;
    detail::column_store truth_, pred_;
    detail::column_store apparent_truth_, apparent_pred_;
    bool has_apparent_ = false;
    bool keep_ = true;
    std::size_t skipped_ = 0;
};

namespace detail {

inline std::string count_text(std::size_t k, std::string_view what) {
    const bool es = !what.empty() && what.back() == 's';
    return std::to_string(k) + " " + std::string(what) + (k == 1 ? "" : es ? "es" : "s");
}

/// Groups the reasons of undefined splits: "3 of 50 splits undefined: only one class".
inline std::vector<std::string> undefined_notes(const track_base& t) {
    std::vector<std::pair<std::string, std::size_t>> groups;
    for (std::size_t i = 0; i < t.values.size(); ++i) {
        if (t.values[i])
            continue;
        auto it = std::find_if(groups.begin(), groups.end(), [&](const auto& g) { return g.first == t.reasons[i]; });
        if (it == groups.end())
            groups.emplace_back(t.reasons[i], 1);
        else
            ++it->second;
    }
    std::vector<std::string> notes;
    for (const auto& [reason, k] : groups)
        notes.push_back(std::to_string(k) + " of " + count_text(t.values.size(), "split") + " undefined: " + reason);
    return notes;
}

inline std::string method_name(const ci::method& m) { return "ci::" + std::string(ci::id_text(m.id)); }

inline double mean_of(std::span<const double> v) {
    compensated_sum s;
    for (double x : v)
        s.add(x);
    return s.value() / static_cast<double>(v.size());
}

inline double sd_of(std::span<const double> v) {
    return two_pass_mean_variance(v).root(1.0); // finite for values near +-1e308 too
}

} // namespace detail

template <outer_measure M>
std::shared_ptr<const detail::track_base> aggregator::track_for(const M& m, std::string_view who) const {
    const std::string name = m.name();
    if (const auto* t = find(name)) {
        if (!dynamic_cast<const detail::measure_track<M>*>(t))
            detail::fail(who, "measure", "the tracked measure named '" + name + "' is of a different type");
        return std::shared_ptr<const detail::track_base>(std::shared_ptr<const detail::track_base>(), t);
    }
    if (!keep_)
        detail::fail(who, "measure",
                     "measure " + name +
                         " was not tracked and predictions were not kept: give it to the aggregator before "
                         "recording, or keep predictions");
    auto tr = std::make_shared<detail::measure_track<M>>(m);
    replay(*tr);
    return tr;
}

template <outer_measure M>
heldout::estimate aggregator::estimate(const M& m, ci::method method, double level) const {
    constexpr std::string_view who = "heldout::aggregator::estimate";
    detail::check_level(who, level);
    if (splits_.empty())
        detail::fail(who, "", "no splits recorded");
    const auto held = track_for(m, who);
    const auto& tr = static_cast<const detail::measure_track<M>&>(*held);
    const M& meas = tr.measure;
    const plan_shape sh = shape();

    heldout::estimate e;
    e.measure = tr.name;
    e.level = level;
    e.per_split = per_split(tr);
    e.notes = detail::undefined_notes(tr);
    if (skipped_ > 0)
        e.notes.push_back(detail::count_text(skipped_, "bootstrap split") + " with no out-of-bag rows skipped");

    std::vector<double> vals;
    double train_sum = 0, test_sum = 0;
    for (std::size_t i = 0; i < splits_.size(); ++i)
        if (tr.values[i]) {
            vals.push_back(*tr.values[i]);
            e.observations += splits_[i].test_size;
            train_sum += static_cast<double>(splits_[i].train_size);
            test_sum += static_cast<double>(splits_[i].test_size);
        }
    if (vals.empty()) {
        std::string why;
        for (const auto& n : e.notes)
            why += (why.empty() ? "" : "; ") + n;
        detail::fail_undefined(who, "measure " + tr.name + " is undefined on every split (" + why + ")");
    }
    e.splits = vals.size();
    e.value = detail::mean_of(vals);
    {
        std::string reason;
        e.pooled = tr.pooled(reason);
        if (!e.pooled)
            e.notes.push_back("pooled value undefined: " + reason);
    }

    // Whether every per-row loss is 0 or 1 (an error rate or accuracy), and the first that is not.
    auto first_non_binary = [&]() -> std::optional<std::size_t> {
        for (std::size_t i = 0; i < tr.losses.size(); ++i)
            if (tr.losses[i] != 0.0 && tr.losses[i] != 1.0)
                return i;
        return std::nullopt;
    };

    ci::method_id id = method.id;
    if (id == ci::method_id::automatic) {
        if (sh.bootstrap)
            id = ci::method_id::bootstrap_632_plus;
        else if (sh.splits > 1)
            id = ci::method_id::corrected_t;
        else if (tr.pointwise && !first_non_binary())
            id = ci::method_id::wilson;
        else if (enable_delong<M>)
            id = ci::method_id::delong;
        else if (tr.pointwise)
            id = ci::method_id::t;
        else
            id = ci::method_id::bca;
    }
    e.method = id;
    e.method_label = std::string(ci::label(id));
    const std::string mname = detail::method_name(ci::method{id});

    const bool one_set = id == ci::method_id::t || id == ci::method_id::wilson ||
                         id == ci::method_id::clopper_pearson || id == ci::method_id::agresti_coull ||
                         id == ci::method_id::bootstrap_percentile || id == ci::method_id::bca ||
                         id == ci::method_id::delong;
    if (one_set && sh.splits > 1)
        detail::fail(who, "method",
                     mname + " computes an interval from one test set of independent rows, but " +
                         detail::count_text(sh.splits, "split") +
                         " were recorded: pooled out-of-fold predictions are dependent (rows of a test set share "
                         "one fitted model, and the models share training rows), so the interval would be too "
                         "narrow; use " +
                         (sh.bootstrap ? "ci::bootstrap_632_plus" : "ci::corrected_t") + " (the default here)");
    const bool needs_losses = id == ci::method_id::t || id == ci::method_id::wilson ||
                              id == ci::method_id::clopper_pearson || id == ci::method_id::agresti_coull ||
                              id == ci::method_id::bootstrap_632 || id == ci::method_id::bootstrap_632_plus;
    if (needs_losses && !tr.pointwise)
        detail::fail(who, "method",
                     mname + " needs per-row losses, and measure " + tr.name +
                         " is not a mean of per-row losses; use " +
                         (enable_delong<M> ? "ci::delong, ci::bca or ci::bootstrap_percentile"
                                           : "ci::bca or ci::bootstrap_percentile") +
                         (sh.splits > 1 ? " on one test set, or ci::corrected_t over splits" : ""));

    switch (id) {
    case ci::method_id::t: {
        const auto r = t_interval(std::span<const double>(tr.losses), level);
        e.se = r.se;
        e.lower = r.lower;
        e.upper = r.upper;
        e.notes.push_back("Student t interval on the " + detail::count_text(r.n, "per-row loss") + ", df " +
                          std::to_string(r.n - 1));
        break;
    }
    case ci::method_id::wilson:
    case ci::method_id::clopper_pearson:
    case ci::method_id::agresti_coull: {
        if (const auto bad = first_non_binary())
            detail::fail(who, "method",
                         mname + " needs 0/1 losses (an error rate or accuracy); measure " + tr.name + " has loss " +
                             detail::number_text(tr.losses[*bad]) + " at row " + std::to_string(rows_[*bad]) +
                             "; use ci::t or ci::bca");
        std::uint64_t k = 0;
        for (double x : tr.losses)
            k += x == 1.0 ? 1 : 0;
        const std::uint64_t n = tr.losses.size();
        const proportion_interval r = id == ci::method_id::wilson            ? wilson_interval(k, n, level)
                                      : id == ci::method_id::clopper_pearson ? clopper_pearson_interval(k, n, level)
                                                                             : agresti_coull_interval(k, n, level);
        const double p = static_cast<double>(k) / static_cast<double>(n);
        e.se = std::sqrt(p * (1.0 - p) / static_cast<double>(n));
        e.lower = r.lower;
        e.upper = r.upper;
        e.notes.push_back(std::string(ci::label(id)) + " interval for " + std::to_string(k) + " of " +
                          detail::count_text(n, "row") + "; se is the binomial sqrt(p(1-p)/n)");
        break;
    }
    case ci::method_id::bootstrap_percentile:
    case ci::method_id::bca: {
        if (!keep_)
            detail::fail(who, "method",
                         mname + " resamples the test rows and needs the predictions, which were not kept");
        const auto tv = truth_.view().slice(0, splits_[0].test_size);
        const auto pv = pred_.view().slice(0, splits_[0].test_size);
        const bootstrap_options o{method.replicates, method.seed, level};
        detail::with_pairing(meas, tv, pv, who, [&](const auto& tt, const auto& pp) {
            using TT = std::remove_cvref_t<decltype(tt)>;
            using PP = std::remove_cvref_t<decltype(pp)>;
            if constexpr (scores_weighted<M, TT, PP, std::span<const std::uint32_t>>) {
                auto set = bootstrap_replicates(meas, tt, pp, o);
                if (set.values.size() < 2)
                    detail::fail_undefined(who, std::to_string(set.undefined) + " of " + std::to_string(o.replicates) +
                                                    " bootstrap replicates are undefined; fewer than 2 remain");
                const double theta = *tr.values[0];
                const bootstrap_result r = id == ci::method_id::bca
                                               ? bca_interval(theta, set.values, jackknife_values(meas, tt, pp), level)
                                               : percentile_interval(theta, set.values, level);
                e.se = detail::sd_of(set.values);
                e.lower = r.lower;
                e.upper = r.upper;
                std::string note =
                    std::string(ci::label(id)) + " over the " + detail::count_text(splits_[0].test_size, "test row") +
                    ", the model held fixed: " + std::to_string(set.values.size()) + " replicates, seed " +
                    std::to_string(method.seed) + "; se is the replicates' standard deviation";
                if (id == ci::method_id::bca)
                    note +=
                        "; z0 " + detail::number_text(r.z0) + ", acceleration " + detail::number_text(r.acceleration);
                e.notes.push_back(note);
                if (set.undefined > 0)
                    e.notes.push_back(std::to_string(set.undefined) + " of " + std::to_string(o.replicates) +
                                      " bootstrap replicates undefined and left out");
            } else {
                detail::fail(who, "method", "measure " + tr.name + " has no weighted add, which " + mname + " needs");
            }
        });
        break;
    }
    case ci::method_id::delong: {
        if constexpr (enable_delong<M>) {
            if (!keep_)
                detail::fail(who, "method", "ci::delong needs the scores, and predictions were not kept");
            const auto tv = truth_.view().slice(0, splits_[0].test_size);
            const auto pv = pred_.view().slice(0, splits_[0].test_size);
            detail::with_pairing(meas, tv, pv, who, [&](const auto& tt, const auto& pp) {
                using TT = std::remove_cvref_t<decltype(tt)>;
                using PP = std::remove_cvref_t<decltype(pp)>;
                if constexpr (label_range<TT> && real_range<PP>) {
                    const auto r = delong_auc(tt, pp, level);
                    e.se = r.se;
                    e.lower = r.lower;
                    e.upper = r.upper;
                } else {
                    detail::fail(who, "method", "ci::delong needs 0/1 labels as truth and real-valued scores");
                }
            });
            e.notes.push_back("DeLong (1988) standard error of the AUC on " +
                              detail::count_text(splits_[0].test_size, "test row") +
                              "; interval on the logit scale, transformed back");
        } else {
            detail::fail(who, "method",
                         "ci::delong is the DeLong interval of the ROC AUC; measure " + tr.name +
                             " is not an AUC: use ci::bca or ci::bootstrap_percentile");
        }
        break;
    }
    case ci::method_id::corrected_t:
    case ci::method_id::naive_t: {
        if (sh.splits < 2)
            detail::fail(who, "method",
                         mname + " works over several splits; one test set was recorded: use ci::t or ci::wilson "
                                 "(pointwise losses), ci::bca, or ci::delong (AUC)");
        if (id == ci::method_id::corrected_t && sh.bootstrap)
            detail::fail(who, "method",
                         "ci::corrected_t (Nadeau-Bengio) is for splits drawn without replacement (k-fold, repeated "
                         "k-fold, subsampling); the recorded splits are bootstrap samples: use "
                         "ci::bootstrap_632_plus");
        if (vals.size() < 2)
            detail::fail_undefined(who, "only one split has a defined value; " + mname + " needs two or more");
        if (id == ci::method_id::corrected_t) {
            const double n_train = train_sum / static_cast<double>(vals.size());
            const double n_test = test_sum / static_cast<double>(vals.size());
            const auto r = corrected_resampled_t(vals, n_train, n_test, level);
            e.se = r.se;
            e.lower = r.lower;
            e.upper = r.upper;
            e.notes.push_back("Nadeau-Bengio corrected resampled t over " + detail::count_text(vals.size(), "split") +
                              ": variance factor 1/J + n_test/n_train with n_train " + detail::number_text(n_train) +
                              ", n_test " + detail::number_text(n_test) +
                              (sh.sizes_vary ? " (mean sizes over the splits)" : "") + "; df " +
                              std::to_string(vals.size() - 1));
        } else {
            const auto r = naive_resampled_t(vals, level);
            e.se = r.se;
            e.lower = r.lower;
            e.upper = r.upper;
            e.notes.push_back("naive t over " + detail::count_text(vals.size(), "split") +
                              " treats them as independent; splits share training rows, so it is known to "
                              "undercover (Nadeau & Bengio 2003): use ci::corrected_t");
        }
        break;
    }
    case ci::method_id::bootstrap_632:
    case ci::method_id::bootstrap_632_plus: {
        for (const auto& s : splits_)
            if (!s.bootstrap)
                detail::fail(who, "method",
                             mname + " combines out-of-bag errors of bootstrap splits with the apparent error; split " +
                                 std::to_string(s.index) + " carries no draw counts (not a bootstrap split)");
        if constexpr (M::better != direction::lower_is_better)
            detail::fail(who, "method",
                         mname + " estimates an error (lower is better); measure " + tr.name + " is higher-is-better");
        if (!tr.has_apparent)
            detail::fail(who, "method",
                         mname + " needs the apparent error: call record_apparent(truth, predictions) with the model "
                                 "fit on all rows scored on all rows (evaluate_splits does this for bootstrap plans)");
        const std::size_t n = splits_[0].rows;
        for (const auto& s : splits_)
            if (s.rows != n)
                detail::fail(who, "method", "bootstrap splits over different numbers of rows");
        if (apparent_truth_.rows() != n)
            detail::fail(who, "method",
                         "the apparent result covers " + std::to_string(apparent_truth_.rows()) +
                             " rows, the bootstrap splits " + std::to_string(n));
        out_of_bag_losses oob(n);
        for (const auto& s : splits_)
            oob.add(std::span<const std::size_t>(rows_).subspan(s.offset, s.test_size),
                    std::span<const double>(tr.losses).subspan(s.offset, s.test_size));
        const double err1 = oob.leave_one_out_error();
        const double gamma = detail::no_information_of(meas, apparent_truth_.view(), apparent_pred_.view());
        if (!tr.apparent)
            detail::fail_undefined(who, "the apparent error is undefined: " + tr.apparent_reason);
        const auto r = bootstrap_632(*tr.apparent, err1, gamma);
        e.value = id == ci::method_id::bootstrap_632 ? r.err_632 : r.err_632_plus;
        e.notes.push_back("point estimate (no interval): apparent " + detail::number_text(r.apparent) +
                          ", leave-one-out bootstrap " + detail::number_text(err1) + ", no-information " +
                          detail::number_text(gamma) +
                          (id == ci::method_id::bootstrap_632_plus
                               ? ", relative overfitting " + detail::number_text(r.relative_overfitting) + ", weight " +
                                     detail::number_text(r.weight)
                               : std::string(", weight 0.632")) +
                          "; mean of the per-split out-of-bag values " + detail::number_text(detail::mean_of(vals)));
        if (const std::size_t never = oob.never_out_of_bag(); never > 0)
            e.notes.push_back(detail::count_text(never, "row") + " never out of bag, left out of the leave-one-out "
                                                                 "bootstrap error");
        break;
    }
    case ci::method_id::automatic:
        HELDOUT_ASSERT(false);
        break;
    }
    return e;
}

HELDOUT_NAMESPACE_END
