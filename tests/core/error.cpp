// Tests for heldout/core/error.hpp: the exception types and the one message shape.
#include <heldout/core/error.hpp>

#include <doctest/doctest.h>

#include <string>

TEST_SUITE("core/error") {
    TEST_CASE("input_error is a std::invalid_argument and undefined_error an input_error") {
        CHECK(std::is_base_of_v<std::invalid_argument, heldout::input_error>);
        CHECK(std::is_base_of_v<heldout::input_error, heldout::undefined_error>);
    }
    TEST_CASE("messages name the caller, the argument and the index") {
        try {
            heldout::detail::fail_at("measure MSE", "prediction", "not finite (nan)", 17);
            FAIL("no throw");
        } catch (const heldout::input_error& e) {
            CHECK(std::string(e.what()) == "measure MSE: argument 'prediction': not finite (nan) at index 17");
        }
        try {
            heldout::detail::fail_undefined("measure precision", "no predicted positive");
            FAIL("no throw");
        } catch (const heldout::undefined_error& e) {
            CHECK(std::string(e.what()) == "measure precision: undefined: no predicted positive");
        }
    }
}
