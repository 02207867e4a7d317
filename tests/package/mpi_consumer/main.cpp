// A program written against the installed package's mpi component (one rank: run directly).
#include <heldout/measure/mean_loss.hpp>
#include <heldout/mpi.hpp>

#include <mpi.h>

#include <cmath>
#include <cstdio>
#include <vector>

int main(int argc, char** argv) {
    MPI_Init(&argc, &argv);
    const std::vector<double> y{1.5, 2.0, 3.5, 4.0, 6.0};
    const std::vector<double> f{1.0, 2.5, 3.0, 4.5, 5.0};
    // 0.4 (methods check, Appendix A), on one rank
    const double mse = heldout::mpi::evaluate(heldout::measure::mse{}, y, f, MPI_COMM_WORLD);
    std::printf("MSE %.6f\n", mse);
    MPI_Finalize();
    return std::abs(mse - 0.4) < 1e-12 ? 0 : 1;
}
