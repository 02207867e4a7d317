// The deterministic twin of tests/fuzz/state_fuzz.cpp, so that every test run (and the ASan
// + UBSan build of the suite) covers it: valid states of every serialisable accumulator,
// mutated with the checksum recomputed, are loaded and used; the only exception allowed is
// heldout::input_error, and the sanitizers must stay quiet.
#include "stream/state_samples.hpp"

#include <doctest/doctest.h>

#include <exception>
#include <random>
#include <string>

TEST_SUITE("stream/state_mutation") {
    TEST_CASE("valid states load and are used without error") {
        for (std::size_t i = 0; i < state_samples::case_count(); ++i) {
            INFO("case " << i);
            for (const auto& s : state_samples::seeds(i))
                CHECK_NOTHROW(state_samples::load_and_use(i, s));
        }
    }
    TEST_CASE("mutated states with a right checksum: input_error or a usable state, never another failure") {
        std::mt19937_64 g(2026);
        std::size_t refused = 0, loaded = 0;
        for (std::size_t i = 0; i < state_samples::case_count(); ++i) {
            const auto seeds = state_samples::seeds(i);
            for (int round = 0; round < 300; ++round) {
                auto bytes = seeds[static_cast<std::size_t>(round) % seeds.size()];
                const int changes = 1 + static_cast<int>(g() % 3);
                for (int c = 0; c < changes; ++c)
                    state_samples::mutate(bytes, g);
                try {
                    state_samples::load_and_use(i, bytes);
                    ++loaded;
                } catch (const heldout::input_error&) {
                    ++refused;
                } catch (const std::exception& e) {
                    FAIL("case " << i << ", round " << round << ": " << e.what());
                }
            }
        }
        CHECK(refused > 0);
        CHECK(loaded > 0);
    }
}
