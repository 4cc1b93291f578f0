package moon

import "math"

// Phase is the Moon's phase word, from the elongation of the Moon from the Sun in ecliptic longitude (see
// [PhaseOf]). The values are consecutive from PhaseUnknown (0) to WaningCrescent, so a Phase can index an
// array of NumPhases counters.
type Phase uint8

// The Moon's phases, in the order of the lunar month.
const (
	PhaseUnknown   Phase = iota // not computed (invalid input)
	New                         // elongation within QuarterWindow of 0°
	WaxingCrescent              // between new and first quarter
	FirstQuarter                // within QuarterWindow of 90°
	WaxingGibbous               // between first quarter and full
	Full                        // within QuarterWindow of 180°
	WaningGibbous               // between full and last quarter
	LastQuarter                 // within QuarterWindow of 270°
	WaningCrescent              // between last quarter and new
)

// NumPhases is the number of Phase values, PhaseUnknown included.
const NumPhases = int(WaningCrescent) + 1

// QuarterWindow is the half-width, degrees of elongation in longitude, of the windows around 0°, 90°, 180°
// and 270° that [PhaseOf] calls new, first quarter, full and last quarter. The Moon gains about 12.2° of
// elongation a day, so each window lasts about 23.6 hours (±11.8 hours around the instant of the principal
// phase) and each crescent or gibbous stretch between them about 5.4 days.
const QuarterWindow = 6.0

var phaseNames = [NumPhases]string{"", "new", "waxing_crescent", "first_quarter", "waxing_gibbous", "full",
	"waning_gibbous", "last_quarter", "waning_crescent"}

// String returns the phase's word in heliotag's output: new, waxing_crescent, first_quarter,
// waxing_gibbous, full, waning_gibbous, last_quarter, waning_crescent; "" for PhaseUnknown or an unknown
// value.
func (p Phase) String() string {
	if int(p) < len(phaseNames) {
		return phaseNames[p]
	}
	return ""
}

// PhaseOf returns the phase for an elongation of the Moon from the Sun in ecliptic longitude, degrees (the
// Moon's apparent longitude minus the Sun's, any value; it is reduced to [0, 360)): New, FirstQuarter, Full or
// LastQuarter when it lies within [QuarterWindow] (6.0°) of 0°, 90°, 180° or 270°, the boundaries included;
// WaxingCrescent, WaxingGibbous, WaningGibbous or WaningCrescent between them. It returns PhaseUnknown for NaN
// or an infinite elongation.
func PhaseOf(elongation float64) Phase {
	if math.IsNaN(elongation) || math.IsInf(elongation, 0) {
		return PhaseUnknown
	}
	return phaseOf(wrap360(elongation))
}

// phaseOf is PhaseOf for an elongation e in [0, 360).
func phaseOf(e float64) Phase {
	n := math.Floor(e*(1.0/90) + 0.5) // nearest quarter, 0…4 (4 is new again)
	if math.Abs(e-90*n) <= QuarterWindow {
		return Phase(1 + 2*(int(n)&3))
	}
	return Phase(2 + 2*int(e*(1.0/90)))
}
