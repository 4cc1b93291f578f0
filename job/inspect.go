package job

import (
	"context"
	"errors"
	"fmt"
	"io"
	"strings"
	"time"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/formats"
)

// Sample is one input row as enrich would read it.
type Sample struct {
	Row   int64
	Value []string // the row's values in the location and time columns
	UTC   time.Time
	Local time.Time // in the row's date zone; zero when the row has none
	Zone  string    // the date zone's name, or "mean solar time"
	Note  string
	Err   error
}

// Inspection describes how enrich would read an input.
type Inspection struct {
	Format     formats.Format
	Columns    []string
	Choices    []enrich.Choice
	ZoneSource string
	Samples    []Sample
	Command    string
	// Package describes a Camtrap DP package (nil for a file); Columns are
	// then the observations' fields read and Samples its first rows.
	Package *PackageInspection
}

// Inspect opens the input and reads up to n rows the way enrich would. A
// Camtrap DP package (a datapackage.json or its folder) is described by
// Inspection.Package, with its first observations as the samples.
func Inspect(ctx context.Context, o Options, n int, stdin io.Reader) (*Inspection, error) {
	if IsPackage(o.Input) {
		return inspectPackage(ctx, o, n)
	}
	if err := checkNotFolder(o.Input); err != nil {
		return nil, err
	}
	if o.At != "" {
		return nil, fmt.Errorf("%w: --at applies to Camtrap DP packages (a datapackage.json or its folder)", enrich.ErrUsage)
	}
	f, err := formats.Detect(o.Input, o.From)
	if err != nil {
		return nil, err
	}
	in, err := formats.Open(o.Input, f, stdin, formats.Options{Select: o.Select, Delimiter: o.Delimiter})
	if err != nil {
		return nil, err
	}
	defer in.Close()
	ins := &Inspection{Format: f, Columns: in.Source.Columns(), ZoneSource: zoneSource(o.Select)}
	if c, ok := in.Source.(enrich.Chooser); ok {
		ins.Choices = c.Choices()
	}
	ins.Samples, err = readSamples(ctx, in.Source, n, func(vals []string) (v []string) {
		for _, c := range ins.Choices {
			if c.Index < len(vals) {
				v = append(v, vals[c.Index])
			}
		}
		return v
	}, "mean solar time (the time carries no zone)")
	if err != nil {
		return nil, err
	}
	ins.Command = command(o, ins.Choices)
	return ins, nil
}

// readSamples reads up to n rows of src and says how each row's time reads:
// the instant in UTC and in the row's zone (noZone names the date's basis
// when the row has none); pick chooses the row's values shown beside it.
func readSamples(ctx context.Context, src enrich.Source, n int, pick func(vals []string) []string, noZone string) ([]Sample, error) {
	chunk, err := src.Next(ctx, n)
	if err != nil && !errors.Is(err, io.EOF) {
		return nil, err
	}
	if chunk == nil {
		return nil, nil
	}
	var samples []Sample
	var inputs enrich.Inputs
	inputs.Reset(chunk.Len())
	chunk.Extract(&inputs)
	for i := range chunk.Len() {
		s := Sample{Row: int64(i + 1), Err: inputs.Err[i], Note: inputs.Note[i]}
		var re *enrich.RowError
		if errors.As(s.Err, &re) {
			re.Row, re.Line = s.Row, chunk.Line(i)
		}
		s.Value = pick(chunk.Values(i))
		if s.Err == nil {
			s.UTC = inputs.Time[i].UTC()
			if z := inputs.Zone[i]; z != nil {
				s.Local, s.Zone = inputs.Time[i].In(z), z.String()
			} else {
				s.Zone = noZone
			}
		}
		samples = append(samples, s)
	}
	return samples, nil
}

func zoneSource(s enrich.Select) string {
	switch {
	case s.TZColumn != "":
		return fmt.Sprintf("per row, from column %q (--tz-column)", s.TZColumn)
	case strings.EqualFold(s.TZ, "auto"):
		return "looked up from each row's coordinates (--tz auto)"
	case s.TZ != "":
		return fmt.Sprintf("%s for every row (--tz)", s.TZ)
	}
	return "none given: times must carry an offset (Z, +02:00); offset-less times need --tz ZONE, --tz-column COL or --tz auto"
}

// command spells out the enrich command line that uses the chosen columns.
func command(o Options, choices []enrich.Choice) string {
	args := []string{"heliotag", "enrich", shellQuote(o.Input)}
	flagFor := map[string]string{"latitude": "--lat", "longitude": "--lon", "timestamp": "--time",
		"date": "--date", "time of day": "--time", "time zone": "--tz-column"}
	for _, c := range choices {
		if f, ok := flagFor[c.Role]; ok {
			args = append(args, f, shellQuote(c.Column))
		}
	}
	s := o.Select
	if s.TimeFormat != "" {
		args = append(args, "--time-format", shellQuote(s.TimeFormat))
	}
	if s.Epoch != "" {
		args = append(args, "--epoch", s.Epoch)
	}
	if s.TZ != "" {
		args = append(args, "--tz", shellQuote(s.TZ))
	}
	if o.Delimiter != "" {
		args = append(args, "--delimiter", shellQuote(o.Delimiter))
	}
	if o.From != "" {
		args = append(args, "--from", o.From)
	}
	out := "-"
	if o.Input != "-" {
		out = SuggestOutput(o.Input)
	}
	args = append(args, "-o", shellQuote(out))
	return strings.Join(args, " ")
}

// SuggestOutput names an output beside the input: "x.csv" → "x_sun.csv".
func SuggestOutput(input string) string {
	gz := strings.HasSuffix(input, ".gz")
	base := strings.TrimSuffix(input, ".gz")
	ext := ""
	if i := strings.LastIndexByte(base, '.'); i > strings.LastIndexByte(base, '/') {
		base, ext = base[:i], base[i:]
	}
	out := base + "_sun" + ext
	if gz {
		out += ".gz"
	}
	return out
}

func shellQuote(s string) string {
	if s != "" && strings.IndexFunc(s, func(r rune) bool {
		return !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || strings.ContainsRune("-_./:+,=%", r))
	}) < 0 {
		return s
	}
	return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'"
}
