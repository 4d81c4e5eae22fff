#!/bin/sh
# Install the Debian packages kphi needs, when they are missing.
# As root: apt-get update + install. Otherwise: print the command and stop.
# `deps.sh fuzz` also wants clang and its libFuzzer runtime (make fuzz).
PKG_CONFIG=${PKG_CONFIG:-pkg-config}
missing=""
command -v cc >/dev/null 2>&1 || missing="$missing gcc"
command -v make >/dev/null 2>&1 || missing="$missing make"
command -v "$PKG_CONFIG" >/dev/null 2>&1 || missing="$missing pkg-config"
have() { command -v "$PKG_CONFIG" >/dev/null 2>&1 && "$PKG_CONFIG" --exists "$1"; }
have gsl || missing="$missing libgsl-dev"
have yaml-0.1 || missing="$missing libyaml-dev"
have check || missing="$missing check"
have plplot || missing="$missing libplplot-dev"
# Charts: PNG and PDF through PLplot's cairo devices (pngcairo, pdfcairo), a separate
# package; SVG through PLplot's native svg device (writes text as text), in libplplot17.
drv=$(command -v "$PKG_CONFIG" >/dev/null 2>&1 && "$PKG_CONFIG" --variable=drvdir plplot 2>/dev/null)
[ -n "$drv" ] && [ -f "$drv/cairo.driver_info" ] || missing="$missing plplot-driver-cairo"
[ -n "$drv" ] && [ -f "$drv/svg.driver_info" ] || missing="$missing libplplot17"
if [ "${1:-}" = fuzz ]; then
    command -v clang >/dev/null 2>&1 || missing="$missing clang"
    ls /usr/lib/llvm-*/lib/clang/*/lib/linux/libclang_rt.fuzzer-x86_64.a >/dev/null 2>&1 ||
        ls /usr/lib/llvm-*/lib/clang/*/lib/linux/libclang_rt.fuzzer-*.a >/dev/null 2>&1 || {
        v=$(clang --version 2>/dev/null | sed -n 's/.*clang version \([0-9]*\).*/\1/p')
        missing="$missing libclang-rt-${v:-14}-dev"
    }
fi
[ -z "$missing" ] && exit 0
if [ "$(id -u)" = 0 ]; then
    echo "kphi: installing missing packages:$missing" >&2
    export DEBIAN_FRONTEND=noninteractive
    apt-get update -qq && apt-get install -y -qq --no-install-recommends $missing >&2 || {
        echo "kphi: apt-get failed; install by hand: apt-get install$missing" >&2
        exit 1
    }
else
    echo "kphi: missing packages:$missing" >&2
    echo "kphi: install them with: sudo apt-get update && sudo apt-get install$missing" >&2
    exit 1
fi
