// heldout/report/svg.hpp — a small SVG writer of our own: valid XML with escaping, numbers
// printed the same in every locale, and a figure with axes, "nice" ticks, labels, lines,
// points, a legend and a title.
//
//   heldout::report::figure fig({.title = "Error by fold", .x = {.label = "fold"},
//                                .y = {.label = "error", .lo = 0, .hi = 0.5}});
//   fig.line("model A", xs, ys);                       // a polyline series (legend entry)
//   fig.points("model B", xs, zs);                     // a point series
//   fig.reference_line(0, 0, 1, 1);                    // a dashed grey guide
//   fig.bar(0.0, 0.1, 0, 42, "#0072B2");               // a filled box in data coordinates
//   fig.error_bar(0.5, 0.41, 0.62, "#0072B2");         // a vertical interval with caps
//   heldout::report::save(fig.str(), "errors.svg");    // a complete SVG document
//   std::string both = heldout::report::stack({top.str(), bottom.str()});   // one above the other
//   std::string html_part = heldout::report::inline_svg(both);              // for an HTML page
//
//   auto t = heldout::report::nice_ticks(0.03, 0.91);  // 0.2, 0.4, 0.6, 0.8 (step 0.2)
//
// Why our own: the plots are simple, the output must be byte-for-byte reproducible (tests
// compare it), and numbers must not pick up the user's locale (std::to_chars, never
// printf or iostreams). Text is escaped (& < > " ') everywhere, attributes included.
// Axis ranges that are not fixed are widened to the enclosing ticks. Text widths are
// estimated (0.6 em a character), which is enough for legends and margins.
#pragma once

#include <heldout/core/error.hpp>
#include <heldout/detail/json.hpp> // detail::utf8_at, shared with the JSON writer

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstddef>
#include <fstream>
#include <limits>
#include <optional>
#include <span>
#include <stdexcept>
#include <string>
#include <string_view>
#include <system_error>
#include <utility>
#include <vector>

