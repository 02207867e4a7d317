// heldout/censored/detail/censored_accumulator.hpp — the running state shared by the censored
// measures: they are not sums of rows (the censoring estimate and the comparable pairs span
// the whole set), so the state keeps the rows; merge appends (exact), value() scores them.
// Internal; the measure M supplies `double from_rows(time, event, prediction, width) const`,
// `void check_prediction(double p, std::size_t row) const` and its prediction width.
#pragma once

#include <heldout/censored/column.hpp> // the aggregator records censored truths
#include <heldout/censored/truth.hpp>
#include <heldout/core/error.hpp>
#include <heldout/core/values.hpp>
#include <heldout/detail/state_checks.hpp>

#include <cmath>
#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace detail {

template <class M>
class censored_accumulator {
public:
    censored_accumulator() = default;
    explicit censored_accumulator(M m) : m_(std::move(m)) {}

    /// A batch: censored truth and one prediction per row (a real range, or rows of a
    /// survival-curve matrix for measures that read curves).
    template <class T, class E, class P>
    requires(real_range<P> || probability_rows<P>) void add(const censored_times<T, E>& truth, const P& prediction) {
        const std::string who = m_.name();
        const std::size_t base = time_.size();
        const std::size_t w = m_.width();
        std::size_t n = 0;
        if constexpr (probability_rows<P>) {
            const auto r = rows_of(prediction);
            if (r.cols != w)
                fail(who, "prediction", std::to_string(r.cols) + " columns, expected " + std::to_string(w));
            n = r.rows;
        } else {
            if (w != 1)
                fail(who, "prediction", "needs survival-curve rows (heldout::rows(flat, k)), got a single column");
            n = values_of(prediction).size();
        }
        try {
            check_censored(who, truth, n, "prediction");
            if constexpr (probability_rows<P>) {
                const auto r = rows_of(prediction);
                for (std::size_t i = 0; i < n; ++i)
                    for (std::size_t j = 0; j < w; ++j)
                        m_.check_prediction(static_cast<double>(r(i, j)), i);
            } else {
                const auto s = values_of(prediction);
                for (std::size_t i = 0; i < n; ++i)
                    m_.check_prediction(static_cast<double>(s[i]), i);
            }
        } catch (const input_error& e) {
            rethrow_shifted(e, base);
        }
        time_.reserve(base + n);
        event_.reserve(base + n);
        pred_.reserve((base + n) * w);
        for (std::size_t i = 0; i < n; ++i) {
            time_.push_back(static_cast<double>(truth.time[i]));
            event_.push_back(static_cast<std::uint8_t>(truth.event[i] != E(0)));
        }
        if constexpr (probability_rows<P>) {
            const auto r = rows_of(prediction);
            for (std::size_t i = 0; i < n; ++i)
                for (std::size_t j = 0; j < w; ++j)
                    pred_.push_back(static_cast<double>(r(i, j)));
        } else {
            for (const auto x : values_of(prediction))
                pred_.push_back(static_cast<double>(x));
        }
    }

    /// One row (single-column measures).
    template <class F>
    void add_one(double time, int event, F prediction) {
        const double t[1] = {time};
        const int e[1] = {event};
        const double p[1] = {static_cast<double>(prediction)};
        add(censored(t, e), p);
    }

    void merge(const censored_accumulator& o) {
        if (!(o.m_ == m_))
            fail_state(m_.name(), "other", "cannot merge a state of " + o.m_.name() + ": the parameters differ");
        time_.insert(time_.end(), o.time_.begin(), o.time_.end());
        event_.insert(event_.end(), o.event_.begin(), o.event_.end());
        pred_.insert(pred_.end(), o.pred_.begin(), o.pred_.end());
    }

    double value() const {
        if (time_.empty())
            fail_undefined(m_.name(), "no rows were added");
        if (event_.size() != time_.size() || pred_.size() != time_.size() * m_.width())
            fail_state(m_.name(), "state", "row counts of time, event and prediction disagree");
        return m_.from_rows(time_, event_, pred_);
    }

    void reset() noexcept {
        time_.clear();
        event_.clear();
        pred_.clear();
    }

    const M& measure() const noexcept { return m_; }

    /// A state read from bytes: rows of one length, every row as add() would accept it.
    void check_state() const {
        check_loaded_size("event", event_.size(), time_.size(), "one per time");
        check_loaded_size("prediction", pred_.size(), time_.size() * m_.width(), "the rows times the prediction width");
        for (std::size_t i = 0; i < time_.size(); ++i) {
            if (!std::isfinite(time_[i]) || time_[i] < 0)
                fail_loaded("time", "element " + std::to_string(i) + " is negative or not finite");
            if (event_[i] > 1)
                fail_loaded("event", "element " + std::to_string(i) + " is not 0 or 1");
        }
        check_loaded_parameters("prediction", [&] {
            for (std::size_t i = 0; i < pred_.size(); ++i)
                m_.check_prediction(pred_[i], i / m_.width());
        });
    }
    std::size_t size() const noexcept { return time_.size(); }

    template <class F>
    void visit_state(F&& f) {
        m_.visit_state(f);
        f(time_);
        f(event_);
        f(pred_);
    }
    template <class F>
    void visit_state(F&& f) const {
        m_.visit_state(f);
        f(time_);
        f(event_);
        f(pred_);
    }

private:
    M m_{};
    std::vector<double> time_;
    std::vector<std::uint8_t> event_;
    std::vector<double> pred_;
};

} // namespace detail
HELDOUT_NAMESPACE_END
