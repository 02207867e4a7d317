// heldout/stream/serialize.hpp — accumulator state to bytes and back, so that shards
// scored on different machines merge into the exact single-machine result.
//
//   auto acc = heldout::measure::auc{}.accumulator();
//   acc.add(truth_shard, scores_shard);
//   std::vector<std::byte> bytes = heldout::serialize(acc);           // send anywhere
//   auto back = heldout::deserialize<decltype(acc)>(bytes);           // on another machine
//   total.merge(back);
//
//   auto typed = heldout::deserialize(bytes, heldout::measure::auc{}); // refuses other measures
//
// Any accumulator with visit_state(f) (core/measure.hpp convention) works. Layout, version 2
// (all integers little-endian, whatever the host):
//
//   offset 0   4 bytes  magic "HDST"
//          4   u16      format version (2)
//          6   u16      reserved (0)
//          8   u32      K = length of the identity key
//         12   K bytes  key: the measure's `key` (cap::serialisable) for an accumulator with
//                       measure(); empty for internal states (detail sums, test structs)
//     12 + K   u32      S = length of the schema string
//     16 + K   S bytes  schema: one code per visited field, in visit order:
//                         'b' bool (1 byte)            'i' signed integer (8 bytes, two's complement)
//                         'u' unsigned integer (8)     'f' float (4, IEEE 754 binary32)
//                         'd' double (8, binary64)     's' string (u64 length + bytes)
//                         'V' + code: vector (u64 count + elements)
//                         'M' Eigen matrix of double (u64 rows, u64 cols, row-major binary64)
//                         '{' ... '}': a nested object's own fields
// 16 + K + S   payload  the fields in schema order (the measure's parameters come first)
//        end   u64      FNV-1a 64-bit hash of every byte before it
//
// deserialize<A>() checks magic, version, key (bytes of an MSE state are refused by an MAE
// accumulator although their fields look alike), schema, lengths and the hash, then the
// accumulator's own check_state(): every invariant of the loaded fields (labels below the
// number of classes, row lengths, weights as long as values, non-negative counts, finite sums,
// parameters in range), so a state with a right checksum but inconsistent content is an
// input_error naming the field, never undefined behaviour. deserialize(bytes, m) also refuses
// bytes whose parameters differ from m's (heldout::same_measure: type and parameters).
// Version 1 (no key) is refused: re-serialise with this version.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/measure.hpp>
#include <heldout/core/traits.hpp>

#include <bit>
#include <cstddef>
#include <cstdint>
#include <cstring>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

namespace detail {

template <class T>
concept visitable_state = requires(const T& t) {
    t.visit_state([](const auto&) {});
};

template <class T>
concept eigen_double_matrix = requires(const T& m) {
    { m.rows() } -> std::convertible_to<std::ptrdiff_t>;
    { m.cols() } -> std::convertible_to<std::ptrdiff_t>;
    { m(0, 0) } -> std::convertible_to<double>;
    typename T::Scalar;
    requires std::is_same_v<typename T::Scalar, double>;
};

template <class T>
struct is_std_vector : std::false_type {};
template <class T, class A>
struct is_std_vector<std::vector<T, A>> : std::true_type {};

inline constexpr std::uint64_t fnv_offset = 0xcbf29ce484222325ULL;
inline constexpr std::uint64_t fnv_prime = 0x100000001b3ULL;

inline std::uint64_t fnv1a(std::span<const std::byte> b) {
    std::uint64_t h = fnv_offset;
    for (std::byte x : b) {
        h ^= static_cast<std::uint64_t>(x);
        h *= fnv_prime;
    }
    return h;
}

template <class T>
constexpr char scalar_code() {
    if constexpr (std::is_same_v<T, bool>)
        return 'b';
    else if constexpr (std::is_enum_v<T>)
        return std::is_signed_v<std::underlying_type_t<T>> ? 'i' : 'u';
    else if constexpr (std::is_integral_v<T>)
        return std::is_signed_v<T> ? 'i' : 'u';
    else if constexpr (std::is_same_v<T, float>)
        return 'f';
    else
        return 'd';
}

class state_writer {
public:
    std::string schema;
    std::vector<std::byte> payload;

