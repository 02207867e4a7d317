// Reader for the live reference tables written by tests/reference/ref_*.py.
//
//   auto t = heldout_test::reference_table("ref_regression");   // build/.../ref_regression.txt
//   std::vector<double> y = t.get("case0.truth");
//   double expected = t.scalar("case0.mse");
#pragma once

#include "support/parse.hpp"

#include <charconv>
#include <fstream>
#include <limits>
#include <map>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

#ifndef HELDOUT_REFERENCE_DIR
#error "HELDOUT_REFERENCE_DIR must be defined by the build"
#endif

namespace heldout_test {

class reference_table {
public:
    explicit reference_table(const std::string& stem) {
        const std::string path = std::string(HELDOUT_REFERENCE_DIR) + "/" + stem + ".txt";
        std::ifstream in(path);
        if (!in)
            throw std::runtime_error("reference table " + path + " missing: run ctest (fixture reference_data)");
        std::string line;
        while (std::getline(in, line)) {
            std::istringstream ls(line);
            std::string name;
            std::size_t n = 0;
            ls >> name >> n;
            std::vector<double> v(n);
            for (auto& x : v) {
                std::string tok;
                ls >> tok;
                auto r = double_from_chars(tok.data(), tok.data() + tok.size(), x);
                if (r.ec != std::errc{}) {
                    if (tok == "nan")
                        x = std::numeric_limits<double>::quiet_NaN();
                    else if (tok == "inf")
                        x = std::numeric_limits<double>::infinity();
                    else if (tok == "-inf")
                        x = -std::numeric_limits<double>::infinity();
                    else
                        throw std::runtime_error("bad number '" + tok + "' in " + path);
                }
            }
            data_[name] = std::move(v);
        }
    }
    const std::vector<double>& get(const std::string& name) const {
        auto it = data_.find(name);
        if (it == data_.end())
            throw std::runtime_error("reference entry '" + name + "' missing");
        return it->second;
    }
    double scalar(const std::string& name) const { return get(name).at(0); }
    bool has(const std::string& name) const { return data_.count(name) != 0; }
    template <class T>
    std::vector<T> get_as(const std::string& name) const {
        const auto& v = get(name);
        return std::vector<T>(v.begin(), v.end());
    }

private:
    std::map<std::string, std::vector<double>> data_;
};

/// |a - b| <= rel * max(|a|, |b|), or both tiny (<= abs).
inline bool close(double a, double b, double rel = 1e-12, double abs = 1e-300) {
    const double d = a > b ? a - b : b - a;
    const double m = (a < 0 ? -a : a) > (b < 0 ? -b : b) ? (a < 0 ? -a : a) : (b < 0 ? -b : b);
    return d <= rel * m || d <= abs;
}

} // namespace heldout_test
