package fields

import (
	"errors"
	"fmt"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/internal/stamp"
	"github.com/heliotag/heliotag/io/internal/zone"
)

// This file serves formats whose values arrive typed (Parquet): they choose
// columns with New or NewTime like the text formats, read typed values
// themselves, and resolve zones through the same resolver.

// Columns are the indexes of the columns an Extractor reads, -1 when unused.
type Columns struct {
	Lat, Lon  int
	Timestamp int // a full timestamp (--time alone, or detected)
	Date      int // with Clock: --date and --time
	Clock     int
	Zone      int // --tz-column
}

// Columns returns the indexes of the chosen columns.
func (x *Extractor) Columns() Columns {
	return Columns{Lat: x.lat, Lon: x.lon, Timestamp: x.ts, Date: x.date, Clock: x.clock, Zone: x.tz}
}

// Parser returns the timestamp parser made from the selection (--time-format, --epoch).
func (x *Extractor) Parser() *stamp.Parser { return x.parser }

// ZoneMode returns how zones are chosen: none, --tz NAME, --tz-column or --tz auto.
func (x *Extractor) ZoneMode() zone.Mode { return x.zones.Mode() }

// TimeColumn names the time column(s) as row errors name them: the timestamp
// column, or "date+time" for a date and a time-of-day column.
func (x *Extractor) TimeColumn() string {
	if x.ts >= 0 {
		return x.names[x.ts]
	}
	if x.date >= 0 {
		return x.names[x.date] + "+" + x.names[x.clock]
	}
	return ""
}

// Resolve turns row i's time, already read from a typed column as st, into
// its instant and date zone exactly as Time does for text: rowZone is the
// row's --tz-column value (ignored otherwise), lat and lon its location.
// Problems go in in.Err[i]; a missing zone stops the run (enrich.ErrFatal).
func (x *Extractor) Resolve(st stamp.Stamp, rowZone string, lat, lon float64, i int, in *enrich.Inputs) {
	col := x.TimeColumn()
	if x.tz >= 0 {
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
