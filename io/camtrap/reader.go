package camtrap

import (
	"bufio"
	"context"
	"errors"
	"fmt"
	"io"
	"strings"
	"time"

	"github.com/heliotag/heliotag/io/parquet"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/internal/num"
	"github.com/heliotag/heliotag/io/internal/stamp"
	"github.com/heliotag/heliotag/io/internal/zone"
)

// At says which instant of an observation's event is computed (--at).
type At uint8

// Instants of an observation.
const (
	// AtStart is eventStart (the default).
	AtStart At = iota
	// AtMiddle is halfway between eventStart and eventEnd; the local date is eventStart's.
	AtMiddle
	// AtEnd is eventEnd.
	AtEnd
)

// ParseAt reads a --at value: start, middle or end ("" is start).
func ParseAt(s string) (At, error) {
	switch s {
	case "", "start":
		return AtStart, nil
	case "middle":
		return AtMiddle, nil
	case "end":
		return AtEnd, nil
	}
	return 0, fmt.Errorf("%w: --at %q; valid: start, middle, end", enrich.ErrUsage, s)
}

func (a At) String() string { return [...]string{"start", "middle", "end"}[a] }

// Options configure reading a package's tables. The zero value reads
// observations at eventStart, with times that must carry a UTC offset.
type Options struct {
	// TZ is "" (times need their UTC offset, as Camtrap DP requires), an
	// IANA zone name or UTC (for offset-less times, and then also the zone of
	// every row's local date), or "auto" (the zone at the deployment).
	TZ string
	// At chooses the instant of an observation.
	At At
	// Allocator holds the Arrow memory of Parquet resources while a batch
	// is turned into rows; nil means Go's heap.
	Allocator parquet.Allocator
}

// Tables are the tables that can be enriched, in output order.
var Tables = []string{TableObservations, TableMedia}

// ParseTables reads a --tables value: a comma-separated list of
// observations and media ("" is observations). The result is in the order
// of Tables.
func ParseTables(s string) ([]string, error) {
	if strings.TrimSpace(s) == "" {
		return []string{TableObservations}, nil
	}
	want := map[string]bool{}
	for _, part := range strings.Split(s, ",") {
		name := strings.ToLower(strings.TrimSpace(part))
		if name == "" {
			continue
		}
		if name != TableObservations && name != TableMedia {
			return nil, fmt.Errorf("%w: --tables: unknown table %q; valid: observations, media", enrich.ErrUsage, part)
		}
		want[name] = true
	}
	var out []string
	for _, t := range Tables {
		if want[t] {
			out = append(out, t)
		}
	}
	if len(out) == 0 {
		return nil, fmt.Errorf("%w: --tables names no table; valid: observations, media", enrich.ErrUsage)
	}
	return out, nil
}

// IDField is the primary key field of a core table: observationID or mediaID.
func IDField(table string) string {
	if table == TableMedia {
		return "mediaID"
	}
	return "observationID"
}

// SunName is the resource name of a table's sun columns ("observations-sun");
// its file is SunName + ".csv".
func SunName(table string) string { return table + "-sun" }

// Reader streams the rows of observations or media. It implements
// enrich.Source (with Roles and Progress); its chunks do the join with the
// deployments and read the times on the workers.
type Reader struct {
	t      *table
	table  string
	deps   *Deployments
	at     At
	id     int // observationID or mediaID
	dep    int // deploymentID
	start  int // eventStart, or the media timestamp; -1 when not read
	end    int // eventEnd; -1 when not read
	parser *stamp.Parser
	rz     *zone.Resolver
}

// NewReader opens table (TableObservations or TableMedia) for reading, joined to deps.
// Missing fields are reported here, before any row is read.
func (p *Package) NewReader(table string, deps *Deployments, o Options) (*Reader, error) {
	if table != TableObservations && table != TableMedia {
		return nil, fmt.Errorf("%w: table %q cannot be enriched; valid: observations, media", enrich.ErrUsage, table)
	}
	res, err := p.Resource(table)
	if err != nil {
		return nil, err
	}
	t, err := openTable(p, res, o.allocator())
	if err != nil {
		return nil, err
	}
	rd := &Reader{t: t, table: table, deps: deps, at: o.At, start: -1, end: -1}
	var idx []int
	switch {
	case table == TableMedia:
		idx, err = t.need("mediaID", "deploymentID", "timestamp")
		if err == nil {
			rd.start = idx[2]
		}
	case o.At == AtStart:
		idx, err = t.need("observationID", "deploymentID", "eventStart")
		if err == nil {
			rd.start = idx[2]
		}
	case o.At == AtEnd:
		idx, err = t.need("observationID", "deploymentID", "eventEnd")
		if err == nil {
			rd.end = idx[2]
		}
	default:
		idx, err = t.need("observationID", "deploymentID", "eventStart", "eventEnd")
		if err == nil {
			rd.start, rd.end = idx[2], idx[3]
		}
	}
	if err != nil {
		t.Close()
		return nil, err
	}
	idx = t.project(idx)
	if rd.start >= 0 {
		rd.start = idx[2]
	}
	if rd.end >= 0 {
		rd.end = idx[len(idx)-1]
	}
	rd.id, rd.dep = idx[0], idx[1]
	rd.parser, _ = stamp.NewParser(stamp.Options{})
	if rd.rz, err = o.resolver(); err != nil {
		t.Close()
		return nil, err
	}
	return rd, nil
}

