// Package job runs heliotag's commands on files: it opens the input, checks
// and creates the outputs atomically, runs enrich, and writes the report.
// The command-line program only turns flags into Options and prints.
package job

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"runtime"
	"strings"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/internal/outfile"
	"github.com/heliotag/heliotag/io/formats"
	"github.com/heliotag/heliotag/solar"
)

// Version is heliotag's version, reported by `heliotag version` and in reports.
const Version = "0.1.0"

// Options are the settings of an enrich run. The zero value of each field
// means its default.
type Options struct {
	Input  string // path, or "-" for stdin
	From   string // input format; "" = from the extension
	To     string // output format; "" = the input's
	Output string // path, or "" / "-" for stdout (text formats)
	Force  bool   // replace an existing output

	Select    enrich.Select
	Delimiter string
	RS        bool // GeoJSON text sequence output with RFC 8142 record separators
	// Compression is the Parquet output codec; "" keeps the input's.
	Compression string

	Add    string // column groups; "" = enrich.DefaultGroups
	Prefix string

	Solar solar.Options
	Glare enrich.GlareOptions

	Policy  enrich.Policy
	Rejects string // rejects file for the skip policy

	Workers   int
	BatchRows int // rows per batch; 0 = the input format's default (formats.Format.BatchRows)

	Report string // JSON report path; "" = none

	// OnProgress, when set, is called after each batch with the rows done and
	// the input bytes consumed and total (total 0 when unknown).
	OnProgress func(rows, done, total int64)

	// At is a Camtrap DP observation's instant: "start" (""), "middle", "end".
	At string
	// Tables are the Camtrap DP tables to enrich: "observations" (""), "media", or both.
	Tables string
}

// Result describes a finished (or failed) run.
type Result struct {
	Summary enrich.Summary
	Output  string // where the output went ("-" for stdout)
	Rejects string // the rejects file, if any
	Format  formats.Format
	// Tables has one entry per enriched table of a Camtrap DP package
	// (Summary then totals them); nil for single files.
	Tables []TableResult
}

// ExitCode is the process exit code for a run's outcome: 0 all rows
// enriched, 1 finished with rows skipped or kept with errors, 2 fatal.
func (r Result) ExitCode(err error) int {
	switch {
	case err != nil:
		return 2
	case r.Summary.Rejected > 0 || r.Summary.Kept > 0:
		return 1
	}
	return 0
}