    template <class T>
    void operator()(const T& v) {
        if constexpr (std::is_arithmetic_v<T> || std::is_enum_v<T>) {
            schema += scalar_code<T>();
            put_scalar(v);
        } else if constexpr (std::is_same_v<T, std::string>) {
            schema += 's';
            put_u64(v.size());
            for (char c : v)
                payload.push_back(static_cast<std::byte>(c));
        } else if constexpr (is_std_vector<T>::value) {
            using E = typename T::value_type;
            schema += 'V';
            put_u64(v.size());
            if constexpr (std::is_arithmetic_v<E> || std::is_enum_v<E>) {
                schema += scalar_code<E>();
                for (const E& e : v)
                    put_scalar(e);
            } else {
                // vector of objects: the element schema is written once (from a default
                // element when empty), so the schema does not depend on the contents.
                state_writer probe;
                probe(v.empty() ? E{} : v.front());
                schema += probe.schema;
                for (const E& e : v) {
                    state_writer sub;
                    sub(e);
                    payload.insert(payload.end(), sub.payload.begin(), sub.payload.end());
                }
            }
        } else if constexpr (eigen_double_matrix<T>) {
            schema += 'M';
            put_u64(static_cast<std::uint64_t>(v.rows()));
            put_u64(static_cast<std::uint64_t>(v.cols()));
            for (std::ptrdiff_t i = 0; i < v.rows(); ++i)
                for (std::ptrdiff_t j = 0; j < v.cols(); ++j)
                    put_scalar(static_cast<double>(v(i, j)));
        } else {
            static_assert(visitable_state<T>, "heldout::serialize: a state member is neither arithmetic, a "
                                              "std::vector, a std::string, an Eigen matrix, nor visitable");
            schema += '{';
            v.visit_state(*this);
            schema += '}';
        }
    }

    void put_u64(std::uint64_t x) {
        for (int k = 0; k < 8; ++k)
            payload.push_back(static_cast<std::byte>((x >> (8 * k)) & 0xFF));
    }

private:
    template <class T>
    void put_scalar(const T& v) {
        if constexpr (std::is_same_v<T, bool>) {
            payload.push_back(static_cast<std::byte>(v ? 1 : 0));
        } else if constexpr (std::is_enum_v<T>) {
            put_u64(static_cast<std::uint64_t>(static_cast<std::underlying_type_t<T>>(v)));
        } else if constexpr (std::is_integral_v<T>) {
            put_u64(static_cast<std::uint64_t>(v));
        } else if constexpr (std::is_same_v<T, float>) {
            const auto b = std::bit_cast<std::uint32_t>(v);
            for (int k = 0; k < 4; ++k)
                payload.push_back(static_cast<std::byte>((b >> (8 * k)) & 0xFF));
        } else {
            static_assert(std::is_same_v<T, double>, "heldout::serialize: long double state is not portable");
            put_u64(std::bit_cast<std::uint64_t>(v));
        }
    }
};

class state_reader {
public:
    state_reader(std::string_view schema, std::span<const std::byte> payload) : schema_(schema), payload_(payload) {}

    template <class T>
    void operator()(T& v) {
        if constexpr (std::is_arithmetic_v<T> || std::is_enum_v<T>) {
            expect(scalar_code<T>());
            get_scalar(v);
        } else if constexpr (std::is_same_v<T, std::string>) {
            expect('s');
            const std::uint64_t n = get_count(1);
            v.resize(static_cast<std::size_t>(n));
            for (auto& c : v)
                c = static_cast<char>(take(1)[0]);
        } else if constexpr (is_std_vector<T>::value) {
            using E = typename T::value_type;
            expect('V');
            if constexpr (std::is_arithmetic_v<E> || std::is_enum_v<E>) {
                expect(scalar_code<E>());
                const std::uint64_t n = get_count(std::is_same_v<E, bool> ? 1 : (std::is_same_v<E, float> ? 4 : 8));
                v.resize(static_cast<std::size_t>(n));
                for (auto& e : v) {
                    E x{};
                    get_scalar(x);
                    e = x;
                }
            } else {
                const std::uint64_t n = get_count(1);
                v.assign(static_cast<std::size_t>(n), E{});
                const std::size_t mark = pos_;
                if (n == 0) {
                    state_writer probe;
                    probe(E{});
                    if (schema_.substr(pos_, probe.schema.size()) != probe.schema)
                        bad_schema();
                    pos_ += probe.schema.size();
                }
                for (auto& e : v) {
                    pos_ = mark;
                    (*this)(e);
                }
            }
        } else if constexpr (eigen_double_matrix<T>) {
            expect('M');
            const std::uint64_t r = get_u64();
            const std::uint64_t c = get_u64();
            // Each dimension alone is bounded too: a 2^64 x 0 matrix holds no byte but its
            // loops would never end.
            const std::uint64_t left = payload_.size() - at_;
            if (r > left || c > left || (c != 0 && r > left / 8 / c))
                truncated();
            v.resize(static_cast<std::ptrdiff_t>(r), static_cast<std::ptrdiff_t>(c));
            for (std::ptrdiff_t i = 0; i < v.rows(); ++i)
                for (std::ptrdiff_t j = 0; j < v.cols(); ++j) {
                    double x = 0;
                    get_scalar(x);
                    v(i, j) = x;
                }
        } else {
            expect('{');
            v.visit_state(*this);
            expect('}');
        }
    }

