// A small XML 1.0 well-formedness checker for the report tests (self-written; it checks
// what the SVG writer must get right, not all of XML): one root element, properly nested
// and closed tags, quoted attributes without '<' and without repeats, only the five
// predefined entities or character references, no raw '<' or '&' in text, no control
// characters, well-formed UTF-8 without U+FFFE/U+FFFF, comments and one optional prolog.
#pragma once

#include <cctype>
#include <set>
#include <string>
#include <string_view>
#include <vector>

namespace heldout_test {

class xml_checker {
public:
    explicit xml_checker(std::string_view s) : s_(s) {}

    /// Empty when the text is well-formed, else what is wrong and where.
    std::string check() {
        for (unsigned char c : s_)
            if (c < 0x20 && c != '\t' && c != '\n' && c != '\r')
                return "control character in document";
        if (auto e = utf8_problem(); !e.empty())
            return e;
        if (s_.substr(0, 5) == "<?xml") {
            auto e = s_.find("?>");
            if (e == std::string_view::npos)
                return "unterminated prolog";
            i_ = e + 2;
        }
        misc();
        if (!peek('<'))
            return err("no root element");
        if (auto e = element(); !e.empty())
            return e;
        misc();
        if (i_ != s_.size())
            return err("content after the root element");
        return {};
    }

    /// Names of all elements, in document order (for tests that count shapes).
    const std::vector<std::string>& elements() const { return names_; }

private:
    /// The document is UTF-8 (the writer declares it): every sequence decodes to a code point
    /// in the shortest form, not a surrogate, at most U+10FFFF, and not U+FFFE/U+FFFF (not XML
    /// 1.0 characters). Decoded by lead-byte length and range checks on the code point (the
    /// definition of UTF-8 in RFC 3629 Section 3), not by the writer's table.
    std::string utf8_problem() const {
        for (std::size_t i = 0; i < s_.size();) {
            const auto b0 = static_cast<unsigned char>(s_[i]);
            std::size_t len = b0 < 0x80 ? 1 : (b0 >> 5) == 6 ? 2 : (b0 >> 4) == 14 ? 3 : (b0 >> 3) == 30 ? 4 : 0;
            if (len == 0 || i + len > s_.size())
                return "ill-formed UTF-8 at offset " + std::to_string(i);
            unsigned long cp = len == 1 ? b0 : b0 & (0x7Fu >> len);
            for (std::size_t j = 1; j < len; ++j) {
                const auto c = static_cast<unsigned char>(s_[i + j]);
                if ((c >> 6) != 2)
                    return "ill-formed UTF-8 at offset " + std::to_string(i);
                cp = (cp << 6) | (c & 0x3Fu);
            }
            const unsigned long shortest[] = {0, 0, 0x80, 0x800, 0x10000};
            if (cp < shortest[len] || (cp >= 0xD800 && cp <= 0xDFFF) || cp > 0x10FFFF)
                return "ill-formed UTF-8 at offset " + std::to_string(i);
            if (cp == 0xFFFE || cp == 0xFFFF)
                return "U+FFFE or U+FFFF (not an XML character) at offset " + std::to_string(i);
            i += len;
        }
        return {};
    }