HELDOUT_NAMESPACE_BEGIN
namespace report {

/// Shortest text that reads back as the same double (std::to_chars, locale-independent).
inline std::string number(double x) {
    if (!std::isfinite(x))
        detail::fail("heldout::report::number", "x", std::isnan(x) ? "not finite (nan)" : "not finite (inf)");
    char buf[64];
    auto r = std::to_chars(buf, buf + sizeof buf, x);
    HELDOUT_ASSERT(r.ec == std::errc{});
    std::string s(buf, r.ptr);
    return s == "-0" ? "0" : s;
}

/// x with a fixed number of decimals (std::to_chars); "-0.00" is printed as "0.00".
inline std::string number(double x, int decimals) {
    if (!std::isfinite(x))
        detail::fail("heldout::report::number", "x", std::isnan(x) ? "not finite (nan)" : "not finite (inf)");
    if (decimals < 0 || decimals > 17)
        detail::fail("heldout::report::number", "decimals", "must lie in 0..17");
    char buf[400];
    auto r = std::to_chars(buf, buf + sizeof buf, x, std::chars_format::fixed, decimals);
    HELDOUT_ASSERT(r.ec == std::errc{});
    std::string s(buf, r.ptr);
    if (s.front() == '-' && s.find_first_not_of("-0.") == std::string::npos)
        s.erase(0, 1);
    return s;
}

/// Text safe inside XML character data and inside double- or single-quoted attributes, and
/// well-formed XML 1.0 for any bytes: control characters other than tab, newline and carriage
/// return are not allowed in XML 1.0 at all, nor are U+FFFE and U+FFFF, and the document is
/// declared UTF-8, so each of these and each ill-formed UTF-8 sequence (its maximal subpart,
/// see detail::utf8_at) becomes one U+FFFD.
inline std::string xml_escape(std::string_view s) {
    std::string out;
    out.reserve(s.size() + 8);
    for (std::size_t i = 0; i < s.size();) {
        const char c = s[i];
        if (static_cast<unsigned char>(c) >= 0x80) {
            const detail::utf8_sequence q = detail::utf8_at(s, i);
            const std::string_view seq = s.substr(i, q.length);
            if (q.valid && seq != "\xEF\xBF\xBE" && seq != "\xEF\xBF\xBF") // U+FFFE, U+FFFF
                out.append(seq);
            else
                out.append(detail::replacement_character);
            i += q.length;
            continue;
        }
        ++i;
        switch (c) {
        case '&':
            out += "&amp;";
            break;
        case '<':
            out += "&lt;";
            break;
        case '>':
            out += "&gt;";
            break;
        case '"':
            out += "&quot;";
            break;
        case '\'':
            out += "&apos;";
            break;
        default:
            if (static_cast<unsigned char>(c) < 0x20 && c != '\t' && c != '\n' && c != '\r')
                out.append(detail::replacement_character);
            else
                out += c;
        }
    }
    return out;
}

/// Tick positions for an axis: a step of 1, 2, 2.5 or 5 times a power of ten.
struct ticks {
    double step = 1;            ///< distance between ticks
    int decimals = 0;           ///< decimals that print every tick exactly at this step
    std::vector<double> values; ///< ascending tick values, all within [lo, hi]
};

/// "Nice" ticks covering [lo, hi]: the smallest step from {1, 2, 2.5, 5} x 10^k that gives
/// at most `target` intervals across the range; ticks are multiples of the step (computed
/// as k * step, so they do not drift). lo == hi is widened by 1 on each side (or by 10% of
/// |lo|, when larger) so that a constant series still gets an axis.
inline ticks nice_ticks(double lo, double hi, std::size_t target = 5) {
    constexpr std::string_view who = "heldout::report::nice_ticks";
    if (!std::isfinite(lo))
        detail::fail(who, "lo", "not finite");
    if (!std::isfinite(hi))
        detail::fail(who, "hi", "not finite");
    if (hi < lo)
        detail::fail(who, "hi", "below lo (" + number(hi) + " < " + number(lo) + ")");
    if (target < 1 || target > 1000)
        detail::fail(who, "target", "must lie in 1..1000");
    if (hi == lo) {
        const double pad = std::max(1.0, 0.1 * std::abs(lo));
        lo -= pad;
        hi += pad;
    }
    const double raw = (hi - lo) / static_cast<double>(target);
    double mag = std::pow(10.0, std::floor(std::log10(raw)));
    static constexpr double factors[] = {1, 2, 2.5, 5, 10};
    double step = 10 * mag;
    double factor = 10;
    for (double f : factors)
        if (f * mag >= raw * (1 - 1e-12)) {
            step = f * mag;
            factor = f;
            break;
        }
    if (factor == 10) {
        mag *= 10;
        factor = 1;
    }
    ticks t;
    t.step = step;
    // 2.5 x 10^k needs one decimal more than 10^k when k <= 0 (0.25, 2.5), none when k > 0 (25).
    t.decimals =
        std::max(0, -static_cast<int>(std::floor(std::log10(mag) + 1e-9))) + (factor == 2.5 && mag < 1.5 ? 1 : 0);
    t.decimals = std::min(t.decimals, 17);
    const double eps = 1e-9 * step;
    const double first = std::ceil((lo - eps) / step);
    const double last = std::floor((hi + eps) / step);
    for (double k = first; k <= last; k += 1) {
        double v = k * step;
        if (std::abs(v) < eps)
            v = 0;
        t.values.push_back(v);
    }
    return t;
}

/// Stroke and fill of a shape; colours are any SVG colour text ("#0072B2", "none").
struct style {
    std::string stroke = "none";
    std::string fill = "none";
    double stroke_width = 1.0;
    std::string dash{};   ///< stroke-dasharray, e.g. "4 3"; empty for solid
    double opacity = 1.0; ///< applied to stroke and fill
};

enum class anchor { start, middle, end };

/// How a text is drawn.
struct text_style {
    double size = 12;
    anchor align = anchor::start;
    std::string fill = "#222222";
    bool bold = false;
    double rotate = 0; ///< degrees, about the text's anchor point
};

/// The estimated width of text in user units (0.6 em a character; UTF-8 continuation
/// bytes do not count).
inline double text_width(std::string_view s, double size) {
    std::size_t chars = 0;
    for (char c : s)
        if ((static_cast<unsigned char>(c) & 0xC0) != 0x80)
            ++chars;
    return 0.6 * size * static_cast<double>(chars);
}

/// An SVG document built shape by shape; str() returns the complete XML text.
class svg {
public:
    svg(double width, double height) : width_(width), height_(height) {
        if (!(width > 0) || !std::isfinite(width))
            detail::fail("heldout::report::svg", "width", "must be positive and finite");
        if (!(height > 0) || !std::isfinite(height))
            detail::fail("heldout::report::svg", "height", "must be positive and finite");
    }

