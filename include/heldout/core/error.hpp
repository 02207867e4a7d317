// heldout/core/error.hpp — the exceptions heldout throws.
//
//   try {
//       heldout::evaluate(heldout::measure::mse{}, truth, prediction);
//   } catch (const heldout::undefined_error& e) {   // input that leaves a measure undefined
//   } catch (const heldout::input_error& e) {       // any other bad input
//       std::cerr << e.what() << '\n';  // "mse: argument 'prediction': not finite (nan) at index 17"
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
#pragma once

#include <heldout/core/config.hpp>

#include <cstddef>
#include <sstream>
#include <stdexcept>
#include <string>
#include <string_view>

HELDOUT_NAMESPACE_BEGIN

/// Bad input: the message names the function, the argument and the first offending index.
class input_error : public std::invalid_argument {
public:
    using std::invalid_argument::invalid_argument;
};

/// Valid input on which the requested value is undefined (0/0 and its kin).
class undefined_error : public input_error {
public:
    using input_error::input_error;
};

namespace detail {

/// "who: argument 'arg': problem" — the one message shape used by every check.
inline std::string input_message(std::string_view who, std::string_view arg, std::string_view problem) {
    std::string s;
    s.reserve(who.size() + arg.size() + problem.size() + 16);
    s.append(who);
    if (!arg.empty()) {
        s.append(": argument '");
        s.append(arg);
        s.append("'");
    }
    s.append(": ");
    s.append(problem);
    return s;
}

[[noreturn]] inline void fail(std::string_view who, std::string_view arg, std::string_view problem) {
    throw input_error(input_message(who, arg, problem));
}

[[noreturn]] inline void fail_at(std::string_view who, std::string_view arg, std::string_view problem,
                                 std::size_t index) {
    std::string p(problem);
    p.append(" at index ");
    p.append(std::to_string(index));
    throw input_error(input_message(who, arg, p));
}

[[noreturn]] inline void fail_undefined(std::string_view who, std::string_view reason) {
    std::string s(who);
    s.append(": undefined: ");
    s.append(reason);
    throw undefined_error(s);
}

/// Shortest round-trip text of a double for messages.
inline std::string number_text(double x) {
    std::ostringstream os;
    os.precision(17);
    os << x;
    return os.str();
}

} // namespace detail

HELDOUT_NAMESPACE_END
