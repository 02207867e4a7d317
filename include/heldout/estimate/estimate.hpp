// heldout/estimate/estimate.hpp — one measure's estimate with its interval and the per-split
// detail behind it; printing and CSV / JSON export.
//
//   heldout::estimate e = agg.estimate(heldout::measure::mse{});
//   std::cout << e << '\n';   // MSE 0.4123 [0.3712, 0.4551] 95% corrected t (Nadeau-Bengio), 50 splits, n=5000
//   e.value; e.lower; e.upper; e.se; e.pooled; e.notes; e.per_split[3].value;
//   heldout::write_json(std::cout, {e, f});   // full round-trip precision, per-split detail
//   heldout::write_csv(std::cout, {e, f});    // one "estimate" row, then one "split" row per split
//
// Conventions:
//  * value is the resampling estimate: the mean of the per-split values over the splits on
//    which the measure is defined (for one test set, the measure on it; for the .632 methods,
//    the .632 / .632+ estimate itself). pooled is the measure over all test rows of all
//    splits together, absent when undefined there.
//  * se, lower and upper are absent for point estimators (.632, .632+); has_interval() says
//    whether there is an interval. Absent values print as "-" and export as null / empty.
//  * splits counts the splits whose values entered the estimate; per_split lists every
//    recorded split, undefined ones with their reason; observations is the number of test
//    rows behind the estimate (with repeats counted each time).
//  * notes say how the estimate was made: undefined splits ("3 of 50 splits undefined: only
//    one class in the test set"), how n_train / n_test were taken, the method's ingredients.
//  * cautions say why the interval may not keep its level: a small class behind a DeLong
//    interval ("only 4 positives ..."), a method known to undercover. They are printed after
//    the line ("; caution: ..."), and exported in JSON ("cautions") and CSV (last column) —
//    every output shows them.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/detail/json.hpp>
#include <heldout/estimate/ci.hpp>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstddef>
#include <initializer_list>
#include <optional>
#include <ostream>
#include <span>
#include <string>
#include <string_view>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

/// One split's value of one measure (value absent when undefined on that split).
struct split_value {
    std::size_t index = 0;         ///< position in the plan (split::index)
    std::size_t repeat = 0;        ///< split::repeat
    std::size_t fold = 0;          ///< split::fold
    std::size_t train_size = 0;    ///< rows fitted on (bootstrap: draws, duplicates counted)
    std::size_t test_size = 0;     ///< rows scored
    std::optional<double> value{}; ///< the measure on this split's test rows
    std::string undefined_reason;  ///< why value is absent ("only one class in the test set")
};

/// An estimate of one measure from the recorded splits, with its interval.
struct estimate {
    std::string measure;                             ///< the measure's name()
    double value = 0;                                ///< the estimate (see the header comment)
    std::optional<double> se{};                      ///< standard error behind the interval
    std::optional<double> lower{};                   ///< interval bounds (absent for point estimators)
    std::optional<double> upper{};                   ///<
    double level = 0.95;                             ///< requested two-sided confidence level
    ci::method_id method = ci::method_id::automatic; ///< the method actually computed
    std::string method_label;                        ///< its printed name (ci::label)
    std::size_t splits = 0;                          ///< splits whose values entered the estimate
    std::size_t observations = 0;                    ///< test rows behind the estimate
    std::optional<double> pooled{};                  ///< the measure over all test rows together
    std::vector<std::string> notes;                  ///< how it was made
    std::vector<std::string> cautions;               ///< why the interval may not keep its level
    std::vector<split_value> per_split;              ///< every recorded split, in record order
    std::string model{};                             ///< the model's name (aggregator::set_model); empty: unnamed

    bool has_interval() const noexcept { return lower.has_value() && upper.has_value(); }
};

