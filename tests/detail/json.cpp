// Tests for heldout/detail/json.hpp: string escaping (control characters, ill-formed UTF-8),
// the writer's structure and numbers. The reference for "valid JSON" is Python's json module
// with a strict UTF-8 decode (run live with /usr/bin/python3).
#include <heldout/detail/json.hpp>

#include <doctest/doctest.h>

#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <limits>
#include <random>
#include <string>
#include <vector>

using heldout::detail::json_quote;
using heldout::detail::json_writer;

namespace {
std::string as_json(std::string_view s) {
    std::string out;
    json_quote(out, s);
    return out;
}
const std::string fffd = "\xEF\xBF\xBD"; // U+FFFD in UTF-8
} // namespace

TEST_SUITE("detail/json") {
    TEST_CASE("escapes: quote, backslash, the short forms and \\u00XX for every other control character") {
        CHECK(as_json("a\"b\\c") == "\"a\\\"b\\\\c\"");
        CHECK(as_json("\n\r\t") == "\"\\n\\r\\t\"");
        CHECK(as_json(std::string("\0", 1)) == "\"\\u0000\"");
        CHECK(as_json("\x01\x1f") == "\"\\u0001\\u001f\"");
        CHECK(as_json("\x7f") == "\"\x7f\""); // DEL is not a control character for JSON (RFC 8259 Section 7)
        for (int c = 0; c < 0x20; ++c) {
            const std::string q = as_json(std::string(1, static_cast<char>(c)));
            for (char ch : q)
                CHECK(static_cast<unsigned char>(ch) >= 0x20); // no raw control character survives
        }
        CHECK(as_json("Gr\xC3\xB6\xC3\x9F\xE2\x82\xAC \xF0\x9F\x98\x80") ==
              "\"Gr\xC3\xB6\xC3\x9F\xE2\x82\xAC \xF0\x9F\x98\x80\""); // well-formed UTF-8 kept as is
    }

    TEST_CASE("ill-formed UTF-8: one U+FFFD per maximal subpart") {
        // Unicode 15.0 Section 3.9, Table 3-8 (example from memory; CPython's
        // bytes.decode("utf-8", "replace") gives the same, and the live check below compares
        // with it on random bytes): 61 F1 80 80 E1 80 C2 62 80 63 80 BF 64.
        CHECK(as_json("\x61\xF1\x80\x80\xE1\x80\xC2\x62\x80\x63\x80\xBF\x64") ==
              "\"a" + fffd + fffd + fffd + "b" + fffd + "c" + fffd + fffd + "d\"");
        CHECK(as_json("\xC0\x80") == "\"" + fffd + fffd + "\"");                       // overlong U+0000
        CHECK(as_json("\xED\xA0\x80") == "\"" + fffd + fffd + fffd + "\"");            // surrogate U+D800
        CHECK(as_json("\xF4\x90\x80\x80") == "\"" + fffd + fffd + fffd + fffd + "\""); // above U+10FFFF
        CHECK(as_json("\xE2\x82") == "\"" + fffd + "\"");                              // truncated at the end
        CHECK(as_json("\xFF\xFE") == "\"" + fffd + fffd + "\"");                       // never in UTF-8
        CHECK(as_json("\xE2\x82\"") == "\"" + fffd + "\\\"\""); // a subpart ends before the quote
        CHECK(as_json("\xEF\xBF\xBF") == "\"\xEF\xBF\xBF\"");   // U+FFFF is a valid JSON character
    }

    TEST_CASE("random bytes: Python's strict UTF-8 decode and json.loads read back bytes.decode('utf-8', 'replace')") {
        const std::string dir = HELDOUT_REFERENCE_DIR;
        const std::string json_path = dir + "/detail_json_bytes.json", hex_path = dir + "/detail_json_bytes.hex";
        std::mt19937_64 gen(11);
        json_writer w;
        w.begin_array();
        std::ofstream hex(hex_path);
        for (int i = 0; i < 2000; ++i) {
            std::string s(gen() % 16, ' ');
            for (auto& ch : s) // bias towards the interesting bytes: controls and 0x80..0xFF
                ch = static_cast<char>(gen() % 3 == 0 ? gen() % 0x20 : 0x80 + gen() % 0x80);
            w.value(s);
            for (char ch : s) {
                char buf[3];
                std::snprintf(buf, sizeof buf, "%02x", static_cast<unsigned>(static_cast<unsigned char>(ch)));
                hex << buf;
            }
            hex << '\n';
        }
        w.end_array();
        hex.close();
        {
            std::ofstream f(json_path, std::ios::binary);
            f << w.str();
        }
        const std::string py = dir + "/detail_json_bytes.py";
        {
            std::ofstream f(py);
            f << "import json, sys\n"
                 "text = open(sys.argv[1], 'rb').read().decode('utf-8')\n" // strict: raises on ill-formed UTF-8
                 "got = json.loads(text)\n"                                // strict: raises on raw control characters
                 "want = [bytes.fromhex(l.strip()).decode('utf-8', 'replace') for l in open(sys.argv[2])]\n"
                 "assert got == want, [(g, w) for g, w in zip(got, want) if g != w][:3]\n"
                 "print(len(got), 'strings agree')\n";
        }
        CHECK(std::system(("/usr/bin/python3 " + py + " " + json_path + " " + hex_path).c_str()) == 0);
    }

    TEST_CASE("writer: structure, keys and numbers") {
        json_writer w;
        w.begin_object().member("name", std::string("a\x01")).member("x", 0.1).key("list").begin_array();
        w.value(1.0)
            .null()
            .value(std::uint64_t{3})
            .value(true)
            .end_array()
            .member("nan", std::numeric_limits<double>::quiet_NaN())
            .end_object();
        CHECK(w.str() == "{\"name\":\"a\\u0001\",\"x\":0.1,\"list\":[1,null,3,true],\"nan\":null}");
    }
}
