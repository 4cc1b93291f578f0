// Package fields reads locations and times out of rows of text fields, for
// every format whose values arrive as strings (CSV, TSV, GeoJSON properties).
// It resolves which columns to use (by flag or by name), parses coordinates
// and timestamps, and resolves time zones.
package fields

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/internal/num"
	"github.com/heliotag/heliotag/io/internal/stamp"
	"github.com/heliotag/heliotag/io/internal/zone"
)

// Sentinel errors for coordinate values.
var (
	ErrEmpty    = errors.New("empty")
	ErrNotFloat = errors.New("not a number")
)

// Names detected, case-insensitively, when no flag names the column.
var (
	latNames   = []string{"lat", "latitude", "decimallatitude", "lat_dd", "latitude_dd"}
	lonNames   = []string{"lon", "lng", "long", "longitude", "decimallongitude", "lon_dd", "longitude_dd"}
	stampNames = []string{"timestamp", "datetime", "date_time", "eventdate", "event_time", "time_utc", "observed_at", "recorded_at"}
	dateNames  = []string{"date", "event_date", "crash_date", "obs_date"}
	clockNames = []string{"time", "event_time_of_day", "crash_time", "obs_time", "time_of_day"}
	timeNames  = []string{"time"}
	zoneNames  = []string{"tz", "timezone", "time_zone", "tzid"}
)

// Extractor reads one row's location and time from its fields. It is safe for
// concurrent use.
type Extractor struct {
	lat, lon, ts, date, clock, tz int // column indexes; -1 when unused
	geom                          int // WKT geometry column (--geometry); -1 when unused
	heading                       int // --heading column; -1 when unused
	names                         []string
	parser                        *stamp.Parser
	zones                         *zone.Resolver
	sel                           enrich.Select
	timeCol                       string // the time column's name, or "date+time" for two columns
	choices                       []enrich.Choice
}

// New resolves the columns of header that sel names or that are detected by
// name, and prepares the timestamp parser and zone resolver. Problems are
// usage errors (wrapping enrich.ErrUsage) that list the available columns.
func New(header []string, sel enrich.Select) (*Extractor, error) {
	return newExtractor(header, sel, true)
}

// NewTime is New for formats that take the location from elsewhere (a
// geometry): it resolves only the time (and zone) columns, and the extractor
// is used through Time, not Row.
func NewTime(header []string, sel enrich.Select) (*Extractor, error) {
	return newExtractor(header, sel, false)
}

func newExtractor(header []string, sel enrich.Select, location bool) (*Extractor, error) {
	x := &Extractor{lat: -1, lon: -1, ts: -1, date: -1, clock: -1, tz: -1, geom: -1, heading: -1, names: header, sel: sel}
	var err error
	if location && sel.Geometry != "" {
		if err := x.pickGeometry(sel); err != nil {
			return nil, err
		}
	} else if location {
		if x.lat, err = x.pick("latitude", "--lat", sel.Lat, latNames, true); err != nil {
			return nil, err
		}
		if x.lon, err = x.pick("longitude", "--lon", sel.Lon, lonNames, true); err != nil {
			return nil, err
		}
	}
	switch {
	case sel.Date != "":
		if x.date, err = x.pick("date", "--date", sel.Date, nil, true); err != nil {
			return nil, err
		}
		if sel.Time == "" {
			return nil, fmt.Errorf("%w: --date needs --time naming the time-of-day column", enrich.ErrUsage)
		}
		if x.clock, err = x.pick("time of day", "--time", sel.Time, nil, true); err != nil {
			return nil, err
		}
	case sel.Time != "":
		if x.ts, err = x.pick("timestamp", "--time", sel.Time, nil, true); err != nil {
			return nil, err
		}
	default:
		if i := x.find(stampNames); i >= 0 {
			x.ts, _ = x.pick("timestamp", "", "", stampNames, true)
			break
		}
		if x.find(dateNames) >= 0 && x.find(clockNames) >= 0 {
			x.date, _ = x.pick("date", "", "", dateNames, true)
			x.clock, _ = x.pick("time of day", "", "", clockNames, true)
			break
		}
		if x.ts, err = x.pick("timestamp", "--time", "", timeNames, true); err != nil {
			return nil, fmt.Errorf("%w; or name a date and a time-of-day column with --date and --time", err)
		}
	}
	if sel.TZColumn != "" {
		if sel.TZ != "" {
			return nil, fmt.Errorf("%w: --tz and --tz-column exclude each other; give one", enrich.ErrUsage)
		}
		if x.tz, err = x.pick("time zone", "--tz-column", sel.TZColumn, nil, true); err != nil {
			return nil, err
		}
	}
	if err := x.pickHeading(sel); err != nil {
		return nil, err
	}
	if x.ts >= 0 {
		x.timeCol = x.names[x.ts]
	} else if x.date >= 0 {
		x.timeCol = x.names[x.date] + "+" + x.names[x.clock]
	}
	if x.parser, err = stamp.NewParser(stamp.Options{Layout: sel.TimeFormat, Epoch: sel.Epoch}); err != nil {
		return nil, fmt.Errorf("%w: %w", enrich.ErrUsage, err)
	}
	zo := zone.Options{Mode: zone.None}
	switch {
	case sel.TZColumn != "":
		zo.Mode = zone.Column
	case strings.EqualFold(sel.TZ, "auto"):
		zo.Mode = zone.Auto
	case sel.TZ != "":
		zo.Mode, zo.Name = zone.Fixed, sel.TZ
	}
	if x.zones, err = zone.NewResolver(zo); err != nil {
		return nil, fmt.Errorf("%w: --tz: %w", enrich.ErrUsage, err)
	}
	return x, nil
}