    bool peek(char c) const { return i_ < s_.size() && s_[i_] == c; }
    std::string err(std::string_view what) const { return std::string(what) + " at offset " + std::to_string(i_); }
    void spaces() {
        while (i_ < s_.size() && std::isspace(static_cast<unsigned char>(s_[i_])))
            ++i_;
    }
    void misc() {
        for (;;) {
            spaces();
            if (s_.substr(i_, 4) == "<!--") {
                auto e = s_.find("-->", i_ + 4);
                i_ = e == std::string_view::npos ? s_.size() : e + 3;
            } else {
                return;
            }
        }
    }
    static bool name_start(char c) { return std::isalpha(static_cast<unsigned char>(c)) || c == '_' || c == ':'; }
    static bool name_char(char c) {
        return name_start(c) || std::isdigit(static_cast<unsigned char>(c)) || c == '-' || c == '.';
    }
    std::string name() {
        std::size_t b = i_;
        if (i_ >= s_.size() || !name_start(s_[i_]))
            return {};
        while (i_ < s_.size() && name_char(s_[i_]))
            ++i_;
        return std::string(s_.substr(b, i_ - b));
    }
    std::string reference() { // at '&'
        auto e = s_.find(';', i_);
        if (e == std::string_view::npos)
            return err("unterminated entity");
        std::string_view r = s_.substr(i_ + 1, e - i_ - 1);
        static const std::set<std::string_view> known{"amp", "lt", "gt", "quot", "apos"};
        bool ok = known.count(r) != 0;
        if (!ok && r.size() > 1 && r[0] == '#') {
            ok = true;
            const bool hex = r[1] == 'x';
            for (char c : r.substr(hex ? 2 : 1))
                ok = ok &&
                     (hex ? std::isxdigit(static_cast<unsigned char>(c)) : std::isdigit(static_cast<unsigned char>(c)));
            ok = ok && r.size() > (hex ? 2u : 1u);
        }
        if (!ok)
            return err("unknown entity &" + std::string(r) + ";");
        i_ = e + 1;
        return {};
    }
    std::string element() { // at '<'
        ++i_;
        const std::string tag = name();
        if (tag.empty())
            return err("bad element name");
        names_.push_back(tag);
        std::set<std::string> attrs;
        for (;;) {
            const std::size_t before = i_;
            spaces();
            if (peek('/')) {
                ++i_;
                if (!peek('>'))
                    return err("expected '>' after '/'");
                ++i_;
                return {};
            }
            if (peek('>')) {
                ++i_;
                break;
            }
            if (i_ == before)
                return err("expected a space before an attribute");
            const std::string a = name();
            if (a.empty())
                return err("bad attribute name");
            if (!attrs.insert(a).second)
                return err("repeated attribute " + a);
            spaces();
            if (!peek('='))
                return err("expected '=' after attribute " + a);
            ++i_;
            spaces();
            if (!peek('"') && !peek('\''))
                return err("unquoted value of attribute " + a);
            const char q = s_[i_++];
            while (i_ < s_.size() && s_[i_] != q) {
                if (s_[i_] == '<')
                    return err("'<' in attribute " + a);
                if (s_[i_] == '&') {
                    if (auto e = reference(); !e.empty())
                        return e;
                } else {
                    ++i_;
                }
            }
            if (i_ >= s_.size())
                return err("unterminated attribute " + a);
            ++i_;
        }
        for (;;) { // content
            if (i_ >= s_.size())
                return err("unclosed element " + tag);
            if (s_.substr(i_, 4) == "<!--") {
                auto e = s_.find("-->", i_ + 4);
                if (e == std::string_view::npos)
                    return err("unterminated comment");
                i_ = e + 3;
            } else if (s_.substr(i_, 2) == "</") {
                i_ += 2;
                const std::string end = name();
                if (end != tag)
                    return err("</" + end + "> closes <" + tag + ">");
                spaces();
                if (!peek('>'))
                    return err("expected '>'");
                ++i_;
                return {};
            } else if (peek('<')) {
                if (auto e = element(); !e.empty())
                    return e;
            } else if (peek('&')) {
                if (auto e = reference(); !e.empty())
                    return e;
            } else if (peek('>') && i_ >= 2 && s_.substr(i_ - 2, 2) == "]]") {
                return err("']]>' in text");
            } else {
                ++i_;
            }
        }
    }

    std::string_view s_;
    std::size_t i_ = 0;
    std::vector<std::string> names_;
};

/// Empty when s is well-formed XML (see xml_checker).
inline std::string xml_problem(std::string_view s) { return xml_checker(s).check(); }

} // namespace heldout_test
