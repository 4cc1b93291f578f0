package fields

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/heliotag/heliotag/enrich"
)

// ErrHeading means a heading value is not a direction heliotag can read.
var ErrHeading = errors.New("not a heading")

// compass maps the direction words of crash records to degrees clockwise
// from true north: the eight compass points and the four "bound" words
// (NB = northbound, travelling north).
var compass = map[string]float64{
	"N": 0, "NE": 45, "E": 90, "SE": 135, "S": 180, "SW": 225, "W": 270, "NW": 315,
	"NB": 0, "EB": 90, "SB": 180, "WB": 270,
	"NORTH": 0, "EAST": 90, "SOUTH": 180, "WEST": 270,
	"NORTHEAST": 45, "SOUTHEAST": 135, "SOUTHWEST": 225, "NORTHWEST": 315,
	"NORTHBOUND": 0, "EASTBOUND": 90, "SOUTHBOUND": 180, "WESTBOUND": 270,
}

// ParseHeading reads a direction of travel or view: degrees clockwise from
// true north in [0, 360), or a compass word (N, NE, E, SE, S, SW, W, NW; NB,
// EB, SB, WB; or the words spelt out), in any case.
func ParseHeading(s string) (float64, error) {
	t := strings.TrimSpace(s)
	if t == "" {
		return 0, fmt.Errorf("heading is %w; expected degrees in [0, 360) or a compass word (N, NE, ..., NB, SB, EB, WB)", ErrEmpty)
	}
	if v, ok := compass[strings.ToUpper(t)]; ok {
		return v, nil
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("%w: %q; expected degrees in [0, 360) or a compass word (N, NE, E, SE, S, SW, W, NW, NB, SB, EB, WB)", ErrHeading, s)
	}
	if v < 0 || v >= 360 {
		return 0, fmt.Errorf("%w: heading %v out of range [0, 360)", ErrHeading, v)
	}
	return v, nil
}

// pickHeading chooses the --heading column, if one is named.
func (x *Extractor) pickHeading(sel enrich.Select) error {
	if sel.Heading == "" {
		return nil
	}
	if sel.HeadingFromGeometry {
		return fmt.Errorf("%w: --heading and --heading-from-geometry both give the heading; give one", enrich.ErrUsage)
	}
	var err error
	x.heading, err = x.pick("heading", "--heading", sel.Heading, nil, true)
	return err
}

// Heading reads row i's heading from rec into in.Heading (NaN when no
// heading column is in use).
func (x *Extractor) Heading(rec []string, i int, in *enrich.Inputs) {
	if x.heading < 0 {
		in.Heading[i] = math.NaN()
		return
	}
	h, err := ParseHeading(rec[x.heading])
	if err != nil {
		in.Err[i] = &enrich.RowError{Column: x.names[x.heading], Err: err}
		return
	}
	in.Heading[i] = h
}
