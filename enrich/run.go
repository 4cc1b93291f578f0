package enrich

import (
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"runtime"
	"strconv"
	"time"

	"github.com/heliotag/heliotag/internal/freelist"
	"github.com/heliotag/heliotag/pipeline"
	"github.com/heliotag/heliotag/solar"
)

// ErrFatal marks a row problem that no policy can route around (for example
// offset-less times with no zone given): it stops the run whatever the policy.
var ErrFatal = errors.New("fatal input problem")

// Policy says what happens to a bad row.
type Policy uint8

// Bad-row policies (--on-bad-row).
const (
	// PolicyFail stops at the first bad row (exit 2, no output).
	PolicyFail Policy = iota
	// PolicySkip leaves bad rows out of the output and records them in the rejects file.
	PolicySkip
	// PolicyKeep writes bad rows with empty sun columns and the reason in sun_error.
	PolicyKeep
)

// ParsePolicy reads a --on-bad-row value.
func ParsePolicy(s string) (Policy, error) {
	switch s {
	case "", "fail":
		return PolicyFail, nil
	case "skip":
		return PolicySkip, nil
	case "keep":
		return PolicyKeep, nil
	}
	return 0, fmt.Errorf("%w: --on-bad-row %q; valid: fail, skip, keep", ErrUsage, s)
}

// badStatus is what the policy does with a bad row.
func (p Policy) badStatus() Status {
	if p == PolicyKeep {
		return RowKept
	}
	return RowRejected
}

// ErrNoHeading means a row has no heading while the glare group needs one.
var ErrNoHeading = errors.New("the row has no heading; the glare group needs one")

func (p Policy) String() string {
	return [...]string{"fail", "skip", "keep"}[p]
}

// DefaultBatchRows is the batch size when Options.BatchRows is 0.
const DefaultBatchRows = 8192

// Options configures Run. The zero value is not usable: Plan is required.
type Options struct {
	Plan   *Plan
	Policy Policy
	// Rejects receives bad rows under PolicySkip as CSV: row, reason, then
	// the row's original values. nil drops them (they are still counted).
	Rejects io.Writer
	// Workers computes batches in parallel; 0 means runtime.NumCPU().
	Workers int
	// BatchRows is the number of rows per batch; 0 means DefaultBatchRows.
	BatchRows int
	// InFlight bounds the batches read but not yet written, and so the
	// memory they hold; 0 means pipeline's default (2·Workers + 2).
	InFlight int
	// Solar configures the sun computation (atmosphere, ΔT).
	Solar solar.Options
	// Glare holds the glare group's thresholds.
	Glare GlareOptions
	// OnProgress, if set, is called from the writing goroutine after each
	// batch with the total rows handled so far.
	OnProgress func(rows int64)
}

// Summary counts a run. Read = Written + Rejected always; Kept rows are
// written (with sun_error) and so are part of Written.
type Summary struct {
	Read, Written, Rejected, Kept int64
	// Reasons counts bad rows by short reason.
	Reasons map[string]int64
	// Phases and Conditions count computed rows by sun_phase and sun_light_condition.
	Phases, Conditions map[string]int64
	Elapsed            time.Duration
}

// batch travels from the reader through a worker to the writer.
type batch struct {
	first int64 // 1-based row number of the chunk's first row
	chunk Chunk
	res   *Results
}

