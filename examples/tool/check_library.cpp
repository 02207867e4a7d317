// check_library — what the library gives for a prediction file, computed without the tool's
// code: the tool's ctests (run_tool.cmake, LIBRARY=ON) compare its --json output with these
// values (check_json.py --library). It reads the CSV with the tool's reader (tested on its
// own, csv_test.cpp) and takes the tool's arguments, then reaches the numbers by other roads
// than the tool does: no aggregator, no automatic method choice, but the free functions
// (t_interval of per-row values each scored by evaluate() on its own row, wilson_interval,
// delong_auc / delong_test, mcnemar_test, evaluate() on each split's rows with
// corrected_resampled_t, evaluate_queries / estimate_queries / compare_queries,
// concordance_estimate / compare_concordance), with the methods docs/tool.md's defaults table
// names. Wide layout only; one JSON object per line:
//   {"kind": "estimate", "model": ..., "key": ..., "value": ..., "lower": ..., "upper": ...}
//   {"kind": "comparison", "first": ..., "second": ..., "key": ..., "difference": ..., "p_value": ...}
// (p_value null where the method draws at random: the paired bootstrap).
#include "csv.hpp"
#include "measures.hpp" // the default names of each task (docs/tool.md), nothing else

#include <heldout/detail/json.hpp>
#include <heldout/heldout.hpp>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <iostream>
#include <map>
#include <optional>
#include <string>
#include <vector>

