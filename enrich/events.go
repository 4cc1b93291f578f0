package enrich

import (
	"math"
	"time"

	"github.com/heliotag/heliotag/moon"
	"github.com/heliotag/heliotag/solar"
)

// worker is the computing state one goroutine uses for a batch: the solar
// kernel (with its own caches of geocentric quantities and days) and a cache
// of local-date windows.
type worker struct {
	kernel  *solar.Kernel
	moon    *moon.Kernel // built on first use
	opts    solar.Options
	windows map[windowKey]window
}

// newWorker returns a worker whose kernel shares grid's geocentric values
// with the other workers' kernels.
func newWorker(o solar.Options, grid *solar.Grid) *worker {
	return &worker{kernel: grid.NewKernel(), opts: o, windows: make(map[windowKey]window)}
}

// moonKernel returns the worker's Moon kernel, building it on first use.
func (w *worker) moonKernel() *moon.Kernel {
	if w.moon == nil {
		w.moon = moon.NewKernel(w.opts)
	}
	return w.moon
}

// windowKey names a local calendar date in a zone.
type windowKey struct {
	zone *time.Location
	day  int64 // days since 1970-01-01 of the local civil date
}

// window is a local date as Unix seconds: [start, end).
type window struct{ start, end float64 }

const maxWindows = 1 << 16

// window returns the local calendar date that contains t in zone, shifted
// by shift days (−1 the day before, +1 the day after). With a nil zone the
// date is that of the location's mean solar time (UTC + lon/15 h), whose
// days are exactly 86,400 s long.
func (w *worker) window(t time.Time, zone *time.Location, lon float64, shift int) window {
	if zone == nil {
		off := lon * 240 // seconds of mean solar time east of Greenwich
		local := float64(t.Unix()) + off
		day := math.Floor(local/86400) + float64(shift)
		start := day*86400 - off
		return window{start, start + 86400}
	}
	y, m, d := t.In(zone).Date()
	key := windowKey{zone, civilDay(y, m, d) + int64(shift)}
	if win, ok := w.windows[key]; ok {
		return win
	}
	if len(w.windows) >= maxWindows {
		clear(w.windows)
	}
	start := time.Date(y, m, d+shift, 0, 0, 0, 0, zone)
	end := time.Date(y, m, d+shift+1, 0, 0, 0, 0, zone)
	win := window{float64(start.Unix()), float64(end.Unix())}
	w.windows[key] = win
	return win
}

// civilDay is the number of days from 1970-01-01 to y-m-d (proleptic
// Gregorian), for any year.
func civilDay(y int, m time.Month, d int) int64 {
	// Howard Hinnant's days_from_civil (public domain algorithm).
	yy := int64(y)
	if m <= 2 {
		yy--
	}
	era := yy / 400
	if yy < 0 && yy%400 != 0 {
		era--
	}
	yoe := yy - era*400
	mp := (int64(m) + 9) % 12
	doy := (153*mp+2)/5 + int64(d) - 1
	doe := yoe*365 + yoe/4 - yoe/100 + doy
	return era*146097 + doe - 719468
}

// days computes the events and relative columns of every computable row.
func (w *worker) days(in *Inputs, unix []float64, res *Results) {
	relative := res.Plan.Has(GroupRelative)
	for i := range unix {
		if res.Status[i] != RowOK {
			continue
		}
		lat, lon, t := in.Lat[i], in.Lon[i], unix[i]
		win := w.window(in.Time[i], in.Zone[i], lon, 0)
		d := w.kernel.Day(win.start, win.end, lat, lon)
		res.Day[i] = d
		if !relative {
			continue
		}
		res.FromRise[i] = (t - d.Rise) / 60 // NaN when there is no sunrise
		res.FromSet[i] = (t - d.Set) / 60
		res.SunTime[i] = math.NaN()
		if math.IsNaN(d.Rise) || math.IsNaN(d.Set) {
			continue
		}
		prevSet, nextRise := math.NaN(), math.NaN()
		if t < d.Rise {
			p := w.window(in.Time[i], in.Zone[i], lon, -1)
			prevSet = w.kernel.Day(p.start, p.end, lat, lon).Set
		}
		if t > d.Set {
			n := w.window(in.Time[i], in.Zone[i], lon, +1)
			nextRise = w.kernel.Day(n.start, n.end, lat, lon).Rise
		}
		res.SunTime[i] = solar.SunTime(t, prevSet, d.Rise, d.Set, nextRise)
	}
}

// instant turns event Unix seconds into a time in the row's date zone (UTC
// when the row has none), rounded to the second; ok is false for NaN.
func instant(sec float64, zone *time.Location) (time.Time, bool) {
	if math.IsNaN(sec) {
		return time.Time{}, false
	}
	t := time.Unix(int64(math.Round(sec)), 0)
	if zone == nil {
		return t.UTC(), true
	}
	return t.In(zone), true
}
