#!/usr/bin/env bash
# run.sh — heliotag's benchmarks: the command end to end on generated files,
# and the micro-benchmarks beside the code.
#
#   bash benchmarks/run.sh full      (make bench: minutes; appends to benchmarks/RESULTS.md)
#   bash benchmarks/run.sh quick     (make bench-quick: 100,000 rows, a subset, under a minute)
#
# Environment: RECORD=1 appends a quick run's entry to RESULTS.md too (RECORD=0
# keeps a full run's out); MICRO=0 skips the micro-benchmarks, E2E=0 the
# end-to-end runs; REPEAT=N runs each command N times and keeps the run with
# the shortest wall time (default 1).
#
# For each data set (format, shape, rows) it generates the input once into
# benchmarks/data/ (git ignores it) with benchmarks/gen, reads it once to
# have it in the page cache, then times under /usr/bin/time:
#   read-only      benchmarks/readonly: the reader's pass alone (no sun
#                  columns, nothing written; see its doc for what it can and
#                  cannot reuse);
#   passthrough    heliotag enrich --add none: the same reader and writer,
#                  no sun columns, 2 workers;
#   default        heliotag enrich, default columns (position, phase), 2 workers;
#   default, 1 w.  the same with --workers 1;
#   all            heliotag enrich --add all, 2 workers.
# Text outputs go to stdout and on to /dev/null; Parquet (which needs a file)
# to a file in /dev/shm (benchmarks/data/ when there is no /dev/shm), deleted
# after each run. The figures are heliotag's, not the disk's.
#
# It prints a markdown table (wall and CPU seconds, rows/s, MB/s of input,
# peak RSS, ratios to the passthrough of the same data set, workers 2 vs 1)
# and the issue 7 targets, each marked met or missed from the measured values.
# On a shared machine wall times depend on the share of the cores a run gets;
# CPU seconds (user + sys) do not, and ratios are taken within one run.
set -euo pipefail
cd "$(dirname "$0")/.."

mode=${1:-quick}
case $mode in
full) record=${RECORD:-1} ;;
quick) record=${RECORD:-0} ;;
*)
	echo "usage: bash benchmarks/run.sh full|quick" >&2
	exit 2
	;;
esac
micro=${MICRO:-1}
repeat=${REPEAT:-1}

TIME=/usr/bin/time
[ -x "$TIME" ] || { echo "needs /usr/bin/time (Debian package: time)" >&2; exit 1; }
data=benchmarks/data
scratch=/dev/shm
[ -d "$scratch" ] && [ -w "$scratch" ] || scratch=$data
mkdir -p "$data" bin
work=$(mktemp -d)
trap 'rm -rf "$work"; rm -f "$scratch"/heliotag-bench-$$.parquet' EXIT

started=$(date -u '+%Y-%m-%d %H:%M UTC')
t0=$(date +%s)
load_before=$(cut -d' ' -f1-3 /proc/loadavg)

# What is measured: a full run builds and benchmarks the commit (HEAD,
# extracted with git archive), so that the entry names exactly what ran even
# while others edit the tree; a quick run, the working tree. SRC=head or
# SRC=tree chooses.
src_mode=${SRC:-}
[ -n "$src_mode" ] || { [ "$mode" = full ] && src_mode=head || src_mode=tree; }
repo=$(pwd)
case $src_mode in
head)
	src=$work/src
	mkdir -p "$src"
	git archive HEAD | tar -x -C "$src"
	built_from="commit $(git rev-parse --short HEAD) (git archive HEAD: uncommitted changes not included)"
	;;
tree)
	src=$repo
	built_from="the working tree at commit $(git rev-parse --short HEAD)"
	dirty=$(git status --porcelain -- '*.go' 'go.mod' 'go.sum' | awk '{ print $2 }' | tr '\n' ' ')
	[ -z "$dirty" ] || built_from="$built_from, with uncommitted changes in: $dirty"
	;;
*)
	echo "SRC=$src_mode; valid: head, tree" >&2
	exit 2
	;;