    double width() const noexcept { return width_; }
    double height() const noexcept { return height_; }

    svg& line(double x1, double y1, double x2, double y2, const style& s) {
        body_ += "<line x1=\"" + c(x1) + "\" y1=\"" + c(y1) + "\" x2=\"" + c(x2) + "\" y2=\"" + c(y2) + "\"" +
                 attributes(s) + "/>\n";
        return *this;
    }

    /// A polyline through (xs[i], ys[i]); non-finite points are refused.
    svg& polyline(std::span<const double> xs, std::span<const double> ys, const style& s) {
        check_points("heldout::report::svg::polyline", xs, ys);
        body_ += "<polyline points=\"";
        for (std::size_t i = 0; i < xs.size(); ++i) {
            if (i)
                body_ += ' ';
            body_ += c(xs[i]) + "," + c(ys[i]);
        }
        body_ += "\"" + attributes(s) + "/>\n";
        return *this;
    }

    svg& circle(double cx, double cy, double r, const style& s) {
        body_ += "<circle cx=\"" + c(cx) + "\" cy=\"" + c(cy) + "\" r=\"" + c(r) + "\"" + attributes(s) + "/>\n";
        return *this;
    }

    svg& rect(double x, double y, double w, double h, const style& s) {
        body_ += "<rect x=\"" + c(x) + "\" y=\"" + c(y) + "\" width=\"" + c(std::max(0.0, w)) + "\" height=\"" +
                 c(std::max(0.0, h)) + "\"" + attributes(s) + "/>\n";
        return *this;
    }

    svg& text(double x, double y, std::string_view content, const text_style& t = {}) {
        body_ += "<text x=\"" + c(x) + "\" y=\"" + c(y) + "\" font-size=\"" + c(t.size) + "\"";
        if (t.align == anchor::middle)
            body_ += " text-anchor=\"middle\"";
        else if (t.align == anchor::end)
            body_ += " text-anchor=\"end\"";
        body_ += " fill=\"" + xml_escape(t.fill) + "\"";
        if (t.bold)
            body_ += " font-weight=\"bold\"";
        if (t.rotate != 0)
            body_ += " transform=\"rotate(" + c(t.rotate) + " " + c(x) + " " + c(y) + ")\"";
        body_ += ">" + xml_escape(content) + "</text>\n";
        return *this;
    }

    /// A tooltip-style title for the document (shown by viewers, read by screen readers).
    svg& title(std::string_view t) {
        title_ = std::string(t);
        return *this;
    }

