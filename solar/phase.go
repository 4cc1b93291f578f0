package solar

// Altitude thresholds of the light phases: geometric (unrefracted) altitude of the sun's centre, degrees,
// as defined by the US Naval Observatory ("Rise, Set, and Twilight Definitions"; Astronomical Almanac).
const (
	// SunriseAltitude is the altitude of the sun's centre at sunrise and sunset, −0°50′ (about −0.833°):
	// the upper limb on the horizon with 34′ of average refraction and a 16′ semi-diameter (USNO). Above it
	// is day.
	SunriseAltitude = -50.0 / 60
	// CivilTwilightAltitude is where civil twilight ends and nautical twilight begins: the centre at −6° (USNO).
	CivilTwilightAltitude = -6.0
	// NauticalTwilightAltitude is where nautical twilight ends and astronomical twilight begins: −12° (USNO).
	NauticalTwilightAltitude = -12.0
	// AstronomicalTwilightAltitude is where astronomical twilight ends and night begins: −18° (USNO).
	AstronomicalTwilightAltitude = -18.0
)

// Phase is the light phase of the sun: day, one of the twilights (morning or evening), or night. The values
// are consecutive from PhaseUnknown (0) to Night, so a Phase can index an array of NumPhases counters.
type Phase uint8

// The light phases. Boundaries belong to the darker phase: an altitude of exactly −6° is civil twilight,
// exactly −18° astronomical twilight.
const (
	PhaseUnknown        Phase = iota // not computed (invalid input)
	Daytime                          // geometric altitude above SunriseAltitude (the phase "day")
	MorningCivil                     // SunriseAltitude down to CivilTwilightAltitude, before the meridian
	EveningCivil                     // SunriseAltitude down to CivilTwilightAltitude, after the meridian
	MorningNautical                  // below CivilTwilightAltitude down to NauticalTwilightAltitude, morning
	EveningNautical                  // below CivilTwilightAltitude down to NauticalTwilightAltitude, evening
	MorningAstronomical              // below NauticalTwilightAltitude down to AstronomicalTwilightAltitude, morning
	EveningAstronomical              // below NauticalTwilightAltitude down to AstronomicalTwilightAltitude, evening
	Night                            // below AstronomicalTwilightAltitude
)

// NumPhases is the number of Phase values, PhaseUnknown included.
const NumPhases = int(Night) + 1

var phaseNames = [NumPhases]string{"", "day", "morning_civil", "evening_civil", "morning_nautical",
	"evening_nautical", "morning_astronomical", "evening_astronomical", "night"}

// String returns the phase's word in heliotag's output: day, morning_civil, evening_civil, morning_nautical,
// evening_nautical, morning_astronomical, evening_astronomical, night; "" for PhaseUnknown or an unknown value.
func (p Phase) String() string {
	if int(p) < len(phaseNames) {
		return phaseNames[p]
	}
	return ""
}

// phaseByLevel maps (depth level 0…4, evening 0/1) to the phase; level counts the thresholds at or above the
// altitude (SunriseAltitude inclusive, the twilight limits exclusive).
var phaseByLevel = [5][2]Phase{
	{Daytime, Daytime},
	{MorningCivil, EveningCivil},
	{MorningNautical, EveningNautical},
	{MorningAstronomical, EveningAstronomical},
	{Night, Night},
}

// PhaseOf returns the light phase for a geometric (unrefracted) altitude of the sun's centre and its local
// hour angle, both in degrees: twilight is morning when the hour angle, reduced to (-180, 180], is negative
// (the sun before the meridian), evening otherwise. Pass Pos.GeometricAltitude and Pos.HourAngle. A NaN
// altitude gives PhaseUnknown.
func PhaseOf(geometricAltitude, hourAngle float64) Phase {
	a := geometricAltitude
	if a != a {
		return PhaseUnknown
	}
	level := 0
	if a <= SunriseAltitude {
		level++
	}
	if a < CivilTwilightAltitude {
		level++
	}
	if a < NauticalTwilightAltitude {
		level++
	}
	if a < AstronomicalTwilightAltitude {
		level++
	}
	evening := 1
	if h := wrap180(hourAngle); h < 0 {
		evening = 0
	}
	return phaseByLevel[level][evening]
}

// Condition is the light condition of crash reporting, natural light only: daylight, dawn, dusk or dark.
type Condition uint8

// The light conditions.
const (
	ConditionUnknown Condition = iota // not computed
	Daylight                          // the Daytime phase
	Dawn                              // morning civil twilight
	Dusk                              // evening civil twilight
	Dark                              // nautical or astronomical twilight, or night
)

var conditionNames = [...]string{"", "daylight", "dawn", "dusk", "dark"}

// String returns daylight, dawn, dusk or dark; "" for ConditionUnknown or an unknown value.
func (c Condition) String() string {
	if int(c) < len(conditionNames) {
		return conditionNames[c]
	}
	return ""
}

var conditionOfPhase = [NumPhases]Condition{ConditionUnknown, Daylight, Dawn, Dusk, Dark, Dark, Dark, Dark, Dark}

// Condition returns the light condition of a phase: Daytime is Daylight, civil twilight is Dawn (morning) or Dusk
// (evening), deeper twilight and night are Dark, PhaseUnknown is ConditionUnknown.
func (p Phase) Condition() Condition {
	if int(p) < len(conditionOfPhase) {
		return conditionOfPhase[p]
	}
	return ConditionUnknown
}