esac
(cd "$src" && go build -o "$repo/bin/heliotag" ./cmd/heliotag)
(cd "$src" && go build -o "$repo/bin/heliotag-gen" ./benchmarks/gen)
(cd "$src" && go build -o "$repo/bin/heliotag-readonly" ./benchmarks/readonly)

# Data sets: format shape rows runs. Shapes: crash (every row its own place,
# local date + time of day in America/Chicago), camera (40 sites, RFC 3339
# with offsets), crash-wide (crash plus 30 mixed-type columns).
e2e_runs=read,passthrough,default,default-w1,all
if [ "$mode" = full ]; then
	sets=(
		"csv crash 1000000 $e2e_runs"
		"csv crash 10000000 $e2e_runs"
		"csv camera 1000000 $e2e_runs"
		"csv camera 10000000 $e2e_runs"
		"csv crash-wide 1000000 read,passthrough,default,default-w1"
		"csv crash-wide 10000000 read,passthrough,default,default-w1"
		"geojson crash 1000000 $e2e_runs"
		"geojson camera 1000000 $e2e_runs"
		"geojson crash-wide 1000000 read,passthrough,default"
		"geojsonseq crash 1000000 $e2e_runs"
		"geojsonseq camera 1000000 $e2e_runs"
		"parquet crash 5000000 $e2e_runs"
		"parquet camera 5000000 $e2e_runs"
		"parquet crash-wide 5000000 read,passthrough,default,default-w1"
	)
else
	sets=(
		"csv crash 100000 $e2e_runs"
		"csv crash-wide 100000 read,passthrough,default,default-w1"
		"geojson camera 100000 read,passthrough,default"
		"geojsonseq crash 100000 read,passthrough,default"
		"parquet camera 100000 read,passthrough,default,default-w1"
		"parquet crash-wide 100000 read,passthrough,default"
	)
fi
[ "${E2E:-1}" = 1 ] || sets=()

ext_of() {
	case $1 in
	csv) echo csv ;;
	geojson) echo geojson ;;
	geojsonseq) echo geojsonl ;;
	parquet) echo parquet ;;
	esac
}

results=$work/results.tsv
commands=$work/commands.txt
: >"$results"
: >"$commands"

for set in "${sets[@]}"; do
	read -r format shape rows runs <<<"$set"
	in=$data/${shape}_${rows}.$(ext_of "$format")
	base=${shape%-wide}
	wide=()
	[ "$base" = "$shape" ] || wide=(-wide)
	gencmd=(bin/heliotag-gen -n "$rows" -shape "$base" "${wide[@]}" -o "$in")
	echo "${gencmd[*]}" >>"$commands"
	if [ ! -s "$in" ]; then
		echo "generating $in" >&2
		"${gencmd[@]}"
	fi
	cat "$in" >/dev/null # into the page cache, for every run alike
	bytes=$(stat -c %s "$in")
	cols=()
	if [ "$base" = crash ]; then
		if [ "$format" = parquet ]; then
			cols=(--tz America/Chicago)
		else
			cols=(--date crash_date --time crash_time --tz America/Chicago)
		fi
	fi
	out=(-o -)
	[ "$format" = parquet ] && out=(-o "$scratch/heliotag-bench-$$.parquet")
	for run in ${runs//,/ }; do
		case $run in
		read) cmd=(bin/heliotag-readonly -rows "$rows" "${cols[@]}" "$in") ;;
		passthrough) cmd=(bin/heliotag enrich "$in" "${cols[@]}" -q --add none --workers 2 "${out[@]}") ;;
		default) cmd=(bin/heliotag enrich "$in" "${cols[@]}" -q --workers 2 "${out[@]}") ;;
		default-w1) cmd=(bin/heliotag enrich "$in" "${cols[@]}" -q --workers 1 "${out[@]}") ;;
		all) cmd=(bin/heliotag enrich "$in" "${cols[@]}" -q --add all --workers 2 "${out[@]}") ;;
		esac
		if [ "$format" = parquet ] || [ "$run" = read ]; then
			echo "${cmd[*]}" >>"$commands"
		else
			echo "${cmd[*]} > /dev/null" >>"$commands"
		fi
		best=""
		for _ in $(seq "$repeat"); do
			"$TIME" -f '%e %U %S %M' -o "$work/time" "${cmd[@]}" >/dev/null 2>"$work/stderr" || {
				echo "failed: ${cmd[*]}" >&2
				cat "$work/stderr" >&2
				exit 1
			}
			rm -f "$scratch/heliotag-bench-$$.parquet"
			read -r wall user sys rss <"$work/time"
			echo "$format $shape $rows $run: ${wall} s wall, $user + $sys s CPU, $((rss / 1024)) MiB" >&2
			if [ -z "$best" ] || awk -v a="$wall" -v b="${best%% *}" 'BEGIN { exit !(a < b) }'; then
				best="$wall $user $sys $rss"
			fi
		done
		read -r wall user sys rss <<<"$best"
		printf '%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\n' "$format" "$shape" "$rows" "$run" "$wall" "$user" "$sys" "$rss" "$bytes" >>"$results"
	done
