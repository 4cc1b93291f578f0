#!/bin/sh
# fuzz.sh DURATION — run every fuzz target in the module for DURATION each.
set -e
t=${1:-20s}
for pkg in $(go list ./...); do
	dir=$(go list -f '{{.Dir}}' "$pkg")
	for target in $(grep -ho '^func Fuzz[A-Za-z0-9_]*' "$dir"/*_test.go 2>/dev/null | sed 's/^func //'); do
		echo "== $pkg $target ($t)"
		# Minimizing each new interesting input may take the default 60 s,
		# during which nothing else is fuzzed (slow targets such as
		# FuzzParquetResource seemed stuck): 200 tries are enough here.
		go test -run '^$' -fuzz "^${target}\$" -fuzztime "$t" -fuzzminimizetime 200x "$pkg"
	done
done
