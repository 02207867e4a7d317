// Tests for heldout/estimate/estimate.hpp: the one-line print, JSON (parsed back by Python's
// json module, run live) and the CSV layout.
#include <heldout/estimate/estimate.hpp>

#include "support/parse.hpp"

#include <doctest/doctest.h>

#include <charconv>
#include <cstdlib>
#include <fstream>
#include <map>
#include <sstream>
#include <string>
#include <vector>

using heldout::estimate;
using heldout::split_value;

namespace {

estimate cv_estimate() {
    estimate e;
    e.measure = "MSE";
    e.value = 0.1 + 0.2; // 0.30000000000000004: needs all 17 digits to round-trip
    e.se = 1.0 / 3;
    e.lower = 0.2123456;
    e.upper = 0.4;
    e.level = 0.95;
    e.method = heldout::ci::method_id::corrected_t;
    e.method_label = std::string(heldout::ci::label(e.method));
    e.splits = 2;
    e.observations = 200;
    e.pooled = 1e-300;
    e.notes = {"1 of 3 splits undefined: constant truth, \"flat\"", "line\nbreak, and comma"};
    e.per_split = {split_value{0, 0, 0, 200, 100, 0.25, ""}, split_value{1, 0, 1, 200, 100, std::nullopt, "flat"},
                   split_value{2, 0, 2, 200, 100, 0.35000000000000003, ""}};
    return e;
}

double parse(const std::string& s) {
    double x = 0;
    const auto r = heldout_test::double_from_chars(s.data(), s.data() + s.size(), x);
    REQUIRE(r.ec == std::errc{});
    return x;
}

} // namespace

