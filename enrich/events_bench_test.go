package enrich

import (
	"fmt"
	"math/rand/v2"
	"slices"
	"testing"
	"time"

	"github.com/heliotag/heliotag/internal/benchclock"
	"github.com/heliotag/heliotag/solar"
)

// eventRows is a stream of rows for the events and relative groups, cut
// into batches of the pipeline's default size.
type eventRows struct {
	batches []eventBatch
}

type eventBatch struct {
	in   Inputs
	unix []float64
}

func newEventRows(lat, lon []float64, t []time.Time, zone []*time.Location) eventRows {
	var r eventRows
	for lo := 0; lo < len(t); lo += DefaultBatchRows {
		hi := min(lo+DefaultBatchRows, len(t))
		var b eventBatch
		b.in.Reset(hi - lo)
		copy(b.in.Lat, lat[lo:hi])
		copy(b.in.Lon, lon[lo:hi])
		copy(b.in.Time, t[lo:hi])
		copy(b.in.Zone, zone[lo:hi])
		b.unix = make([]float64, hi-lo)
		for i, ti := range b.in.Time {
			b.unix[i] = float64(ti.Unix())
		}
		r.batches = append(r.batches, b)
	}
	return r
}

// crashEventRows: every row its own place (39–43° N, 85–91° W) at a random
// minute of the ten years 2014–2023, dated in America/Chicago (--tz), as
// benchmarks/gen's crash shape.
func crashEventRows(b *testing.B, n int) eventRows {
	chicago, err := time.LoadLocation("America/Chicago")
	if err != nil {
		b.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(7, 1))
	lat, lon := make([]float64, n), make([]float64, n)
	ts, zone := make([]time.Time, n), make([]*time.Location, n)
	lo := time.Date(2014, 1, 1, 0, 0, 0, 0, time.UTC).Unix()
	for i := range n {
		lat[i], lon[i] = 39+rng.Float64()*4, -91+rng.Float64()*6
		ts[i] = time.Unix(lo+rng.Int64N(3652*86400)/60*60, 0)
		zone[i] = chicago
	}
	return newEventRows(lat, lon, ts, zone)
}

// cameraEventRows: 40 sites (latitudes −40° to 60°) with their whole-hour
// offsets (one shared zone per offset, as the timestamp reader gives them),
// random instants over 2024 in time order, as detections are usually listed.
func cameraEventRows(n int) eventRows {
	rng := rand.New(rand.NewPCG(40, 2024))
	type site struct {
		lat, lon float64
		zone     *time.Location
	}
	zones := map[int]*time.Location{}
	sites := make([]site, 40)
	for i := range sites {
		s := site{lat: -40 + rng.Float64()*100, lon: -150 + rng.Float64()*300}
		off := 3600 * int(s.lon/15)
		if zones[off] == nil {
			zones[off] = time.FixedZone(fmt.Sprintf("%+d", off/3600), off)
		}
		s.zone = zones[off]
		sites[i] = s
	}
	unix := make([]int64, n)
	lo := time.Date(2024, 1, 1, 0, 0, 0, 0, time.UTC).Unix()
	for i := range unix {
		unix[i] = lo + rng.Int64N(366*86400)
	}
	slices.Sort(unix)
	lat, lon := make([]float64, n), make([]float64, n)
	ts, zone := make([]time.Time, n), make([]*time.Location, n)
	for i, u := range unix {
		s := sites[rng.IntN(len(sites))]
		lat[i], lon[i], ts[i], zone[i] = s.lat, s.lon, time.Unix(u, 0), s.zone
	}
	return newEventRows(lat, lon, ts, zone)
}

// BenchmarkEvents measures the events and relative groups of a worker
// (worker.days: the local-date window of each row, Kernel.Day, minutes from
// sunrise and sunset, sun time), one default-size batch per op, the batches
// of a longer stream taken in turn by one worker, as a pipeline worker takes
// them:
//   - window-cache: worker.days on the whole batch, as enrich runs it (local
//     date windows remembered per zone and date);
//   - no-window-cache: the same rows one at a time with the window cache
//     emptied before each row, so every window is computed from the zone
//     (two time.Date calls and a map insert); the kernel's own Day cache
//     (keyed by place and window) is kept in both.
//
// Shapes: crash (every row its own place, ten years, one zone: the Day cache
// rarely hits, windows repeat per date) and camera (40 sites over a year, in
// time order: both caches hit).
func BenchmarkEvents(b *testing.B) {
	plan, err := NewPlan(PlanOptions{Add: "events,relative"})
	if err != nil {
		b.Fatal(err)
	}
	shapes := []struct {
		name string
		rows func() eventRows
	}{
		{"crash", func() eventRows { return crashEventRows(b, 8*DefaultBatchRows) }},
		{"camera", func() eventRows { return cameraEventRows(128 * DefaultBatchRows) }},
	}
	for _, sh := range shapes {
		rows := sh.rows()
		for _, cached := range []bool{true, false} {
			name := "window-cache"
			if !cached {
				name = "no-window-cache"
			}
			b.Run(fmt.Sprintf("%s/%s/n=%d", sh.name, name, DefaultBatchRows), func(b *testing.B) {
				w := newWorker(solar.Options{}, solar.NewGrid(solar.Options{}))
				res := &Results{Plan: plan}
				one := &Results{Plan: plan}
				var in1 Inputs
				batch := func(k int) {
					bt := &rows.batches[k%len(rows.batches)]
					res.reset(len(bt.unix))
					if cached {
						w.days(&bt.in, bt.unix, res)
						return
					}
					for i := range bt.unix {
						clear(w.windows)
						oneRow(&bt.in, i, &in1)
						one.reset(1)
						w.days(&in1, bt.unix[i:i+1], one)
						res.Day[i], res.SunTime[i] = one.Day[0], one.SunTime[0]
					}
				}
				for k := range rows.batches { // the kernel's grid spans the rows' years
					batch(k)
				}
				b.ReportAllocs()
				cpu := benchclock.Start()
				k := 0
				for b.Loop() {
					batch(k)
					k++
				}
				cpu.Report(b, DefaultBatchRows)
				b.ReportMetric(float64(DefaultBatchRows*b.N)/b.Elapsed().Seconds(), "rows/s")
			})
		}
	}
}

// oneRow points dst at row i of in.
func oneRow(in *Inputs, i int, dst *Inputs) {
	dst.Lat, dst.Lon = in.Lat[i:i+1], in.Lon[i:i+1]
	dst.Time, dst.Zone = in.Time[i:i+1], in.Zone[i:i+1]
}
