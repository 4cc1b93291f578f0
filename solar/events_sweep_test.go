package solar

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// sweepWindow draws a random place and day window: latitudes over the whole range with extra weight within
// 2° of the polar circles, where events come and go; instants mostly in 1900–2100 and some over the whole
// valid range; windows of the date at mean solar time (24 h), or at a zone-like offset from it (24 h, or
// 23 h and 25 h as on clock-change days).
func sweepWindow(rng *rand.Rand) (start, end, lat, lon float64, kind string) {
	lat = rng.Float64()*180 - 90
	if rng.IntN(10) == 0 {
		lat = math.Copysign(66.56+rng.Float64()*4-2, rng.Float64()-0.5)
	}
	lon = rng.Float64()*360 - 180
	lo, hi := yearUnix(1900), yearUnix(2100)
	if rng.IntN(20) == 0 {
		lo, hi = MinUnix+3*secondsPerDay, MaxUnix-3*secondsPerDay
	}
	t := lo + rng.Float64()*(hi-lo)
	switch r := rng.IntN(20); {
	case r < 10:
		start, end = meanSolarWindow(t, lon)
		return start, end, lat, lon, "mean solar"
	default:
		// A zone offset of whole hours, up to two hours away from the mean solar time.
		offset := math.Round(lon/15) + float64(rng.IntN(5)-2)
		start = math.Floor((t+offset*3600)/secondsPerDay)*secondsPerDay - offset*3600
		switch {
		case r < 14:
			return start, start + secondsPerDay, lat, lon, "zone 24 h"
		case r < 17:
			return start, start + 23*3600, lat, lon, "zone 23 h"
		}
		return start, start + 25*3600, lat, lon, "zone 25 h"
	}
}

// sweepSamples holds the geometric altitude (sea level) every sweepStep seconds over a window, and at its
// last millisecond.
type sweepSamples struct {
	t, alt []float64
}

const sweepStep = 120.0

func (s *sweepSamples) fill(k *Kernel, start, end, lat, lon float64, out *Positions, la, lo *[]float64) {
	s.t = s.t[:0]
	for t := start; t < end-1e-3; t += sweepStep {
		s.t = append(s.t, t)
	}
	s.t = append(s.t, end-1e-3)
	*la, *lo = (*la)[:0], (*lo)[:0]
	for range s.t {
		*la, *lo = append(*la, lat), append(*lo, lon)
	}
	k.Positions(s.t, *la, *lo, out)
	s.alt = append(s.alt[:0], out.Altitude...)
}

// firstCrossing returns the end of the first sampling interval in which the altitude crosses alt in the
// direction given (NaN if none), and whether a sample lies within 1e-5° of alt, where the batch path's
// altitudes (within 1e-6° of the reference) cannot decide.
func (s *sweepSamples) firstCrossing(alt float64, rising bool) (first float64, unsure bool) {
	for i := 0; i+1 < len(s.alt); i++ {
		a, b := s.alt[i], s.alt[i+1]
		if math.Abs(a-alt) < 1e-5 || math.Abs(b-alt) < 1e-5 {
			unsure = true
		}
		if rising && a < alt && b >= alt || !rising && a >= alt && b < alt {
			return s.t[i+1], unsure
		}
	}
	return math.NaN(), unsure
}

// aboveSeconds returns the time the sampled altitude spends above alt, interpolating linearly across the
// crossings, and whether it is above everywhere and below (or at) it everywhere.
func (s *sweepSamples) aboveSeconds(alt float64) (secs float64, allAbove, allBelow bool) {
	allAbove, allBelow = true, true
	for i, a := range s.alt {
		allAbove = allAbove && a > alt
		allBelow = allBelow && a <= alt
		if i+1 == len(s.alt) {
			break
		}
		b, dt := s.alt[i+1], s.t[i+1]-s.t[i]
		switch {
		case a > alt && b > alt:
			secs += dt
		case a > alt:
			secs += dt * (a - alt) / (a - b)
		case b > alt:
			secs += dt * (b - alt) / (b - a)
		}
	}
	return secs, allAbove, allBelow
}

// minima returns the instants of the sampled altitude's local minima inside the window.
func (s *sweepSamples) minima() []float64 {
	var m []float64
	for i := 1; i+1 < len(s.alt); i++ {
		if s.alt[i] < s.alt[i-1] && s.alt[i] <= s.alt[i+1] {
			m = append(m, s.t[i])
		}
	}
	return m
}

