// heldout/measure/table_accumulator.hpp — the accumulator of every table-based label measure
// (precision, recall, MCC, kappa, ...): a confusion_accumulator plus the measure, whose value
// is computed from the table when asked.
//
//   heldout::measure::table_accumulator<heldout::measure::mcc> acc(heldout::measure::mcc{});
//   acc.add(truth, pred);  acc.merge(other);  double v = acc.value();
#pragma once

#include <heldout/core/measure.hpp>
#include <heldout/detail/confusion_table.hpp>
#include <heldout/detail/state_checks.hpp>
#include <heldout/measure/confusion_accumulator.hpp>

#include <concepts>
#include <cstdint>
#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN

namespace measure {

/// The accumulator of every table-based label measure M: a confusion_accumulator plus
/// the measure, whose value is computed from the table when asked. M provides name() and
/// message_name() (its name in messages, without parameters such as costs),
/// table_classes() (the fixed k, or 0; it checks the parameters), from_view(view, margins,
/// who), visit_state over its parameters, and optionally check_usable(who) (refuses a
/// measure that cannot score, e.g. a default cost_weighted_error without costs).
///
/// State (visit_state order): the measure's parameters (nested), then the confusion
/// table's state (name, fixed k, k, cells, carries, count).
template <class M>
class table_accumulator {
public:
    /// The accumulator of a default M (what deserialize() fills).
    table_accumulator() : table_accumulator(M{}) {}
    explicit table_accumulator(const M& m) : m_(m), table_(m.table_classes(), "measure " + m.message_name()) {}

    template <label_range T, label_range P>
    void add(const T& truth, const P& prediction) {
        check_usable();
        table_.add(truth, prediction);
    }
    template <label_range T, label_range P, weight_range W>
    void add(const T& truth, const P& prediction, const W& weights) {
        check_usable();
        table_.add(truth, prediction, weights);
    }
    template <std::integral A, std::integral B>
    void add_one(A y, B f, double w = 1.0) {
        check_usable();
        table_.add_one(y, f, w);
    }
    /// Combines two shards; both must be of the same measure (equal parameters).
    void merge(const table_accumulator& o) {
        if (!same_measure(m_, o.m_))
            detail::fail_state(table_.who(), "other",
                               "cannot merge a state of measure " + o.m_.name() + " into one of " + m_.name());
        table_.merge(o.table_);
    }

    /// The measure on the table so far; undefined_error when it is 0/0 (see the measure).
    /// Allocates nothing once a table of this k has been scored on this thread.
    double value() const {
        check_usable();
        if (table_.count() == 0)
            detail::fail_undefined(table_.who(), "no observations");
        const detail::table_view v = table_.view();
        detail::table_margins& m = detail::margins_scratch();
        m.compute(v);
        return m_.from_view(v, m, table_.who());
    }
    void reset() noexcept { table_.reset(); }

    /// The confusion table underneath.
    const confusion_accumulator& confusion() const noexcept { return table_; }
    std::uint64_t count() const noexcept { return table_.count(); }
    double total_weight() const { return table_.total_weight(); }
    const M& measure() const noexcept { return m_; }

    // The parameters come first, so deserialised bytes restore the measure; read from
    // bytes, they are checked as the constructor checks them.
    template <class F>
    void visit_state(F&& f) {
        f(m_);
        table_.visit_state(f);
        // Bytes of a measure with the same layout (precision read as recall) are refused.
        if (m_.table_classes() != table_.fixed_classes() || table_.who() != "measure " + m_.message_name())
            detail::fail("heldout::deserialize", "bytes",
                         "the state is of " + table_.who() + " with " + std::to_string(table_.fixed_classes()) +
                             " fixed classes, not of measure " + m_.message_name());
    }
    template <class F>
    void visit_state(F&& f) const {
        f(m_);
        table_.visit_state(f);
    }
    /// After a load (stream/serialize.hpp): the parameters as the constructor checks them,
    /// then the table.
    void check_state() const {
        detail::check_loaded_parameters("parameters", [&] { (void)m_.table_classes(); });
        table_.check_state();
    }

private:
    void check_usable() const {
        if constexpr (requires(const M& m) { m.check_usable(std::string_view{}); })
            m_.check_usable(table_.who());
    }

    M m_;
    confusion_accumulator table_;
};

} // namespace measure

HELDOUT_NAMESPACE_END