// find returns the index of the first column whose name is one of names
// (case-insensitive), or -1.
func (x *Extractor) find(names []string) int {
	for _, want := range names {
		for i, h := range x.names {
			if strings.EqualFold(strings.TrimSpace(h), want) {
				return i
			}
		}
	}
	return -1
}

// pick finds a column: by the flag's value (exact, then case-insensitive), or
// by detection among names. required makes a miss an error.
func (x *Extractor) pick(role, flag, given string, names []string, required bool) (int, error) {
	if given != "" {
		for i, h := range x.names {
			if h == given {
				x.choices = append(x.choices, enrich.Choice{Role: role, Column: h, Index: i, How: flag})
				return i, nil
			}
		}
		for i, h := range x.names {
			if strings.EqualFold(h, given) {
				x.choices = append(x.choices, enrich.Choice{Role: role, Column: h, Index: i, How: flag})
				return i, nil
			}
		}
		return -1, fmt.Errorf("%w: %s %q: no such column; columns are %s", enrich.ErrUsage, flag, given, quoteList(x.names))
	}
	if i := x.find(names); i >= 0 {
		x.choices = append(x.choices, enrich.Choice{Role: role, Column: x.names[i], Index: i, How: "detected by name"})
		return i, nil
	}
	if !required {
		return -1, nil
	}
	return -1, fmt.Errorf("%w: no %s column found (looked for %s); name it with %s; columns are %s",
		enrich.ErrUsage, role, strings.Join(names, ", "), flag, quoteList(x.names))
}

func quoteList(names []string) string {
	q := make([]string, len(names))
	for i, n := range names {
		q[i] = strconv.Quote(n)
	}
	return strings.Join(q, ", ")
}

// Choices says which columns are used and how each was chosen.
func (x *Extractor) Choices() []enrich.Choice { return x.choices }

// Roles names the location and time columns, for messages.
func (x *Extractor) Roles() enrich.Roles {
	var r enrich.Roles
	if x.lat >= 0 {
		r.Lat, r.Lon = x.names[x.lat], x.names[x.lon]
	}
	if x.geom >= 0 {
		r.Lat, r.Lon = x.names[x.geom], x.names[x.geom]
	}
	switch {
	case x.ts >= 0:
		r.Time = x.names[x.ts]
	case x.date >= 0:
		r.Time = x.names[x.date] + "+" + x.names[x.clock]
	}
	return r
}

// Indexes returns the column indexes the extractor reads (for formats that
// decode only the fields they need).
func (x *Extractor) Indexes() []int {
	var idx []int
	for _, i := range []int{x.lat, x.lon, x.geom, x.ts, x.date, x.clock, x.tz, x.heading} {
		if i >= 0 {
			idx = append(idx, i)
		}
	}
	return idx
}

// Row reads row i of in from the fields of rec (one field per header column).
func (x *Extractor) Row(rec []string, i int, in *enrich.Inputs) {
	if x.geom >= 0 {
		x.rowGeometry(rec, i, in)
		return
	}
	lat, err := Coordinate(rec[x.lat], "latitude", 90)
	if err != nil {
		in.Err[i] = &enrich.RowError{Column: x.names[x.lat], Err: err}
		return
	}
	lon, err := Coordinate(rec[x.lon], "longitude", 180)
	if err != nil {
		in.Err[i] = &enrich.RowError{Column: x.names[x.lon], Err: err}
		return
	}
	in.Lat[i], in.Lon[i] = lat, lon
	x.Time(rec, i, lat, lon, in)
	if in.Err[i] == nil {
		x.Heading(rec, i, in)
	}
}

// Time reads row i's time (and zone) from rec, for a known location.
func (x *Extractor) Time(rec []string, i int, lat, lon float64, in *enrich.Inputs) {
	var st stamp.Stamp
	var err error
	col := x.timeCol
	if x.ts >= 0 {
		st, err = x.parser.Parse(rec[x.ts])
	} else {
		st, err = x.parser.ParseDateTime(rec[x.date], rec[x.clock])
	}
	if err != nil {
		if errors.Is(err, stamp.ErrEmpty) {
			err = fmt.Errorf("%w; expected a timestamp such as 2024-06-21T18:30:00Z or 2024-06-21 18:30", err)
		}
		in.Err[i] = &enrich.RowError{Column: col, Err: err}
		return
	}
	rowZone := ""
	if x.tz >= 0 {
		rowZone = rec[x.tz]
		col = x.names[x.tz]
	}
	t, dz, note, err := x.zones.Resolve(st, rowZone, lat, lon)
	if err != nil {
		if errors.Is(err, zone.ErrNoTimeZone) {
			err = fmt.Errorf("%w: %w", enrich.ErrFatal, err)
		}
		in.Err[i] = &enrich.RowError{Column: col, Err: err}
		return
	}
	in.Time[i], in.Zone[i], in.Note[i] = t, dz, note
}

// Coordinate parses a decimal-degree value. Range is checked by the caller
// (solar.Check) so that every format reports it the same way; here only the
// syntax, with the valid range named in the message.
func Coordinate(s, what string, limit int) (float64, error) {
	t := s
	// Most values have nothing to trim: no ASCII space or control, and no
	// multi-byte (possibly Unicode space) character, at either end.
	if t == "" || t[0]-'!' > '~'-'!' || t[len(t)-1]-'!' > '~'-'!' {
		t = strings.TrimSpace(s)
	}
	if t == "" {
		return 0, fmt.Errorf("%s is %w; expected decimal degrees in [%d, %d]", what, ErrEmpty, -limit, limit)
	}
	v, err := num.ParseDecimal(t)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("%s %q is %w; expected decimal degrees in [%d, %d]", what, s, ErrNotFloat, -limit, limit)
	}
	return v, nil
}