// Table is the name of the table read.
func (rd *Reader) Table() string { return rd.table }

// Columns returns the table's fields as read: the whole header of a CSV
// resource; of a Parquet resource, only the fields the join reads (the ID,
// deploymentID and the time fields), in the file's order. Rows (and
// rejects files) hold these fields.
func (rd *Reader) Columns() []string { return rd.t.header }

// Roles names the fields that feed the computation, for messages.
func (rd *Reader) Roles() enrich.Roles {
	return enrich.Roles{Lat: "deployments.latitude", Lon: "deployments.longitude", Time: rd.timeName()}
}

func (rd *Reader) timeName() string {
	switch {
	case rd.table == TableMedia:
		return "timestamp"
	case rd.at == AtEnd:
		return "eventEnd"
	case rd.at == AtMiddle:
		return "eventStart+eventEnd"
	}
	return "eventStart"
}

// Position reports bytes read and the files' total size (0 when unknown).
func (rd *Reader) Position() (done, total int64) { return rd.t.count.n.Load(), rd.t.size }

// Close closes the open file.
func (rd *Reader) Close() error { return rd.t.Close() }

// Next reads up to max rows. Rows are 1-based across the resource's files;
// lines are given only for a single-file CSV resource.
func (rd *Reader) Next(ctx context.Context, max int) (enrich.Chunk, error) {
	if err := ctx.Err(); err != nil {
		return nil, context.Cause(ctx)
	}
	c := &chunk{rd: rd}
	for len(c.recs) < max {
		rec, line, err := rd.t.read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		if len(rd.t.paths) > 1 || rd.t.parquet {
			line = 0
		}
		c.recs = append(c.recs, rec)
		c.lines = append(c.lines, line)
	}
	if len(c.recs) == 0 {
		return nil, io.EOF
	}
	return c, nil
}

// chunk is a run of rows, each its own slice of fields.
type chunk struct {
	rd    *Reader
	recs  [][]string
	lines []int64
	out   []byte
}

func (c *chunk) Len() int              { return len(c.recs) }
func (c *chunk) Line(i int) int64      { return c.lines[i] }
func (c *chunk) Values(i int) []string { return c.recs[i] }

// Extract joins each row to its deployment and reads its time.
func (c *chunk) Extract(in *enrich.Inputs) {
	rd := c.rd
	want := len(rd.t.header)
	for i, rec := range c.recs {
		if len(rec) != want {
			in.Err[i] = &enrich.RowError{Err: fmt.Errorf("%w: the row has %d fields, the header has %d", ErrFieldCount, len(rec), want)}
			continue
		}
		idName := rd.t.header[rd.id]
		if strings.TrimSpace(rec[rd.id]) == "" {
			in.Err[i] = &enrich.RowError{Column: idName, Err: fmt.Errorf("%w: %s is empty; every row needs one", ErrEmptyID, idName)}
			continue
		}
		depID := rec[rd.dep]
		d := rd.deps.Get(depID)
		if d == nil {
			err := fmt.Errorf("%w: %q is not in the deployments table", ErrNoDeployment, depID)
			if strings.TrimSpace(depID) == "" {
				err = fmt.Errorf("%w: deploymentID is empty", ErrNoDeployment)
			}
			in.Err[i] = &enrich.RowError{Column: "deploymentID", Err: err}
			continue
		}
		if d.Err != nil {
			in.Err[i] = &enrich.RowError{Column: "deploymentID", Err: d.Err}
			continue
		}
		in.Lat[i], in.Lon[i], in.Heading[i] = d.Lat, d.Lon, d.Heading

		var t time.Time
		var dz *time.Location
		var note string
		switch {
		case rd.start >= 0 && rd.end >= 0: // the middle of the event
			t0, z0, n0, ok := rd.instant(rec, rd.start, d, i, in)
			if !ok {
				continue
			}
			t1, _, n1, ok := rd.instant(rec, rd.end, d, i, in)
			if !ok {
				continue
			}
			if t1.Before(t0) {
				in.Err[i] = &enrich.RowError{Column: "eventEnd", Err: fmt.Errorf("%w: eventEnd %s is before eventStart %s", ErrEventOrder, rec[rd.end], rec[rd.start])}
				continue
			}
			t, dz, note = t0.Add(t1.Sub(t0)/2), z0, joinNotes(n0, n1)
		case rd.start >= 0:
			var ok bool
			if t, dz, note, ok = rd.instant(rec, rd.start, d, i, in); !ok {
				continue
			}
		default:
			var ok bool
			if t, dz, note, ok = rd.instant(rec, rd.end, d, i, in); !ok {
				continue
			}
		}
		if (!d.Start.IsZero() && t.Before(d.Start)) || (!d.End.IsZero() && t.After(d.End)) {
			note = joinNotes(note, NoteOutsideDeployment)
		}
		if d.TimestampIssues {
			note = joinNotes(note, NoteTimestampIssues)
		}
		in.Time[i], in.Zone[i], in.Note[i] = t, dz, note
	}
}

