// heldout_test::double_from_chars: std::from_chars for a double where the standard library
// has it (libstdc++), else strtod_l in the "C" locale (libc++ before LLVM 20 has no
// floating-point from_chars). Tests read back numbers that heldout or the reference scripts
// printed; the tool's CSV reader (examples/tool/csv.hpp) carries the exact from_chars grammar.
//
//   double x = 0;
//   auto r = heldout_test::double_from_chars(s.data(), s.data() + s.size(), x);
#pragma once

#include <cerrno>
#include <charconv>
#include <clocale>
#include <cmath>
#include <cstdlib>
#include <string>
#include <system_error>

namespace heldout_test {

inline std::from_chars_result double_from_chars(const char* first, const char* last, double& x) {
#if defined(__cpp_lib_to_chars) && __cpp_lib_to_chars >= 201611L
    return std::from_chars(first, last, x);
#else
    // from_chars takes no leading space and no '+'; strtod would
    if (first == last || *first == '+' || *first == ' ' || *first == '\t' || *first == '\n')
        return {first, std::errc::invalid_argument};
    static const locale_t c_locale = newlocale(LC_ALL_MASK, "C", locale_t{});
    const std::string text(first, last);
    char* end = nullptr;
    errno = 0;
    const double v = strtod_l(text.c_str(), &end, c_locale);
    const char* ptr = first + (end - text.c_str());
    if (ptr == first)
        return {first, std::errc::invalid_argument};
    if (errno == ERANGE && (v == 0 || std::isinf(v)))
        return {ptr, std::errc::result_out_of_range};
    x = v;
    return {ptr, std::errc{}};
#endif
}

} // namespace heldout_test
