#!/bin/sh
# counts.sh FILE COLUMN... — print how many rows of a CSV file hold each value
# of the named columns. Assumes no quoted field in FILE holds a comma (true of
# heliotag's demo output).
file=$1; shift
for col in "$@"; do
	echo "  $col in $(basename "$file"):"
	awk -F, -v col="$col" '
		NR == 1 { for (i = 1; i <= NF; i++) if ($i == col) c = i; next }
		c { n[$c]++ }
		END { for (k in n) printf "    %-22s %6d\n", (k == "" ? "(empty)" : k), n[k] }
	' "$file" | sort
done