done
load_after=$(cut -d' ' -f1-3 /proc/loadavg)

# The table and the targets, from the measured values.
table=$work/table.md
awk -F'\t' '
function label(r, format) {
	if (r == "read" && format == "parquet") return "read-only (pqarrow)"
	if (r == "read" && format != "") return "read-only (no buffer reuse)"
	if (r == "read") return "read-only"
	if (r == "passthrough") return "passthrough (--add none)"
	if (r == "default") return "enrich default"
	if (r == "default-w1") return "enrich default, 1 worker"
	if (r == "all") return "enrich --add all"
	return r
}
function fmtrows(n) { return n >= 1e6 && n % 1e6 == 0 ? n / 1e6 "M" : (n >= 1e3 && n % 1e3 == 0 ? n / 1e3 "k" : n) }
function verdict(ok) { return ok ? "**met**" : "**missed**" }
{
	key = $1 SUBSEP $2 SUBSEP $3
	if (!(key in seen)) { seen[key] = 1; keys[++nk] = key }
	runs[key, ++nr[key]] = $4
	wall[key, $4] = $5; cpu[key, $4] = $6 + $7; rss[key, $4] = $8 / 1024; bytes[key] = $9
}
END {
	if (nk == 0) exit
	print "| format | shape | rows | run | wall s | CPU s | cores used | rows/s | MB/s | peak RSS MiB | wall / passthrough | CPU / passthrough | workers 2 vs 1 |"
	print "|---|---|---|---|---|---|---|---|---|---|---|---|---|"
	for (k = 1; k <= nk; k++) {
		key = keys[k]; split(key, f, SUBSEP)
		for (i = 1; i <= nr[key]; i++) {
			r = runs[key, i]; w = wall[key, r]; c = cpu[key, r]
			rw = "" ; rc = ""; sp = ""
			if ((key, "passthrough") in wall && r != "passthrough") {
				pw = wall[key, "passthrough"]; pc = cpu[key, "passthrough"]
				rw = pw > 0 ? sprintf("%.2f", w / pw) : "n/a"
				rc = pc > 0 ? sprintf("%.2f", c / pc) : "n/a"
			}
			if (r == "default" && (key, "default-w1") in wall && w > 0)
				sp = sprintf("%.2f×", wall[key, "default-w1"] / w)
			rate = "n/a"; mbs = "n/a"; cores = "n/a"
			if (w > 0) { rate = sprintf("%.0f", f[3] / w); mbs = sprintf("%.1f", bytes[key] / 1e6 / w); cores = sprintf("%.2f", c / w) }
			printf "| %s | %s | %s | %s | %.2f | %.2f | %s | %s | %s | %.1f | %s | %s | %s |\n", f[1], f[2], f[3], label(r, f[1]), w, c, cores, rate, mbs, rss[key, r], rw, rc, sp
		}
	}
	print ""
	print "CPU s is user + system time; cores used is CPU s / wall s (at most 2 here: below that, the run waited"
	print "for a core or for its one serial stage). Workers 2 vs 1 is the wall time of the 1-worker run over the"
	print "2-worker run. MB/s is input bytes per wall second. read-only: text formats drain the heliotag reader"
	print "(io/formats, Source.Next until EOF) without a writer, so chunks never return to the pool of the reader and"
	print "every batch allocates and grows fresh buffers (a run with a writer reuses them): it can cost more than"
	print "the passthrough. Parquet: the pqarrow record reader, set up as io/parquet sets it up (64 KiB buffered"
	print "column streams, 8,192-row batches, every column decoded), each batch released once counted."
	print ""
	print "Targets (issue 7), from the table above:"
	print ""
	# Enrich (default columns, 2 workers) vs passthrough, wall time, CSV and Parquet.
	for (t = 1; t <= 2; t++) {
		fmt = t == 1 ? "csv" : "parquet"; line = ""; ok = 1; any = 0
		for (k = 1; k <= nk; k++) {
			key = keys[k]; split(key, f, SUBSEP)
			if (f[1] != fmt || !((key, "default") in wall) || !((key, "passthrough") in wall) || wall[key, "passthrough"] <= 0) continue
			x = wall[key, "default"] / wall[key, "passthrough"]; any = 1; if (x > 1.5) ok = 0
			line = line sprintf("%s%s %s %.2f (CPU %.2f)", line == "" ? "" : "; ", f[2], fmtrows(f[3]), x, cpu[key, "default"] / cpu[key, "passthrough"])
		}
		if (any) printf "- %s enrich ≤ 1.5× passthrough (wall): %s: %s\n", fmt == "csv" ? "CSV" : "Parquet", line, verdict(ok)
	}
	# GeoJSON rate.
	line = ""; ok = 1; any = 0
	for (k = 1; k <= nk; k++) {
		key = keys[k]; split(key, f, SUBSEP)
		if (f[1] !~ /^geojson/ || !((key, "default") in wall) || wall[key, "default"] <= 0) continue
		x = f[3] / wall[key, "default"]; any = 1; if (x < 200000) ok = 0
		line = line sprintf("%s%s %s %s %.0f", line == "" ? "" : "; ", f[1], f[2], fmtrows(f[3]), x)
	}
	if (any) printf "- GeoJSON ≥ 200,000 features/s (enrich default, 2 workers): %s: %s\n", line, verdict(ok)
	# Workers 2 vs 1.
	line = ""; ok = 1; any = 0
	for (k = 1; k <= nk; k++) {
		key = keys[k]; split(key, f, SUBSEP)
		if ((f[1] != "csv" && f[1] != "parquet") || !((key, "default-w1") in wall) || wall[key, "default"] <= 0) continue
		x = wall[key, "default-w1"] / wall[key, "default"]; any = 1; if (x < 1.6) ok = 0
		line = line sprintf("%s%s %s %s %.2f×", line == "" ? "" : "; ", f[1], f[2], fmtrows(f[3]), x)
	}
	if (any) printf "- Workers 2 vs 1 ≥ 1.6× (enrich default, wall): %s: %s\n", line, verdict(ok)
	# Peak RSS 1M vs 10M.
	line = ""; other = ""; ok = 1; any = 0
	for (k = 1; k <= nk; k++) {
		key = keys[k]; split(key, f, SUBSEP)
		if (f[3] != 1000000) continue
		big = f[1] SUBSEP f[2] SUBSEP 10000000
		if (!(big in seen)) continue
		for (i = 1; i <= nr[key]; i++) {
			r = runs[key, i]
			if (!((big, r) in rss) || rss[key, r] <= 0) continue
			x = rss[big, r] / rss[key, r]
			item = sprintf("%s %s %.1f → %.1f MiB (%+.0f%%)", f[1], f[2], rss[key, r], rss[big, r], 100 * (x - 1))
			if (r == "default") {
				any = 1; if (x > 1.25 || x < 0.8) ok = 0
				line = line (line == "" ? "" : "; ") item
			} else
				other = other (other == "" ? "" : "; ") label(r) ", " item
		}
	}
	if (any) printf "- Peak RSS flat in input size, 1M vs 10M rows within 25%% (enrich default, 2 workers): %s: %s\n", line, verdict(ok)
	if (other != "") printf "  (the other runs, for information: %s)\n", other
}' "$results" >"$table"

