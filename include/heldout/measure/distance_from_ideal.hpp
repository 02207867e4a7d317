// heldout/measure/distance_from_ideal.hpp — a measure with an ideal value (direction::
// toward_ideal, such as the calibration slope, ideal 1) seen as the distance from that
// ideal, a lower-is-better measure. compare() ranks such measures through it.
//
//   using namespace heldout;
//   measure::distance_from_ideal<measure::calibration_slope> off{};      // |slope - 1|
//   double d = evaluate(off, y, p);
//   aggregator agg(measure::calibration_slope{}, off);                    // both tracked
//
// The value is |value of the inner measure - ideal|, undefined where the inner value is. It
// has no per-row values and no other capability: the distance of a fitted value is not a
// mean of per-row values, and its standard error is not the inner one's.
#pragma once

#include <heldout/core/measure.hpp>

#include <string>
#include <utility>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

template <class M>
struct distance_from_ideal;

/// Running state of distance_from_ideal<M>: the inner measure's state.
template <class M>
class distance_from_ideal_accumulator {
public:
    distance_from_ideal_accumulator() : inner_(M{}.accumulator()) {}
    explicit distance_from_ideal_accumulator(const M& m) : inner_(m.accumulator()) {}

    template <class T, class P>
    requires requires(accumulator_t<M>& a, const T& t, const P& p) { a.add(t, p); }
    void add(const T& truth, const P& prediction) { inner_.add(truth, prediction); }
    template <class T, class P, class W>
    requires requires(accumulator_t<M>& a, const T& t, const P& p, const W& w) { a.add(t, p, w); }
    void add(const T& truth, const P& prediction, const W& weights) { inner_.add(truth, prediction, weights); }
    template <class... A>
    requires requires(accumulator_t<M>& a, const A&... x) { a.add_one(x...); }
    void add_one(const A&... x) { inner_.add_one(x...); }
    void merge(const distance_from_ideal_accumulator& o) { inner_.merge(o.inner_); }
    double value() const { return heldout::distance_from_ideal(inner_.value(), ideal_value_v<M>); }
    void reset() { inner_.reset(); }
    /// The inner measure's state.
    const accumulator_t<M>& inner() const noexcept { return inner_; }

private:
    accumulator_t<M> inner_;
};

/// |m - ideal| for a measure m with an ideal value; lower is better.
template <class M>
struct distance_from_ideal {
    static_assert(has_ideal_v<M>, "heldout::measure::distance_from_ideal takes a measure that declares an ideal "
                                  "value (better = direction::toward_ideal, `static constexpr double ideal`)");
    static constexpr direction better = direction::lower_is_better;
    using prediction = prediction_kind_t<M>;
    using truth = truth_kind_t<M>;

    M measure{};

    bool operator==(const distance_from_ideal& o) const { return same_measure(measure, o.measure); }
    /// "distance of calibration slope from 1".
    std::string name() const { return "distance of " + measure.name() + " from " + detail::number_text(M::ideal); }
    distance_from_ideal_accumulator<M> accumulator() const { return distance_from_ideal_accumulator<M>(measure); }
};

} // namespace measure
HELDOUT_NAMESPACE_END