// sweepStats gathers the figures the sweep logs.
type sweepStats struct {
	events, absent, grazingOnly  int
	maxAltErr, maxHourAngle      float64
	maxDT, maxDTAlt, maxNoonAltD float64
	presenceDiffers              int
	kinds                        map[string]int
}

// checkDay checks one path's Day for a window against Position and the sampled altitudes.
func checkDay(t *testing.T, path, where string, d Day, start, end, lat, lon float64, s *sweepSamples,
	mins []float64, exactNoonAltitude bool, st *sweepStats) {
	t.Helper()
	fail := func(format string, args ...any) {
		t.Helper()
		t.Errorf("%s %s: %s", path, where, fmt.Sprintf(format, args...))
	}
	// Each event: inside the window, at its altitude (via Position, geometric, sea level), present if and
	// only if the sampled altitude crosses its threshold in its direction, and not after the first such
	// crossing.
	for _, e := range events {
		v := e.get(d)
		first, unsure := s.firstCrossing(e.alt, e.rising)
		if math.IsNaN(v) {
			st.absent++
			if !math.IsNaN(first) && !unsure {
				fail("%s absent, but the altitude crosses %v° before %s", e.name, e.alt, fmtInstant(first))
			}
			continue
		}
		st.events++
		if !(v >= start && v < end) {
			fail("%s %s outside the window", e.name, fmtInstant(v))
			continue
		}
		p, err := Position(v, lat, lon, Options{})
		if err != nil {
			t.Fatal(err)
		}
		st.maxAltErr = max(st.maxAltErr, math.Abs(p.GeometricAltitude-e.alt))
		if !(math.Abs(p.GeometricAltitude-e.alt) <= 0.001) {
			fail("%s at %s: geometric altitude %.6f°, want %v° ± 0.001°", e.name, fmtInstant(v), p.GeometricAltitude, e.alt)
		}
		switch {
		case math.IsNaN(first):
			// A crossing the sampling does not see: a grazing pair within one sampling step, or one in
			// the window's last millisecond.
			st.grazingOnly++
		case v > first && !unsure:
			fail("%s at %s is not the first: the altitude crosses %v° before %s", e.name, fmtInstant(v), e.alt, fmtInstant(first))
		}
	}

	// Noon: present if and only if the hour angle passes 0° in the window; the first such instant; the
	// altitude there as Position gives it under the options.
	ps, _ := Position(start, lat, lon, Options{})
	pe, _ := Position(end-1e-3, lat, lon, Options{})
	adv := 360 * (end - start) / secondsPerDay // the hour angle advances by 360° ± 0.5° a day
	hEnd := ps.HourAngle + adv + wrap180(pe.HourAngle-ps.HourAngle-adv)
	transits := math.Ceil(hEnd/360) - math.Ceil(ps.HourAngle/360)
	if math.IsNaN(d.Noon) != (transits == 0) {
		fail("noon %s, but %v transits in the window", fmtInstant(d.Noon), transits)
	}
	if !math.IsNaN(d.Noon) {
		pn, _ := Position(d.Noon, lat, lon, Options{})
		st.maxHourAngle = max(st.maxHourAngle, math.Abs(pn.HourAngle))
		if !(math.Abs(pn.HourAngle) < 1e-3) {
			fail("noon %s: hour angle %.6f°", fmtInstant(d.Noon), pn.HourAngle)
		}
		if first := start + (360*math.Ceil(ps.HourAngle/360)-ps.HourAngle)*240; !(math.Abs(d.Noon-first) < 120) {
			fail("noon %s is not the first transit (about %s)", fmtInstant(d.Noon), fmtInstant(first))
		}
		if !(d.Noon >= start && d.Noon < end) {
			fail("noon %s outside the window", fmtInstant(d.Noon))
		}
		tol := 0.0005
		if exactNoonAltitude {
			tol = 0
		}
		if !(math.Abs(d.NoonAltitude-pn.Altitude) <= tol) {
			fail("noon altitude %v, Position %v", d.NoonAltitude, pn.Altitude)
		}
	} else if !math.IsNaN(d.NoonAltitude) {
		fail("noon altitude %v without a noon", d.NoonAltitude)
	}

	// Day length.
	secs, allAbove, allBelow := s.aboveSeconds(SunriseAltitude)
	switch {
	case d.Rise < d.Set:
		if d.DayLength != (d.Set-d.Rise)/60 {
			fail("day length %v, set − rise = %v min", d.DayLength, (d.Set-d.Rise)/60)
		}
	case math.IsNaN(d.Rise) && math.IsNaN(d.Set) && (allAbove || allBelow):
		if want := map[bool]float64{true: 1440, false: 0}[allAbove]; d.DayLength != want {
			fail("day length %v with the sun always above (%v) or below: want %v", d.DayLength, allAbove, want)
		}
	default:
		if !(math.Abs(d.DayLength*60-secs) <= 60) {
			fail("day length %.3f min (rise %s, set %s), sampled time above %.3f min", d.DayLength,
				fmtInstant(d.Rise), fmtInstant(d.Set), secs/60)
		}
	}

	// Order within one rise and fall of the altitude (between two of its minima): dawns, rise, noon, set,
	// dusks. Events within two sampling steps of a sampled minimum are left out.
	order := []float64{d.AstronomicalDawn, d.NauticalDawn, d.CivilDawn, d.Rise, d.Noon, d.Set, d.CivilDusk,
		d.NauticalDusk, d.AstronomicalDusk}
	piece := func(v float64) int {
		n := 0
		for _, m := range mins {
			if math.Abs(v-m) < 2*sweepStep {
				return -1
			}
			if m < v {
				n++
			}
		}
		return n
	}
	for i, a := range order {
		for j := i + 1; j < len(order); j++ {
			b := order[j]
			if math.IsNaN(a) || math.IsNaN(b) || piece(a) < 0 || piece(a) != piece(b) {
				continue
			}
			if !(a < b) {
				fail("events out of order: #%d at %s, #%d at %s (0 = astronomical dawn … 4 = noon … 8 = "+
					"astronomical dusk)", i, fmtInstant(a), j, fmtInstant(b))
			}
		}
	}
}