    std::string str() const {
        std::string out = "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n";
        out += "<svg xmlns=\"http://www.w3.org/2000/svg\" version=\"1.1\" width=\"" + c(width_) + "\" height=\"" +
               c(height_) + "\" viewBox=\"0 0 " + c(width_) + " " + c(height_) +
               "\" font-family=\"DejaVu Sans, Helvetica, Arial, sans-serif\">\n";
        if (!title_.empty())
            out += "<title>" + xml_escape(title_) + "</title>\n";
        out += "<rect x=\"0\" y=\"0\" width=\"" + c(width_) + "\" height=\"" + c(height_) + "\" fill=\"#ffffff\"/>\n";
        out += body_;
        out += "</svg>\n";
        return out;
    }

private:
    // Coordinates with two decimals: a hundredth of a pixel is below what any viewer shows.
    static std::string c(double v) {
        if (!std::isfinite(v))
            detail::fail("heldout::report::svg", "coordinate", "not finite");
        return number(v, 2);
    }

    static std::string attributes(const style& s) {
        std::string a = " stroke=\"" + xml_escape(s.stroke) + "\" fill=\"" + xml_escape(s.fill) + "\"";
        if (s.stroke != "none")
            a += " stroke-width=\"" + c(s.stroke_width) + "\"";
        if (!s.dash.empty())
            a += " stroke-dasharray=\"" + xml_escape(s.dash) + "\"";
        if (s.opacity != 1.0)
            a += " opacity=\"" + c(s.opacity) + "\"";
        return a;
    }

    static void check_points(std::string_view who, std::span<const double> xs, std::span<const double> ys) {
        if (xs.size() != ys.size())
            detail::fail(who, "y",
                         "size " + std::to_string(ys.size()) + " differs from size " + std::to_string(xs.size()) +
                             " of 'x'");
        for (std::size_t i = 0; i < xs.size(); ++i) {
            if (!std::isfinite(xs[i]))
                detail::fail_at(who, "x", "not finite", i);
            if (!std::isfinite(ys[i]))
                detail::fail_at(who, "y", "not finite", i);
        }
    }

