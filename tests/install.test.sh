#!/bin/sh
# `make install` into a temporary PREFIX after an ordinary build, then the installed kphi
# run from another directory: its data path points at the PREFIX, `kphi species` and a
# user's reaction set outside reactions/ find the installed species data; a staged
# install (DESTDIR) works from wherever it lands. Run by tests/run_tests.sh from the
# repository root: $1 = the build directory ($BUILD). Prints one line per failed check;
# exits nonzero when any failed.
build=${1:-build}
repo=$(pwd)
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
fail=0
check() { # check "what" command...
    what=$1
    shift
    if ! "$@" >"$tmp/out" 2>&1; then
        echo "install test: $what failed:" >&2
        sed 's/^/  /' "$tmp/out" | head -5 >&2
        fail=1
    fi
}
# A copy of the build, so that the tree's own objects and binary stay as they are.
cp -R "$build" "$tmp/build"
mk() {
    make -s -C "$repo" --no-print-directory BUILD="$tmp/build" BIN="$tmp/build/bin/kphi" \
        LIBA="$tmp/build/lib/libkphi.a" "$@"
}
check "make install PREFIX=$tmp/x" mk install PREFIX="$tmp/x"
kphi="$tmp/x/bin/kphi"
# the compiled-in data directory is the PREFIX's, not the one of the earlier build
check "data path compiled for the PREFIX" grep -aq "$tmp/x/share/kphi" "$kphi"
mkdir -p "$tmp/work"
cd "$tmp/work" || exit 1
check "kphi species from another directory" env -u KPHI_DATA "$kphi" species NH3
# a user's reaction set with no species_file and no species.yaml beside it
cat >myset.yaml <<'YAML'
name: my ammonia set
species: [N2, H2, NH3]
reactions:
  - N2 + 3 H2 = 2 NH3
conversion: N2
YAML
cat >mycase.yaml <<'YAML'
reactions: myset.yaml
feed: {N2: 1, H2: 3}
T: 450 C
P: 200 bar
YAML
check "a user set outside reactions/ (check)" env -u KPHI_DATA "$kphi" check myset.yaml
check "a user set outside reactions/ (solve)" env -u KPHI_DATA "$kphi" solve mycase.yaml
# the key that names a species file of one's own still wins
cp "$repo/reactions/species.yaml" own-species.yaml
printf 'species_file: own-species.yaml\n' >>myset.yaml
check "species_file key" env -u KPHI_DATA "$kphi" solve mycase.yaml
printf 'species_file: none-such.yaml\n' >myset2.yaml
sed -n '1,5p' myset.yaml >>myset2.yaml
if env -u KPHI_DATA "$kphi" check myset2.yaml >"$tmp/out" 2>&1; then
    echo "install test: a missing species_file was not refused" >&2
    fail=1
fi
# a staged install (DESTDIR) for another PREFIX, run from where it landed
cd "$repo" || exit 1
check "make install DESTDIR" mk install PREFIX=/opt/kphi-test DESTDIR="$tmp/stage"
cd "$tmp/work" || exit 1
check "staged kphi species" env -u KPHI_DATA "$tmp/stage/opt/kphi-test/bin/kphi" species N2
exit $fail
