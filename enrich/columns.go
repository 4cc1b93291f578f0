package enrich

import (
	"fmt"
	"slices"
	"strings"
)

// Group names a set of added columns chosen with --add.
type Group string

// The column groups of the product contract.
const (
	GroupPosition Group = "position"
	GroupPhase    Group = "phase"
	GroupEvents   Group = "events"
	GroupRelative Group = "relative"
	GroupMoon     Group = "moon"
	GroupGlare    Group = "glare"
)

// DefaultGroups is what --add means when it is not given.
const DefaultGroups = "position,phase"

// Field identifies one computed value of a row.
type Field uint8

// The computed fields, one per added column.
const (
	FieldAltitude Field = iota + 1
	FieldAzimuth
	FieldPhase
	FieldCondition
	FieldRise
	FieldSet
	FieldNoon
	FieldCivilDawn
	FieldCivilDusk
	FieldNauticalDawn
	FieldNauticalDusk
	FieldAstronomicalDawn
	FieldAstronomicalDusk
	FieldDayLength
	FieldNoonAltitude
	FieldMinutesFromRise
	FieldMinutesFromSet
	FieldSunTime
	FieldMoonAltitude
	FieldMoonAzimuth
	FieldMoonIllumination
	FieldMoonPhase
	FieldRelativeAzimuth
	FieldGlare
	FieldTimeNote
	FieldError
)

// Kind says how a column's values are typed in the output.
type Kind uint8

// Column value kinds.
const (
	// KindFloat is a float64; text formats print Decimals digits after the point.
	KindFloat Kind = iota + 1
	// KindCategory is one of a few fixed words (dictionary-encoded in Parquet).
	KindCategory
	// KindText is free text, empty (null in Parquet) when there is nothing to say.
	KindText
	// KindInstant is a point in time: in text formats RFC 3339 in the row's
	// date zone, in Parquet a UTC timestamp in microseconds.
	KindInstant
)

// Column describes one added output column.
type Column struct {
	Name        string // output name, prefix included
	Field       Field
	Kind        Kind
	Decimals    int    // for KindFloat in text formats
	Unit        string // "deg", "min", "h", "1", or "" for words and text
	Description string
}

type columnDef struct {
	base        string
	group       Group
	field       Field
	kind        Kind
	decimals    int
	unit        string
	description string
}

// columnDefs lists every column in output order.
var columnDefs = []columnDef{
	{"sun_altitude_deg", GroupPosition, FieldAltitude, KindFloat, 4, "deg", "topocentric altitude of the sun's centre, refraction applied unless disabled"},
	{"sun_azimuth_deg", GroupPosition, FieldAzimuth, KindFloat, 4, "deg", "azimuth of the sun clockwise from true north, [0, 360)"},
	{"sun_phase", GroupPhase, FieldPhase, KindCategory, 0, "", "day, civil/nautical/astronomical twilight (morning or evening), or night"},
	{"sun_light_condition", GroupPhase, FieldCondition, KindCategory, 0, "", "natural light: daylight, dawn, dusk or dark"},
	{"sun_rise", GroupEvents, FieldRise, KindInstant, 0, "", "sunrise on the row's local date (centre at -0.833 deg)"},
	{"sun_set", GroupEvents, FieldSet, KindInstant, 0, "", "sunset on the row's local date (centre at -0.833 deg)"},
	{"sun_noon", GroupEvents, FieldNoon, KindInstant, 0, "", "solar noon (transit) on the row's local date"},
	{"sun_civil_dawn", GroupEvents, FieldCivilDawn, KindInstant, 0, "", "start of morning civil twilight (-6 deg)"},
	{"sun_civil_dusk", GroupEvents, FieldCivilDusk, KindInstant, 0, "", "end of evening civil twilight (-6 deg)"},
	{"sun_nautical_dawn", GroupEvents, FieldNauticalDawn, KindInstant, 0, "", "start of morning nautical twilight (-12 deg)"},
	{"sun_nautical_dusk", GroupEvents, FieldNauticalDusk, KindInstant, 0, "", "end of evening nautical twilight (-12 deg)"},
	{"sun_astronomical_dawn", GroupEvents, FieldAstronomicalDawn, KindInstant, 0, "", "start of morning astronomical twilight (-18 deg)"},
	{"sun_astronomical_dusk", GroupEvents, FieldAstronomicalDusk, KindInstant, 0, "", "end of evening astronomical twilight (-18 deg)"},
	{"sun_day_length_min", GroupEvents, FieldDayLength, KindFloat, 2, "min", "sunrise to sunset; 0 in polar night, 1440 in polar day"},
	{"sun_noon_altitude_deg", GroupEvents, FieldNoonAltitude, KindFloat, 4, "deg", "altitude of the sun at solar noon"},
	{"sun_minutes_from_rise", GroupRelative, FieldMinutesFromRise, KindFloat, 2, "min", "minutes from the date's sunrise (negative before)"},
	{"sun_minutes_from_set", GroupRelative, FieldMinutesFromSet, KindFloat, 2, "min", "minutes from the date's sunset (negative before)"},
	{"sun_time_h", GroupRelative, FieldSunTime, KindFloat, 4, "h", "double-anchored sun time: sunrise 6, sunset 18"},
	{"moon_altitude_deg", GroupMoon, FieldMoonAltitude, KindFloat, 4, "deg", "topocentric apparent altitude of the Moon's centre"},
	{"moon_azimuth_deg", GroupMoon, FieldMoonAzimuth, KindFloat, 4, "deg", "azimuth of the Moon clockwise from true north"},
	{"moon_illumination", GroupMoon, FieldMoonIllumination, KindFloat, 4, "1", "illuminated fraction of the Moon's disk, 0 to 1"},
	{"moon_phase", GroupMoon, FieldMoonPhase, KindCategory, 0, "", "new, waxing_crescent, first_quarter, waxing_gibbous, full, waning_gibbous, last_quarter, waning_crescent"},
	{"sun_relative_azimuth_deg", GroupGlare, FieldRelativeAzimuth, KindFloat, 4, "deg", "sun azimuth minus heading, (-180, 180]"},
	{"sun_glare", GroupGlare, FieldGlare, KindCategory, 0, "", "ahead, behind or none"},
	{"sun_time_note", "", FieldTimeNote, KindText, 0, "", "empty, or a note on how the row's time was read"},
	{"sun_error", "", FieldError, KindText, 0, "", "empty, or why the row could not be computed"},
}

