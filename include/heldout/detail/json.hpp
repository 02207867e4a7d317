// heldout/detail/json.hpp — a minimal streaming JSON writer for heldout's exports.
// Internal: include the public headers instead (estimate/estimate.hpp uses it).
//
// Numbers are written in the shortest form that reads back to the same double
// (std::to_chars without a precision), so a JSON consumer recovers every bit. JSON has no
// NaN or infinity: a non-finite number is written as null, and callers decide beforehand
// whether that can happen (heldout's estimates hold finite numbers or absent values).
#pragma once

#include <heldout/core/config.hpp>

#include <charconv>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <optional>
#include <ostream>
#include <string>
#include <string_view>
#include <system_error>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace detail {

/// Shortest round-trip decimal text of a finite double ("0.1", "1e-300", "-0").
inline std::string shortest_text(double x) {
    char buf[64];
    const auto r = std::to_chars(buf, buf + sizeof buf, x);
    HELDOUT_ASSERT(r.ec == std::errc{});
    return std::string(buf, r.ptr);
}

/// Appends s to out as a JSON string literal (quotes and escapes included).
inline void json_quote(std::string& out, std::string_view s) {
    out.push_back('"');
    for (const char ch : s) {
        const auto c = static_cast<unsigned char>(ch);
        switch (c) {
        case '"':
            out += "\\\"";
            break;
        case '\\':
            out += "\\\\";
            break;
        case '\n':
            out += "\\n";
            break;
        case '\r':
            out += "\\r";
            break;
        case '\t':
            out += "\\t";
            break;
        default:
            if (c < 0x20) {
                static constexpr char hex[] = "0123456789abcdef";
                out += "\\u00";
                out.push_back(hex[c >> 4]);
                out.push_back(hex[c & 15]);
            } else {
                out.push_back(ch); // UTF-8 bytes pass through unchanged
            }
        }
    }
    out.push_back('"');
}

/// Builds one JSON text: objects, arrays, keys and scalar values, commas handled.
class json_writer {
public:
    json_writer& begin_object() {
        open('{');
        return *this;
    }
    json_writer& end_object() {
        close('}');
        return *this;
    }
    json_writer& begin_array() {
        open('[');
        return *this;
    }
    json_writer& end_array() {
        close(']');
        return *this;
    }
    /// The key of the next member of the current object.
    json_writer& key(std::string_view k) {
        comma();
        json_quote(out_, k);
        out_.push_back(':');
        after_key_ = true;
        return *this;
    }
    json_writer& value(std::string_view s) {
        comma();
        json_quote(out_, s);
        return *this;
    }
    json_writer& value(const char* s) { return value(std::string_view(s)); }
    json_writer& value(const std::string& s) { return value(std::string_view(s)); }
    json_writer& value(double x) {
        comma();
        if (std::isfinite(x))
            out_ += shortest_text(x);
        else
            out_ += "null";
        return *this;
    }
    json_writer& value(std::uint64_t x) {
        comma();
        out_ += std::to_string(x);
        return *this;
    }
    json_writer& value(bool b) {
        comma();
        out_ += b ? "true" : "false";
        return *this;
    }
    json_writer& value(const std::optional<double>& x) { return x ? value(*x) : null(); }
    json_writer& null() {
        comma();
        out_ += "null";
        return *this;
    }
    template <class T>
    json_writer& member(std::string_view k, const T& v) {
        key(k);
        return value(v);
    }

    const std::string& str() const noexcept { return out_; }

private:
    void comma() {
        if (after_key_) {
            after_key_ = false;
            return;
        }
        if (!first_.empty()) {
            if (!first_.back())
                out_.push_back(',');
            first_.back() = false;
        }
    }
    void open(char c) {
        comma();
        out_.push_back(c);
        first_.push_back(true);
    }
    void close(char c) {
        HELDOUT_ASSERT(!first_.empty());
        first_.pop_back();
        out_.push_back(c);
    }

    std::string out_;
    std::vector<bool> first_; // per open container: no element written yet
    bool after_key_ = false;
};

} // namespace detail
HELDOUT_NAMESPACE_END