echo
cat "$table"
echo
machine="$(nproc) cores, $(grep -m1 'model name' /proc/cpuinfo | cut -d: -f2 | sed 's/^ //')"
echo "machine: $machine; load average before $load_before, after $load_after"

# Micro-benchmarks beside the code (short -benchtime).
microout=$work/micro.txt
: >"$microout"
if [ "$micro" = 1 ]; then
	if [ "$mode" = full ]; then
		benches=(
			"./solar/ Kernel$|Compare|Day"
			"./moon/ Kernel$|VersusSun"
			"./enrich/ ."
			"./io/internal/stamp/ ."
			"./io/internal/zone/ Resolve|Search|ParseAndResolve"
			"./io/internal/num/ ."
			"./io/csv/ ."
			"./io/geojson/ Location"
			"./io/parquet/ ColumnBuilders|Encode|Extract|Writer$"
		)
		benchtime=200ms
	else
		benches=("./solar/ Kernel$|Compare" "./io/csv/ Split")
		benchtime=100ms
	fi
	for b in "${benches[@]}"; do
		read -r pkg pattern <<<"$b"
		cmd=(go test -run '^$' -bench "$pattern" -benchtime "$benchtime" "$pkg")
		echo "go test -run '^\$' -bench '$pattern' -benchtime $benchtime $pkg" | tee -a "$microout"
		(cd "$src" && "${cmd[@]}") 2>&1 | grep -v '^\(goos\|goarch\|cpu\|pkg\): ' | tee -a "$microout"
	done
