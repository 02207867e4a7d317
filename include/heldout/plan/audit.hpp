// heldout/plan/audit.hpp — a plan's splits as CSV, so other tools can reuse the exact
// splits and heldout can re-read them.
//
//   auto r = heldout::kfold{.folds = 5, .seed = 7}.splits(n);
//   std::ofstream out("splits.csv");
//   heldout::write_splits(out, r);
//   std::ifstream in("splits.csv");
//   std::vector<heldout::owned_split> back = heldout::read_splits(in);   // equal to r.to_vector()
//
// Layout (long: one line per row of each split), header line exactly
//   repeat,fold,role,row
// then, split by split in plan order, the training rows (in the split's order) and then the
// test rows. role is "train" or "test"; for a split that carries bootstrap counts it is
// "draw" (one line per draw, so a row drawn 3 times has 3 lines) or "oob" (out of bag).
// Lines end in '\n' (a trailing '\r' is accepted when reading). Consecutive lines with the
// same (repeat, fold) form one split; a split's index is its position in the file. For a
// draw/oob split the row count n is one more than its largest row (every row is drawn or
// out of bag), and counts is rebuilt from the draw lines. A split with no lines at all
// cannot be written; a split whose test set is empty is written with its train lines only.
// Bad CSV -> heldout::input_error("heldout::read_splits: argument 'csv': line L: ...").
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/core/split.hpp>
#include <heldout/plan/range.hpp>

#include <algorithm>
#include <charconv>
#include <cstddef>
#include <cstdint>
#include <fstream>
#include <istream>
#include <ostream>
#include <span>
#include <string>
#include <string_view>
#include <system_error>
#include <vector>

HELDOUT_NAMESPACE_BEGIN

inline constexpr std::string_view splits_csv_header = "repeat,fold,role,row";

/// The lines of one split (no header).
inline void write_split(std::ostream& os, const split& s) {
    const bool boot = !s.counts.empty();
    std::string buf;
    buf.reserve(64 * 1024);
    char num[3][24];
    char* ends[2];
    ends[0] = std::to_chars(num[0], num[0] + 24, s.repeat).ptr;
    ends[1] = std::to_chars(num[1], num[1] + 24, s.fold).ptr;
    auto emit = [&](std::span<const std::size_t> rows, std::string_view role) {
        for (std::size_t r : rows) {
            buf.append(num[0], ends[0]);
            buf.push_back(',');
            buf.append(num[1], ends[1]);
            buf.push_back(',');
            buf.append(role);
            buf.push_back(',');
            buf.append(num[2], std::to_chars(num[2], num[2] + 24, r).ptr);
            buf.push_back('\n');
            if (buf.size() > 60 * 1024) {
                os.write(buf.data(), static_cast<std::streamsize>(buf.size()));
                buf.clear();
            }
        }
    };
    emit(s.train, boot ? "draw" : "train");
    emit(s.test, boot ? "oob" : "test");
    os.write(buf.data(), static_cast<std::streamsize>(buf.size()));
}

/// Header line and every split of a range, in order.
template <split_source R>
void write_splits(std::ostream& os, R&& r) {
    os << splits_csv_header << '\n';
    const std::size_t total = r.size();
    for (std::size_t i = 0; i < total; ++i)
        write_split(os, r.split(i));
}

/// Header line and kept splits, in order.
inline void write_splits(std::ostream& os, const std::vector<owned_split>& v) {
    os << splits_csv_header << '\n';
    for (const owned_split& s : v)
        write_split(os, s.view());
}

