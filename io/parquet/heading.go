package parquet

import (
	"fmt"
	"math"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/paulmach/orb/encoding/wkb"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/internal/fields"
	"github.com/heliotag/heliotag/io/internal/geom"
)

// chooseHeading checks the --heading column's type (numbers of degrees, or
// text holding degrees or compass words) and --heading-from-geometry's need
// for a geometry column.
func (e *extractor) chooseHeading(sc *arrow.Schema, sel enrich.Select) error {
	e.heading = e.x.HeadingColumn()
	e.headingFromGeometry = sel.HeadingFromGeometry
	if e.headingFromGeometry {
		if e.geo == nil {
			return fmt.Errorf("%w: --heading-from-geometry needs a geometry column (--geometry or a GeoParquet file); give --heading COL instead", enrich.ErrUsage)
		}
		if e.geo.enc == encPoint {
			return fmt.Errorf("%w: --heading-from-geometry: the geometry column %q holds points, which have no direction; give --heading COL", enrich.ErrUsage, e.geo.name)
		}
	}
	if e.heading >= 0 {
		f := sc.Field(e.heading)
		if !numberType(f.Type) && !textType(f.Type) {
			return typeError(f, "heading", "a number column of degrees from true north, or a text column of degrees or compass words")
		}
	}
	return nil
}

// readHeading fills in every row's heading (NaN stays when none is in use).
func (e *extractor) readHeading(rec arrow.RecordBatch, in *enrich.Inputs) {
	switch {
	case e.heading >= 0:
		a := storage(rec.Column(e.heading))
		name := e.names[e.heading]
		text := textType(a.DataType())
		for i := range a.Len() {
			if in.Err[i] != nil {
				continue
			}
			if a.IsNull(i) {
				in.Err[i] = &enrich.RowError{Column: name, Err: fmt.Errorf("heading is %w (null); expected degrees in [0, 360) or a compass word", fields.ErrEmpty)}
				continue
			}
			var h float64
			var err error
			if text {
				h, err = fields.ParseHeading(valueText(a, i))
			} else {
				h = floatValue(a, i)
				if math.IsNaN(h) || h < 0 || h >= 360 {
					err = fmt.Errorf("%w: heading %v out of range [0, 360)", fields.ErrHeading, h)
				}
			}
			if err != nil {
				in.Err[i] = &enrich.RowError{Column: name, Err: err}
				continue
			}
			in.Heading[i] = h
		}
	case e.headingFromGeometry:
		a := storage(rec.Column(e.geo.index))
		value, ok := binaryValues(a)
		if !ok {
			return // read has reported the column type already
		}
		for i := range a.Len() {
			if in.Err[i] != nil || a.IsNull(i) {
				continue
			}
			h, err := wkbHeading(value(i))
			if err != nil {
				in.Err[i] = &enrich.RowError{Column: e.geo.name, Err: err}
				continue
			}
			in.Heading[i] = h
		}
	}
}

// wkbHeading is geom.Heading of a WKB line geometry.
func wkbHeading(b []byte) (float64, error) {
	if len(b) < 5 {
		return 0, fmt.Errorf("%w: %d bytes is too short for WKB", ErrGeometry, len(b))
	}
	order, typ, dims, _, err := wkbHeader(b)
	if err != nil {
		return 0, err
	}
	if dims != 2 || order.Uint32(b[1:]) != typ {
		// Z/M ordinates, ISO dimension codes or EWKB flags: rewrite as 2D WKB.
		if b, err = flatten2D(b); err != nil {
			return 0, err
		}
	}
	g, err := wkb.Unmarshal(b)
	if err != nil {
		return 0, fmt.Errorf("%w: %w", ErrGeometry, err)
	}
	return geom.Heading(g)
}