namespace detail {

/// Numbers for people: 4 significant digits, shortest form ("0.8712", "1235", "1.2e-05").
inline std::string readable_number(double x) {
    if (!std::isfinite(x))
        return std::isnan(x) ? "nan" : (x > 0 ? "inf" : "-inf");
    char buf[64];
    const auto r = std::to_chars(buf, buf + sizeof buf, x, std::chars_format::general, 4);
    return std::string(buf, r.ptr);
}

/// Numbers inside notes, for people: whole numbers as they are ("1080"), others with 4
/// significant digits and no exponent from 1e-4 up ("0.1234", "1079.5", "12346"); the
/// full-precision values are in the estimate's fields and exports, never in words.
inline std::string note_number(double x) {
    if (!std::isfinite(x))
        return readable_number(x);
    char buf[64];
    const double a = std::abs(x);
    if (a < 1e15 && x == std::round(x)) {
        const auto r = std::to_chars(buf, buf + sizeof buf, x, std::chars_format::fixed, 0);
        return std::string(buf, r.ptr);
    }
    if (a < 1e-4 || a >= 1e15)
        return readable_number(x);
    const int magnitude = static_cast<int>(std::floor(std::log10(a)));
    const auto r = std::to_chars(buf, buf + sizeof buf, x, std::chars_format::fixed, std::max(0, 3 - magnitude));
    std::string s(buf, r.ptr);
    if (s.find('.') != std::string::npos) { // 0.1200 -> 0.12
        while (s.back() == '0')
            s.pop_back();
        if (s.back() == '.')
            s.pop_back();
    }
    return s;
}

inline std::string level_text(double level) {
    char buf[64];
    const auto r = std::to_chars(buf, buf + sizeof buf, level * 100.0, std::chars_format::general, 6);
    return std::string(buf, r.ptr) + "%";
}

/// RFC 4180 field: quoted when it holds a comma, quote or line break.
inline std::string csv_field(std::string_view s) {
    if (s.find_first_of(",\"\r\n") == std::string_view::npos)
        return std::string(s);
    std::string out = "\"";
    for (const char c : s) {
        if (c == '"')
            out.push_back('"');
        out.push_back(c);
    }
    out.push_back('"');
    return out;
}

inline std::string csv_number(const std::optional<double>& x) {
    return x && std::isfinite(*x) ? number_text(*x) : std::string();
}

inline void write_estimate_json(json_writer& w, const estimate& e) {
    w.begin_object();
    if (!e.model.empty())
        w.member("model", e.model);
    w.member("measure", e.measure);
    w.member("method", ci::id_text(e.method));
    w.member("method_label", e.method_label);
    w.member("level", e.level);
    w.member("value", e.value);
    w.member("se", e.se);
    w.member("lower", e.lower);
    w.member("upper", e.upper);
    w.member("pooled", e.pooled);
    w.member("splits", static_cast<std::uint64_t>(e.splits));
    w.member("observations", static_cast<std::uint64_t>(e.observations));
    w.key("notes").begin_array();
    for (const auto& n : e.notes)
        w.value(n);
    w.end_array();
    w.key("cautions").begin_array();
    for (const auto& c : e.cautions)
        w.value(c);
    w.end_array();
    w.key("per_split").begin_array();
    for (const auto& s : e.per_split) {
        w.begin_object();
        w.member("index", static_cast<std::uint64_t>(s.index));
        w.member("repeat", static_cast<std::uint64_t>(s.repeat));
        w.member("fold", static_cast<std::uint64_t>(s.fold));
        w.member("train_size", static_cast<std::uint64_t>(s.train_size));
        w.member("test_size", static_cast<std::uint64_t>(s.test_size));
        w.member("value", s.value);
        if (!s.value)
            w.member("undefined", s.undefined_reason);
        w.end_object();
    }
    w.end_array();
    w.end_object();
}

} // namespace detail