    double width_, height_;
    std::string title_;
    std::string body_;
};

/// Writes text to a file; std::runtime_error naming the path when that fails.
inline void save(const std::string& text, const std::string& path) {
    std::ofstream out(path, std::ios::binary | std::ios::trunc);
    if (!out)
        throw std::runtime_error("heldout::report::save: cannot open '" + path + "' for writing");
    out.write(text.data(), static_cast<std::streamsize>(text.size()));
    out.close();
    if (!out)
        throw std::runtime_error("heldout::report::save: writing '" + path + "' failed");
}

/// An SVG document without its XML declaration, to be placed inside an HTML page (where a
/// `<?xml ...?>` line is not allowed) or inside another SVG document.
inline std::string inline_svg(std::string_view document) {
    if (document.substr(0, 5) == "<?xml") {
        const auto end = document.find("?>");
        if (end == std::string_view::npos)
            detail::fail("heldout::report::inline_svg", "document", "an XML declaration that is not closed");
        document.remove_prefix(end + 2);
        while (!document.empty() && (document.front() == '\n' || document.front() == '\r'))
            document.remove_prefix(1);
    }
    return std::string(document);
}

/// SVG documents (made by svg::str or figure::str) one above the other in one document, as
/// nested <svg> elements, left-aligned; the width is the widest one's.
inline std::string stack(std::span<const std::string> documents) {
    constexpr std::string_view who = "heldout::report::stack";
    if (documents.empty())
        detail::fail(who, "documents", "empty input");
    auto attribute = [&](std::string_view doc, std::string_view name, std::size_t i) {
        const auto open = doc.find("<svg ");
        const std::string key = " " + std::string(name) + "=\"";
        const auto at = open == std::string_view::npos ? open : doc.find(key, open);
        const auto end = at == std::string_view::npos ? at : doc.find('"', at + key.size());
        if (end != std::string_view::npos) {
            // written by number(v, 2): digits, a point, digits (no floating from_chars in libc++ 14)
            double v = 0, scale = 0;
            bool ok = end > at + key.size();
            for (std::size_t k = at + key.size(); ok && k < end; ++k) {
                const char ch = doc[k];
                if (ch == '.' && scale == 0)
                    scale = 1;
                else if (ch >= '0' && ch <= '9') {
                    if (scale > 0)
                        v += (ch - '0') * (scale /= 10);
                    else
                        v = 10 * v + (ch - '0');
                } else
                    ok = false;
            }
            if (ok && v > 0)
                return v;
        }
        detail::fail_at(who, "documents", "not an SVG document with a " + std::string(name) + " (svg::str)", i);
    };
    double width = 0, height = 0;
    std::vector<double> heights;
    for (std::size_t i = 0; i < documents.size(); ++i) {
        width = std::max(width, attribute(documents[i], "width", i));
        heights.push_back(attribute(documents[i], "height", i));
        height += heights.back();
    }
    std::string out = "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n";
    out += "<svg xmlns=\"http://www.w3.org/2000/svg\" version=\"1.1\" width=\"" + number(width, 2) + "\" height=\"" +
           number(height, 2) + "\" viewBox=\"0 0 " + number(width, 2) + " " + number(height, 2) + "\">\n";
    double y = 0;
    for (std::size_t i = 0; i < documents.size(); ++i) {
        std::string inner = inline_svg(documents[i]);
        // the nested document keeps its own size and viewBox; only its position is added
        inner.replace(0, 4, "<svg x=\"0\" y=\"" + number(y, 2) + "\"");
        out += inner;
        y += heights[i];
    }
    out += "</svg>\n";
    return out;
}

/// The Okabe–Ito colour-blind-safe palette (Okabe & Ito 2008, "Color universal design"),
/// black last; series i takes colour i modulo 8.
inline const std::string& palette(std::size_t i) {
    static const std::string colours[] = {"#0072B2", "#D55E00", "#009E73", "#CC79A7",
                                          "#E69F00", "#56B4E9", "#F0E442", "#000000"};
    return colours[i % 8];
}

/// One axis of a figure. Without lo/hi the range is taken from the data; a range that is
/// not `fixed` is widened to the nice ticks around it.
struct axis {
    std::string label{};
    std::optional<double> lo{};
    std::optional<double> hi{};
    bool fixed = false;                                       ///< keep [lo, hi] exactly (ticks inside it)
    std::vector<std::pair<double, std::string>> categories{}; ///< labelled positions instead of numeric ticks
};

enum class legend_place { top_left, top_right, bottom_left, bottom_right };

/// What a figure looks like.
struct figure_options {
    std::string title{};
    axis x{};
    axis y{};
    double width = 640;
    double height = 480;
    legend_place legend = legend_place::bottom_right;
    bool grid = true;
    std::string subtitle{}; ///< a smaller second line under the title (e.g. the data set)
};

/// A plot with two axes. Series are recorded as they are added; str() lays out the axes
/// (from the data when the ranges are open), draws everything and returns the SVG text.
class figure {
public:
    explicit figure(figure_options o) : o_(std::move(o)) {}

    /// A polyline series (a legend entry when the name is not empty).
    figure& line(std::string name, std::span<const double> xs, std::span<const double> ys, std::string colour = "",
                 std::string dash = "", double width = 2.0) {
        add(kind::line, std::move(name), xs, ys, std::move(colour), std::move(dash), width);
        return *this;
    }

    /// A point series drawn as circles of radius r.
    figure& points(std::string name, std::span<const double> xs, std::span<const double> ys, std::string colour = "",
                   double r = 3.5) {
        add(kind::points, std::move(name), xs, ys, std::move(colour), "", r);
        return *this;
    }

    /// Points joined by a line, each point marked.
    figure& line_points(std::string name, std::span<const double> xs, std::span<const double> ys,
                        std::string colour = "") {
        add(kind::line_points, std::move(name), xs, ys, std::move(colour), "", 2.0);
        return *this;
    }

    /// A thin dashed grey segment without a legend entry (a diagonal, a mean, a target).
    figure& reference_line(double x1, double y1, double x2, double y2, std::string colour = "#888888",
                           std::string dash = "5 4", double width = 1.2) {
        const double xs[] = {x1, x2}, ys[] = {y1, y2};
        add(kind::guide, "", xs, ys, std::move(colour), std::move(dash), width);
        return *this;
    }