/// The splits written by write_splits (or by another tool in the same layout).
inline std::vector<owned_split> read_splits(std::istream& is) {
    constexpr std::string_view who = "heldout::read_splits";
    std::vector<owned_split> out;
    std::string line;
    std::size_t line_no = 0;
    auto bad = [&](const std::string& what) {
        detail::fail(who, "csv", "line " + std::to_string(line_no) + ": " + what);
    };
    if (!std::getline(is, line))
        detail::fail(who, "csv", "empty input (no header line)");
    ++line_no;
    if (!line.empty() && line.back() == '\r')
        line.pop_back();
    if (line != splits_csv_header)
        bad("header is '" + line + "', expected '" + std::string(splits_csv_header) + "'");
    enum class kind { none, plain, boot };
    kind k = kind::none;
    std::size_t max_row = 0;
    auto finish = [&]() {
        if (out.empty() || k != kind::boot)
            return;
        owned_split& s = out.back();
        s.counts.assign(max_row + 1, 0);
        for (std::size_t r : s.train)
            ++s.counts[r];
    };
    while (std::getline(is, line)) {
        ++line_no;
        if (!line.empty() && line.back() == '\r')
            line.pop_back();
        if (line.empty())
            continue;
        std::string_view f[4];
        std::size_t start = 0, field = 0;
        for (std::size_t j = 0; j <= line.size(); ++j)
            if (j == line.size() || line[j] == ',') {
                if (field == 4)
                    bad("more than 4 fields");
                f[field++] = std::string_view(line).substr(start, j - start);
                start = j + 1;
            }
        if (field != 4)
            bad("expected 4 fields (repeat,fold,role,row), got " + std::to_string(field));
        std::size_t v[3];
        const std::string_view num[3] = {f[0], f[1], f[3]};
        const char* names[3] = {"repeat", "fold", "row"};
        for (int j = 0; j < 3; ++j) {
            const auto res = std::from_chars(num[j].data(), num[j].data() + num[j].size(), v[j]);
            if (res.ec != std::errc() || res.ptr != num[j].data() + num[j].size() || num[j].empty())
                bad(std::string("bad ") + names[j] + " '" + std::string(num[j]) + "'");
        }
        const std::string_view role = f[2];
        const bool train = role == "train" || role == "draw";
        const kind lk = (role == "train" || role == "test") ? kind::plain
                        : (role == "draw" || role == "oob") ? kind::boot
                                                            : kind::none;
        if (lk == kind::none)
            bad("role '" + std::string(role) + "' is not train, test, draw or oob");
        if (out.empty() || out.back().repeat != v[0] || out.back().fold != v[1]) {
            finish();
            owned_split s;
            s.repeat = v[0];
            s.fold = v[1];
            s.index = out.size();
            out.push_back(std::move(s));
            k = lk;
            max_row = 0;
        } else if (lk != k) {
            bad("role '" + std::string(role) +
                "' mixes bootstrap (draw/oob) and plain (train/test) lines in one split");
        }
        (train ? out.back().train : out.back().test).push_back(v[2]);
        max_row = v[2] > max_row ? v[2] : max_row;
    }
    finish();
    return out;
}

/// Writes a range's (or kept) splits to a file.
template <class R>
void write_splits_file(const std::string& path, R&& r) {
    std::ofstream os(path, std::ios::binary);
    if (!os)
        detail::fail("heldout::write_splits_file", "path", "cannot open '" + path + "' for writing");
    write_splits(os, r);
    if (!os)
        detail::fail("heldout::write_splits_file", "path", "writing '" + path + "' failed");
}

inline std::vector<owned_split> read_splits_file(const std::string& path) {
    std::ifstream is(path, std::ios::binary);
    if (!is)
        detail::fail("heldout::read_splits_file", "path", "cannot open '" + path + "'");
    return read_splits(is);
}

/// Same rows on each side (in order), same repeat, fold, index and counts.
inline bool same_split(const split& a, const split& b) {
    auto eq = [](auto x, auto y) { return x.size() == y.size() && std::equal(x.begin(), x.end(), y.begin()); };
    return a.repeat == b.repeat && a.fold == b.fold && a.index == b.index && eq(a.train, b.train) &&
           eq(a.test, b.test) && eq(a.counts, b.counts);
}

HELDOUT_NAMESPACE_END
