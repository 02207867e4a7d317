// Tests for heldout/core/values.hpp: contiguous inputs without copies, Eigen included.
#include <heldout/core/values.hpp>

#include <Eigen/Dense>
#include <doctest/doctest.h>

#include <array>
#include <cmath>
#include <cstdint>
#include <limits>
#include <span>
#include <vector>

TEST_SUITE("core/values") {
    TEST_CASE("vectors, spans, arrays and Eigen vectors are viewed in place") {
        std::vector<double> v{1, 2, 3};
        CHECK(heldout::values_of(v).data() == v.data());
        std::span<const double> s(v);
        CHECK(heldout::values_of(s).data() == v.data());
        std::array<float, 2> a{1.f, 2.f};
        CHECK(heldout::values_of(a).size() == 2);
        Eigen::VectorXd e(4);
        e << 1, 2, 3, 4;
        CHECK(heldout::values_of(e).data() == e.data());
        Eigen::VectorXf ef(3);
        CHECK(heldout::values_of(ef).size() == 3);
        Eigen::RowVectorXd r(2);
        CHECK(heldout::values_of(r).size() == 2);
    }
    TEST_CASE("concepts tell labels from real values by element type") {
        CHECK(heldout::label_range<std::vector<int>>);
        CHECK(heldout::label_range<std::vector<std::uint8_t>>);
        CHECK(heldout::label_range<std::vector<bool>> == false); // std::vector<bool> is not contiguous
        CHECK(heldout::label_range<std::array<bool, 3>>);
        CHECK(heldout::real_range<std::vector<float>>);
        CHECK(heldout::real_range<Eigen::VectorXd>);
        CHECK_FALSE(heldout::real_range<std::vector<int>>);
        CHECK_FALSE(heldout::label_range<std::vector<double>>);
        CHECK(heldout::probability_rows<Eigen::MatrixXd>);
        CHECK_FALSE(heldout::probability_rows<Eigen::VectorXd>);
    }
    TEST_CASE("a strided Eigen view is refused with a clear message") {
        Eigen::MatrixXd m = Eigen::MatrixXd::Zero(3, 3);
        auto row = m.row(1); // inner stride 3 in a column-major matrix
        CHECK_THROWS_WITH_AS(heldout::values_of(row, "f", "x"),
                             "f: argument 'x': Eigen vector with inner stride != 1; pass a contiguous copy",
                             heldout::input_error);
    }
    TEST_CASE("rows views column-major and row-major matrices alike") {
        Eigen::MatrixXd cm(2, 3);
        cm << 0.1, 0.2, 0.7, 0.3, 0.3, 0.4;
        Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor> rm = cm;
        auto a = heldout::rows_of(cm);
        auto b = heldout::rows_of(rm);
        for (std::size_t i = 0; i < 2; ++i)
            for (std::size_t j = 0; j < 3; ++j) {
                CHECK(a(i, j) == cm(Eigen::Index(i), Eigen::Index(j)));
                CHECK(b(i, j) == cm(Eigen::Index(i), Eigen::Index(j)));
            }
        std::vector<double> flat{0.1, 0.2, 0.7, 0.3, 0.3, 0.4};
        auto c = heldout::rows(flat, 3);
        CHECK(c.rows == 2);
        CHECK(c(1, 2) == 0.4);
        CHECK_THROWS_AS(heldout::rows(flat, 4), heldout::input_error);
    }
    TEST_CASE("scores become labels only through an explicit threshold") {
        std::vector<double> s{0.2, 0.5, 0.7};
        CHECK(heldout::labels_at(s, 0.5) == std::vector<std::uint8_t>{0, 1, 1});
        // A non-finite threshold is refused: NaN made every label 0 without a word.
        CHECK_THROWS_WITH_AS(heldout::labels_at(s, std::nan("")),
                             "heldout::labels_at: argument 'threshold': not finite (nan)", heldout::input_error);
        CHECK_THROWS_WITH_AS(heldout::labels_at(s, std::numeric_limits<double>::infinity()),
                             "heldout::labels_at: argument 'threshold': not finite (inf)", heldout::input_error);
        CHECK_THROWS_WITH_AS(heldout::labels_at(s, -std::numeric_limits<double>::infinity()),
                             "heldout::labels_at: argument 'threshold': not finite (inf)", heldout::input_error);
    }
}