// instant reads the timestamp in field col of rec; on a problem it sets
// in.Err[i] and returns false.
func (rd *Reader) instant(rec []string, col int, d *Deployment, i int, in *enrich.Inputs) (time.Time, *time.Location, string, bool) {
	name := rd.t.header[col]
	st, err := rd.parser.Parse(rec[col])
	if err != nil {
		if errors.Is(err, stamp.ErrEmpty) {
			err = fmt.Errorf("%w; expected an ISO 8601 time with its UTC offset such as 2024-06-21T18:30:00+01:00", err)
		}
		in.Err[i] = &enrich.RowError{Column: name, Err: err}
		return time.Time{}, nil, "", false
	}
	t, dz, note, err := rd.rz.Resolve(st, "", d.Lat, d.Lon)
	if err != nil {
		if errors.Is(err, zone.ErrNoTimeZone) {
			err = fmt.Errorf("%w: %w; Camtrap DP times carry a UTC offset: give --tz ZONE or --tz auto to read times without one", enrich.ErrFatal, err)
		}
		in.Err[i] = &enrich.RowError{Column: name, Err: err}
		return time.Time{}, nil, "", false
	}
	return t, dz, note, true
}

// joinNotes joins non-empty notes with ";", without repeating one.
func joinNotes(a, b string) string {
	switch {
	case a == "" || a == b:
		return b
	case b == "":
		return a
	}
	for _, n := range strings.Split(a, ";") {
		if n == b {
			return a
		}
	}
	return a + ";" + b
}

// Encode renders each written row: its ID, then the added columns.
func (c *chunk) Encode(res *enrich.Results) error {
	b := c.out[:0]
	for i, rec := range c.recs {
		if res.Status[i] == enrich.RowRejected {
			continue
		}
		id := ""
		if c.rd.id < len(rec) {
			id = rec[c.rd.id]
		}
		b = appendField(b, id)
		b = appendColumns(b, res, i)
		b = append(b, '\n')
	}
	c.out = b
	return nil
}

// appendColumns appends a comma and each added column's value of row i.
func appendColumns(b []byte, res *enrich.Results, i int) []byte {
	for _, col := range res.Plan.Columns {
		b = append(b, ',')
		switch col.Kind {
		case enrich.KindFloat:
			if v, ok := res.Float(col.Field, i); ok {
				b = num.AppendFixed(b, v, col.Decimals)
			}
		case enrich.KindCategory:
			b = append(b, res.Word(col.Field, i)...)
		case enrich.KindText:
			b = appendField(b, res.Text(col.Field, i))
		case enrich.KindInstant:
			if t, ok := res.Instant(col.Field, i); ok {
				b = t.AppendFormat(b, time.RFC3339)
			}
		}
	}
	return b
}

// appendField appends s as a CSV field, quoted (RFC 4180) when it holds a
// comma, a quote, a line break or surrounding spaces.
func appendField(b []byte, s string) []byte {
	if s == "" || (!strings.ContainsAny(s, ",\"\r\n") && s[0] != ' ' && s[len(s)-1] != ' ') {
		return append(b, s...)
	}
	b = append(b, '"')
	for i := 0; i < len(s); i++ {
		if s[i] == '"' {
			b = append(b, '"')
		}
		b = append(b, s[i])
	}
	return append(b, '"')
}

// Writer writes a table's sun columns as CSV: the ID field, then the added
// columns. It implements enrich.Sink.
type Writer struct {
	w *bufio.Writer
}

// NewWriter writes the header at once.
func NewWriter(w io.Writer, rd *Reader, plan *enrich.Plan) (*Writer, error) {
	wr := &Writer{w: bufio.NewWriterSize(w, 1<<16)}
	b := appendField(nil, rd.t.header[rd.id])
	for _, name := range plan.Names() {
		b = append(b, ',')
		b = appendField(b, name)
	}
	b = append(b, '\n')
	if _, err := wr.w.Write(b); err != nil {
		return nil, fmt.Errorf("writing %s: %w", SunName(rd.table), err)
	}
	return wr, nil
}

// Write writes a chunk encoded by Encode.
func (w *Writer) Write(_ context.Context, ch enrich.Chunk) error {
	c, ok := ch.(*chunk)
	if !ok {
		return fmt.Errorf("camtrap: chunk %T was not read by this package", ch)
	}
	_, err := w.w.Write(c.out)
	c.out, c.recs = nil, nil
	if err != nil {
		return fmt.Errorf("writing output: %w", err)
	}
	return nil
}

// Close flushes buffered output.
func (w *Writer) Close() error {
	if err := w.w.Flush(); err != nil {
		return fmt.Errorf("writing output: %w", err)
	}
	return nil
}
