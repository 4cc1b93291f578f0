package enrich

import (
	"math"
	"time"

	"github.com/heliotag/heliotag/moon"
	"github.com/heliotag/heliotag/solar"
)

// Results are the computed values of one chunk, indexed like its rows.
// Formats read them through Float, Word, Text and Instant, column by column.
type Results struct {
	Plan   *Plan
	Status []Status
	Err    []error // the row's problem when Status is not RowOK

	Altitude, Azimuth []float64
	Phase             []solar.Phase

	// Moon holds the Moon's altitude, azimuth, illumination and phase.
	Moon moon.Positions

	// RelAz (degrees) and Glare: the sun relative to the row's heading.
	RelAz []float64
	Glare []Glare

	// Day holds the events of the row's local date (events and relative groups).
	Day []solar.Day
	// FromRise, FromSet (minutes) and SunTime (hours); NaN when undefined.
	FromRise, FromSet, SunTime []float64

	// Zone is the row's date zone (from Inputs) for writing instants.
	Zone []*time.Location
	Note []string
}

func (r *Results) reset(n int) {
	r.Status = resize(r.Status, n)
	r.Err = resize(r.Err, n)
	r.Altitude = resize(r.Altitude, n)
	r.Azimuth = resize(r.Azimuth, n)
	r.Phase = resize(r.Phase, n)
	if r.Plan != nil && r.Plan.Has(GroupGlare) {
		r.RelAz = resize(r.RelAz, n)
		r.Glare = resize(r.Glare, n)
	}
	if r.Plan != nil && (r.Plan.Has(GroupEvents) || r.Plan.Has(GroupRelative)) {
		r.Day = resize(r.Day, n)
		r.FromRise = resize(r.FromRise, n)
		r.FromSet = resize(r.FromSet, n)
		r.SunTime = resize(r.SunTime, n)
	}
	r.Zone = resize(r.Zone, n)
	r.Note = resize(r.Note, n)
}

// Len is the number of rows.
func (r *Results) Len() int { return len(r.Status) }

// Float returns a KindFloat value of row i; ok is false when the cell is empty
// (the row was not computed, or the value does not exist for it).
func (r *Results) Float(f Field, i int) (v float64, ok bool) {
	if r.Status[i] != RowOK {
		return 0, false
	}
	switch f {
	case FieldAltitude:
		v = r.Altitude[i]
	case FieldAzimuth:
		v = r.Azimuth[i]
	case FieldRelativeAzimuth:
		v = r.RelAz[i]
	case FieldMoonAltitude:
		v = r.Moon.Altitude[i]
	case FieldMoonAzimuth:
		v = r.Moon.Azimuth[i]
	case FieldMoonIllumination:
		v = r.Moon.Illumination[i]
	case FieldDayLength:
		v = r.Day[i].DayLength
	case FieldNoonAltitude:
		v = r.Day[i].NoonAltitude
	case FieldMinutesFromRise:
		v = r.FromRise[i]
	case FieldMinutesFromSet:
		v = r.FromSet[i]
	case FieldSunTime:
		v = r.SunTime[i]
	default:
		return 0, false
	}
	if math.IsNaN(v) {
		return 0, false
	}
	return v, true
}

// Word returns a KindCategory value of row i, "" when empty.
func (r *Results) Word(f Field, i int) string {
	if r.Status[i] != RowOK {
		return ""
	}
	switch f {
	case FieldPhase:
		return r.Phase[i].String()
	case FieldCondition:
		return r.Phase[i].Condition().String()
	case FieldGlare:
		return r.Glare[i].String()
	case FieldMoonPhase:
		return r.Moon.Phase[i].String()
	}
	return ""
}

// Text returns a KindText value of row i, "" when empty.
func (r *Results) Text(f Field, i int) string {
	switch f {
	case FieldTimeNote:
		return r.Note[i]
	case FieldError:
		if r.Err[i] == nil {
			return ""
		}
		var re *RowError
		if asRowError(r.Err[i], &re) {
			return re.Reason()
		}
		return r.Err[i].Error()
	}
	return ""
}

// Instant returns a KindInstant value of row i in the row's date zone (UTC
// when the row has none); ok is false when empty.
func (r *Results) Instant(f Field, i int) (t time.Time, ok bool) {
	if r.Status[i] != RowOK || i >= len(r.Day) {
		return time.Time{}, false
	}
	d := &r.Day[i]
	var sec float64
	switch f {
	case FieldRise:
		sec = d.Rise
	case FieldSet:
		sec = d.Set
	case FieldNoon:
		sec = d.Noon
	case FieldCivilDawn:
		sec = d.CivilDawn
	case FieldCivilDusk:
		sec = d.CivilDusk
	case FieldNauticalDawn:
		sec = d.NauticalDawn
	case FieldNauticalDusk:
		sec = d.NauticalDusk
	case FieldAstronomicalDawn:
		sec = d.AstronomicalDawn
	case FieldAstronomicalDusk:
		sec = d.AstronomicalDusk
	default:
		return time.Time{}, false
	}
	return instant(sec, r.Zone[i])
}
