// Tests for heldout/plan/audit.hpp: CSV round trips and bad CSV.
#include <heldout/plan/audit.hpp>

#include <heldout/plan/bootstrap.hpp>
#include <heldout/plan/repeated_kfold.hpp>
#include <heldout/plan/walk_forward.hpp>

#include <doctest/doctest.h>

#include <sstream>
#include <string>
#include <vector>

namespace {
std::string message_of(auto&& f) {
    try {
        f();
    } catch (const heldout::input_error& e) {
        return e.what();
    }
    return "no error";
}
template <class R>
void round_trip(R&& r) {
    std::ostringstream os;
    heldout::write_splits(os, r);
    std::istringstream is(os.str());
    const auto back = heldout::read_splits(is);
    const auto orig = r.to_vector();
    REQUIRE(back.size() == orig.size());
    for (std::size_t i = 0; i < orig.size(); ++i)
        CHECK(heldout::same_split(back[i].view(), orig[i].view()));
}
} // namespace

TEST_SUITE("plan/audit") {
    TEST_CASE("the layout: header, train then test lines per split") {
        auto r = heldout::walk_forward{.initial = 2, .horizon = 1}.splits(4);
        std::ostringstream os;
        heldout::write_splits(os, r);
        CHECK(os.str() == "repeat,fold,role,row\n"
                          "0,0,train,0\n0,0,train,1\n0,0,test,2\n"
                          "0,1,train,0\n0,1,train,1\n0,1,train,2\n0,1,test,3\n");
        std::ostringstream ob;
        heldout::write_splits(ob, heldout::bootstrap{.replicates = 1, .seed = 42}.splits(3));
        CHECK(ob.str().find(",draw,") != std::string::npos);
    }
    TEST_CASE("re-read splits equal the originals: k-fold, bootstrap, walk-forward") {
        round_trip(heldout::repeated_kfold{.folds = 4, .repeats = 2, .seed = 3}.splits(37));
        round_trip(heldout::bootstrap{.replicates = 5, .seed = 3}.splits(23));
        round_trip(heldout::walk_forward{.initial = 5, .horizon = 3, .step = 2, .gap = 1}.splits(30));
        auto kept = heldout::bootstrap{.replicates = 2, .seed = 1}.splits(9).to_vector();
        std::ostringstream os;
        heldout::write_splits(os, kept);
        std::istringstream is(os.str());
        const auto back = heldout::read_splits(is);
        CHECK(back[1].counts == kept[1].counts);
    }
    TEST_CASE("a trailing carriage return is accepted") {
        std::istringstream is("repeat,fold,role,row\r\n0,0,train,1\r\n0,0,test,0\r\n");
        const auto v = heldout::read_splits(is);
        REQUIRE(v.size() == 1);
        CHECK(v[0].train == std::vector<std::size_t>{1});
        CHECK(v[0].test == std::vector<std::size_t>{0});
    }
    TEST_CASE("bad CSV names the line") {
        auto read = [](const std::string& text) {
            return message_of([&] {
                std::istringstream is(text);
                heldout::read_splits(is);
            });
        };
        CHECK(read("") == "heldout::read_splits: argument 'csv': empty input (no header line)");
        CHECK(read("a,b\n") ==
              "heldout::read_splits: argument 'csv': line 1: header is 'a,b', expected 'repeat,fold,role,row'");
        CHECK(read("repeat,fold,role,row\n0,0,train\n") ==
              "heldout::read_splits: argument 'csv': line 2: expected 4 fields (repeat,fold,role,row), got 3");
        CHECK(read("repeat,fold,role,row\n0,0,train,x\n") ==
              "heldout::read_splits: argument 'csv': line 2: bad row 'x'");
        CHECK(read("repeat,fold,role,row\n0,-1,train,2\n") ==
              "heldout::read_splits: argument 'csv': line 2: bad fold '-1'");
        CHECK(read("repeat,fold,role,row\n0,0,fit,2\n") ==
              "heldout::read_splits: argument 'csv': line 2: role 'fit' is not train, test, draw or oob");
        CHECK(read("repeat,fold,role,row\n0,0,train,2\n0,0,oob,1\n") ==
              "heldout::read_splits: argument 'csv': line 3: role 'oob' mixes bootstrap (draw/oob) and plain "
              "(train/test) lines in one split");
        CHECK(read("repeat,fold,role,row\n0,0,train,2,3\n") ==
              "heldout::read_splits: argument 'csv': line 2: more than 4 fields");
    }
}
