package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"strings"
	"time"

	"github.com/heliotag/heliotag/job"
)

const inspectHelp = `Usage: heliotag inspect [flags] INPUT

Shows the detected format and columns, the location and time columns that
enrich would use and how they were chosen, how the first rows' times parse
(the instant in UTC and in the row's zone), the time zone source, and the
enrich command line that would run. It writes nothing.

For a Camtrap DP package (its folder or its datapackage.json) it shows the
version, each resource's files with their format (and row count when the
file says it: Parquet), the deployments' count and coordinate ranges, and
how the first observations' times parse (eventStart; --at middle or end
for the middle or end of the event, as enrich --at).

Examples:
  heliotag inspect testdata/demo/marrowfield_collisions.csv --tz America/Chicago
  heliotag inspect testdata/demo/hollin_ridge_package

Flags:
`

func runInspect(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("inspect", flag.ContinueOnError)
	fs.SetOutput(stderr)
	var o job.Options
	fs.StringVar(&o.From, "from", "", "input `FORMAT`: csv|tsv|geojson|geojsonseq|parquet (default: from the extension)")
	addSelectFlags(fs, &o.Select, &o.Delimiter)
	rows := fs.Int("rows", 5, "number of sample `ROWS` to parse")
	fs.StringVar(&o.At, "at", "", "Camtrap DP package: the observations' `INSTANT` shown, start|middle|end of the event (default start)")
	fs.Usage = func() {
		fmt.Fprint(fs.Output(), inspectHelp)
		fs.PrintDefaults()
	}
	pos, err := parseInterspersed(fs, args)
	if err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return 0
		}
		return 2
	}
	if o.Input, err = oneInput(pos); err != nil {
		return flagError(stderr, "inspect", err)
	}
	if *rows < 1 {
		*rows = 1
	}
	ins, err := job.Inspect(ctx, o, *rows, stdin)
	if err != nil {
		fmt.Fprintf(stderr, "heliotag inspect: %v\n", err)
		return 2
	}
	w := stdout
	if ins.Package != nil {
		printPackage(w, ins)
		return 0
	}
	fmt.Fprintf(w, "format:    %s\n", ins.Format)
	fmt.Fprintf(w, "columns:   %d: %s\n", len(ins.Columns), strings.Join(ins.Columns, ", "))
	fmt.Fprintln(w, "uses:")
	for _, c := range ins.Choices {
		fmt.Fprintf(w, "  %-12s %q (%s)\n", c.Role, c.Column, c.How)
	}
	fmt.Fprintf(w, "time zone: %s\n", ins.ZoneSource)
	fmt.Fprintln(w, "sample rows:")
	printSamples(w, ins)
	return 0
}

func quoteAll(v []string) []string {
	out := make([]string, len(v))
	for i, s := range v {
		out[i] = fmt.Sprintf("%q", s)
	}
	return out
}

// printSamples prints how the sample rows' times read, the enrich command
// and how many sample rows would be bad rows.
func printSamples(w io.Writer, ins *job.Inspection) {
	bad := 0
	for _, s := range ins.Samples {
		fmt.Fprintf(w, "  row %d: %s\n", s.Row, strings.Join(quoteAll(s.Value), " "))
		if s.Err != nil {
			bad++
			fmt.Fprintf(w, "    problem: %v\n", s.Err)
			continue
		}
		fmt.Fprintf(w, "    instant: %s\n", s.UTC.Format(time.RFC3339Nano))
		if !s.Local.IsZero() {
			fmt.Fprintf(w, "    local:   %s (%s)\n", s.Local.Format(time.RFC3339Nano), s.Zone)
		} else {
			fmt.Fprintf(w, "    local:   %s\n", s.Zone)
		}
		if s.Note != "" {
			fmt.Fprintf(w, "    note:    %s\n", s.Note)
		}
	}
	if len(ins.Samples) == 0 {
		fmt.Fprintln(w, "  (no data rows)")
	}
	fmt.Fprintf(w, "command:   %s\n", ins.Command)
	if bad > 0 {
		fmt.Fprintf(w, "%d of %d sample rows would be bad rows; see the problems above.\n", bad, len(ins.Samples))
	}
}
