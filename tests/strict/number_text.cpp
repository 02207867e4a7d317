// Prints heldout's number texts for a fixed set of doubles: shortest round-trip text (JSON
// and CSV exports), four significant digits (printed estimates), the report's fixed-decimal
// and shortest numbers (SVG). tests/strict.cmake builds it with g++ (libstdc++) and with
// clang++ (libc++) and requires the two outputs to be identical, byte for byte: an estimate
// written on one standard library reads the same on the other.
#include <heldout/detail/json.hpp>
#include <heldout/estimate/estimate.hpp>
#include <heldout/report/svg.hpp>

#include <bit>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <limits>
#include <string>
#include <vector>

int main() {
    using lim = std::numeric_limits<double>;
    std::vector<double> v = {0.0,
                             -0.0,
                             0.1,
                             1.0 / 3.0,
                             1e21,
                             1e22,
                             1e23,
                             1e-5,
                             0.001,
                             123456.0,
                             9007199254740993.0,
                             123456789012345677877.0,
                             lim::max(),
                             lim::min(),
                             lim::denorm_min(),
                             lim::epsilon(),
                             -2.5e17,
                             0.35000000000000003};
    for (int i = -1074; i <= 1023; ++i)
        v.push_back(std::ldexp(1.0, i));
    for (int i = 0; i < 2000; ++i) {
        v.push_back(i / 10.0);
        v.push_back(i / 1000.0);
        v.push_back(-7.0 * i);
    }
    std::uint64_t s = 88172645463325252ull; // xorshift64: bit patterns over the whole range
    for (int i = 0; i < 100000; ++i) {
        s ^= s << 13, s ^= s >> 7, s ^= s << 17;
        if (const double x = std::bit_cast<double>(s); std::isfinite(x))
            v.push_back(x);
        v.push_back(std::bit_cast<double>(s & 0x000fffffffffffffull));
        v.push_back(static_cast<double>(s >> 11) * 0x1p-53);
    }
    for (const double x : v) {
        std::string line = heldout::detail::number_text(x) + " " + heldout::detail::readable_number(x) + " " +
                           heldout::report::number(x);
        for (const int d : {0, 2, 5, 17})
            line += " " + heldout::report::number(x, d);
        std::puts(line.c_str());
    }
    return 0;
}
