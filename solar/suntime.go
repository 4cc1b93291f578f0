package solar

import "math"

// SunTime returns the double-anchored sun time of instant t, in hours in [0, 24): the equinoctial anchoring
// of Vazquez, Rowcliffe, Spoelstra & Jansen (2019, Methods in Ecology and Evolution), which maps sunrise to
// 6 and sunset to 18 whatever their clock times, so that events of different dates and places can be put on
// one sun-anchored clock.
//
//   - From rise to set (the day): 6 + 12·(t − rise)/(set − rise), so rise → 6 and set → 18.
//   - From set to nextRise (the night after the date's day): 18 + 12·(t − set)/(nextRise − set), reduced
//     mod 24, so it runs on from 18 through 24 = 0 to 6.
//   - From prevSet to rise (the night before it): 18 + 12·(t − prevSet)/(rise − prevSet), mod 24.
//
// rise and set are the date's sunrise and sunset ([Day].Rise and Set), prevSet the previous date's sunset
// and nextRise the next date's sunrise; all are Unix seconds, like t. Only the two anchors around t are
// used: prevSet only when t is before rise, nextRise only when t is after set.
//
// It returns NaN when t, rise or set is NaN (the date has no sunrise or no sunset: polar day or night, or
// the days around them), when the anchor needed for t is NaN, or when t lies outside [prevSet, nextRise].
// On a date whose sunset comes before its sunrise (a sunset just after midnight, near the polar circles),
// t between that set and that rise is in the night between them (the same night formula with set and rise
// as anchors), and any other t gives NaN, since that date has no day of its own from rise to set.
func SunTime(t, prevSet, rise, set, nextRise float64) float64 {
	switch {
	case math.IsNaN(t) || math.IsNaN(rise) || math.IsNaN(set):
		return math.NaN()
	case rise < set && t >= rise && t <= set:
		return 6 + 12*(t-rise)/(set-rise)
	case rise < set && t > set:
		return night(t, set, nextRise)
	case rise < set:
		return night(t, prevSet, rise)
	case set < rise && t >= set && t <= rise:
		return night(t, set, rise)
	}
	return math.NaN()
}

// night maps t in [set, rise] linearly onto 18 → 30 hours, reduced mod 24; NaN if t is outside it (or an
// anchor is NaN).
func night(t, set, rise float64) float64 {
	if !(set < rise && t >= set && t <= rise) {
		return math.NaN()
	}
	h := 18 + 12*(t-set)/(rise-set)
	if h >= 24 {
		h -= 24
	}
	return h
}
