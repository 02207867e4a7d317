// A consumer translation unit that instantiates a representative part of heldout, so that
// warnings inside templates show up: every measure family through evaluate (labels of
// several integer types, float and double scores, weights), streaming accumulators with
// merge and serialize / deserialize, evaluate_parallel, the plans (plain, stratified,
// grouped, nested, time-ordered) with their audit files, the aggregator with estimates and
// comparisons, the one-test-set methods, the compare tools, early stopping, the plots, and the
// query, censored, calibration, subgroup and planning families.
// tests/strict.cmake compiles it with g++ and clang++ (libc++) under the strict warning set
// and -Werror; it is compiled, not run: what it checks is that it builds warning-free.
#include <heldout/heldout.hpp>

#include <Eigen/Dense>

#include <cstddef>
#include <cstdint>
#include <iostream>
#include <span>
#include <sstream>
#include <string>
#include <vector>

namespace hm = heldout::measure;

namespace {

template <class L, class S>
double label_measures(const std::vector<L>& y, const std::vector<L>& f, const std::vector<S>& w) {
    double s = 0;
    s += heldout::evaluate(hm::classification_error{}, y, f);
    s += heldout::evaluate(hm::classification_error{}, y, f, w);
    s += heldout::evaluate(hm::accuracy{.classes = 3}, y, f, w);
    s += heldout::evaluate(hm::balanced_accuracy{}, y, f, w);
    s += heldout::evaluate(hm::precision{}, y, f);
    s += heldout::evaluate(hm::recall{.combination = hm::class_combination::pooled}, y, f, w);
    s += heldout::evaluate(hm::specificity{.combination = hm::class_combination::one_vs_rest, .positive = 1}, y, f);
    s += heldout::evaluate(hm::f_beta{.beta = 2.0, .combination = hm::class_combination::prevalence_weighted}, y, f);
    s += heldout::evaluate(hm::mcc{}, y, f, w);
    s += heldout::evaluate(hm::cohen_kappa{hm::kappa_weighting::quadratic}, y, f, w);
    Eigen::MatrixXd costs(2, 2);
    costs << 0, 1, 5, 0;
    s += heldout::evaluate(hm::cost_weighted_error{costs}, y, f, w);
    const Eigen::MatrixXd table = heldout::evaluate(hm::confusion_matrix{}, y, f, w);
    s += table.sum();
    auto acc = hm::confusion_matrix{.classes = 3}.accumulator();
    acc.add(y, f);
    acc.add_one(2, 0);
    auto other = acc;
    other.merge(acc);
    s += other(1, 1);
    return s;
}

template <class L, class S>
double score_measures(const std::vector<L>& y, const std::vector<S>& p, const std::vector<S>& w) {
    double s = 0;
    s += heldout::evaluate(hm::brier_score{}, y, p);
    s += heldout::evaluate(hm::brier_score{}, y, p, w);
    s += heldout::evaluate(hm::cross_entropy{1e-12}, y, p, w);
    s += heldout::evaluate(hm::calibration_error{}, y, p);
    s += heldout::evaluate(hm::calibration_error{.bins = 10,
                                                 .binning = hm::bin_rule::equal_count,
                                                 .variant = hm::calibration_variant::top_label},
                           y, p, w);
    s += heldout::evaluate(hm::auc{}, y, p);
    s += heldout::evaluate(hm::auc{}, y, p, w);
    s += heldout::evaluate(hm::binned_auc{.bins = 128}, y, p);
    s += heldout::evaluate(hm::average_precision{}, y, p, w);
    s += heldout::evaluate(hm::auprc{hm::pr_start::first_precision}, y, p);
    s += heldout::evaluate(hm::partial_auc{.fpr_low = 0, .fpr_high = 0.2}, y, p);
    s += static_cast<double>(heldout::roc_points(y, p).size() + heldout::pr_points(y, p, w).size());
    s += heldout::youden_threshold(y, p).threshold;
    Eigen::Matrix2d cost;
    cost << 0, 1, 5, 0;
    s += heldout::cost_optimal_threshold(y, p, cost).threshold;
    s += heldout::evaluate(hm::mean_loss<heldout::loss::logistic>{}, y, p);
    s += heldout::evaluate(hm::mean_loss<heldout::loss::hinge>{}, y, p, w);
    s += heldout::evaluate(hm::mean_loss<heldout::loss::zero_one>{{0.5}}, y, p);
    return s;
}

template <class T>
double real_measures(const std::vector<T>& y, const std::vector<T>& f, const std::vector<T>& w) {
    double s = 0;
    s += heldout::evaluate(hm::mse{}, y, f);
    s += heldout::evaluate(hm::mse{}, y, f, w);
    s += heldout::evaluate(hm::mae{}, y, f, w);
    s += heldout::evaluate(hm::rmse{}, y, f);
    s += heldout::evaluate(hm::r_squared{}, y, f, w);
    s += heldout::evaluate(hm::max_absolute_error{}, y, f);
    s += heldout::evaluate(hm::median_absolute_error{}, y, f, w);
    s += heldout::evaluate(hm::mean_loss<heldout::loss::huber>{{1.5}}, y, f);
    s += heldout::evaluate(hm::mean_loss<heldout::loss::pinball>{{0.9}}, y, f, w);
    s += heldout::evaluate(hm::mean_loss<heldout::loss::absolute>{}, y, f);
    s += heldout::evaluate(hm::mean_loss<heldout::loss::poisson>{}, y, f);
    s += heldout::evaluate_parallel(hm::mse{}, y, f, {.threads = 2, .chunk = 4096});
    s += heldout::evaluate_parallel(hm::mae{}, y, f, w, {.threads = 2, .chunk = 4096});
    return s;
}

double rows_measures(const std::vector<int>& y, const Eigen::MatrixXd& p, const std::vector<double>& flat) {
    double s = 0;
    s += heldout::evaluate(hm::multiclass_brier_score{}, y, p);
    s += heldout::evaluate(hm::multiclass_cross_entropy{1e-9}, y, heldout::rows(flat, 3));
    s += heldout::evaluate(hm::multiclass_calibration_error{}, y, p);
    s += heldout::evaluate(hm::multiclass_auc{}, y, p);
    s += heldout::evaluate(hm::multiclass_auc{hm::multiclass_auc_method::one_vs_rest_weighted}, y, p);
    return s;
}

template <class M, class T, class P>
double shipped(const M& m, const T& y, const P& p) {
    auto a = m.accumulator();
    a.add(y, p);
    using A = decltype(a);
    const std::vector<std::byte> bytes = heldout::serialize(a);
    A back = heldout::deserialize<A>(bytes);
    back.merge(a);
    back.reset();
    back.add(y, p);
    return back.value();
}

double streaming(const std::vector<int>& yl, const std::vector<int>& fl, const std::vector<double>& y,
                 const std::vector<double>& f, const std::vector<double>& p) {
    double s = 0;
    s += shipped(hm::mse{}, y, f);
    s += shipped(hm::median_absolute_error{}, y, f);
    s += shipped(hm::r_squared{}, y, f);
    s += shipped(hm::classification_error{}, yl, fl);
    s += shipped(hm::mcc{}, yl, fl);
    s += shipped(hm::auc{}, yl, p);
    s += shipped(hm::binned_auc{}, yl, p);
    s += shipped(hm::calibration_error{}, yl, p);
    s += shipped(hm::cross_entropy{1e-12}, yl, p);
    heldout::early_stopping stop{hm::mse{}, {.patience = 3, .min_improvement = 0}};
    for (double v : f)
        if (stop.update(v))
            break;
    s += static_cast<double>(stop.best_epoch()) + stop.best_value();
    return s;
}

std::size_t plans(const std::vector<int>& labels, const std::vector<int>& ids, const std::vector<double>& t0,
                  const std::vector<double>& t1) {
    const std::size_t n = labels.size();
    std::size_t s = 0;
    for (const heldout::split& sp : heldout::kfold{.folds = 10, .seed = 7}.splits(n))
        s += sp.test.size();
    for (const heldout::split& sp : heldout::kfold{.folds = 5, .seed = 1}.splits(heldout::strata(labels)))
        s += sp.train.size();
    for (const heldout::split& sp :
         heldout::repeated_kfold{.folds = 4, .repeats = 2, .seed = 3}.splits(heldout::groups(ids)))
        s += sp.repeat;
    for (const heldout::split& sp : heldout::bootstrap{.replicates = 5, .seed = 3}.splits(n))
        s += sp.fold;
    for (const heldout::split& sp : heldout::holdout{.test_fraction = 0.3, .seed = 42}.splits(heldout::strata(labels)))
        s += sp.test.size();
    for (const heldout::split& sp : heldout::subsampling{.repeats = 3, .test_fraction = 0.2, .seed = 1}.splits(n))
        s += sp.test.size();
    for (const heldout::split& sp : heldout::leave_one_out{}.splits(heldout::groups(ids)))
        s += sp.test.size();
    for (const heldout::split& sp : heldout::five_by_two{.seed = 3}.splits(n))
        s += sp.test.size();
    for (const heldout::split& sp : heldout::walk_forward{.initial = 5, .horizon = 3, .step = 2, .gap = 1}.splits(n))
        heldout::check_time_order(sp, 1);
    for (const heldout::split& sp :
         heldout::purged_kfold{.folds = 5, .embargo = 0.5}.splits(heldout::intervals(t0, t1)))
        s += sp.test.size();
    const heldout::nested<heldout::kfold, heldout::kfold> nest{{.folds = 5, .seed = 1}, {.folds = 3, .seed = 2}};
    for (const auto& sp : nest.splits(n))
        s += sp.test.size();
    auto kept = heldout::repeated_kfold{.folds = 3, .repeats = 2, .seed = 1}.splits(n).to_vector();
    std::stringstream io;
    heldout::write_splits(io, kept);
    const auto back = heldout::read_splits(io);
    heldout::check_partition(back, n, 3);
    return s + back.size();
}

double aggregate(const std::vector<double>& y, const std::vector<double>& fa, const std::vector<double>& fb,
                 const std::vector<int>& yl, const std::vector<int>& la, const std::vector<int>& lb,
                 const std::vector<double>& pa, const std::vector<double>& pb) {
    const std::size_t n = y.size();
    heldout::aggregator a(hm::mse{}, hm::mae{}), b(hm::mse{});
    for (const heldout::split& s : heldout::repeated_kfold{.folds = 5, .repeats = 2, .seed = 1}.splits(n)) {
        std::vector<double> truth, f1, f2;
        for (const std::size_t r : s.test) {
            truth.push_back(y[r]);
            f1.push_back(fa[r]);
            f2.push_back(fb[r]);
        }
        a.record(s, truth, f1);
        b.record(s, truth, f2);
    }
    double v = 0;
    const heldout::estimate e = a.estimate(hm::mse{});
    const auto naive = a.estimate(hm::rmse{}, heldout::ci::naive_t, 0.9);
    std::ostringstream os;
    os << e << '\n' << naive << '\n';
    heldout::write_json(os, {e, naive});
    heldout::write_csv(os, {e, naive});
    a.write_predictions_csv(os);
    const heldout::comparison c = heldout::compare(a, b, hm::mse{});
    os << c << '\n';
    const auto all = heldout::compare_all_pairs(std::vector<heldout::aggregator>{a, b}, hm::mse{},
                                                heldout::paired::automatic, 0.95, {"a", "b"});
    heldout::write_csv(os, all);
    v += e.value + c.p_value + static_cast<double>(os.str().size());

    // one test set
    heldout::aggregator one(hm::classification_error{}, hm::auc{});
    std::vector<std::size_t> rows(n);
    for (std::size_t i = 0; i < n; ++i)
        rows[i] = i;
    one.record(heldout::split{{}, rows, 0, 0, 0, {}}, yl, la);
    v += one.estimate(hm::classification_error{}, heldout::ci::wilson).value;
    v += one.estimate(hm::accuracy{}, heldout::ci::bca(500, 7)).value;
    v += heldout::compare(hm::classification_error{}, yl, la, lb, heldout::paired::mcnemar_exact).p_value;
    v += heldout::compare(hm::auc{}, yl, pa, pb).p_value;
    v += heldout::compare(hm::brier_score{}, yl, pa, pb, heldout::paired::bootstrap_bca(500, 7)).p_value;
    v += heldout::delong_auc(yl, pa).se + heldout::delong_test(yl, pa, pb).p_value;
    v += heldout::bootstrap_bca(hm::mse{}, y, fa, {.replicates = 200, .seed = 7, .level = 0.95}).lower;
    v += heldout::bootstrap_percentile(hm::auc{}, yl, pa, {.replicates = 200, .seed = 7, .level = 0.95}).estimate;
    v += heldout::t_interval(fa, 0.95).se + heldout::wilson_interval(12, 200, 0.95).upper;
    v += heldout::no_information_error_rate(yl, la) + heldout::no_information_squared_error(y, fa);
    return v;
}

double tools(const std::vector<double>& d) {
    double v = heldout::five_by_two_test(d, 0.95).t_p_value;
    v += heldout::corrected_resampled_t(d, 90, 10, 0.95).p_value;
    v += heldout::holm_adjust(d)[0];
    v += heldout::mcnemar_test(10, 3, heldout::mcnemar::exact).p_value;
    Eigen::MatrixXd acc(6, 3);
    acc << .80, .82, .79, .75, .78, .76, .90, .91, .88, .66, .70, .70, .85, .84, .83, .72, .75, .71;
    const auto f = heldout::friedman_test(acc, heldout::direction::higher_is_better, {"A", "B", "C"});
    const double cd = heldout::nemenyi_critical_difference(3, 6, 0.05);
    v += f.f_p_value + cd + static_cast<double>(heldout::nemenyi_groups(f.average_ranks, cd).size());
    std::ostringstream os;
    heldout::print_rank_table(os, f, 0.05);
    const std::vector<std::string> names{"A", "B", "C"};
    os << heldout::report::critical_difference_plot(names, f.average_ranks, cd);
    return v + static_cast<double>(os.str().size());
}

std::string plots(const std::vector<int>& y, const std::vector<double>& p) {
    const heldout::report::roc_series roc[] = {heldout::report::roc_series_of("model", heldout::roc_points(y, p))};
    std::string s = heldout::report::roc_plot(roc);
    const heldout::report::calibration_series cal[] = {{"model", heldout::report::reliability_bins(y, p, 10)}};
    s += heldout::report::calibration_plot(cal);
    const heldout::report::strip_group g[] = {{"model", p}};
    s += heldout::report::strip_plot(g);
    return s;
}

// The families added later: query ranking, censored times, calibration, subgroups, planning.
double newer_families(const std::vector<int>& yl, const std::vector<double>& pa, const std::vector<double>& pb,
                      const std::vector<int>& ids, const std::vector<double>& t1) {
    double v = 0;
    const std::vector<double> rel(pa.begin(), pa.end());
    const auto ra = heldout::evaluate_queries(hm::ndcg{.k = 5, .gain = heldout::gain::linear}, ids, yl, pa);
    const auto rb = heldout::evaluate_queries(hm::ndcg{.k = 5, .gain = heldout::gain::linear}, ids, yl, pb);
    v += ra.mean + heldout::estimate_queries(ra, 0.9).value + heldout::compare_queries(ra, rb, {}).p_value;
    v += heldout::evaluate_queries(hm::reciprocal_rank{}, ids, yl, pa).mean;
    v += heldout::evaluate_queries(hm::average_precision_at{.k = 3}, ids, yl, pa).mean;
    v += heldout::evaluate(hm::harrell_c{}, heldout::censored(t1, yl), pa);
    v += heldout::evaluate(hm::calibration_slope{}, yl, pa) + heldout::evaluate(hm::calibration_intercept{}, yl, pa);
    v += heldout::spiegelhalter_test(yl, pa).p_value;
    for (const auto& b : heldout::reliability(yl, pa, 5))
        v += b.upper;
    heldout::aggregator agg(hm::brier_score{});
    std::vector<std::size_t> rows(yl.size());
    for (std::size_t i = 0; i < rows.size(); ++i)
        rows[i] = i;
    agg.record(heldout::split{.train = {}, .test = rows}, yl, pa);
    for (const heldout::slice_estimate& r : heldout::estimate_slices(agg, hm::brier_score{}, ids, {}))
        v += r.estimate.value;
    v += static_cast<double>(heldout::test_rows_for_proportion(0.1, 0.02, 0.95) +
                             heldout::test_rows_for_auc(0.8, 0.1, 0.05, 0.95) +
                             heldout::test_rows_for_paired_error(0.2, 0.1, 0.05, 0.9));
    return v;
}

} // namespace