/// One line: [model:] measure, value, [lower, upper], level, method, splits, rows, then each caution.
///   "MSE 0.4123 [0.3712, 0.4551] 95% corrected t (Nadeau-Bengio), 50 splits, n=5000"
///   "ridge: MSE 0.4123 [0.3712, 0.4551] 95% ..."                       (a named model)
///   "AUC 0.871 [0.848, 0.893] 95% DeLong, one test set, n=1200"
///   "error rate 0.1872 (.632+ bootstrap, point estimate), 200 splits, n=7350"
inline std::ostream& operator<<(std::ostream& os, const estimate& e) {
    std::string s =
        (e.model.empty() ? std::string() : e.model + ": ") + e.measure + " " + detail::readable_number(e.value);
    if (e.has_interval()) {
        s += " [" + detail::readable_number(*e.lower) + ", " + detail::readable_number(*e.upper) + "] " +
             detail::level_text(e.level) + " " + e.method_label;
    } else {
        s += " (" + e.method_label + ", point estimate)";
    }
    const std::size_t recorded = e.per_split.size();
    if (recorded > 1 || e.splits != recorded) {
        s += ", ";
        if (e.splits != recorded)
            s += std::to_string(e.splits) + " of ";
        s += std::to_string(recorded) + (recorded == 1 ? " split" : " splits");
    } else if (recorded == 1) {
        s += ", one test set";
    }
    s += ", n=" + std::to_string(e.observations);
    for (const auto& c : e.cautions)
        s += "; caution: " + c;
    return os << s;
}

/// The estimate as one JSON object (numbers in shortest round-trip form, absent values null).
inline std::string to_json(const estimate& e) {
    detail::json_writer w;
    detail::write_estimate_json(w, e);
    return w.str();
}

/// A JSON array of estimates.
inline void write_json(std::ostream& os, std::span<const estimate> es) {
    detail::json_writer w;
    w.begin_array();
    for (const auto& e : es)
        detail::write_estimate_json(w, e);
    w.end_array();
    os << w.str() << '\n';
}
inline void write_json(std::ostream& os, std::initializer_list<estimate> es) {
    write_json(os, std::span<const estimate>(es.begin(), es.size()));
}

/// The CSV header written by write_csv.
inline constexpr std::string_view csv_header = "record,model,measure,method,level,value,se,lower,upper,pooled,splits,"
                                               "observations,split,repeat,fold,train_size,test_size,notes,cautions";

/// CSV with a header line; per estimate, one `estimate` row then one `split` row per split
/// (split rows leave the summary columns and cautions empty; an undefined split has an empty
/// value and its reason in notes). Numbers in shortest round-trip form; fields quoted per RFC 4180.
inline void write_csv(std::ostream& os, std::span<const estimate> es) {
    os << csv_header << '\n';
    for (const auto& e : es) {
        std::string notes, cautions;
        for (const auto& n : e.notes)
            notes += (notes.empty() ? "" : "; ") + n;
        for (const auto& c : e.cautions)
            cautions += (cautions.empty() ? "" : "; ") + c;
        const std::string head = detail::csv_field(e.model) + "," + detail::csv_field(e.measure) + "," +
                                 std::string(ci::id_text(e.method)) + "," + detail::number_text(e.level);
        os << "estimate," << head << "," << detail::number_text(e.value) << "," << detail::csv_number(e.se) << ","
           << detail::csv_number(e.lower) << "," << detail::csv_number(e.upper) << "," << detail::csv_number(e.pooled)
           << "," << e.splits << "," << e.observations << ",,,,,," << detail::csv_field(notes) << ","
           << detail::csv_field(cautions) << '\n';
        for (const auto& s : e.per_split)
            os << "split," << head << "," << detail::csv_number(s.value) << ",,,,,,," << s.index << "," << s.repeat
               << "," << s.fold << "," << s.train_size << "," << s.test_size << ","
               << detail::csv_field(s.value ? std::string() : s.undefined_reason) << ",\n";
    }
}
inline void write_csv(std::ostream& os, std::initializer_list<estimate> es) {
    write_csv(os, std::span<const estimate>(es.begin(), es.size()));
}

HELDOUT_NAMESPACE_END
