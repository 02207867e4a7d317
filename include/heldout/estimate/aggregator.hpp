// heldout/estimate/aggregator.hpp — records what each train/test split gave, and turns it
// into estimates with honest intervals.
//
//   heldout::aggregator agg(heldout::measure::mse{}, heldout::measure::mae{});
//   for (const heldout::split& s : heldout::repeated_kfold{.folds = 10, .repeats = 10}.splits(n)) {
//       std::vector<double> f = fit_predict(s.train, s.test);    // predictions for s.test, in order
//       agg.record(s, gather(y, s.test), f);                     // truth of the test rows, predictions
//   }
//   agg.set_model("ridge");                                      // its name in estimates, comparisons, CSV
//   heldout::estimate e = agg.estimate(heldout::measure::mse{});  // corrected t: the valid default here
//   auto naive = agg.estimate(heldout::measure::mse{}, heldout::ci::naive_t);   // for contrast
//   std::cout << e << '\n';
//
// What is recorded per split: index, repeat, fold, design, train and test sizes, the test
// row numbers; per tracked measure its value on the split (an undefined value is caught as
// heldout::undefined_error and kept with its reason), for measures with cap::row_losses the
// value of every test row, and the pooled state over all test rows; and, unless
// keep_predictions(false), the truth and predictions of the test rows (the out-of-fold
// predictions), which one-test-set methods need (bootstrap, BCa, DeLong) and from which a
// measure added later is computed.
//
// Measures are identified by type and parameters (heldout::same_measure), never by name:
// estimate(m), split_values(m), losses(m, i) and compare() answer only for a measure tracked
// with exactly those parameters, and refuse any other with input_error listing the tracked
// ones; add_measure(m) tracks a new one (replaying the kept predictions), so classification
// error at threshold 0.3 and at 0.5 are two measures. Two tracked measures never print
// alike (add_measure refuses a measure whose name() equals a tracked one's).
//
// Predictions are stored as given: integral labels, real values, class-probability rows
// (Eigen matrix or heldout::rows), or whatever another family records (column_traits). A
// measure that cannot score what was recorded is refused at record() or add_measure() with
// input_error — the check the compiler makes for heldout::evaluate happens here at run
// time, since the aggregator holds any measure.
//
// Which interval method applies is decided by the one table in estimate/methods.hpp (the
// design of the splits, and what the measure offers); ci::automatic picks its default there
// and refuses, listing the methods that apply and why, when no valid default exists
// (leave-one-out, time-ordered and purged splits).
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/measure.hpp>
#include <heldout/core/split.hpp>
#include <heldout/core/values.hpp>
#include <heldout/detail/columns.hpp>
#include <heldout/detail/tracks.hpp>
#include <heldout/estimate/ci.hpp>
#include <heldout/estimate/estimate.hpp>
#include <heldout/estimate/estimators.hpp>
#include <heldout/estimate/methods.hpp>
#include <heldout/estimate/t_interval.hpp>

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

/// Per-row values of a measure with cap::row_losses on one split: row numbers and values, aligned.
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
    std::size_t repeats = 0;                    ///< distinct repeat numbers
    bool bootstrap = false;                     ///< some split carried draw counts
    double mean_train = 0;                      ///< mean train size
    double mean_test = 0;                       ///< mean test size
    bool sizes_vary = false;                    ///< train or test sizes differ between splits
    split_design design = split_design::random; ///< the design of the splits (of the first, when mixed)
    bool mixed_designs = false;                 ///< splits of several designs
};

class aggregator;

namespace detail {
struct aggregator_access;
}

/// Records splits and makes estimates; see the header comment.
class aggregator {
public:
    aggregator() = default;

    /// An aggregator tracking these measures from the first record on.
    // At least one measure, and never an aggregator: checked first, so that asking whether an
    // aggregator is copyable does not ask whether an aggregator is a measure (clang recurses).
    template <class M0, class... Ms>
    requires(!std::is_same_v<std::remove_cvref_t<M0>, aggregator>) && outer_measure<M0> &&
        (outer_measure<Ms> && ...) explicit aggregator(const M0& m0, const Ms&... ms) {
        add_measure(m0);
        (add_measure(ms), ...);
    }

