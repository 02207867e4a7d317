// heldout/core/kinds.hpp — the vocabulary of what a column of data holds: the kind of a
// measure's truth and the kind of its prediction.
//
//   struct my_measure {
//       static constexpr heldout::prediction_kind kind = heldout::prediction_kind::score; // classic spelling
//       // or, for any kind (including ones other headers add):
//       using prediction = heldout::kinds::score;
//       using truth = heldout::kinds::binary;
//       ...
//   };
//   static_assert(std::is_same_v<heldout::prediction_kind_t<heldout::measure::auc>, heldout::kinds::score>);
//
// A kind is a tag type with a `name` (used in messages and reports). The five classic
// prediction kinds also have the enum spelling `prediction_kind` (real, score, probability,
// label, class_probabilities), which maps one to one onto kinds::real, kinds::score,
// kinds::probability, kinds::label and kinds::class_probabilities. Other families add
// their own tags (graded relevance within queries, censored event times, ...) in their
// own headers; a kind whose data the classic columns cannot hold names the view type the
// aggregator stores it as (`using view = ...`), so new kinds need no change elsewhere.
#pragma once

#include <heldout/core/config.hpp>

#include <concepts>
#include <string_view>
#include <type_traits>

HELDOUT_NAMESPACE_BEGIN

/// A data kind: a tag type with a name.
template <class K>
concept data_kind = std::is_empty_v<K> && requires {
    { K::name } -> std::convertible_to<std::string_view>;
};

namespace kinds {
/// A real number: the truth of a regression, or a real-valued prediction of it.
struct real {
    static constexpr std::string_view name = "real value";
};
/// A 0/1 truth (1 = the positive class, the event).
struct binary {
    static constexpr std::string_view name = "0/1 label";
};
/// A class label 0..k-1 (truth or prediction).
struct label {
    static constexpr std::string_view name = "class label";
};
/// A real-valued score for a 0/1 truth, higher = more likely 1 (ranking, margins, logits).
struct score {
    static constexpr std::string_view name = "binary score";
};
/// P(y = 1) in [0, 1] for a 0/1 truth.
struct probability {
    static constexpr std::string_view name = "probability";
};
/// An n x k matrix of class probabilities (rows sum to 1) for a class truth.
struct class_probabilities {
    static constexpr std::string_view name = "class-probability rows";
};
} // namespace kinds

/// The classic prediction kinds, in their enum spelling (see kinds:: for the tags).
enum class prediction_kind {
    real,               ///< kinds::real — real-valued prediction of a real truth (regression)
    score,              ///< kinds::score — real-valued score for a 0/1 truth, higher = more likely 1
    probability,        ///< kinds::probability — P(y = 1) in [0, 1] for a 0/1 truth
    label,              ///< kinds::label — a class label 0..k-1 for a class truth
    class_probabilities ///< kinds::class_probabilities — an n x k matrix of class probabilities
};

namespace detail {
template <prediction_kind K>
struct kind_of_enum;
template <>
struct kind_of_enum<prediction_kind::real> {
    using type = kinds::real;
};
template <>
struct kind_of_enum<prediction_kind::score> {
    using type = kinds::score;
};
template <>
struct kind_of_enum<prediction_kind::probability> {
    using type = kinds::probability;
};
template <>
struct kind_of_enum<prediction_kind::label> {
    using type = kinds::label;
};
template <>
struct kind_of_enum<prediction_kind::class_probabilities> {
    using type = kinds::class_probabilities;
};
} // namespace detail

/// The tag of a classic prediction kind.
template <prediction_kind K>
using kind_t = typename detail::kind_of_enum<K>::type;

/// The name of a classic prediction kind ("binary score").
constexpr std::string_view to_string(prediction_kind k) noexcept {
    switch (k) {
    case prediction_kind::real:
        return kinds::real::name;
    case prediction_kind::score:
        return kinds::score::name;
    case prediction_kind::probability:
        return kinds::probability::name;
    case prediction_kind::label:
        return kinds::label::name;
    case prediction_kind::class_probabilities:
        return kinds::class_probabilities::name;
    }
    return "?";
}

/// The truth kind that goes with a classic prediction kind when a measure names none:
/// real predictions score a real truth, scores and probabilities a 0/1 truth, labels and
/// class probabilities a class label.
template <class Prediction>
using default_truth_t = std::conditional_t<
    std::is_same_v<Prediction, kinds::real>, kinds::real,
    std::conditional_t<std::is_same_v<Prediction, kinds::score> || std::is_same_v<Prediction, kinds::probability>,
                       kinds::binary, kinds::label>>;

HELDOUT_NAMESPACE_END