fi
# The solar kernel's targets, from BenchmarkCompare (one goroutine: per core).
microtargets=$work/microtargets.md
awk '
/^BenchmarkCompare/ {
	for (i = 2; i < NF; i++) {
		if ($(i + 1) == "kernel_rows/s") k = $i
		if ($(i + 1) == "x_reference") x = $i
	}
}
END {
	if (k == "" || x == "") exit
	vk = "**missed**"; vx = "**missed**"
	if (k + 0 >= 1e7) vk = "**met**"
	if (x + 0 >= 30) vx = "**met**"
	printf "- Solar kernel ≥ 10 M rows/s per core (BenchmarkCompare, one goroutine): %.1f M: %s\n", k / 1e6, vk
	printf "- Solar kernel ≥ 30× the reference path (same benchmark, same rows): %.1f×: %s\n", x, vx
}' "$microout" >"$microtargets"
if [ -s "$microtargets" ]; then
	echo
	cat "$microtargets"
fi
load_end=$(cut -d' ' -f1-3 /proc/loadavg)
elapsed=$(($(date +%s) - t0))
echo "script time: ${elapsed} s; load average at the end $load_end"

if [ "$record" = 1 ]; then
	{
		echo
		echo "## \`bash benchmarks/run.sh $mode\` ($started, issue 7)"
		echo
		echo "Built from $built_from; $(go version | cut -d' ' -f3);"
		echo "machine: $machine; load average (1, 5, 15 min) before the end-to-end runs $load_before, after them"
		echo "$load_after, at the end $load_end; the whole script took ${elapsed} s (data sets already generated: see"
		echo "the generator commands below; generating them all takes a few minutes more). Each end-to-end command ran"
		echo "$repeat time(s); the table keeps the run with the shortest wall time."
		echo
		cat "$table"
		cat "$microtargets"
		echo
		echo "Commands (in this order; \`bin/\` is built by the script, the micro-benchmarks run in the same source):"
		echo
		echo '```sh'
		cat "$commands"
		echo '```'
		if [ -s "$microout" ]; then
			echo
			echo "Micro-benchmarks:"
			echo
			echo '```'
			cat "$microout"
			echo '```'
		fi
	} >>benchmarks/RESULTS.md
	echo "appended to benchmarks/RESULTS.md" >&2
fi
