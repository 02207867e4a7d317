// Prints the method table of docs/intervals.md from the one table in the library
// (estimate/methods.hpp), so the docs cannot drift from what estimate() and compare() do:
// a ctest (examples/check_method_table.cmake) compares this output with the docs.
//
//   ./build/dev/examples/example_method_table     # paste between the markers in docs/intervals.md
#include <heldout/heldout.hpp>

#include <cstdio>
#include <span>
#include <string>

namespace {

std::string needs_text(heldout::need set) {
    using heldout::need;
    static constexpr std::pair<need, const char*> words[] = {
        {need::one_test_set, "one test set"},
        {need::several_splits, "several splits"},
        {need::random_splits, "random splits without replacement"},
        {need::bootstrap_splits, "bootstrap splits"},
        {need::row_losses, "per-row values"},
        {need::zero_one_losses, "0/1 per-row values"},
        {need::case_components, "DeLong components"},
        {need::weighted_add, "weighted add"},
        {need::kept_predictions, "kept predictions"},
        {need::lower_is_better, "an error (lower is better)"},
        {need::apparent, "the apparent result"},
        {need::five_by_two, "the 10 splits of five_by_two"},
        {need::resamplable, "resamplable rows"},
        {need::query_values, "per-query values of two rankers (compare_queries)"},
    };
    std::string s;
    for (const auto& [n, w] : words)
        if (heldout::has(set, n))
            s += (s.empty() ? "" : ", ") + std::string(w);
    return s.empty() ? "-" : s;
}

void print(const char* title, const char* prefix, std::span<const heldout::method_info> rows) {
    std::printf("%s\n\n| method | printed as | needs | interval | source |\n|---|---|---|---|---|\n", title);
    for (const auto& m : rows.subspan(1)) // automatic is the rule set below the table, not a method
        std::printf("| `%s%.*s` | %.*s | %s | %s | %.*s |\n", prefix, static_cast<int>(m.key.size()), m.key.data(),
                    static_cast<int>(m.label.size()), m.label.data(), needs_text(m.needs).c_str(),
                    m.interval ? "yes" : "no", static_cast<int>(m.source.size()), m.source.data());
}

} // namespace

int main() {
    print("Interval methods (`heldout::ci`):", "ci::", heldout::ci::methods);
    std::printf("\n");
    print("Paired comparisons (`heldout::paired`):", "paired::", heldout::paired::methods);
    return 0;
}