// Groups that this build can compute. A group in the contract but not here is
// refused with a message that says so.
var supportedGroups = []Group{GroupPosition, GroupPhase, GroupEvents, GroupRelative, GroupMoon, GroupGlare}

// PlanOptions selects the added columns.
type PlanOptions struct {
	// Add is the comma-separated list of groups, or "all"; "" means DefaultGroups.
	Add string
	// Prefix goes in front of every added column name.
	Prefix string
	// TimeNote adds sun_time_note (needed when local times may be ambiguous).
	TimeNote bool
	// ErrorColumn adds sun_error (the keep policy).
	ErrorColumn bool
	// Input is the input's column names; an added name that already exists is an error.
	Input []string
	// Heading says a heading is given (--heading or --heading-from-geometry),
	// which the glare group needs; "all" includes glare only then.
	Heading bool
}

// Plan is the ordered list of added columns. The plan for --add none has no
// columns at all: rows are copied unchanged (a passthrough, which measures
// what reading and writing alone cost).
type Plan struct {
	Columns []Column
	groups  []Group
}

// Has reports whether group g is computed.
func (p *Plan) Has(g Group) bool { return slices.Contains(p.groups, g) }

// HasField reports whether field f is among the added columns.
func (p *Plan) HasField(f Field) bool {
	for _, c := range p.Columns {
		if c.Field == f {
			return true
		}
	}
	return false
}

// Names returns the added column names in order.
func (p *Plan) Names() []string {
	names := make([]string, len(p.Columns))
	for i, c := range p.Columns {
		names[i] = c.Name
	}
	return names
}

// NewPlan resolves the groups and names of the added columns.
func NewPlan(o PlanOptions) (*Plan, error) {
	add := strings.TrimSpace(o.Add)
	if add == "" {
		add = DefaultGroups
	}
	var groups []Group
	if add == "none" {
		return &Plan{}, nil
	}
	if add == "all" {
		for _, g := range supportedGroups {
			if g != GroupGlare || o.Heading {
				groups = append(groups, g)
			}
		}
	} else {
		for _, part := range strings.Split(add, ",") {
			g := Group(strings.ToLower(strings.TrimSpace(part)))
			if g == "" {
				continue
			}
			known := false
			for _, d := range columnDefs {
				if d.group == g {
					known = true
					break
				}
			}
			if !known {
				return nil, fmt.Errorf("%w: unknown column group %q; valid groups: position, phase, events, relative, moon, glare, or all", ErrUsage, g)
			}
			if !slices.Contains(supportedGroups, g) {
				return nil, fmt.Errorf("%w: column group %q is not available in this version; available: %s", ErrUsage, g, joinGroups(supportedGroups))
			}
			if g == GroupGlare && !o.Heading {
				return nil, fmt.Errorf("%w: the glare group needs the direction of travel or view: --heading COL (degrees or N, NE, ..., NB, SB, EB, WB) or --heading-from-geometry", ErrUsage)
			}
			if !slices.Contains(groups, g) {
				groups = append(groups, g)
			}
		}
	}
	if len(groups) == 0 {
		return nil, fmt.Errorf("%w: --add names no column group; valid groups: %s, or all", ErrUsage, joinGroups(supportedGroups))
	}
	p := &Plan{groups: groups}
	for _, d := range columnDefs {
		switch {
		case d.field == FieldTimeNote && !o.TimeNote,
			d.field == FieldError && !o.ErrorColumn,
			d.group != "" && !slices.Contains(groups, d.group):
			continue
		}
		name := o.Prefix + d.base
		if slices.ContainsFunc(o.Input, func(s string) bool { return s == name }) {
			return nil, fmt.Errorf("%w: the input already has a column %q; choose a prefix for the added columns with --prefix", ErrUsage, name)
		}
		p.Columns = append(p.Columns, Column{
			Name: name, Field: d.field, Kind: d.kind, Decimals: d.decimals,
			Unit: d.unit, Description: d.description,
		})
	}
	return p, nil
}

func joinGroups(gs []Group) string {
	s := make([]string, len(gs))
	for i, g := range gs {
		s[i] = string(g)
	}
	return strings.Join(s, ", ")
}
