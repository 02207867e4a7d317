// Tests for heldout/version.hpp and heldout/core/config.hpp: version macros, the inline
// versioned namespace, and the umbrella headers.
#include <heldout/core/config.hpp>
#include <heldout/heldout.hpp>
#include <heldout/measure.hpp>
#include <heldout/report.hpp>
#include <heldout/stream.hpp>
#include <heldout/version.hpp>

#include <doctest/doctest.h>

#include <type_traits>

TEST_SUITE("core/version") {
    TEST_CASE("the version macros agree with each other") {
        CHECK(HELDOUT_VERSION == HELDOUT_VERSION_MAJOR * 10000 + HELDOUT_VERSION_MINOR * 100 + HELDOUT_VERSION_PATCH);
        CHECK(HELDOUT_VERSION_MAJOR == 0);
        CHECK(HELDOUT_VERSION_MINOR == 1);
    }
    TEST_CASE("public names live in the inline namespace v0") {
        CHECK(std::is_same_v<heldout::input_error, heldout::v0::input_error>);
        CHECK(std::is_same_v<heldout::measure::mse, heldout::v0::measure::mse>);
    }
    TEST_CASE("the umbrella headers bring every group") {
        // one name from each group, all through <heldout/heldout.hpp>
        CHECK(heldout::outer_measure<heldout::measure::auc>);
        CHECK(heldout::outer_measure<heldout::measure::brier_score>);
        CHECK(heldout::kfold{.folds = 3}.splits(9).size() == 3);
        CHECK(heldout::holm_adjust(std::vector<double>{0.01}).size() == 1);
        CHECK(heldout::wilson_interval(0, 10, 0.95).lower == 0.0);
        heldout::early_stopping stop{heldout::direction::lower_is_better};
        CHECK_FALSE(stop.update(1.0));
        CHECK(heldout::report::xml_escape("<a&b>") == "&lt;a&amp;b&gt;");
    }
}
