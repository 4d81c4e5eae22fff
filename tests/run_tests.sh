#!/bin/sh
# Run every Check suite in $1 and the bad-input catalogue against the CLI $2.
# Bad inputs: tests/bad/NAME.yaml beside NAME.err, which holds
#   args: solve --P 0bar        (optional; the command, FILE is appended; default "check")
#   exit: 2
#   <the exact one-line message on stderr>
# Then the scripts tests/*.test.sh (install). Prints "N passed, N failed" at the end and exits nonzero on any failure.
dir=$1
kphi=$2
KPHI_BIN=$kphi
export KPHI_BIN
pass=0
fail=0
for t in "$dir"/*; do
    [ -x "$t" ] || continue
    case "$t" in *.d) continue ;; esac
    if "$t"; then pass=$((pass + 1)); else fail=$((fail + 1)); echo "FAILED: $t"; fi
done
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
for err in tests/bad/*.err; do
    [ -f "$err" ] || continue
    input=${err%.err}.yaml
    args=$(sed -n 's/^args: //p' "$err")
    [ -n "$args" ] || args=check
    want_exit=$(sed -n 's/^exit: //p' "$err")
    want_msg=$(grep -v -e '^args: ' -e '^exit: ' "$err")
    # shellcheck disable=SC2086
    (cd "$tmp" && true)
    "$kphi" $args "$input" >"$tmp/out" 2>"$tmp/err"
    got_exit=$?
    got_msg=$(cat "$tmp/err")
    if [ "$got_exit" = "$want_exit" ] && [ "$got_msg" = "$want_msg" ]; then
        pass=$((pass + 1))
    else
        fail=$((fail + 1))
        echo "FAILED: $input: exit $got_exit (want $want_exit)"
        echo "  got:  $got_msg"
        echo "  want: $want_msg"
    fi
done
# Scripts that test the build and install (tests/*.test.sh; $1 = the build directory).
for script in tests/*.test.sh; do
    [ -f "$script" ] || continue
    if sh "$script" "$(dirname "$dir")"; then
        pass=$((pass + 1))
    else
        fail=$((fail + 1))
        echo "FAILED: $script"
    fi
done
echo "$pass passed, $fail failed"
[ "$fail" = 0 ]