    aggregator(const aggregator& o)
        : splits_(o.splits_), rows_(o.rows_), truth_(copy(o.truth_)), pred_(copy(o.pred_)),
          apparent_truth_(copy(o.apparent_truth_)), apparent_pred_(copy(o.apparent_pred_)),
          has_apparent_(o.has_apparent_), keep_(o.keep_), skipped_(o.skipped_), model_(o.model_) {
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
        static_assert(check_measure<M>());
        constexpr std::string_view who = "heldout::aggregator::add_measure";
        const std::string name = m.name();
        if (find(m))
            detail::fail(who, "measure", "measure " + name + " is already tracked (with the same parameters)");
        for (const auto& t : tracks_)
            if (t->name == name)
                detail::fail(who, "measure",
                             "a different measure tracked here already prints as '" + name +
                                 "': two tracked measures must print differently (show the parameters in name())");
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

    /// Names the model whose predictions are recorded: estimates carry the name (estimate::model),
    /// compare() and compare_all_pairs use it for A and B, and the predictions CSV names its
    /// column after it. Empty (the default): unnamed.
    void set_model(std::string name) { model_ = std::move(name); }
    const std::string& model() const noexcept { return model_; }

    /// Records one split: the truth of its test rows and the predictions for them, in the
    /// order of split.test (values, labels, class-probability rows, or another family's view).
    template <class T, class P>
    void record(const split& s, const T& truth_of_test_rows, const P& predictions) {
        constexpr std::string_view who = "heldout::aggregator::record";
        static_assert(recordable<T>, "heldout::aggregator: the truth is a contiguous range of numbers, or a view "
                                     "another family records (heldout::column_traits)");
        static_assert(recordable<P>, "heldout::aggregator: predictions are contiguous ranges of numbers, "
                                     "class-probability rows (an Eigen matrix or heldout::rows), or a view another "
                                     "family records (heldout::column_traits)");
        const std::size_t n = s.test.size();
        if (n == 0 && !s.counts.empty()) {
            // A bootstrap replicate that drew every row has no out-of-bag rows: nothing to score.
            ++skipped_;
            return;
        }
        detail::check_nonempty(who, "split.test", n);
        detail::check_same_size(who, "truth", n, detail::input_rows(truth_of_test_rows), "split.test");
        detail::check_same_size(who, "predictions", n, detail::input_rows(predictions), "split.test");
        if (!s.counts.empty())
            for (std::size_t i = 0; i < n; ++i)
                if (s.test[i] >= s.counts.size())
                    detail::fail_at(who, "split.test",
                                    "row " + std::to_string(s.test[i]) + " outside the " +
                                        std::to_string(s.counts.size()) + " rows of split.counts",
                                    i);
        // Convert into new columns first: nothing changes if anything below throws.
        auto t = detail::make_column(truth_of_test_rows, who, "truth");
        auto p = detail::make_column(predictions, who, "predictions");
        if (std::is_same_v<typename column_traits<std::remove_cvref_t<T>>::column, detail::rows_column>)
            detail::fail(who, "truth", "truth must be values or labels, not class-probability rows");
        check_layout(truth_, *t, who, "truth");
        check_layout(pred_, *p, who, "predictions");
        for (auto& tr : tracks_)
            tr->prepare(*t, *p, 0, n);
        split_record r;
        r.index = s.index;
        r.repeat = s.repeat;
        r.fold = s.fold;
        r.train_size = s.train.size();
        r.test_size = n;
        r.bootstrap = !s.counts.empty();
        r.rows = s.counts.size();
        r.offset = rows_.size();
        r.design = r.bootstrap ? split_design::bootstrap : s.design;
        for (auto& tr : tracks_)
            tr->commit(*t, *p, 0, n);
        splits_.push_back(r);
        rows_.insert(rows_.end(), s.test.begin(), s.test.end());
        keep(truth_, std::move(t));
        keep(pred_, std::move(p));
    }

    /// Records the apparent (resubstitution) result: the model fit on all n rows, scored on
    /// all n rows in row order. The .632 estimators need it.
    template <class T, class P>
    void record_apparent(const T& truth, const P& predictions) {
        constexpr std::string_view who = "heldout::aggregator::record_apparent";
        const std::size_t n = detail::input_rows(truth);
        detail::check_nonempty(who, "truth", n);
        detail::check_same_size(who, "predictions", n, detail::input_rows(predictions));
        auto t = detail::make_column(truth, who, "truth");
        auto p = detail::make_column(predictions, who, "predictions");
        check_layout(truth_, *t, who, "truth");
        check_layout(pred_, *p, who, "predictions");
        std::vector<std::unique_ptr<detail::track_base>> copies;
        for (auto& tr : tracks_) {
            copies.push_back(tr->clone());
            copies.back()->set_apparent(*t, *p);
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
    /// Whether measure m is tracked (same type and parameters).
    template <outer_measure M>
    bool tracks(const M& m) const {
        return find(m) != nullptr;
    }
    bool has_apparent() const noexcept { return has_apparent_; }
    /// Kept truth of split i's test rows (input_error when predictions were not kept).
    recorded_column truth_of(std::size_t i) const { return kept(truth_.get(), i, "truth_of"); }
    /// Kept predictions for split i's test rows, in test-row order.
    recorded_column predictions_of(std::size_t i) const { return kept(pred_.get(), i, "predictions_of"); }
    /// The kept truth of split i as a view of type V (a family's own view; see column_traits).
    template <class V>
    V truth_view(std::size_t i) const {
        return typed_view<V>(truth_.get(), i, "truth_view");
    }
    template <class V>
    V predictions_view(std::size_t i) const {
        return typed_view<V>(pred_.get(), i, "predictions_view");
    }
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
        sh.design = splits_[0].design;
        for (const auto& s : splits_) {
            reps.push_back(s.repeat);
            tr += static_cast<double>(s.train_size);
            te += static_cast<double>(s.test_size);
            sh.bootstrap = sh.bootstrap || s.bootstrap;
            sh.mixed_designs = sh.mixed_designs || s.design != sh.design;
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
        return per_split(track_for(m, "heldout::aggregator::split_values"));
    }

    /// Per-row values of measure m (cap::row_losses) on split i (rows and values aligned).
    template <outer_measure M>
    row_losses losses(const M& m, std::size_t i) const {
        static_assert(offers_v<M, cap::row_losses>, "heldout::aggregator::losses: the measure has no per-row values "
                                                    "(it does not offer heldout::cap::row_losses)");
        const auto& t = track_for(m, "heldout::aggregator::losses");
        const auto& r = splits_.at(i);
        return {std::span<const std::size_t>(rows_).subspan(r.offset, r.test_size),
                std::span<const double>(t.losses).subspan(r.offset, r.test_size)};
    }

    /// The estimate of measure m by method at the given level (see ci.hpp and methods.hpp).
    template <outer_measure M>
    heldout::estimate estimate(const M& m, ci::method method = ci::automatic, double level = 0.95) const;

    /// The record's shape as the method table sees it.
    record_shape method_shape() const {
        record_shape r;
        const plan_shape sh = shape();
        r.splits = sh.splits;
        r.design = sh.design;
        r.mixed_designs = sh.mixed_designs;
        r.bootstrap = sh.bootstrap;
        r.kept_predictions = keep_;
        r.apparent = has_apparent_;
        r.five_by_two = splits_.size() == 10;
        for (std::size_t i = 0; r.five_by_two && i < splits_.size(); ++i)
            r.five_by_two = splits_[i].repeat == i / 2 && splits_[i].fold == i % 2;
        // Leave-one-out splits made by hand are still leave-one-out.
        if (sh.splits > 1 && !sh.bootstrap && r.design == split_design::random &&
            std::all_of(splits_.begin(), splits_.end(), [](const split_record& s) { return s.test_size == 1; }))
            r.design = split_design::leave_one_out;
        return r;
    }

    /// The out-of-fold predictions as CSV: split,repeat,fold,row,truth,prediction (one
    /// prediction column per class for probability rows). Needs kept predictions. A named
    /// model's columns are named after it (NAME, or NAME:j per class); several models in one
    /// file: heldout::write_predictions_csv (estimate/predictions_csv.hpp).
    void write_predictions_csv(std::ostream& os) const {
        if (!keep_)
            detail::fail("heldout::aggregator::write_predictions_csv", "", "predictions were not kept");
        os << "split,repeat,fold,row,truth";
        const std::size_t cells = pred_ ? pred_->cells() : 1;
        const std::string column = model_.empty() ? std::string("prediction") : detail::csv_field(model_);
        const std::string sep = model_.empty() ? "_" : ":";
        if (cells > 1)
            for (std::size_t j = 0; j < cells; ++j)
                os << ','
                   << (model_.empty() ? column + sep + std::to_string(j)
                                      : detail::csv_field(model_ + sep + std::to_string(j)));
        else
            os << ',' << column;
        os << '\n';
        for (const auto& s : splits_)
            for (std::size_t i = 0; i < s.test_size; ++i) {
                const std::size_t k = s.offset + i;
                os << s.index << ',' << s.repeat << ',' << s.fold << ',' << rows_[k];
                for (std::size_t j = 0; j < truth_->cells(); ++j) {
                    os << ',';
                    truth_->write_cell(os, k, j);
                }
                for (std::size_t j = 0; j < cells; ++j) {
                    os << ',';
                    pred_->write_cell(os, k, j);
                }
                os << '\n';
            }
    }

private:
    friend struct detail::aggregator_access;
    using column_ptr = std::unique_ptr<detail::column_base>;
    static column_ptr copy(const column_ptr& c) { return c ? c->clone() : nullptr; }

    /// A record's columns must have the layout of those recorded before.
    static void check_layout(const column_ptr& kept, const detail::column_base& c, std::string_view who,
                             std::string_view arg) {
        if (kept && !kept->same_layout(c))
            detail::fail(who, arg, c.describe() + " differ from the " + kept->describe() + " recorded before");
    }
    /// Keeps a record's column (its layout alone when predictions are not kept).
    void keep(column_ptr& kept, column_ptr c) {
        if (!keep_)
            c->clear();
        if (!kept)
            kept = std::move(c);
        else if (keep_)
            kept->append(*c);
    }

    recorded_column kept(const detail::column_base* c, std::size_t i, std::string_view fn) const {
        if (!keep_)
            detail::fail("heldout::aggregator::" + std::string(fn), "", "predictions were not kept");
        const auto& r = splits_.at(i);
        recorded_column out;
        if (const auto* l = dynamic_cast<const detail::label_column*>(c))
            out.labels = std::span<const std::int64_t>(l->data).subspan(r.offset, r.test_size);
        else if (const auto* v = dynamic_cast<const detail::real_column*>(c))
            out.values = std::span<const double>(v->data).subspan(r.offset, r.test_size);
        else if (const auto* m = dynamic_cast<const detail::rows_column*>(c)) {
            out.values = std::span<const double>(m->data).subspan(r.offset * m->cols, r.test_size * m->cols);
            out.cols = m->cols;
        } else
            detail::fail("heldout::aggregator::" + std::string(fn), "",
                         "the recorded column holds " + c->describe() +
                             ": read it with truth_view / "
                             "predictions_view");
        return out;
    }

    template <class V>
    V typed_view(const detail::column_base* c, std::size_t i, std::string_view fn) const {
        if (!keep_)
            detail::fail("heldout::aggregator::" + std::string(fn), "", "predictions were not kept");
        const auto& r = splits_.at(i);
        if (c->view_type() != std::type_index(typeid(V)))
            detail::fail("heldout::aggregator::" + std::string(fn), "V",
                         "the recorded column holds " + c->describe() + ", not this view type");
        return detail::view_of<V>(*c, r.offset, r.test_size);
    }

    /// Feeds a new track every kept split (and the apparent result).
    void replay(detail::track_base& tr) const {
        for (const auto& s : splits_) {
            tr.prepare(*truth_, *pred_, s.offset, s.test_size);
            tr.commit(*truth_, *pred_, s.offset, s.test_size);
        }
        if (has_apparent_)
            tr.set_apparent(*apparent_truth_, *apparent_pred_);
    }

    /// The tracked measure of the same type and parameters as m, or null.
    template <class M>
    const detail::measure_track<M>* find(const M& m) const {
        for (const auto& t : tracks_)
            if (const auto* typed = dynamic_cast<const detail::measure_track<M>*>(t.get()))
                if (same_measure(typed->measure, m))
                    return typed;
        return nullptr;
    }

    /// The track of m; input_error listing the tracked measures when m is not one of them.
    template <class M>
    const detail::measure_track<M>& track_for(const M& m, std::string_view who) const {
        if (const auto* t = find(m))
            return *t;
        std::string tracked;
        for (const auto& t : tracks_)
            tracked += (tracked.empty() ? "" : ", ") + t->name;
        detail::fail(who, "measure",
                     "measure " + m.name() + " is not tracked with these parameters (tracked: " +
                         (tracked.empty() ? std::string("none") : tracked) + "); add it with add_measure(m)" +
                         (keep_ ? " (it is computed from the kept predictions)" : " before recording"));
    }

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
    column_ptr truth_, pred_;
    column_ptr apparent_truth_, apparent_pred_;
    bool has_apparent_ = false;
    bool keep_ = true;
    std::size_t skipped_ = 0;
    std::string model_;
};

namespace detail {

/// What compare() reads of an aggregator beyond its public interface.
struct aggregator_access {
    template <class M>
    static const measure_track<M>& track(const aggregator& a, const M& m, std::string_view who) {
        return a.track_for(m, who);
    }
    static const column_base* truth(const aggregator& a) noexcept { return a.truth_.get(); }
    static const column_base* predictions(const aggregator& a) noexcept { return a.pred_.get(); }
};

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

/// What the table needs to know of a tracked measure.
inline measure_facts facts_of(const track_base& t) {
    measure_facts f;
    f.row_losses = t.row_losses;
    f.zero_one_losses =
        t.row_losses && std::all_of(t.losses.begin(), t.losses.end(), [](double x) { return x == 0.0 || x == 1.0; });
    f.case_components = t.case_components;
    f.weighted_add = t.weighted_add;
    f.lower_is_better = t.lower_is_better;
    f.fitted_se = t.fitted_se;
    return f;
}

} // namespace detail

template <outer_measure M>
heldout::estimate aggregator::estimate(const M& m, ci::method method, double level) const {
    constexpr std::string_view who = "heldout::aggregator::estimate";
    detail::check_level(who, level);
    if (splits_.empty())
        detail::fail(who, "", "no splits recorded");
    const auto& tr = track_for(m, who);

    heldout::estimate e;
    e.measure = tr.name;
    e.model = model_;
    e.level = level;
    e.per_split = per_split(tr);
    e.notes = detail::undefined_notes(tr);
    if (skipped_ > 0)
        e.notes.push_back(detail::count_text(skipped_, "bootstrap split") + " with no out-of-bag rows skipped");

    detail::interval_input in{tr, splits_, rows_};
    in.truth = truth_.get();
    in.predictions = pred_.get();
    in.apparent_truth = apparent_truth_.get();
    in.apparent_predictions = apparent_pred_.get();
    in.method = method;
    in.level = level;
    double train_sum = 0, test_sum = 0;
    for (std::size_t i = 0; i < splits_.size(); ++i)
        if (tr.values[i]) {
            in.values.push_back(*tr.values[i]);
            e.observations += splits_[i].test_size;
            train_sum += static_cast<double>(splits_[i].train_size);
            test_sum += static_cast<double>(splits_[i].test_size);
            in.sizes_vary = in.sizes_vary || splits_[i].train_size != splits_[0].train_size ||
                            splits_[i].test_size != splits_[0].test_size;
        }
    if (in.values.empty()) {
        std::string why;
        for (const auto& n : e.notes)
            why += (why.empty() ? "" : "; ") + n;
        detail::fail_undefined(who, "measure " + tr.name + " is undefined on every split (" + why + ")");
    }
    in.mean_train = train_sum / static_cast<double>(in.values.size());
    in.mean_test = test_sum / static_cast<double>(in.values.size());
    e.splits = in.values.size();
    e.value = detail::mean_of(in.values);
    {
        std::string reason;
        e.pooled = tr.pooled(reason);
        if (!e.pooled)
            e.notes.push_back("pooled value undefined: " + reason);
    }

    const record_shape rs = method_shape();
    measure_facts facts = detail::facts_of(tr);
    // One test set of a U statistic: the class counts pick DeLong or Newcombe (methods.hpp).
    if (method.id == ci::method_id::automatic && rs.splits == 1 && !rs.bootstrap && facts.case_components && truth_ &&
        pred_) {
        try {
            const auto c = tr.components(*truth_, *pred_, 0, splits_[0].test_size);
            facts.smaller_class = std::min(c.cases.size(), c.controls.size());
        } catch (const undefined_error&) {
            // one class absent: no interval method of this kind applies; the method reports it
        }
    }
    const ci::method_id id = detail::resolve_method(method.id, rs, facts, tr.name, who);
    e.method = id;
    e.method_label = std::string(ci::info(id).label);
    detail::run_interval(id, in, e);
    return e;
}

HELDOUT_NAMESPACE_END