TEST_SUITE("estimate/estimate") {
    TEST_CASE("one line: measure, value, [lower, upper], level, method, splits, rows") {
        std::ostringstream os;
        os << cv_estimate();
        CHECK(os.str() == "MSE 0.3 [0.2123, 0.4] 95% corrected t (Nadeau-Bengio), 2 of 3 splits, n=200");

        estimate one;
        one.measure = "AUC";
        one.value = 0.87123;
        one.lower = 0.848;
        one.upper = 0.89349;
        one.se = 0.01;
        one.level = 0.9;
        one.method = heldout::ci::method_id::delong;
        one.method_label = "DeLong";
        one.splits = 1;
        one.observations = 1200;
        one.per_split = {split_value{0, 0, 0, 800, 1200, 0.87123, ""}};
        std::ostringstream o1;
        o1 << one;
        CHECK(o1.str() == "AUC 0.8712 [0.848, 0.8935] 90% DeLong, one test set, n=1200");

        estimate point;
        point.measure = "classification error";
        point.value = 0.18724;
        point.method = heldout::ci::method_id::bootstrap_632_plus;
        point.method_label = ".632+ bootstrap";
        point.splits = 200;
        point.observations = 7350;
        point.per_split.resize(200);
        std::ostringstream o2;
        o2 << point;
        CHECK(o2.str() == "classification error 0.1872 (.632+ bootstrap, point estimate), 200 splits, n=7350");
        CHECK(!point.has_interval());
        CHECK(cv_estimate().has_interval());
        CHECK(heldout::detail::level_text(0.975) == "97.5%");
        CHECK(heldout::detail::readable_number(123456.0) == "1.235e+05");
    }

    TEST_CASE("JSON parsed back by Python's json.loads gives every number bit for bit") {
        const std::string dir = HELDOUT_REFERENCE_DIR;
        const std::string in = dir + "/estimate_json_check.json", out = dir + "/estimate_json_check.txt";
        {
            std::ofstream f(in);
            heldout::write_json(f, {cv_estimate(), cv_estimate()});
        }
        // The reference parser is Python's json module (run live with /usr/bin/python3); it
        // prints each field with repr(), the shortest round-trip text of the double it read.
        const std::string script =
            "import json,sys\n"
            "d=json.load(open(sys.argv[1]))\n"
            "e=d[1]\n"
            "o=open(sys.argv[2],'w')\n"
            "for k in ('value','se','lower','upper','level','pooled'): o.write(k+' '+repr(e[k])+'\\n')\n"
            "o.write('splits '+str(e['splits'])+'\\n')\n"
            "o.write('method '+e['method']+'\\n')\n"
            "o.write('null '+str(e['per_split'][1]['value'] is None)+'\\n')\n"
            "o.write('undefined '+e['per_split'][1]['undefined']+'\\n')\n"
            "o.write('v2 '+repr(e['per_split'][2]['value'])+'\\n')\n"
            "o.write('note0 '+json.dumps(e['notes'][0])+'\\n')\n"
            "o.write('note1 '+json.dumps(e['notes'][1])+'\\n')\n"
            "o.write('count '+str(len(d))+'\\n')\n";
        const std::string py = dir + "/estimate_json_check.py";
        {
            std::ofstream f(py);
            f << script;
        }
        REQUIRE(std::system(("/usr/bin/python3 " + py + " " + in + " " + out).c_str()) == 0);
        std::ifstream f(out);
        std::map<std::string, std::string> got;
        std::string line;
        while (std::getline(f, line)) {
            const auto sp = line.find(' ');
            got[line.substr(0, sp)] = line.substr(sp + 1);
        }
        const estimate e = cv_estimate();
        CHECK(parse(got["value"]) == e.value); // exact: shortest round-trip digits
        CHECK(parse(got["se"]) == *e.se);
        CHECK(parse(got["lower"]) == *e.lower);
        CHECK(parse(got["upper"]) == *e.upper);
        CHECK(parse(got["level"]) == e.level);
        CHECK(parse(got["pooled"]) == *e.pooled);
        CHECK(parse(got["v2"]) == *e.per_split[2].value);
        CHECK(got["value"] == "0.30000000000000004");
        CHECK(got["splits"] == "2");
        CHECK(got["method"] == "corrected_t");
        CHECK(got["null"] == "True");
        CHECK(got["undefined"] == "flat");
        CHECK(got["note0"] == "\"1 of 3 splits undefined: constant truth, \\\"flat\\\"\"");
        CHECK(got["note1"] == "\"line\\nbreak, and comma\"");
        CHECK(got["count"] == "2");
    }

    TEST_CASE("JSON text: absent values are null, keys in a fixed order") {
        estimate e;
        e.measure = "x";
        e.value = 1;
        e.method = heldout::ci::method_id::bootstrap_632;
        e.method_label = ".632 bootstrap";
        CHECK(heldout::to_json(e) ==
              "{\"measure\":\"x\",\"method\":\"bootstrap_632\",\"method_label\":\".632 bootstrap\",\"level\":0.95,"
              "\"value\":1,\"se\":null,\"lower\":null,\"upper\":null,\"pooled\":null,\"splits\":0,"
              "\"observations\":0,\"notes\":[],\"cautions\":[],\"per_split\":[]}");
        heldout::detail::json_writer w;
        w.begin_object().member("tab", "a\tb\x01").end_object();
        CHECK(w.str() == "{\"tab\":\"a\\tb\\u0001\"}");
    }

    TEST_CASE("CSV: header, one estimate row, one row per split; RFC 4180 quoting") {
        std::ostringstream os;
        heldout::write_csv(os, {cv_estimate()});
        const std::string expect =
            "record,model,measure,method,level,value,se,lower,upper,pooled,splits,observations,split,repeat,fold,"
            "train_size,test_size,notes,cautions\n"
            "estimate,,MSE,corrected_t,0.95,0.30000000000000004,0.3333333333333333,0.2123456,0.4,1e-300,2,200,,,,,,"
            "\"1 of 3 splits undefined: constant truth, \"\"flat\"\"; line\nbreak, and comma\",\n"
            "split,,MSE,corrected_t,0.95,0.25,,,,,,,0,0,0,200,100,,\n"
            "split,,MSE,corrected_t,0.95,,,,,,,,1,0,1,200,100,flat,\n"
            "split,,MSE,corrected_t,0.95,0.35000000000000003,,,,,,,2,0,2,200,100,,\n";
        CHECK(os.str() == expect);
        // every row has the header's 19 fields (outside quotes)
        std::size_t fields = 1;
        bool quoted = false;
        for (char c : std::string(heldout::csv_header))
            fields += c == ',';
        CHECK(fields == 19);
        std::size_t commas = 0, rows = 0;
        for (char c : expect) {
            if (c == '"')
                quoted = !quoted;
            else if (c == ',' && !quoted)
                ++commas;
            else if (c == '\n' && !quoted) {
                CHECK(commas == 18);
                commas = 0;
                ++rows;
            }
        }
        CHECK(rows == 5);
    }

    TEST_CASE("cautions show in the line, the JSON and the CSV") {
        estimate e = cv_estimate();
        e.cautions = {"only 4 positives (4 positive, 16 negative): check", "second, with comma"};
        std::ostringstream line;
        line << e;
        CHECK(line.str() == "MSE 0.3 [0.2123, 0.4] 95% corrected t (Nadeau-Bengio), 2 of 3 splits, n=200; caution: "
                            "only 4 positives (4 positive, 16 negative): check; caution: second, with comma");
        const std::string j = heldout::to_json(e);
        CHECK(j.find("\"cautions\":[\"only 4 positives (4 positive, 16 negative): check\",\"second, with comma\"]") !=
              std::string::npos);
        std::ostringstream csv;
        heldout::write_csv(csv, {e});
        CHECK(csv.str().find(",\"only 4 positives (4 positive, 16 negative): check; second, with comma\"\n") !=
              std::string::npos);
    }
}