    void finish() const {
        if (pos_ != schema_.size())
            bad_schema();
        if (at_ != payload_.size())
            fail("heldout::deserialize", "bytes", "trailing bytes after the state");
    }

    std::uint64_t get_u64() {
        auto b = take(8);
        std::uint64_t x = 0;
        for (int k = 0; k < 8; ++k)
            x |= static_cast<std::uint64_t>(b[static_cast<std::size_t>(k)]) << (8 * k);
        return x;
    }

private:
    [[noreturn]] void bad_schema() const {
        fail("heldout::deserialize", "bytes",
             "the bytes hold a different accumulator type or layout (schema '" + std::string(schema_) + "')");
    }
    [[noreturn]] void truncated() const { fail("heldout::deserialize", "bytes", "truncated state"); }

    void expect(char c) {
        if (pos_ >= schema_.size() || schema_[pos_] != c)
            bad_schema();
        ++pos_;
    }
    std::span<const std::byte> take(std::size_t n) {
        if (payload_.size() - at_ < n)
            truncated();
        auto s = payload_.subspan(at_, n);
        at_ += n;
        return s;
    }
    std::uint64_t get_count(std::size_t min_element_bytes) {
        const std::uint64_t n = get_u64();
        if (n > (payload_.size() - at_) / min_element_bytes)
            truncated();
        return n;
    }
    template <class T>
    void get_scalar(T& v) {
        if constexpr (std::is_same_v<T, bool>) {
            v = take(1)[0] != std::byte{0};
        } else if constexpr (std::is_enum_v<T>) {
            v = static_cast<T>(static_cast<std::underlying_type_t<T>>(get_u64()));
        } else if constexpr (std::is_integral_v<T>) {
            v = static_cast<T>(get_u64());
        } else if constexpr (std::is_same_v<T, float>) {
            auto b = take(4);
            std::uint32_t x = 0;
            for (int k = 0; k < 4; ++k)
                x |= static_cast<std::uint32_t>(b[static_cast<std::size_t>(k)]) << (8 * k);
            v = std::bit_cast<float>(x);
        } else {
            v = std::bit_cast<double>(get_u64());
        }
    }

    std::string_view schema_;
    std::span<const std::byte> payload_;
    std::size_t pos_ = 0;
    std::size_t at_ = 0;
};

inline constexpr std::uint16_t state_format_version = 2;

/// The identity key written for accumulator A: its measure's `key`, or empty for states
/// without a measure (internal sums).
template <class A>
constexpr std::string_view state_key() {
    if constexpr (requires(const A& a) {
                      { std::remove_cvref_t<decltype(a.measure())>::key } -> std::convertible_to<std::string_view>;
                  })
        return std::remove_cvref_t<decltype(std::declval<const A&>().measure())>::key;
    else
        return {};
}

inline void put_u32(std::vector<std::byte>& out, std::uint32_t x) {
    for (int k = 0; k < 4; ++k)
        out.push_back(static_cast<std::byte>((x >> (8 * k)) & 0xFF));
}
inline std::uint32_t get_u32(std::span<const std::byte> b, std::size_t at) {
    std::uint32_t x = 0;
    for (int k = 0; k < 4; ++k)
        x |= static_cast<std::uint32_t>(b[at + static_cast<std::size_t>(k)]) << (8 * k);
    return x;
}

/// A state check that an accumulator runs once every field is read (cap::serialisable).
template <class A>
concept checks_state = requires(const A& a) {
    a.check_state();
};

} // namespace detail

