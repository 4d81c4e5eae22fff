#!/bin/sh
# make bench: run the benchmark program (it prints its own figures).
# $1 = benchmark binary, $2 = the kphi CLI (used for the peak-memory run).
exec "$1" "$2"