int main() {
    std::vector<int> yl, la, lb, ids;
    std::vector<std::uint8_t> y8, f8;
    std::vector<long> yw, fw;
    std::vector<double> y, fa, fb, pa, pb, w, t0, t1, flat;
    std::vector<float> pf, wf;
    for (int i = 0; i < 60; ++i) {
        yl.push_back(i % 2);
        la.push_back((i / 3) % 2);
        lb.push_back((i / 5) % 2);
        ids.push_back(i / 4);
        y8.push_back(static_cast<std::uint8_t>(i % 3));
        f8.push_back(static_cast<std::uint8_t>((i / 2) % 3));
        yw.push_back(i % 3);
        fw.push_back((i / 7) % 3);
        y.push_back(i * 0.5);
        fa.push_back(i * 0.5 + (i % 3) * 0.1);
        fb.push_back(i * 0.5 - (i % 4) * 0.1);
        pa.push_back((i % 7) / 7.0);
        pb.push_back((i % 5) / 5.0);
        w.push_back(1.0 + (i % 2));
        t0.push_back(i);
        t1.push_back(i + 1.5);
        pf.push_back(static_cast<float>(i % 9) / 9.0f);
        wf.push_back(1.0f);
        for (int c = 0; c < 3; ++c)
            flat.push_back(1.0 / 3);
    }
    Eigen::MatrixXd rows = Eigen::MatrixXd::Constant(60, 3, 1.0 / 3);
    std::vector<int> y3(yl.size());
    for (std::size_t i = 0; i < y3.size(); ++i)
        y3[i] = static_cast<int>(i % 3);
    double s = 0;
    s += label_measures(yl, la, w);
    s += label_measures(y8, f8, wf);
    s += label_measures(yw, fw, w);
    s += score_measures(yl, pa, w);
    s += score_measures(y8, pf, wf);
    s += real_measures(y, fa, w);
    s += real_measures(pf, pf, wf);
    s += rows_measures(y3, rows, flat);
    s += streaming(yl, la, y, fa, pa);
    s += static_cast<double>(plans(yl, ids, t0, t1));
    s += aggregate(y, fa, fb, yl, la, lb, pa, pb);
    s += tools(fa);
    s += static_cast<double>(plots(yl, pa).size());
    s += newer_families(yl, pa, pb, ids, t1);
    std::cout << s << '\n';
    return 0;
}