namespace {

struct args {
    std::string file, task = "binary", truth, split, query, time, event;
    std::vector<std::string> scores, measures;
    double threshold = 0.5, level = 0.95, folds = 0;
};

std::string q(const std::string& s) {
    std::string out;
    heldout::detail::json_quote(out, s);
    return out;
}
std::string n(std::optional<double> x) { return x && std::isfinite(*x) ? heldout::report::number(*x) : "null"; }

void estimate_line(const std::string& model, const std::string& key, double v, std::optional<double> lo,
                   std::optional<double> hi) {
    std::cout << "{\"kind\": \"estimate\", \"model\": " << q(model) << ", \"key\": " << q(key)
              << ", \"value\": " << n(v) << ", \"lower\": " << n(lo) << ", \"upper\": " << n(hi) << "}\n";
}
void comparison_line(const std::string& a, const std::string& b, const std::string& key, double d,
                     std::optional<double> p) {
    std::cout << "{\"kind\": \"comparison\", \"first\": " << q(a) << ", \"second\": " << q(b) << ", \"key\": " << q(key)
              << ", \"difference\": " << n(d) << ", \"p_value\": " << n(p) << "}\n";
}

template <class T>
std::vector<T> pick(const std::vector<T>& v, const std::vector<std::size_t>& rows, std::size_t cols = 1) {
    std::vector<T> out;
    for (auto r : rows)
        for (std::size_t j = 0; j < cols; ++j)
            out.push_back(v[r * cols + j]);
    return out;
}

struct data {
    std::vector<double> truth;
    std::vector<std::uint8_t> y01, event;
    std::vector<std::int64_t> labels, query;
    std::vector<std::string> names;
    std::vector<std::vector<double>> pred; // per model, row-major
    std::vector<std::size_t> cols;
    std::vector<std::vector<std::int64_t>> argmax;
    std::vector<std::vector<std::size_t>> splits;
};

/// The models for which keep(k) holds (a measure of probabilities leaves out raw scores and
/// class labels, as the tool does, with a note).
template <class Keep>
data only(const data& d, Keep keep) {
    data o = d;
    o.names.clear();
    o.pred.clear();
    o.cols.clear();
    o.argmax.clear();
    for (std::size_t k = 0; k < d.names.size(); ++k)
        if (keep(k)) {
            o.names.push_back(d.names[k]);
            o.pred.push_back(d.pred[k]);
            o.cols.push_back(d.cols[k]);
            o.argmax.push_back(d.argmax[k]);
        }
    return o;
}

/// Resampled: evaluate m on each split's rows, then the corrected t (Nadeau & Bengio 2003).
template <class M, class Score>
void resampled(const M& m, const std::string& key, const data& d, const args& a, Score score) {
    double n_test = 0;
    for (const auto& s : d.splits)
        n_test += static_cast<double>(s.size());
    n_test /= static_cast<double>(d.splits.size());
    const double n_train = (a.folds - 1) * n_test;
    std::vector<std::vector<double>> per(d.names.size());
    for (std::size_t k = 0; k < d.names.size(); ++k) {
        for (const auto& rows : d.splits)
            per[k].push_back(score(m, k, rows));
        const auto c = heldout::corrected_resampled_t(per[k], n_train, n_test, a.level);
        estimate_line(d.names[k], key, c.mean, c.lower, c.upper);
    }
    for (std::size_t i = 0; i < per.size(); ++i)
        for (std::size_t j = i + 1; j < per.size(); ++j) {
            std::vector<double> diff;
            for (std::size_t s = 0; s < per[i].size(); ++s)
                diff.push_back(per[i][s] - per[j][s]);
            const auto c = heldout::corrected_resampled_t(diff, n_train, n_test, a.level);
            comparison_line(d.names[i], d.names[j], key, c.mean, c.p_value);
        }
}

/// One test set, a mean of per-row values: each row scored by evaluate() on its own; t interval,
/// Wilson when every per-row value is 0 or 1 (docs/tool.md, the defaults table); pairs: McNemar
/// mid-p for 0/1 values, else the difference only (the paired bootstrap's p is drawn at random).
template <class M, class Row>
void pointwise(const M& m, const std::string& key, const data& d, const args& a, Row row_value) {
    std::vector<std::vector<double>> per(d.names.size());
    const std::size_t rows = d.truth.size();
    for (std::size_t k = 0; k < d.names.size(); ++k)
        for (std::size_t i = 0; i < rows; ++i)
            per[k].push_back(row_value(m, k, i));
    for (std::size_t k = 0; k < d.names.size(); ++k) {
        const bool zero_one = std::all_of(per[k].begin(), per[k].end(), [](double x) { return x == 0 || x == 1; });
        if (zero_one) {
            std::uint64_t wrong = 0;
            for (double v : per[k])
                wrong += v == 1 ? 1 : 0;
            const auto w = heldout::wilson_interval(wrong, rows, a.level);
            estimate_line(d.names[k], key, w.estimate, w.lower, w.upper);
        } else {
            const auto t = heldout::t_interval(per[k], a.level);
            estimate_line(d.names[k], key, t.mean, t.lower, t.upper);
        }
    }
    for (std::size_t i = 0; i < per.size(); ++i)
        for (std::size_t j = i + 1; j < per.size(); ++j) {
            double mi = 0, mj = 0;
            std::uint64_t only_i = 0, only_j = 0;
            for (std::size_t r = 0; r < rows; ++r) {
                mi += per[i][r];
                mj += per[j][r];
                only_i += per[i][r] == 0 && per[j][r] == 1;
                only_j += per[j][r] == 0 && per[i][r] == 1;
            }
            std::optional<double> p;
            const auto is01 = [](const std::vector<double>& v) {
                return std::all_of(v.begin(), v.end(), [](double x) { return x == 0 || x == 1; });
            };
            if (is01(per[i]) && is01(per[j]))
                p = heldout::mcnemar_test(only_i, only_j, heldout::mcnemar::mid_p).p_value;
            comparison_line(d.names[i], d.names[j], key, (mi - mj) / static_cast<double>(rows), p);
        }
}

} // namespace