// Enrich runs one enrich job. stdin and stdout serve "-" paths.
func Enrich(ctx context.Context, o Options, stdin io.Reader, stdout io.Writer) (res Result, err error) {
	if IsPackage(o.Input) {
		return enrichPackage(ctx, o)
	}
	if err := checkNotFolder(o.Input); err != nil {
		return res, err
	}
	if o.At != "" || o.Tables != "" {
		return res, fmt.Errorf("%w: --at and --tables apply to Camtrap DP packages (a datapackage.json or its folder)", enrich.ErrUsage)
	}
	f, err := formats.Detect(o.Input, o.From)
	if err != nil {
		return res, err
	}
	if err := o.Solar.Validate(); err != nil {
		return res, fmt.Errorf("%w: %w", enrich.ErrUsage, err)
	}
	res.Format = f
	if err := o.Glare.Validate(); err != nil {
		return res, err
	}
	if _, err := enrich.NewPlan(enrich.PlanOptions{Add: o.Add, Heading: o.Select.HasHeading()}); err != nil {
		return res, err // the groups, checked before the input is opened
	}
	if o.To != "" && !strings.EqualFold(o.To, string(f)) {
		return res, fmt.Errorf("%w: --to %s: converting %s to another format is not supported yet; the output format is the input's (%s)", enrich.ErrUsage, o.To, f, f)
	}
	toStdout := o.Output == "" || o.Output == "-"
	if toStdout && !f.Text() {
		return res, fmt.Errorf("%w: %s output needs a file: give -o FILE", enrich.ErrUsage, f)
	}
	if o.Policy == enrich.PolicySkip && o.Rejects == "" {
		if toStdout {
			return res, fmt.Errorf("%w: --on-bad-row skip writing to stdout needs --rejects FILE for the rows it leaves out", enrich.ErrUsage)
		}
		o.Rejects = DefaultRejects(o.Output)
	}
	if o.Rejects != "" && o.Policy != enrich.PolicySkip {
		return res, fmt.Errorf("%w: --rejects goes with --on-bad-row skip", enrich.ErrUsage)
	}
	// Check every output before reading anything.
	targets := []string{}
	if !toStdout {
		targets = append(targets, o.Output)
	}
	if o.Rejects != "" {
		targets = append(targets, o.Rejects)
	}
	if o.Report != "" {
		targets = append(targets, o.Report)
	}
	for _, t := range targets {
		if err := outfile.Check(t, o.Force, o.Input); err != nil {
			return res, fmt.Errorf("%w: %w", enrich.ErrUsage, err)
		}
	}

	in, err := formats.Open(o.Input, f, stdin, formats.Options{Select: o.Select, Delimiter: o.Delimiter, RS: o.RS, Compression: o.Compression, Workers: o.Workers})
	if err != nil {
		return res, err
	}
	defer in.Close()
	if o.BatchRows <= 0 {
		o.BatchRows = in.BatchRows()
	}

	plan, err := enrich.NewPlan(enrich.PlanOptions{
		Add: o.Add, Prefix: o.Prefix, Input: in.Source.Columns(),
		TimeNote:    o.Select.ZoneMode(),
		Heading:     o.Select.HasHeading(),
		ErrorColumn: o.Policy == enrich.PolicyKeep,
	})
	if err != nil {
		return res, err
	}

	var out io.Writer = stdout
	res.Output = "-"
	var outFile, rejFile *outfile.File
	defer func() {
		if err != nil {
			if outFile != nil {
				outFile.Abort()
			}
			if rejFile != nil {
				rejFile.Abort()
			}
		}
	}()
	if !toStdout {
		if outFile, err = outfile.Create(o.Output); err != nil {
			return res, err
		}
		out, res.Output = outFile, o.Output
	}
	var rejects io.Writer
	if o.Rejects != "" {
		if rejFile, err = outfile.Create(o.Rejects); err != nil {
			return res, err
		}
		rejects, res.Rejects = rejFile, o.Rejects
	}

	sink, err := in.NewSink(out, plan)
	if err != nil {
		return res, err
	}
	eo := enrich.Options{
		Plan: plan, Policy: o.Policy, Rejects: rejects,
		Workers: o.Workers, BatchRows: o.BatchRows, Solar: o.Solar, Glare: o.Glare,
	}
	if in.Format == formats.Parquet {
		// A Parquet batch holds every column of its rows decoded: one
		// batch per worker and one being written keep the workers busy
		// with less memory than pipeline's default (benchmarks/RESULTS.md,
		// "Parquet memory").
		workers := o.Workers
		if workers < 1 {
			workers = runtime.NumCPU()
		}
		eo.InFlight = workers + 1
	}
	if o.OnProgress != nil {
		pos, _ := in.Source.(enrich.Progress)
		eo.OnProgress = func(rows int64) {
			var done, total int64
			if pos != nil {
				done, total = pos.Position()
			}
			o.OnProgress(rows, done, total)
		}
	}
	res.Summary, err = enrich.Run(ctx, in.Source, sink, eo)
	if cerr := sink.Close(); err == nil {
		err = cerr
	}
	if err == nil && ctx.Err() != nil {
		err = context.Cause(ctx)
	}
	if err != nil {
		return res, err
	}
	if rejFile != nil {
		if err = rejFile.Commit(); err != nil {
			return res, err
		}
	}
	if outFile != nil {
		if err = outFile.Commit(); err != nil {
			return res, err
		}
	}
	if o.Report != "" {
		if err = writeReport(o, res); err != nil {
			return res, err
		}
	}
	return res, nil
}