    /// A short horizontal bar from x1 to x2 at height y (e.g. a group mean in a strip plot).
    figure& segment(double x1, double x2, double y, std::string colour, double width = 2.5) {
        const double xs[] = {x1, x2}, ys[] = {y, y};
        add(kind::segment, "", xs, ys, std::move(colour), "", width);
        return *this;
    }

    /// A filled box from (x0, y0) to (x1, y1) in data coordinates, without a legend entry
    /// (a histogram bar; its pixel size follows the axes, whatever the figure's size).
    figure& bar(double x0, double x1, double y0, double y1, std::string colour, double opacity = 0.75) {
        const double xs[] = {std::min(x0, x1), std::max(x0, x1)}, ys[] = {std::min(y0, y1), std::max(y0, y1)};
        add(kind::bar, "", xs, ys, std::move(colour), "", 0.0);
        series_.back().opacity = opacity;
        return *this;
    }

    /// A vertical interval from lo to hi at x, with short caps, without a legend entry.
    figure& error_bar(double x, double lo, double hi, std::string colour, double width = 1.4) {
        const double xs[] = {x, x}, ys[] = {std::min(lo, hi), std::max(lo, hi)};
        add(kind::error_bar, "", xs, ys, std::move(colour), "", width);
        return *this;
    }

    /// Sets the opacity of the series added last (e.g. many overlapping points); 0 < a <= 1.
    figure& opacity(double a) {
        if (series_.empty())
            detail::fail("heldout::report::figure::opacity", "", "no series added yet");
        if (!(a > 0 && a <= 1))
            detail::fail("heldout::report::figure::opacity", "a", "must lie in (0, 1]");
        series_.back().opacity = a;
        return *this;
    }

    std::size_t series_count() const noexcept { return series_.size(); }

