// A consumer that includes everything public and uses nothing: what every user's build sees
// (tests/strict.cmake compiles it under the strict warning set with -Werror).
#include <heldout/heldout.hpp>

int main() { return 0; }
