// heldout/detail/state_checks.hpp — checks of a state loaded from bytes (stream/serialize.hpp):
// each accumulator's check_state() calls these once every field is read, so inconsistent
// content with a right checksum is an input_error from heldout::deserialize naming the field.
#pragma once

#include <heldout/core/error.hpp>

#include <cmath>
#include <cstddef>
#include <cstdint>
#include <span>
#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN
namespace detail {

/// Every element finite (a sum, a score, a probability).
template <class T>
void check_loaded_finite(std::string_view field, std::span<const T> v) {
    for (std::size_t i = 0; i < v.size(); ++i)
        if (!std::isfinite(v[i]))
            fail_loaded(field, "element " + std::to_string(i) + " is not finite");
}
inline void check_loaded_finite(std::string_view field, double v) {
    if (!std::isfinite(v))
        fail_loaded(field, "is not finite");
}
/// Finite and >= 0 (weights, weighted counts).
template <class T>
void check_loaded_nonnegative(std::string_view field, std::span<const T> v) {
    for (std::size_t i = 0; i < v.size(); ++i)
        if (!std::isfinite(v[i]) || v[i] < 0)
            fail_loaded(field, "element " + std::to_string(i) + " is negative or not finite");
}
inline void check_loaded_nonnegative(std::string_view field, double v) {
    if (!std::isfinite(v) || v < 0)
        fail_loaded(field, "is negative or not finite");
}
/// Labels below the number of classes.
template <class T>
void check_loaded_labels(std::string_view field, std::span<const T> v, std::size_t classes) {
    for (std::size_t i = 0; i < v.size(); ++i)
        if (static_cast<std::size_t>(v[i]) >= classes)
            fail_loaded(field, "element " + std::to_string(i) + " is label " + std::to_string(v[i]) +
                                   ", not below the number of classes " + std::to_string(classes));
}
/// A vector whose length must be `want` (weights as long as values, rows of k columns).
inline void check_loaded_size(std::string_view field, std::size_t got, std::size_t want, std::string_view what) {
    if (got != want)
        fail_loaded(field, "has " + std::to_string(got) + " elements, " + std::string(what) + " needs " +
                               std::to_string(want));
}

/// Parameters read from bytes, checked as the constructor checks them: `check` throws the
/// constructor's input_error, reported here as a load failure of `field`.
template <class Check>
void check_loaded_parameters(std::string_view field, Check&& check) {
    try {
        check();
    } catch (const input_error& e) {
        fail_loaded(field, std::string("out of range: ") + e.what());
    }
}

/// A row count (u64) that must equal `want`.
inline void check_loaded_count(std::string_view field, std::uint64_t got, std::uint64_t want) {
    if (got != want)
        fail_loaded(field, "is " + std::to_string(got) + ", the state holds " + std::to_string(want) + " rows");
}

} // namespace detail
HELDOUT_NAMESPACE_END
