// Package enrich joins a format's reader and writer to the sun computation:
// it decides which columns are added, runs the batches through the ordered
// pipeline, routes bad rows by the user's policy and counts every row.
//
// A format plugs in through Source, Chunk and Sink. Chunk methods run on
// worker goroutines, so a format's expensive work (parsing fields, encoding
// output) runs in parallel; Sink.Write runs on one goroutine, in read order.
package enrich

import (
	"context"
	"errors"
	"fmt"
	"math"
	"time"
)

// Sentinel errors. Match them with errors.Is.
var (
	// ErrUsage marks a problem with the command line or options (exit 2).
	ErrUsage = errors.New("usage")
	// ErrBadRow marks the first bad row under the fail policy (exit 2).
	ErrBadRow = errors.New("bad row")
)

// RowError is a problem with one input row.
type RowError struct {
	Row    int64  // 1-based data row number (the header is not counted); 0 if unknown
	Line   int64  // 1-based line in a text file where the row starts; 0 if not applicable
	Column string // the input column at fault, "" if none in particular
	Err    error
}

func (e *RowError) Error() string {
	var pos string
	switch {
	case e.Row > 0 && e.Line > 0:
		pos = fmt.Sprintf("row %d (line %d)", e.Row, e.Line)
	case e.Row > 0:
		pos = fmt.Sprintf("row %d", e.Row)
	default:
		pos = "row"
	}
	if e.Column != "" {
		pos += fmt.Sprintf(", column %q", e.Column)
	}
	return pos + ": " + e.Err.Error()
}

func (e *RowError) Unwrap() error { return e.Err }

// Reason is the row error's message without its position: what the rejects
// file and sun_error carry (they hold the row number separately).
func (e *RowError) Reason() string {
	if e.Column != "" {
		return fmt.Sprintf("column %q: %s", e.Column, e.Err.Error())
	}
	return e.Err.Error()
}

// Inputs are the values a format extracts from each row of a chunk: where and
// when. Index i is the chunk's row i.
type Inputs struct {
	// Lat and Lon are WGS84 degrees, north and east positive.
	Lat, Lon []float64
	// Time is the row's instant (its location is irrelevant; use it as UTC).
	Time []time.Time
	// Zone decides the row's local calendar date (events, relative columns):
	// nil means the location's mean solar time.
	Zone []*time.Location
	// Heading is the direction of travel or view, degrees clockwise from
	// true north, NaN when the input gives none.
	Heading []float64
	// Note is "" or a short reason about how the time was read (sun_time_note).
	Note []string
	// Err is nil, or the row's problem: a *RowError naming the column.
	// A row with an error is not computed.
	Err []error

	unix []float64 // scratch: Time as Unix seconds
}

// Reset sizes every slice to n rows, reusing memory, and clears them.
func (in *Inputs) Reset(n int) {
	in.Lat = resize(in.Lat, n)
	in.Lon = resize(in.Lon, n)
	in.Time = resize(in.Time, n)
	in.Zone = resize(in.Zone, n)
	in.Note = resize(in.Note, n)
	in.Err = resize(in.Err, n)
	in.Heading = resize(in.Heading, n)
	for i := range in.Heading {
		in.Heading[i] = math.NaN()
	}
}

func resize[T any](s []T, n int) []T {
	if cap(s) < n {
		return make([]T, n)
	}
	s = s[:n]
	clear(s)
	return s
}

// Status says what happens to a row in the output.
type Status uint8

// Row statuses.
const (
	// RowOK is computed and written.
	RowOK Status = iota
	// RowKept has an error; it is written with empty sun columns and sun_error (keep policy).
	RowKept
	// RowRejected has an error; it is left out of the output (skip and fail policies).
	RowRejected
)

// Source reads an input file batch by batch. Next and Close are called from
// one goroutine.
type Source interface {
	// Columns returns the input's column names (header, properties or schema).
	Columns() []string
	// Next returns the next chunk of at most max rows, or io.EOF after the last.
	// A chunk owns its memory: it stays valid after later calls to Next.
	Next(ctx context.Context, max int) (Chunk, error)
	Close() error
}

// Chunk is a batch of consecutive input rows in a format's own form. Its
// methods are called on one worker goroutine at a time.
type Chunk interface {
	// Len is the number of rows.
	Len() int
	// Line returns the 1-based line where row i starts in a text file, or 0.
	Line(i int) int64
	// Extract fills in each row's location and time; in has been Reset to Len().
	// Per-row problems go in in.Err[i] as *RowError with Column set.
	Extract(in *Inputs)
	// Values returns row i's original values as text, for the rejects file.
	Values(i int) []string
	// Encode renders the rows whose status is RowOK or RowKept, with the
	// added columns of res.Plan, and keeps the result for Sink.Write.
	Encode(res *Results) error
}

// Sink writes chunks in read order.
type Sink interface {
	// Write writes an encoded chunk. Its memory may be reused afterwards.
	Write(ctx context.Context, c Chunk) error
	// Close finishes the output (footer, flush). It does not commit a file:
	// the caller renames the temporary output after Close succeeds.
	Close() error
}

// Progress is an optional interface of a Source that knows how far it is.
type Progress interface {
	// Position returns bytes consumed and the total (0 when unknown).
	Position() (done, total int64)
}

// Select says which input columns hold the location and the time and how to
// read them. Empty names are detected from the column names. Formats turn it
// into their own extraction.
type Select struct {
	Lat      string `json:"lat,omitempty"` // decimal-degree columns
	Lon      string `json:"lon,omitempty"`
	Geometry string `json:"geometry,omitempty"` // a geometry column (WKT in text formats, WKB in Parquet)
	Time     string `json:"time,omitempty"`     // a full timestamp, or with Date the time of day
	Date     string `json:"date,omitempty"`     // a date column, combined with Time
	// TimeFormat is a strftime layout; "" reads RFC 3339 and ISO local forms.
	TimeFormat string `json:"time_format,omitempty"`
	// Epoch is "", or "s", "ms", "us", "ns": timestamps are Unix time numbers.
	Epoch string `json:"epoch,omitempty"`
	// TZ is "", an IANA zone name (or "UTC"), or "auto" (from the coordinates).
	TZ string `json:"tz,omitempty"`
	// TZColumn names a column of IANA zone names, one per row.
	TZColumn string `json:"tz_column,omitempty"`
	// Heading names a column of directions of travel or view (degrees
	// clockwise from true north, or compass words), for the glare group.
	Heading string `json:"heading,omitempty"`
	// HeadingFromGeometry takes the heading from a line geometry: its
	// bearing at the representative point, in the direction drawn.
	HeadingFromGeometry bool `json:"heading_from_geometry,omitempty"`
}

// HasHeading reports whether a heading is given (needed by the glare group).
func (s Select) HasHeading() bool { return s.Heading != "" || s.HeadingFromGeometry }

// ZoneMode reports whether offset-less local times can be read (a zone is set).
func (s Select) ZoneMode() bool { return s.TZ != "" || s.TZColumn != "" }

// Choice records which input column plays a role and how it was chosen.
type Choice struct {
	Role   string // "latitude", "longitude", "timestamp", "date", "time of day", "time zone"
	Column string
	Index  int
	How    string // the flag that named it ("--lat"), or "detected by name"
}

// Chooser is an optional interface of a Source that reports its column choice.
type Chooser interface {
	Choices() []Choice
}
