#!/bin/sh
# Run the loader fuzz target: fuzz/run.sh FUZZ_BINARY [SECONDS] [extra libFuzzer flags...]
# Corpus: fuzz/corpus-work/ (grows; not in git), seeded read-only from reactions/, cases/,
# tests/bad/ and fuzz/seeds/. Crashes, leaks, timeouts and out-of-memory inputs are written
# to fuzz/findings/. Exits nonzero when the fuzzer found something. A sweep axis may hold
# up to 1e6 points (8 MB); the limits below are generous all the same, as the
# sanitizers slow everything down.
# Run from the repository root (make fuzz does).
set -u
bin=$1
secs=${2:-60}
[ $# -ge 2 ] && shift 2 || shift $#
mkdir -p fuzz/corpus-work fuzz/findings
tmp=$(mktemp -d "${TMPDIR:-/tmp}/kphi-fuzz-XXXXXX") || exit 2
trap 'rm -rf "$tmp"' EXIT INT TERM
KPHI_SOURCE_DIR=$(pwd) KPHI_FUZZ_TMP=$tmp "$bin" \
    -max_total_time="$secs" -timeout=30 -rss_limit_mb=4096 -max_len=8192 \
    -dict=fuzz/kphi.dict -artifact_prefix=fuzz/findings/ -print_final_stats=1 "$@" \
    fuzz/corpus-work fuzz/seeds reactions cases tests/bad
