#!/usr/bin/env bash
# e2e.sh — end-to-end CSV benchmark of the heliotag command on generated data.
#
#   benchmarks/e2e.sh [ROWS...]      (default: 1000000)
#
# For each size it generates (once, deterministic) a crash-like CSV with
# benchmarks/gen, then runs in one script: a passthrough (--add none: same
# reader and writer, no sun columns), enrich with the default columns, enrich
# with all columns, and enrich with 1 worker, each under /usr/bin/time. It
# prints a markdown table of wall seconds, CPU seconds (user + sys), rows/s,
# MB/s, peak RSS and the ratios to the passthrough of the same run. Wall
# times depend on the share of the cores the run gets on a shared machine;
# CPU seconds do not.
set -euo pipefail
cd "$(dirname "$0")/.."
sizes=("$@")
[ ${#sizes[@]} -gt 0 ] || sizes=(1000000)
mkdir -p benchmarks/data bin
go build -o bin/heliotag ./cmd/heliotag
go build -o bin/heliotag-gen ./benchmarks/gen
TIME=/usr/bin/time
[ -x "$TIME" ] || { echo "needs /usr/bin/time (Debian package: time)"; exit 1; }

printf '| rows | run | wall s | CPU s | rows/s | MB/s | peak RSS MiB | wall / passthrough | CPU / passthrough |\n'
printf '|---|---|---|---|---|---|---|---|---|\n'
for n in "${sizes[@]}"; do
	in="benchmarks/data/crash_${n}.csv"
	[ -s "$in" ] || bin/heliotag-gen -n "$n" -shape crash -o "$in"
	mb=$(awk -v b="$(stat -c %s "$in")" 'BEGIN { printf "%.1f", b / 1e6 }')
	# Output goes to stdout and on to /dev/null: the figures are heliotag's,
	# not the disk's (a VM disk's write-back can stall a run for seconds).
	common=(enrich "$in" --date crash_date --time crash_time --tz America/Chicago -q)
	base_wall="" base_cpu=""
	for run in "passthrough|--add none --workers 2" "default, 2 workers|--workers 2" "all, 2 workers|--add all --workers 2" "default, 1 worker|--workers 1"; do
		name=${run%%|*}; flags=${run#*|}
		# shellcheck disable=SC2086
		$TIME -f '%e %U %S %M' -o /tmp/heliotag-bench-time bin/heliotag "${common[@]}" $flags > /dev/null
		read -r wall user sys rss < /tmp/heliotag-bench-time
		cpu=$(awk -v u="$user" -v s="$sys" 'BEGIN { printf "%.2f", u + s }')
		if [ -z "$base_wall" ]; then base_wall=$wall; base_cpu=$cpu; fi
		awk -v n="$n" -v name="$name" -v w="$wall" -v c="$cpu" -v r="$rss" -v mb="$mb" -v bw="$base_wall" -v bc="$base_cpu" 'BEGIN {
			printf "| %d | %s | %.2f | %.2f | %.0f | %.1f | %.1f | %.2f | %.2f |\n", n, name, w, c, n / w, mb / w, r / 1024, w / bw, c / bc }'
	done
done
rm -f /tmp/heliotag-bench-time
echo
echo "machine: $(nproc) cores, $(grep -m1 'model name' /proc/cpuinfo | cut -d: -f2 | sed 's/^ //'), load $(cut -d' ' -f1-3 /proc/loadavg)"