// TestEventsSweep runs 10,000 seeded random places and day windows through the reference path (Events)
// and the batch path (Kernel.Day, one kernel for all, as a pipeline worker uses it), checks each against
// Position and against the geometric altitude sampled every two minutes (see checkDay), and compares the
// two paths.
func TestEventsSweep(t *testing.T) {
	n := 10000
	if testing.Short() {
		n = 1000
	}
	rng := rand.New(rand.NewPCG(4, 2019))
	fast := NewKernel(Options{})
	sampler := NewKernel(Options{NoRefraction: true})
	var s sweepSamples
	var out, rate Positions
	var la, lo []float64
	st := sweepStats{kinds: map[string]int{}}
	var dts []float64
	for i := range n {
		start, end, lat, lon, kind := sweepWindow(rng)
		st.kinds[kind]++
		where := fmt.Sprintf("#%d (%s window [%s, %s), lat %v, lon %v)", i, kind, fmtInstant(start), fmtInstant(end), lat, lon)
		ref, err := Events(start, end, lat, lon, Options{})
		if err != nil {
			t.Fatalf("%s: %v", where, err)
		}
		d := fast.Day(start, end, lat, lon)
		s.fill(sampler, start, end, lat, lon, &out, &la, &lo)
		mins := s.minima()
		checkDay(t, "Events", where, ref, start, end, lat, lon, &s, mins, true, &st)
		checkDay(t, "Kernel.Day", where, d, start, end, lat, lon, &s, mins, false, &st)

		// The two paths agree.
		for _, e := range append(slices.Clone(events), eventByName("noon")) {
			a, b := e.get(ref), e.get(d)
			if math.IsNaN(a) != math.IsNaN(b) {
				st.presenceDiffers++
				t.Errorf("%s: %s: Events %s, Kernel.Day %s", where, e.name, fmtInstant(a), fmtInstant(b))
				continue
			}
			if math.IsNaN(a) {
				continue
			}
			dt := math.Abs(a - b)
			dts = append(dts, dt)
			st.maxDT = max(st.maxDT, dt)
			if e.name != "noon" { // the altitude difference that the time difference amounts to
				sampler.Positions([]float64{a, a + 1}, []float64{lat, lat}, []float64{lon, lon}, &rate)
				st.maxDTAlt = max(st.maxDTAlt, dt*math.Abs(rate.Altitude[1]-rate.Altitude[0]))
			}
			if !(dt <= 1) {
				t.Errorf("%s: %s: Events %s, Kernel.Day %s, %.3f s apart", where, e.name, fmtInstant(a), fmtInstant(b), dt)
			}
		}
		if !math.IsNaN(ref.Noon) {
			st.maxNoonAltD = max(st.maxNoonAltD, math.Abs(ref.NoonAltitude-d.NoonAltitude))
		}
		if !(math.Abs(ref.DayLength-d.DayLength) <= 1.0/60) {
			t.Errorf("%s: day length: Events %v, Kernel.Day %v", where, ref.DayLength, d.DayLength)
		}
	}
	slices.Sort(dts)
	t.Logf("%d windows %v: %d events present, %d absent (both paths); %d present events the 2-minute sampling "+
		"does not see", n, st.kinds, st.events, st.absent, st.grazingOnly)
	t.Logf("largest |geometric altitude − threshold| at an event %.2g°; |hour angle| at noon %.2g°", st.maxAltErr, st.maxHourAngle)
	t.Logf("Kernel.Day vs Events: %d presence differences; |Δt| median %.2g s, 99.9%% %.2g s, max %.2g s "+
		"(max |Δt|·altitude rate %.2g°); noon altitude max |Δ| %.2g°", st.presenceDiffers, dts[len(dts)/2],
		dts[len(dts)*999/1000], st.maxDT, st.maxDTAlt, st.maxNoonAltD)
}