// DefaultRejects is the rejects file used for the skip policy when none is
// named: beside the output, "<output without extension>.rejects.csv".
func DefaultRejects(output string) string {
	base := strings.TrimSuffix(output, ".gz")
	base = strings.TrimSuffix(base, filepath.Ext(base))
	return base + ".rejects.csv"
}

// Report is the JSON document written by --report.
type Report struct {
	Version    string           `json:"version"`
	Input      string           `json:"input"`
	Output     string           `json:"output"`
	Format     string           `json:"format"`
	RowsRead   int64            `json:"rows_read"`
	RowsOut    int64            `json:"rows_written"`
	Rejected   int64            `json:"rows_rejected"`
	Kept       int64            `json:"rows_kept_with_error"`
	Reasons    map[string]int64 `json:"bad_rows_by_reason"`
	Phases     map[string]int64 `json:"rows_by_sun_phase"`
	Conditions map[string]int64 `json:"rows_by_light_condition"`
	Seconds    float64          `json:"seconds"`
	RowsPerSec float64          `json:"rows_per_second"`
	Options    ReportOptions    `json:"options"`
}

// ReportOptions records the settings of the run in the report.
type ReportOptions struct {
	Add        string        `json:"add"`
	Prefix     string        `json:"prefix,omitempty"`
	OnBadRow   string        `json:"on_bad_row"`
	Rejects    string        `json:"rejects,omitempty"`
	Workers    int           `json:"workers"`
	BatchRows  int           `json:"batch_rows"`
	Select     enrich.Select `json:"columns"`
	Pressure   float64       `json:"pressure_hpa"`
	Temp       float64       `json:"temperature_c"`
	Refraction bool          `json:"refraction"`
}

func writeReport(o Options, res Result) error {
	s := res.Summary
	rep := Report{
		Version: Version, Input: o.Input, Output: res.Output, Format: string(res.Format),
		RowsRead: s.Read, RowsOut: s.Written, Rejected: s.Rejected, Kept: s.Kept,
		Reasons: s.Reasons, Phases: s.Phases, Conditions: s.Conditions,
		Seconds: s.Elapsed.Seconds(),
	}
	if sec := s.Elapsed.Seconds(); sec > 0 {
		rep.RowsPerSec = float64(s.Read) / sec
	}
	rep.Options = reportOptions(o, res.Rejects)
	return writeJSON(o.Report, rep)
}

// reportOptions are the run's settings as the report states them, defaults
// filled in.
func reportOptions(o Options, rejects string) ReportOptions {
	add := o.Add
	if add == "" {
		add = enrich.DefaultGroups
	}
	workers, batch := o.Workers, o.BatchRows
	if workers <= 0 {
		workers = runtime.NumCPU()
	}
	if batch <= 0 {
		batch = enrich.DefaultBatchRows
	}
	pressure, temp := o.Solar.Pressure, 10.0
	if pressure == 0 {
		pressure = 1010
	}
	if o.Solar.Temperature != nil {
		temp = *o.Solar.Temperature
	}
	return ReportOptions{
		Add: add, Prefix: o.Prefix, OnBadRow: o.Policy.String(), Rejects: rejects,
		Workers: workers, BatchRows: batch, Select: o.Select,
		Pressure: pressure, Temp: temp, Refraction: !o.Solar.NoRefraction,
	}
}

// writeJSON writes v, indented, to path atomically.
func writeJSON(path string, v any) error {
	b, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		return err
	}
	f, err := outfile.Create(path)
	if err != nil {
		return err
	}
	if _, err := f.Write(append(b, '\n')); err != nil {
		f.Abort()
		return fmt.Errorf("writing report: %w", err)
	}
	return f.Commit()
}

// IsUsage reports whether err is a usage problem (as opposed to a data or I/O one).
func IsUsage(err error) bool { return errors.Is(err, enrich.ErrUsage) }
