// Text checks shared by the tests that read what heldout printed (pages, notes, messages).
//
//   CHECK(heldout_test::count_of(page, "<svg") == 6);
//   CHECK(heldout_test::has(e.notes[0], "one test set"));
#pragma once

#include <cstddef>
#include <string_view>

namespace heldout_test {

/// How many times `what` occurs in s (overlapping occurrences counted).
inline std::size_t count_of(std::string_view s, std::string_view what) {
    std::size_t n = 0;
    for (auto p = s.find(what); p != std::string_view::npos; p = s.find(what, p + 1))
        ++n;
    return n;
}

/// Whether `part` occurs in text.
inline bool has(std::string_view text, std::string_view part) { return text.find(part) != std::string_view::npos; }

} // namespace heldout_test