    /// The SVG document.
    std::string str() const {
        const auto [xlo, xhi, xt] = layout(o_.x, true);
        const auto [ylo, yhi, yt] = layout(o_.y, false);
        svg doc(o_.width, o_.height);
        doc.title(o_.title);
        const double top = o_.title.empty() ? 20 : (o_.subtitle.empty() ? 44 : 60);
        double ytick_w = 0;
        for (const auto& [v, label] : yt)
            ytick_w = std::max(ytick_w, text_width(label, 11));
        const double left = 28 + ytick_w + (o_.y.label.empty() ? 0 : 20);
        const double right = 20, bottom = 56;
        const double pw = o_.width - left - right, ph = o_.height - top - bottom;
        if (!(pw > 20 && ph > 20))
            detail::fail("heldout::report::figure", "width", "too small for the axes and labels");
        // Init-captures: clang 14 does not yet let a lambda capture a structured binding (C++20).
        auto px = [&, x0 = xlo, x1 = xhi](double x) { return left + (x - x0) / (x1 - x0) * pw; };
        auto py = [&, y0 = ylo, y1 = yhi](double y) { return top + ph - (y - y0) / (y1 - y0) * ph; };

        if (!o_.title.empty())
            doc.text(o_.width / 2, 26, o_.title, {.size = 16, .align = anchor::middle, .bold = true});
        if (!o_.subtitle.empty())
            doc.text(o_.width / 2, 45, o_.subtitle, {.size = 12, .align = anchor::middle, .fill = "#555555"});

        const style grid{.stroke = "#e4e4e4", .stroke_width = 1};
        const style tick{.stroke = "#333333", .stroke_width = 1};
        for (const auto& [v, label] : xt) {
            if (o_.grid)
                doc.line(px(v), top, px(v), top + ph, grid);
            doc.line(px(v), top + ph, px(v), top + ph + 5, tick);
            doc.text(px(v), top + ph + 19, label, {.size = 11, .align = anchor::middle});
        }
        for (const auto& [v, label] : yt) {
            if (o_.grid)
                doc.line(left, py(v), left + pw, py(v), grid);
            doc.line(left - 5, py(v), left, py(v), tick);
            doc.text(left - 8, py(v) + 4, label, {.size = 11, .align = anchor::end});
        }
        doc.rect(left, top, pw, ph, {.stroke = "#333333", .stroke_width = 1});
        if (!o_.x.label.empty())
            doc.text(left + pw / 2, o_.height - 14, o_.x.label, {.size = 13, .align = anchor::middle});
        if (!o_.y.label.empty())
            doc.text(16, top + ph / 2, o_.y.label, {.size = 13, .align = anchor::middle, .rotate = -90});

        for (const auto& s : series_) {
            std::vector<double> xs(s.x.size()), ys(s.y.size());
            for (std::size_t i = 0; i < xs.size(); ++i) {
                xs[i] = px(s.x[i]);
                ys[i] = py(s.y[i]);
            }
            switch (s.k) {
            case kind::line:
            case kind::guide:
            case kind::segment:
                doc.polyline(xs, ys,
                             {.stroke = s.colour, .stroke_width = s.size, .dash = s.dash, .opacity = s.opacity});
                break;
            case kind::bar: // ys[1] is the top (the larger value) in pixels: the smaller coordinate
                doc.rect(xs[0], ys[1], xs[1] - xs[0], ys[0] - ys[1], {.fill = s.colour, .opacity = s.opacity});
                break;
            case kind::error_bar: {
                const style st{.stroke = s.colour, .stroke_width = s.size, .opacity = s.opacity};
                doc.line(xs[0], ys[0], xs[0], ys[1], st);
                doc.line(xs[0] - 4, ys[0], xs[0] + 4, ys[0], st);
                doc.line(xs[0] - 4, ys[1], xs[0] + 4, ys[1], st);
                break;
            }
            case kind::points: {
                const double edge = s.opacity < 1 ? 0.0 : 0.8; // faint points: no white rim
                for (std::size_t i = 0; i < xs.size(); ++i)
                    doc.circle(xs[i], ys[i], s.size,
                               {.stroke = edge > 0 ? "#ffffff" : "none",
                                .fill = s.colour,
                                .stroke_width = edge,
                                .opacity = s.opacity});
                break;
            }
            case kind::line_points:
                doc.polyline(xs, ys, {.stroke = s.colour, .stroke_width = s.size});
                for (std::size_t i = 0; i < xs.size(); ++i)
                    doc.circle(xs[i], ys[i], 3.5, {.stroke = "#ffffff", .fill = s.colour, .stroke_width = 0.8});
                break;
            }
        }
        draw_legend(doc, left, top, pw, ph);
        return doc.str();
    }

private:
    enum class kind { line, points, line_points, guide, segment, bar, error_bar };
    struct series {
        kind k;
        std::string name;
        std::vector<double> x, y;
        std::string colour, dash;
        double size;
        double opacity = 1.0;
    };
    struct axis_layout {
        double lo, hi;
        std::vector<std::pair<double, std::string>> ticks;
    };

    void add(kind k, std::string name, std::span<const double> xs, std::span<const double> ys, std::string colour,
             std::string dash, double size) {
        constexpr std::string_view who = "heldout::report::figure";
        if (xs.size() != ys.size())
            detail::fail(who, "y",
                         "size " + std::to_string(ys.size()) + " differs from size " + std::to_string(xs.size()) +
                             " of 'x'");
        for (std::size_t i = 0; i < xs.size(); ++i) {
            if (!std::isfinite(xs[i]))
                detail::fail_at(who, "x", "not finite", i);
            if (!std::isfinite(ys[i]))
                detail::fail_at(who, "y", "not finite", i);
        }
        if (colour.empty()) {
            std::size_t named = 0;
            for (const auto& s : series_)
                named += !s.name.empty() && s.k != kind::guide && s.k != kind::bar && s.k != kind::error_bar;
            colour = palette(named);
        }
        series_.push_back({k,
                           std::move(name),
                           {xs.begin(), xs.end()},
                           {ys.begin(), ys.end()},
                           std::move(colour),
                           std::move(dash),
                           size});
    }

