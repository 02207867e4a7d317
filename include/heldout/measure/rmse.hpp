// heldout/measure/rmse.hpp — root mean squared error: the square root of MSE.
//
//   double r = heldout::evaluate(heldout::measure::rmse{}, y, f);       // sqrt(mean (y - f)^2)
//   double w = heldout::evaluate(heldout::measure::rmse{}, y, f, wts);  // sqrt(sum w e^2 / sum w)
//
// The accumulator is MSE's (mean_loss<loss::squared>): streaming, mergeable, compensated;
// the root is taken only in value(), so merging shards is exact.
#pragma once

#include <heldout/measure/mean_loss.hpp>

#include <cmath>
#include <string>

HELDOUT_NAMESPACE_BEGIN
namespace measure {

struct rmse;

/// Running state of rmse: MSE's state, read through a square root.
class rmse_accumulator : public mean_loss_accumulator<loss::squared> {
public:
    using mean_loss_accumulator<loss::squared>::mean_loss_accumulator;
    void merge(const rmse_accumulator& o) { mean_loss_accumulator<loss::squared>::merge(o); }
    double value() const { return std::sqrt(mean_loss_accumulator<loss::squared>::value()); }
    rmse measure() const;
};

/// Root mean squared error.
struct rmse {
    static constexpr direction better = direction::lower_is_better;
    static constexpr prediction_kind kind = prediction_kind::real;
    using capabilities = offers<cap::serialisable>;
    static constexpr std::string_view key = "rmse";

    std::string name() const { return "RMSE"; }
    rmse_accumulator accumulator() const { return {}; }
};

inline rmse rmse_accumulator::measure() const { return {}; }

} // namespace measure
HELDOUT_NAMESPACE_END
