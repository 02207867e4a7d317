// A tiny program written against the installed heldout package.
#include <heldout/heldout.hpp>

#include <cmath>
#include <cstdio>
#include <vector>

int main() {
    const std::vector<double> y{1.5, 2.0, 3.5, 4.0, 6.0};
    const std::vector<double> f{1.0, 2.5, 3.0, 4.5, 5.0};
    const double mse = heldout::evaluate(heldout::measure::mse{}, y, f); // 0.4 (methods check, Appendix A)
    std::printf("MSE %.6f\n", mse);
    return std::abs(mse - 0.4) < 1e-12 ? 0 : 1;
}