int main(int argc, char** argv) {
    args a;
    std::vector<std::string> v(argv + 1, argv + argc);
    for (std::size_t i = 0; i < v.size(); ++i) {
        auto next = [&] { return v.at(++i); };
        if (v[i] == "--task")
            a.task = next();
        else if (v[i] == "--truth")
            a.truth = next();
        else if (v[i] == "--score" || v[i] == "--prediction")
            a.scores.push_back(next());
        else if (v[i] == "--split")
            a.split = next();
        else if (v[i] == "--query")
            a.query = next();
        else if (v[i] == "--time")
            a.time = next();
        else if (v[i] == "--event")
            a.event = next();
        else if (v[i] == "--measure")
            a.measures.push_back(next());
        else if (v[i] == "--threshold")
            a.threshold = std::stod(next());
        else if (v[i] == "--level")
            a.level = std::stod(next());
        else if (v[i] == "--folds")
            a.folds = std::stod(next());
        else if (v[i].rfind("--", 0) == 0) {
            if (v[i] != "--json")
                ++i; // an option with a value the check does not need (--report, --plots)
        } else
            a.file = v[i];
    }
    const auto t = heldout_tool::read_csv_file(a.file);
    data d;
    const std::size_t rows = t.rows();
    const bool censored = a.task == "censored";
    for (std::size_t r = 0; r < rows; ++r) {
        d.truth.push_back(t.number(r, t.column(censored ? a.time : a.truth)));
        if (censored)
            d.event.push_back(static_cast<std::uint8_t>(t.number(r, t.column(a.event))));
        if (a.task == "query")
            d.query.push_back(static_cast<std::int64_t>(t.number(r, t.column(a.query))));
    }
    for (double y : d.truth) {
        d.y01.push_back(static_cast<std::uint8_t>(y == 1));
        d.labels.push_back(static_cast<std::int64_t>(y));
    }
    for (const auto& s : a.scores) {
        d.names.push_back(s);
        std::vector<std::size_t> cs;
        bool found = false;
        for (std::size_t c = 0; c < t.columns(); ++c)
            found = found || t.header()[c] == s;
        if (found)
            cs.push_back(t.column(s));
        else
            for (std::size_t j = 0;; ++j) {
                bool has = false;
                for (std::size_t c = 0; c < t.columns(); ++c)
                    has = has || t.header()[c] == s + ":" + std::to_string(j);
                if (!has)
                    break;
                cs.push_back(t.column(s + ":" + std::to_string(j)));
            }
        std::vector<double> p;
        std::vector<std::int64_t> am;
        for (std::size_t r = 0; r < rows; ++r) {
            std::size_t best = 0;
            for (std::size_t j = 0; j < cs.size(); ++j) {
                p.push_back(t.number(r, cs[j]));
                if (p.back() > p[r * cs.size() + best])
                    best = j;
            }
            am.push_back(cs.size() == 1 ? static_cast<std::int64_t>(p.back()) : static_cast<std::int64_t>(best));
        }
        d.pred.push_back(std::move(p));
        d.cols.push_back(cs.size());
        d.argmax.push_back(std::move(am));
    }
    if (!a.split.empty()) {
        std::map<std::string, std::size_t> index;
        for (std::size_t r = 0; r < rows; ++r) {
            auto [it, fresh] = index.emplace(t.cell(r, t.column(a.split)), d.splits.size());
            if (fresh)
                d.splits.emplace_back();
            d.splits[it->second].push_back(r);
        }
    }
    const bool split = !a.split.empty();
    std::vector<std::string> measures;
    for (const auto& m : a.measures) { // "a,b" as the tool takes them
        std::size_t s = 0;
        for (std::size_t c; (c = m.find(',', s)) != std::string::npos; s = c + 1)
            measures.push_back(m.substr(s, c - s));
        measures.push_back(m.substr(s));
    }
    if (measures.empty()) {
        const std::map<std::string, heldout_tool::task> tasks{{"regression", heldout_tool::task::regression},
                                                              {"binary", heldout_tool::task::binary},
                                                              {"multiclass", heldout_tool::task::multiclass},
                                                              {"query", heldout_tool::task::query},
                                                              {"censored", heldout_tool::task::censored}};
        measures = heldout_tool::default_measures(tasks.at(a.task));
    }
    namespace ms = heldout::measure;
    const data& d_all = d;
    for (const auto& key : measures) {
        const data& d = d_all; // the models a measure applies to: filtered below
        if (a.task == "regression") {
            auto score = [&](const auto& m, std::size_t k, const std::vector<std::size_t>& rs) {
                return heldout::evaluate(m, pick(d.truth, rs), pick(d.pred[k], rs));
            };
            auto row = [&](const auto& m, std::size_t k, std::size_t i) {
                return heldout::evaluate(m, std::vector<double>{d.truth[i]}, std::vector<double>{d.pred[k][i]});
            };
            if (key == "mse")
                split ? resampled(ms::mse{}, key, d, a, score) : pointwise(ms::mse{}, key, d, a, row);
            else if (key == "mae")
                split ? resampled(ms::mae{}, key, d, a, score) : pointwise(ms::mae{}, key, d, a, row);
            else if (key == "rmse" && split)
                resampled(ms::rmse{}, key, d, a, score);
            else if (key == "r2" && split)
                resampled(ms::r_squared{}, key, d, a, score);
            else if (key == "r2") // BCa interval: the value only
                for (std::size_t k = 0; k < d.names.size(); ++k)
                    estimate_line(d.names[k], key, heldout::evaluate(ms::r_squared{}, d.truth, d.pred[k]), {}, {});
        } else if (a.task == "binary") {
            const bool ranked = key == "auc" || key == "ap";
            const data d = only(d_all, [&](std::size_t k) {
                if (ranked)
                    return true;
                for (std::size_t i = 0; i < d_all.truth.size(); ++i) {
                    const double p = d_all.pred[k][i];
                    if (p < 0 || p > 1 || (key == "log-loss" && (d_all.y01[i] ? p : 1 - p) == 0))
                        return false;
                }
                return true;
            });
            auto score = [&](const auto& m, std::size_t k, const std::vector<std::size_t>& rs) {
                return heldout::evaluate(m, pick(d.y01, rs), pick(d.pred[k], rs));
            };
            auto row = [&](const auto& m, std::size_t k, std::size_t i) {
                return heldout::evaluate(m, std::vector<std::uint8_t>{d.y01[i]}, std::vector<double>{d.pred[k][i]});
            };
            const auto err = heldout::at_threshold(ms::classification_error{}, a.threshold);
            if (key == "error")
                split ? resampled(err, key, d, a, score) : pointwise(err, key, d, a, row);
            else if (key == "brier")
                split ? resampled(ms::brier_score{}, key, d, a, score) : pointwise(ms::brier_score{}, key, d, a, row);
            else if (key == "log-loss")
                split ? resampled(ms::cross_entropy{}, key, d, a, score)
                      : pointwise(ms::cross_entropy{}, key, d, a, row);
            else if (key == "auc" && split)
                resampled(ms::auc{}, key, d, a, score);
            else if (key == "auc") {
                for (std::size_t k = 0; k < d.names.size(); ++k) {
                    std::size_t pos = 0;
                    for (auto y : d.y01)
                        pos += y;
                    // docs/tool.md's defaults table: Newcombe below 30 rows in the smaller class
                    const bool small = std::min(pos, d.y01.size() - pos) < heldout::delong_small_class;
                    const auto e = small ? heldout::newcombe_auc_interval(d.y01, d.pred[k], a.level)
                                         : heldout::delong_auc(d.y01, d.pred[k], a.level);
                    estimate_line(d.names[k], key, e.value, e.lower, e.upper);
                }
                for (std::size_t i = 0; i < d.names.size(); ++i)
                    for (std::size_t j = i + 1; j < d.names.size(); ++j) {
                        const auto c = heldout::delong_test(d.y01, d.pred[i], d.pred[j], a.level);
                        comparison_line(d.names[i], d.names[j], key, c.difference, c.p_value);
                    }
            }
        } else if (a.task == "multiclass") {
            const bool rows_only = key == "log-loss" || key == "brier" || key == "auc";
            const data d = only(d_all, [&](std::size_t k) {
                if (!rows_only)
                    return true;
                if (d_all.cols[k] == 1)
                    return false;
                for (std::size_t i = 0; i < d_all.truth.size(); ++i)
                    if (key == "log-loss" &&
                        d_all.pred[k][i * d_all.cols[k] + static_cast<std::size_t>(d_all.labels[i])] == 0)
                        return false;
                return true;
            });
            // labels channel: the given or most probable class
            auto lscore = [&](const auto& m, std::size_t k, const std::vector<std::size_t>& rs) {
                return heldout::evaluate(m, pick(d.labels, rs), pick(d.argmax[k], rs));
            };
            auto lrow = [&](const auto& m, std::size_t k, std::size_t i) {
                return heldout::evaluate(m, std::vector<std::int64_t>{d.labels[i]},
                                         std::vector<std::int64_t>{d.argmax[k][i]});
            };
            auto pscore = [&](const auto& m, std::size_t k, const std::vector<std::size_t>& rs) {
                const auto p = pick(d.pred[k], rs, d.cols[k]);
                return heldout::evaluate(m, pick(d.labels, rs), heldout::rows(p, d.cols[k]));
            };
            auto prow = [&](const auto& m, std::size_t k, std::size_t i) {
                const std::vector<double> p(d.pred[k].begin() + static_cast<std::ptrdiff_t>(i * d.cols[k]),
                                            d.pred[k].begin() + static_cast<std::ptrdiff_t>((i + 1) * d.cols[k]));
                return heldout::evaluate(m, std::vector<std::int64_t>{d.labels[i]}, heldout::rows(p, d.cols[k]));
            };
            if (key == "error")
                split ? resampled(ms::classification_error{}, key, d, a, lscore)
                      : pointwise(ms::classification_error{}, key, d, a, lrow);
            else if (key == "log-loss")
                split ? resampled(ms::multiclass_cross_entropy{}, key, d, a, pscore)
                      : pointwise(ms::multiclass_cross_entropy{}, key, d, a, prow);
            else if (key == "brier")
                split ? resampled(ms::multiclass_brier_score{}, key, d, a, pscore)
                      : pointwise(ms::multiclass_brier_score{}, key, d, a, prow);
        } else if (a.task == "query") {
            auto run = [&](const auto& m) {
                if (split) {
                    resampled(m, key, d, a, [&](const auto& mm, std::size_t k, const std::vector<std::size_t>& rs) {
                        const auto qq = pick(d.query, rs);
                        const auto rel = pick(d.truth, rs);
                        return heldout::evaluate(mm, heldout::by_query(qq, rel), pick(d.pred[k], rs));
                    });
                    return;
                }
                std::vector<heldout::query_result> res;
                for (std::size_t k = 0; k < d.names.size(); ++k) {
                    res.push_back(heldout::evaluate_queries(m, d.query, d.truth, d.pred[k]));
                    const auto e = heldout::estimate_queries(res.back(), a.level);
                    estimate_line(d.names[k], key, e.value, e.lower, e.upper);
                }
                for (std::size_t i = 0; i < res.size(); ++i)
                    for (std::size_t j = i + 1; j < res.size(); ++j) {
                        const auto c = heldout::compare_queries(res[i], res[j], {.level = a.level});
                        comparison_line(d.names[i], d.names[j], key, c.difference, c.p_value);
                    }
            };
            const auto at = key.find('@');
            const std::size_t k = at == std::string::npos ? 0 : std::stoul(key.substr(at + 1));
            const std::string word = key.substr(0, at);
            if (word == "ndcg")
                run(ms::ndcg{.k = k});
            else if (word == "p")
                run(ms::precision_at{.k = k});
            else if (word == "mrr")
                run(ms::reciprocal_rank{});
            else if (word == "ap")
                run(ms::average_precision_at{.k = k});
        } else if (a.task == "censored") {
            auto run = [&](const auto& m) {
                if (split) {
                    resampled(m, key, d, a, [&](const auto& mm, std::size_t k, const std::vector<std::size_t>& rs) {
                        const auto tt = pick(d.truth, rs);
                        const auto ev = pick(d.event, rs);
                        return heldout::evaluate(mm, heldout::censored(tt, ev), pick(d.pred[k], rs));
                    });
                    return;
                }
                const auto truth = heldout::censored(d.truth, d.event);
                for (std::size_t k = 0; k < d.names.size(); ++k) {
                    const auto e = heldout::concordance_estimate(m, truth, d.pred[k], a.level);
                    estimate_line(d.names[k], key, e.value, e.lower, e.upper);
                }
                for (std::size_t i = 0; i < d.names.size(); ++i)
                    for (std::size_t j = i + 1; j < d.names.size(); ++j) {
                        const auto c = heldout::compare_concordance(m, truth, d.pred[i], d.pred[j], a.level);
                        comparison_line(d.names[i], d.names[j], key, c.difference, c.p_value);
                    }
            };
            if (key == "harrell-c")
                run(ms::harrell_c{});
            else if (key.rfind("uno-c@", 0) == 0)
                run(ms::uno_c{.horizon = std::stod(key.substr(6))});
        }
    }
    return 0;
}
