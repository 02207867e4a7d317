#!/usr/bin/env bash
# ctest setup.demo_clean_tree: `bash cmake/setup.sh demo`, run from a fresh copy of the source
# tree as README's Quick start runs it, must leave the tree as it found it (everything it
# writes goes under build/, which git ignores).
#   check_clean_tree.sh SOURCE_DIR WORK_DIR
# The copy holds the files git would track (tracked and untracked-but-not-ignored; without git,
# every file outside build*/). In the copy a fresh git repository records the starting state,
# and `git status --porcelain` after the run must print nothing. Packages must already be
# installed (the test set-up installs more than the demo's); the script then needs no root.
set -euo pipefail
src=$(cd "$1" && pwd)
work=$2
rm -rf "$work"
mkdir -p "$work/tree"
if git -C "$src" rev-parse --show-toplevel >/dev/null 2>&1; then
    (cd "$src" && git ls-files -co --exclude-standard -z) | (cd "$src" && xargs -0 cp --parents -t "$work/tree")
else
    (cd "$src" && find . -path './build' -prune -o -path './build-*' -prune -o -type f -print0) |
        (cd "$src" && xargs -0 cp --parents -t "$work/tree")
fi
cd "$work/tree"
git init -q .
git -c user.name=check -c user.email=check@localhost add -A
git -c user.name=check -c user.email=check@localhost commit -qm "the tree before setup.sh demo"
bash cmake/setup.sh demo >"$work/setup_output.txt" 2>&1 || {
    echo "setup.sh demo failed:"
    cat "$work/setup_output.txt"
    exit 1
}
changed=$(git status --porcelain --untracked-files=all)
if [ -n "$changed" ]; then
    echo "setup.sh demo changed the source tree:"
    echo "$changed"
    exit 1
fi
grep -q "== 6. Pictures" "$work/setup_output.txt" || {
    echo "the demo did not run to its end:"
    cat "$work/setup_output.txt"
    exit 1
}
ls build/release/demo_output/*.svg >/dev/null
echo "setup.sh demo left the tree clean; its output:"
grep "^setup:" "$work/setup_output.txt"
