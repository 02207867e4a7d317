// heldout/censored/column.hpp — how the aggregator records a censored truth: times and event
// indicators kept side by side, read back by the censored measures as
// heldout::censored_times<double, std::uint8_t>.
//
//   heldout::aggregator agg(heldout::measure::harrell_c{});
//   for (const heldout::split& s : heldout::repeated_kfold{.folds = 5, .repeats = 10}
//                                      .splits(heldout::strata(event)))   // stratified by the event
//       agg.record(s, heldout::censored(gather(time, s.test), gather(event, s.test)), risk_of(s));
//   heldout::estimate e = agg.estimate(heldout::measure::harrell_c{});     // corrected t over splits
#pragma once

#include <heldout/censored/truth.hpp>
#include <heldout/core/error.hpp>
#include <heldout/detail/columns.hpp>

#include <cstddef>
#include <cstdint>
#include <memory>
#include <ostream>
#include <span>
#include <string>
#include <string_view>
#include <typeindex>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace detail {

/// Censored times: time as double, event as 0/1.
class censored_column final : public column_base {
public:
    std::vector<double> time;
    std::vector<std::uint8_t> event;

    std::unique_ptr<column_base> empty_copy() const override { return std::make_unique<censored_column>(); }
    std::unique_ptr<column_base> clone() const override { return std::make_unique<censored_column>(*this); }
    std::size_t rows() const noexcept override { return time.size(); }
    std::string describe() const override { return "censored event times"; }
    bool same_layout(const column_base& o) const noexcept override {
        return dynamic_cast<const censored_column*>(&o) != nullptr;
    }
    void append(const column_base& o) override {
        const auto& x = static_cast<const censored_column&>(o);
        time.insert(time.end(), x.time.begin(), x.time.end());
        event.insert(event.end(), x.event.begin(), x.event.end());
    }
    void clear() noexcept override {
        time.clear();
        event.clear();
    }
    std::type_index view_type() const noexcept override { return typeid(censored_times<double, std::uint8_t>); }
    void view_into(std::size_t first, std::size_t count, void* out) const override {
        *static_cast<censored_times<double, std::uint8_t>*>(out) =
            censored_times<double, std::uint8_t>{std::span<const double>(time).subspan(first, count),
                                                 std::span<const std::uint8_t>(event).subspan(first, count)};
    }
    std::size_t cells() const noexcept override { return 2; }
    void write_cell(std::ostream& os, std::size_t row, std::size_t cell) const override {
        if (cell == 0)
            os << number_text(time[row]);
        else
            os << static_cast<int>(event[row]);
    }
};

} // namespace detail

/// A censored truth is recorded as a detail::censored_column (rows checked here).
template <class T, class E>
struct column_traits<censored_times<T, E>> {
    using column = detail::censored_column;
    static void append(column& c, const censored_times<T, E>& y, std::string_view who, std::string_view) {
        c.time.reserve(c.time.size() + y.size());
        c.event.reserve(c.event.size() + y.size());
        for (std::size_t i = 0; i < y.size(); ++i) {
            detail::check_censored_row(who, y.time[i], y.event[i], i);
            c.time.push_back(static_cast<double>(y.time[i]));
            c.event.push_back(static_cast<std::uint8_t>(y.event[i] != E(0)));
        }
    }
};

HELDOUT_NAMESPACE_END