// FuzzEvents checks any place and window on both paths: they reject the same inputs (Events with an error,
// Kernel.Day with NaN everywhere); otherwise every event lies in the window, and the two paths agree on
// each event's presence and within 1 s on its time, except for grazing crossings, where the altitude moves
// by less than 1e-5° a second, so that the batch path's 1e-6° can decide whether the sun touches the
// threshold. Run with go test -fuzz FuzzEvents; the seeds run with the tests.
func FuzzEvents(f *testing.F) {
	f.Add(unixOf(2003, 10, 17, 7, 0, 0, 0), 24.0, 39.742476, -105.1786)
	f.Add(unixOf(2024, 6, 21, 0, 0, 0, 0), 24.0, 70.0, 19.0)
	f.Add(unixOf(2024, 12, 21, 0, 0, 0, 0), 24.0, -80.0, -60.0)
	f.Add(unixOf(2024, 3, 20, 0, 0, 0, 0), 24.0, 90.0, 0.0)
	f.Add(unixOf(2024, 9, 22, 0, 0, 0, 0), 25.0, -90.0, 180.0)
	f.Add(unixOf(2024, 5, 25, 22, 0, 0, 0), 23.0, 66.3, 25.0)
	f.Add(unixOf(2024, 7, 20, 22, 0, 0, 0), 48.0, 67.0, -150.0)
	f.Add(unixOf(1600, 1, 1, 0, 0, 0, 0), 24.0, 0.0, -180.0)
	f.Add(MinUnix, 24.0, 45.0, 45.0)
	f.Add(MaxUnix-86400, 24.0, -45.0, 45.0)
	f.Add(0.0, -1.0, 0.0, 0.0)
	f.Add(math.NaN(), 24.0, 0.0, 0.0)
	f.Add(0.0, 24.0, 91.0, 0.0)
	f.Fuzz(func(t *testing.T, start, hours, lat, lon float64) {
		end := start + hours*3600
		ref, err := Events(start, end, lat, lon, Options{})
		fast := NewKernel(Options{}).Day(start, end, lat, lon)
		if err != nil {
			if !allNaN(fast) || !allNaN(ref) {
				t.Fatalf("invalid input (%v): Events %+v, Kernel.Day %+v", err, ref, fast)
			}
			return
		}
		grazing := func(v float64) bool {
			p1, _ := Position(v-1, lat, lon, Options{})
			p2, _ := Position(min(v+1, MaxUnix-1e-3), lat, lon, Options{})
			return math.Abs(p2.GeometricAltitude-p1.GeometricAltitude) < 2e-5
		}
		for _, e := range append(slices.Clone(events), eventByName("noon")) {
			a, b := e.get(ref), e.get(fast)
			for _, v := range []float64{a, b} {
				if !math.IsNaN(v) && !(v >= start && v < end) {
					t.Fatalf("%s %s outside the window [%s, %s)", e.name, fmtInstant(v), fmtInstant(start), fmtInstant(end))
				}
			}
			switch {
			case math.IsNaN(a) && math.IsNaN(b):
			case math.IsNaN(a) != math.IsNaN(b):
				v := a // the one present
				if math.IsNaN(v) {
					v = b
				}
				if e.name == "noon" || !grazing(v) {
					t.Fatalf("%s: Events %s, Kernel.Day %s", e.name, fmtInstant(a), fmtInstant(b))
				}
			case !(math.Abs(a-b) <= 1) && (e.name == "noon" || !grazing(a)):
				t.Fatalf("%s: Events %s, Kernel.Day %s", e.name, fmtInstant(a), fmtInstant(b))
			}
		}
	})
}
