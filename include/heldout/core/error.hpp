// heldout/core/error.hpp — the exceptions heldout throws, readable and structured.
//
//   try {
//       heldout::evaluate(heldout::measure::mse{}, truth, prediction);
//   } catch (const heldout::undefined_error& e) {   // input that leaves a measure undefined
//   } catch (const heldout::input_error& e) {       // any other bad input
//       std::cerr << e.what() << '\n';  // "measure MSE: argument 'prediction': not finite (nan) at index 17"
//       if (e.code() == heldout::error_code::bad_argument && e.index())
//           drop_row(*e.index());       // programs branch on the cause, not on the text
//   }
//
// Policy, the same everywhere:
//  * input_error (a std::invalid_argument) for bad input: size mismatch, empty input,
//    NaN or infinity, a label outside 0..k-1, a probability outside [0,1], negative
//    weights, a plan that cannot be built. The message names the function or measure,
//    the argument and, for element errors, the index of the first offending element.
//  * undefined_error (derived from input_error) when the input is valid data but the
//    requested value is mathematically undefined on it: precision with no predicted
//    positive, R^2 with constant truth, AUC with one class absent, kappa with p_e = 1.
//    heldout never returns a silent NaN or a conventional 0/0.5 in its place; callers
//    that want to skip such cases (the aggregator does, and reports them) catch it.
//  * state_error (derived from input_error) when accumulator state does not fit: bytes of
//    another measure or configuration, inconsistent fields in bytes whose checksum is
//    right, merging accumulators configured differently.
//  * io_error (a std::runtime_error) when reading or writing a file or stream fails.
//
// Every error carries its parts: code(), who() ("measure MSE", "heldout::kfold"),
// argument() ("prediction"; empty when the problem is not one argument's), index() (the
// first offending element, when there is one) and problem() (the text after them).
#pragma once

#include <heldout/core/config.hpp>

#include <charconv>
#include <cstddef>
#include <optional>
#include <stdexcept>
#include <string>
#include <string_view>
#include <utility>

HELDOUT_NAMESPACE_BEGIN

/// What kind of failure an error reports; programs branch on it.
enum class error_code : unsigned char {
    bad_argument,   ///< input_error: the input is not valid for this call
    undefined,      ///< undefined_error: valid input, but the value is 0/0 or its kin
    state_mismatch, ///< state_error: state of another measure or configuration, or inconsistent state
    io,             ///< io_error: a file or stream could not be read or written
    remote          ///< the failure happened elsewhere (another process of a distributed run)
};

constexpr std::string_view to_string(error_code c) noexcept {
    switch (c) {
    case error_code::bad_argument:
        return "bad argument";
    case error_code::undefined:
        return "undefined";
    case error_code::state_mismatch:
        return "state mismatch";
    case error_code::io:
        return "input/output";
    case error_code::remote:
        return "remote failure";
    }
    return "?";
}

/// The parts of an error message, kept apart so programs need not parse text.
struct error_details {
    error_code code = error_code::bad_argument;
    std::string who;                    ///< the function or measure ("measure MSE")
    std::string argument;               ///< the argument at fault; empty when none
    std::string problem;                ///< what is wrong ("not finite (nan)")
    std::optional<std::size_t> index{}; ///< first offending element, when there is one
};

namespace detail {

/// "who: argument 'arg': problem at index i" — the one message shape used by every check.
inline std::string compose_message(const error_details& d) {
    std::string s;
    s.reserve(d.who.size() + d.argument.size() + d.problem.size() + 40);
    s.append(d.who);
    if (!d.argument.empty()) {
        s.append(": argument '");
        s.append(d.argument);
        s.append("'");
    }
    s.append(": ");
    if (d.code == error_code::undefined)
        s.append("undefined: ");
    s.append(d.problem);
    if (d.index) {
        s.append(" at index ");
        s.append(std::to_string(*d.index));
    }
    return s;
}

} // namespace detail

/// Bad input: the message names the function, the argument and the first offending index.
class input_error : public std::invalid_argument {
public:
    /// An error from its parts; what() is composed from them.
    explicit input_error(error_details d) : std::invalid_argument(detail::compose_message(d)), d_(std::move(d)) {}
    /// An error with a ready message (no argument or index known).
    explicit input_error(const std::string& message) : std::invalid_argument(message) { d_.problem = message; }
    explicit input_error(const char* message) : input_error(std::string(message)) {}

