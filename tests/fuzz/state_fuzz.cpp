// libFuzzer harness for loading accumulator state (heldout/stream/serialize.hpp). Built and
// run by tests/fuzz/run_state_smoke.sh (clang++-14 -fsanitize=fuzzer,address,undefined).
//
// An input is one byte choosing the accumulator (tests/stream/state_samples.hpp lists them),
// then a state without its trailing checksum: the harness appends the right FNV-1a hash, so
// libFuzzer's mutations reach the field checks instead of stopping at the checksum. The state
// is loaded and used (value, merge, serialize); any exception other than heldout::input_error,
// or any sanitizer report, is a failure. Built with -DHELDOUT_STATE_SEEDS it is instead a
// program writing the seed corpus (valid states of every accumulator) into the directory
// given as its argument.
#include "stream/state_samples.hpp"

#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <exception>
#include <string>
#include <vector>

#ifdef HELDOUT_STATE_SEEDS
int main(int argc, char** argv) {
    if (argc != 2) {
        std::fprintf(stderr, "usage: %s DIR\n", argv[0]);
        return 2;
    }
    int written = 0;
    for (std::size_t i = 0; i < state_samples::case_count(); ++i) {
        const auto seeds = state_samples::seeds(i);
        for (std::size_t s = 0; s < seeds.size(); ++s) {
            const std::string path = std::string(argv[1]) + "/state_" + std::to_string(i) + "_" + std::to_string(s);
            std::FILE* f = std::fopen(path.c_str(), "wb");
            if (!f)
                return 3;
            const unsigned char which = static_cast<unsigned char>(i);
            const bool ok = std::fwrite(&which, 1, 1, f) == 1 &&
                            std::fwrite(seeds[s].data(), 1, seeds[s].size() - 8, f) == seeds[s].size() - 8;
            if (std::fclose(f) != 0 || !ok)
                return 3;
            ++written;
        }
    }
    std::printf("%d seed states written\n", written);
    return 0;
}
#else
extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    if (size < 1)
        return 0;
    const std::size_t which = data[0] % state_samples::case_count();
    std::vector<std::byte> bytes(size - 1 + 8);
    for (std::size_t i = 1; i < size; ++i)
        bytes[i - 1] = static_cast<std::byte>(data[i]);
    state_samples::reseal(bytes);
    try {
        state_samples::load_and_use(which, bytes);
    } catch (const heldout::input_error&) {
    } catch (const std::exception& e) {
        std::fprintf(stderr, "state_fuzz: accumulator %zu threw a non-input_error: %s\n", which, e.what());
        std::abort();
    }
    return 0;
}
#endif