/// The accumulator's state as portable bytes (layout in the header comment).
template <class A>
requires detail::visitable_state<A> std::vector<std::byte> serialize(const A& acc) {
    detail::state_writer w;
    acc.visit_state(w);
    constexpr std::string_view key = detail::state_key<A>();
    std::vector<std::byte> out;
    out.reserve(20 + key.size() + w.schema.size() + w.payload.size() + 8);
    for (char c : std::string_view("HDST"))
        out.push_back(static_cast<std::byte>(c));
    out.push_back(static_cast<std::byte>(detail::state_format_version & 0xFF));
    out.push_back(static_cast<std::byte>(detail::state_format_version >> 8));
    out.push_back(std::byte{0});
    out.push_back(std::byte{0});
    detail::put_u32(out, static_cast<std::uint32_t>(key.size()));
    for (char c : key)
        out.push_back(static_cast<std::byte>(c));
    detail::put_u32(out, static_cast<std::uint32_t>(w.schema.size()));
    for (char c : w.schema)
        out.push_back(static_cast<std::byte>(c));
    out.insert(out.end(), w.payload.begin(), w.payload.end());
    const std::uint64_t h = detail::fnv1a(out);
    for (int k = 0; k < 8; ++k)
        out.push_back(static_cast<std::byte>((h >> (8 * k)) & 0xFF));
    return out;
}

/// Rebuilds an accumulator of type A from serialize()'s bytes; refuses bytes of another type.
template <class A>
requires detail::visitable_state<A> && std::default_initializable<A> A deserialize(std::span<const std::byte> bytes) {
    constexpr std::string_view who = "heldout::deserialize";
    if (bytes.size() < 24)
        detail::fail(who, "bytes", "too short to hold a state (" + std::to_string(bytes.size()) + " bytes)");
    if (std::memcmp(bytes.data(), "HDST", 4) != 0)
        detail::fail(who, "bytes", "not a heldout state (bad magic)");
    const auto version =
        static_cast<std::uint16_t>(static_cast<unsigned>(bytes[4]) | (static_cast<unsigned>(bytes[5]) << 8));
    if (version != detail::state_format_version)
        detail::fail(who, "bytes", "unsupported format version " + std::to_string(version));
    const auto body = bytes.first(bytes.size() - 8);
    std::uint64_t h = 0;
    for (int k = 0; k < 8; ++k)
        h |= static_cast<std::uint64_t>(bytes[bytes.size() - 8 + static_cast<std::size_t>(k)]) << (8 * k);
    if (h != detail::fnv1a(body))
        detail::fail(who, "bytes", "checksum mismatch (corrupted or truncated state)");
    const std::uint32_t k = detail::get_u32(body, 8);
    if (k > body.size() - 16)
        detail::fail(who, "bytes", "key length past the end");
    const std::string_view key(reinterpret_cast<const char*>(body.data() + 12), k);
    constexpr std::string_view want = detail::state_key<A>();
    if (key != want)
        detail::fail(who, "bytes",
                     "the bytes hold the state of '" + std::string(key.empty() ? "(no measure)" : key) + "', not of '" +
                         std::string(want.empty() ? "(no measure)" : want) + "'");
    const std::uint32_t s = detail::get_u32(body, 12 + std::size_t{k});
    if (s > body.size() - 16 - k)
        detail::fail(who, "bytes", "schema length past the end");
    const std::string_view schema(reinterpret_cast<const char*>(body.data() + 16 + k), s);
    detail::state_reader r(schema, body.subspan(16 + std::size_t{k} + s));
    A acc{};
    acc.visit_state(r);
    r.finish();
    if constexpr (detail::checks_state<A>)
        acc.check_state();
    return acc;
}

/// Overload for a byte vector.
template <class A>
A deserialize(const std::vector<std::byte>& bytes) {
    return deserialize<A>(std::span<const std::byte>(bytes));
}

/// Typed load: rebuilds the accumulator of measure m from serialize()'s bytes and refuses
/// bytes of another measure, or of the same measure with other parameters (e.g. a
/// calibration error with 10 bins when m has 15): the identity is type and parameters.
template <outer_measure M>
requires detail::has_serialisable_parts<M> accumulator_t<M> deserialize(std::span<const std::byte> bytes, const M& m) {
    auto acc = deserialize<accumulator_t<M>>(bytes);
    if (!same_measure(acc.measure(), m))
        detail::fail("heldout::deserialize", "bytes",
                     "the bytes hold the state of " + acc.measure().name() + ", but the expected measure is " +
                         m.name());
    return acc;
}

/// Typed load from a byte vector.
template <outer_measure M>
requires detail::has_serialisable_parts<M> accumulator_t<M> deserialize(const std::vector<std::byte>& bytes,
                                                                        const M& m) {
    return deserialize(std::span<const std::byte>(bytes), m);
}

HELDOUT_NAMESPACE_END