    error_code code() const noexcept { return d_.code; }
    const std::string& who() const noexcept { return d_.who; }
    const std::string& argument() const noexcept { return d_.argument; }
    const std::string& problem() const noexcept { return d_.problem; }
    std::optional<std::size_t> index() const noexcept { return d_.index; }
    const error_details& details() const noexcept { return d_; }

private:
    error_details d_;
};

/// Valid input on which the requested value is undefined (0/0 and its kin); problem() is the reason.
class undefined_error : public input_error {
public:
    explicit undefined_error(error_details d) : input_error((d.code = error_code::undefined, std::move(d))) {}
    explicit undefined_error(const std::string& message)
        : input_error(error_details{error_code::undefined, {}, {}, message, {}}) {}
};

/// Accumulator state that does not fit: another measure or configuration, or inconsistent bytes.
class state_error : public input_error {
public:
    explicit state_error(error_details d) : input_error((d.code = error_code::state_mismatch, std::move(d))) {}
};

/// A file or stream could not be read or written.
class io_error : public std::runtime_error {
public:
    explicit io_error(error_details d)
        : std::runtime_error(detail::compose_message((d.code = error_code::io, d))), d_(std::move(d)) {}

    error_code code() const noexcept { return d_.code; }
    const std::string& who() const noexcept { return d_.who; }
    const std::string& argument() const noexcept { return d_.argument; }
    const std::string& problem() const noexcept { return d_.problem; }
    std::optional<std::size_t> index() const noexcept { return d_.index; }
    const error_details& details() const noexcept { return d_; }

private:
    error_details d_;
};

namespace detail {

[[noreturn]] inline void fail(std::string_view who, std::string_view arg, std::string_view problem) {
    throw input_error(
        error_details{error_code::bad_argument, std::string(who), std::string(arg), std::string(problem), {}});
}

[[noreturn]] inline void fail_at(std::string_view who, std::string_view arg, std::string_view problem,
                                 std::size_t index) {
    throw input_error(
        error_details{error_code::bad_argument, std::string(who), std::string(arg), std::string(problem), index});
}

[[noreturn]] inline void fail_undefined(std::string_view who, std::string_view reason) {
    throw undefined_error(error_details{error_code::undefined, std::string(who), {}, std::string(reason), {}});
}

[[noreturn]] inline void fail_state(std::string_view who, std::string_view arg, std::string_view problem) {
    throw state_error(
        error_details{error_code::state_mismatch, std::string(who), std::string(arg), std::string(problem), {}});
}

/// A loaded state (stream/serialize.hpp) whose field `field` breaks an invariant: the
/// accumulators' check_state() reports through this, so the error names deserialize.
[[noreturn]] inline void fail_loaded(std::string_view field, std::string_view problem) {
    fail("heldout::deserialize", field, problem);
}

[[noreturn]] inline void fail_io(std::string_view who, std::string_view arg, std::string_view problem) {
    throw io_error(error_details{error_code::io, std::string(who), std::string(arg), std::string(problem), {}});
}

/// The same error with its index moved by `offset` (a chunk's rows start at `offset`).
[[noreturn]] inline void rethrow_shifted(const input_error& e, std::size_t offset) {
    error_details d = e.details();
    if (d.index)
        *d.index += offset;
    if (e.code() == error_code::undefined)
        throw undefined_error(std::move(d));
    if (e.code() == error_code::state_mismatch)
        throw state_error(std::move(d));
    throw input_error(std::move(d));
}

/// Shortest text of a double that reads back to the same double ("0.3", "1e-15", "10", "-0"):
/// std::to_chars' shortest form, the same on libstdc++ and libc++ and independent of the
/// C locale (tests/detail/json.cpp checks it against the standard's rule).
inline std::string number_text(double x) {
    char buf[64];
    const auto r = std::to_chars(buf, buf + sizeof buf, x);
    return std::string(buf, r.ptr);
}

} // namespace detail

HELDOUT_NAMESPACE_END