// Run reads src to the end, computes the planned columns, and writes the rows
// to sink in read order. It does not close src or sink. Under PolicyFail the
// first bad row is returned as a *RowError (wrapped); any other error is fatal.
func Run(ctx context.Context, src Source, sink Sink, o Options) (Summary, error) {
	start := time.Now()
	if o.Plan == nil {
		return Summary{}, fmt.Errorf("%w: no column plan", ErrUsage)
	}
	workers := o.Workers
	if workers <= 0 {
		workers = runtime.NumCPU()
	}
	rows := o.BatchRows
	if rows <= 0 {
		rows = DefaultBatchRows
	}

	// Per-worker computing state: a worker takes one for a batch and puts
	// it back, so each state (and its caches) serves one goroutine at a time.
	// Their kernels share one grid of the sun's geocentric values.
	states := make(chan *worker, workers)
	grid := solar.NewGrid(o.Solar)
	for range workers {
		states <- newWorker(o.Solar, grid)
	}
	// Free lists, not sync.Pool: kept across collections, so the heap stops
	// growing once the batches in flight have their buffers.
	inputs := freelist.New(4*workers+8, func() *Inputs { return new(Inputs) })
	results := freelist.New(4*workers+8, func() *Results { return new(Results) })
	roles := Roles{}
	if r, ok := src.(interface{ Roles() Roles }); ok {
		roles = r.Roles()
	}

	var rejects *csv.Writer
	if o.Rejects != nil && o.Policy == PolicySkip {
		rejects = csv.NewWriter(o.Rejects)
		if err := rejects.Write(append([]string{"row", "reason"}, src.Columns()...)); err != nil {
			return Summary{}, fmt.Errorf("writing rejects: %w", err)
		}
	}

	sum := Summary{Reasons: map[string]int64{}, Phases: map[string]int64{}, Conditions: map[string]int64{}}
	var phaseCount [16]int64
	var next int64 = 1

	read := func(ctx context.Context) (batch, error) {
		c, err := src.Next(ctx, rows)
		if err != nil {
			return batch{}, err
		}
		b := batch{first: next, chunk: c}
		next += int64(c.Len())
		return b, nil
	}

	passthrough := len(o.Plan.Columns) == 0
	work := func(ctx context.Context, _ int, b batch) (batch, error) {
		n := b.chunk.Len()
		if passthrough {
			res := results.Get()
			res.Plan = o.Plan
			res.reset(n)
			if err := b.chunk.Encode(res); err != nil {
				return b, err
			}
			b.res = res
			return b, nil
		}
		in := inputs.Get()
		defer inputs.Put(in)
		in.Reset(n)
		b.chunk.Extract(in)

		res := results.Get()
		res.Plan = o.Plan
		res.reset(n)
		copy(res.Zone, in.Zone)
		copy(res.Note, in.Note)

		in.unix = resize(in.unix, n)
		unix := in.unix
		good := math.NaN()
		for i := range n {
			if in.Err[i] == nil {
				u := unixSeconds(in.Time[i])
				if err := solar.Check(u, in.Lat[i], in.Lon[i]); err != nil {
					in.Err[i] = &RowError{Column: roles.columnFor(err), Err: err}
				} else {
					unix[i] = u
					if math.IsNaN(good) {
						good = u
					}
					continue
				}
			}
			unix[i] = math.NaN()
		}
		if math.IsNaN(good) {
			good = 0
		}
		for i := range n {
			if math.IsNaN(unix[i]) {
				// A bad row is computed on harmless values (a good row's
				// instant, so the kernel's grid is not stretched) and its
				// result ignored.
				unix[i], in.Lat[i], in.Lon[i] = good, 0, 0
			}
		}
		for i := range n {
			if err := in.Err[i]; err != nil {
				var re *RowError
				if !asRowError(err, &re) {
					re = &RowError{Err: err}
				}
				re.Row = b.first + int64(i)
				re.Line = b.chunk.Line(i)
				if errors.Is(re, ErrFatal) {
					return b, re
				}
				res.Err[i] = re
				res.Status[i] = o.Policy.badStatus()
			}
		}

		var w *worker
		select {
		case w = <-states:
		case <-ctx.Done():
			return b, context.Cause(ctx)
		}
		if o.Plan.Has(GroupPosition) || o.Plan.Has(GroupPhase) || o.Plan.Has(GroupGlare) {
			out := solar.Positions{Altitude: res.Altitude, Azimuth: res.Azimuth, Phase: res.Phase}
			w.kernel.Positions(unix, in.Lat, in.Lon, &out)
		}
		if o.Plan.Has(GroupMoon) {
			w.moonKernel().Positions(unix, in.Lat, in.Lon, &res.Moon)
		}
		if o.Plan.Has(GroupGlare) {
			for i := range n {
				if res.Status[i] != RowOK {
					continue
				}
				if math.IsNaN(in.Heading[i]) {
					res.Status[i] = o.Policy.badStatus()
					res.Err[i] = &RowError{Row: b.first + int64(i), Line: b.chunk.Line(i), Err: ErrNoHeading}
					continue
				}
				res.RelAz[i] = RelativeAzimuth(res.Azimuth[i], in.Heading[i])
				res.Glare[i] = GlareOf(res.Phase[i], res.Altitude[i], res.RelAz[i], o.Glare)
			}
		}
		if o.Plan.Has(GroupEvents) || o.Plan.Has(GroupRelative) {
			w.days(in, unix, res)
		}
		states <- w

		if err := b.chunk.Encode(res); err != nil {
			return b, err
		}
		b.res = res
		return b, nil
	}

	write := func(ctx context.Context, b batch) error {
		res := b.res
		defer results.Put(res)
		n := b.chunk.Len()
		for i := range n {
			switch res.Status[i] {
			case RowOK:
				if o.Plan.Has(GroupPhase) {
					phaseCount[res.Phase[i]]++
				}
				continue
			case RowRejected:
				if o.Policy == PolicyFail {
					return fmt.Errorf("%w (stopping at the first %w; --on-bad-row skip or keep goes on)", res.Err[i], ErrBadRow)
				}
				sum.Rejected++
				if rejects != nil {
					var re *RowError
					reason := res.Err[i].Error()
					if asRowError(res.Err[i], &re) {
						reason = re.Reason()
					}
					rec := append([]string{strconv.FormatInt(b.first+int64(i), 10), reason}, b.chunk.Values(i)...)
					if err := rejects.Write(rec); err != nil {
						return fmt.Errorf("writing rejects: %w", err)
					}
				}
			case RowKept:
				sum.Kept++
			}
			sum.Reasons[reasonKey(res.Err[i])]++
		}
		if err := sink.Write(ctx, b.chunk); err != nil {
			return err
		}
		sum.Read += int64(n)
		if o.OnProgress != nil {
			o.OnProgress(sum.Read)
		}
		return nil
	}

	err := pipeline.Run(ctx, pipeline.Options{Workers: workers, InFlight: o.InFlight}, read, work, write)
	if rejects != nil {
		rejects.Flush()
		if ferr := rejects.Error(); ferr != nil && err == nil {
			err = fmt.Errorf("writing rejects: %w", ferr)
		}
	}
	sum.Written = sum.Read - sum.Rejected
	for p, c := range phaseCount {
		if c == 0 {
			continue
		}
		ph := solar.Phase(p)
		sum.Phases[ph.String()] += c
		sum.Conditions[ph.Condition().String()] += c
	}
	sum.Elapsed = time.Since(start)
	return sum, err
}

// Roles names the input columns that feed the computation, for messages.
type Roles struct {
	Lat, Lon, Time string
}

// columnFor names the input column a solar input check is about.
func (r Roles) columnFor(err error) string {
	switch {
	case errors.Is(err, solar.ErrLatitude):
		return r.Lat
	case errors.Is(err, solar.ErrLongitude):
		return r.Lon
	case errors.Is(err, solar.ErrTimeRange):
		return r.Time
	}
	return ""
}

func unixSeconds(t time.Time) float64 {
	return float64(t.Unix()) + float64(t.Nanosecond())*1e-9
}

func asRowError(err error, target **RowError) bool { return errors.As(err, target) }

// reasonKey is a short, stable label for counting bad rows by reason: the
// column and the innermost error's first clause.
func reasonKey(err error) string {
	if err == nil {
		return ""
	}
	col := ""
	var re *RowError
	if asRowError(err, &re) {
		col = re.Column
		err = re.Err
	}
	for {
		u := errors.Unwrap(err)
		if u == nil {
			break
		}
		err = u
	}
	key := err.Error()
	if col != "" {
		key = col + ": " + key
	}
	return key
}