    axis_layout layout(const axis& a, bool is_x) const {
        double lo = std::numeric_limits<double>::infinity(), hi = -lo;
        for (const auto& s : series_)
            for (double v : is_x ? s.x : s.y) {
                lo = std::min(lo, v);
                hi = std::max(hi, v);
            }
        for (const auto& [v, label] : a.categories) {
            lo = std::min(lo, v - 0.5);
            hi = std::max(hi, v + 0.5);
        }
        if (a.lo)
            lo = *a.lo;
        if (a.hi)
            hi = *a.hi;
        if (!std::isfinite(lo) || !std::isfinite(hi)) { // no data and no range
            lo = 0;
            hi = 1;
        }
        if (hi < lo)
            detail::fail("heldout::report::figure", is_x ? "x.hi" : "y.hi", "below lo");
        axis_layout out;
        if (!a.categories.empty()) {
            if (hi == lo) {
                lo -= 0.5;
                hi += 0.5;
            }
            out.lo = lo;
            out.hi = hi;
            out.ticks = a.categories;
            return out;
        }
        const std::size_t target = is_x ? std::max<std::size_t>(2, static_cast<std::size_t>(o_.width / 110))
                                        : std::max<std::size_t>(2, static_cast<std::size_t>(o_.height / 80));
        ticks t = nice_ticks(lo, hi, target);
        if (a.fixed && hi > lo) {
            out.lo = lo;
            out.hi = hi;
        } else {
            if (hi == lo) { // the widened range of nice_ticks
                const double pad = std::max(1.0, 0.1 * std::abs(lo));
                lo -= pad;
                hi += pad;
            }
            out.lo = std::min(lo, std::floor(lo / t.step + 1e-9) * t.step);
            out.hi = std::max(hi, std::ceil(hi / t.step - 1e-9) * t.step);
            t = nice_ticks(out.lo, out.hi, target);
        }
        for (double v : t.values)
            out.ticks.emplace_back(v, number(v, t.decimals));
        return out;
    }

    void draw_legend(svg& doc, double left, double top, double pw, double ph) const {
        std::vector<const series*> entries;
        for (const auto& s : series_)
            if (!s.name.empty())
                entries.push_back(&s);
        if (entries.empty())
            return;
        double w = 0;
        for (auto* s : entries)
            w = std::max(w, text_width(s->name, 12));
        w += 44;
        const double row = 18, h = row * static_cast<double>(entries.size()) + 10;
        const bool at_left = o_.legend == legend_place::top_left || o_.legend == legend_place::bottom_left;
        const bool at_top = o_.legend == legend_place::top_left || o_.legend == legend_place::top_right;
        const double x = at_left ? left + 10 : left + pw - 10 - w;
        const double y = at_top ? top + 10 : top + ph - 10 - h;
        doc.rect(x, y, w, h, {.stroke = "#bbbbbb", .fill = "#ffffff", .stroke_width = 1, .opacity = 0.92});
        for (std::size_t i = 0; i < entries.size(); ++i) {
            const series& s = *entries[i];
            const double cy = y + 5 + row * (static_cast<double>(i) + 0.5);
            if (s.k == kind::points) {
                doc.circle(x + 18, cy, 4, {.fill = s.colour});
            } else {
                doc.line(x + 8, cy, x + 28, cy, {.stroke = s.colour, .stroke_width = 2.5, .dash = s.dash});
                if (s.k == kind::line_points)
                    doc.circle(x + 18, cy, 3.5, {.fill = s.colour});
            }
            doc.text(x + 36, cy + 4, s.name, {.size = 12});
        }
    }

    figure_options o_;
    std::vector<series> series_;
};

} // namespace report
HELDOUT_NAMESPACE_END
