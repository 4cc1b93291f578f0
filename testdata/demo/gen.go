//go:build ignore

// gen writes the invented demo data of testdata/demo. Every place, road,
// camera site and record in it is invented; nothing comes from a real crash
// register or camera-trap project. Run from the repository root:
//
//	go run testdata/demo/gen.go
//
// The output is deterministic (fixed seeds).
package main

import (
	"encoding/csv"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"time"
)

func main() {
	if err := collisions("testdata/demo/marrowfield_collisions.csv", 3000); err != nil {
		panic(err)
	}
	if err := detections("testdata/demo/hollin_ridge_detections.csv", 3000); err != nil {
		panic(err)
	}
}

// collisions: the invented Marrowfield district, placed at about 41.9 N,
// 88.8 W so that its clocks follow America/Chicago (with daylight saving).
func collisions(path string, n int) error {
	rng := rand.New(rand.NewPCG(2026, 12))
	roads := []struct {
		name    string
		lat0    float64
		lon0    float64
		bearing float64 // direction of the road, degrees from north
	}{
		{"Quillon Avenue", 41.905, -88.842, 90},
		{"Old Tannery Road", 41.872, -88.801, 0},
		{"Harrowgate Parkway", 41.931, -88.776, 45},
		{"Fenwick Lane", 41.889, -88.861, 135},
		{"County Route 9", 41.853, -88.824, 90},
		{"Brindle Street", 41.917, -88.812, 0},
		{"Larkspur Bypass", 41.941, -88.848, 70},
		{"Mill Race Drive", 41.866, -88.789, 160},
	}
	loc, err := time.LoadLocation("America/Chicago")
	if err != nil {
		return err
	}
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	w := csv.NewWriter(f)
	w.Write([]string{"collision_id", "crash_date", "crash_time", "lat", "lon", "road", "direction", "severity", "vehicles", "weather"})
	start := time.Date(2023, 1, 1, 0, 0, 0, 0, loc)
	dirs := []string{"NB", "SB", "EB", "WB"}
	sev := []string{"property damage", "property damage", "property damage", "minor injury", "minor injury", "serious injury", "fatal"}
	weather := []string{"clear", "clear", "clear", "cloudy", "rain", "snow", "fog"}
	for i := 0; i < n; i++ {
		day := rng.IntN(731)
		// Commute peaks in the morning and late afternoon, a tail at night.
		var minute int
		switch r := rng.Float64(); {
		case r < 0.3:
			minute = int(clamp(rng.NormFloat64()*60+7.75*60, 0, 1439))
		case r < 0.7:
			minute = int(clamp(rng.NormFloat64()*75+17*60, 0, 1439))
		default:
			minute = rng.IntN(1440)
		}
		t := start.AddDate(0, 0, day).Add(time.Duration(minute) * time.Minute)
		// Skip local times that fall in the spring-forward gap: a clean demo.
		if t.Hour()*60+t.Minute() != minute {
			t = t.Add(time.Hour)
		}
		road := roads[rng.IntN(len(roads))]
		d := rng.Float64()*6 - 3 // km along the road
		lat := road.lat0 + d*math.Cos(road.bearing*math.Pi/180)/111.0
		lon := road.lon0 + d*math.Sin(road.bearing*math.Pi/180)/(111.0*math.Cos(road.lat0*math.Pi/180))
		dir := dirs[rng.IntN(4)]
		w.Write([]string{
			fmt.Sprintf("MF-%05d", i+1),
			t.Format("2006-01-02"),
			t.Format("1504"),
			fmt.Sprintf("%.5f", lat),
			fmt.Sprintf("%.5f", lon),
			road.name, dir,
			sev[rng.IntN(len(sev))],
			fmt.Sprint(1 + rng.IntN(3)),
			weather[rng.IntN(len(weather))],
		})
	}
	w.Flush()
	if err := w.Error(); err != nil {
		return err
	}
	return f.Close()
}

// detections: the invented Hollin Ridge camera-trap survey, 30 camera sites
// at about 54.5 N, 2.9 W, on local clocks (Europe/London); timestamps are
// RFC 3339 with the camera's UTC offset.
func detections(path string, n int) error {
	rng := rand.New(rand.NewPCG(54, 29))
	loc, err := time.LoadLocation("Europe/London")
	if err != nil {
		return err
	}
	type site struct {
		id       string
		lat, lon float64
		habitat  string
	}
	habitats := []string{"woodland edge", "conifer plantation", "upland heath", "stream corridor", "hay meadow"}
	sites := make([]site, 30)
	for i := range sites {
		sites[i] = site{
			id:      fmt.Sprintf("HR%02d", i+1),
			lat:     54.45 + rng.Float64()*0.12,
			lon:     -2.98 + rng.Float64()*0.18,
			habitat: habitats[rng.IntN(len(habitats))],
		}
	}
	// Species with a typical activity centre (local hour) and spread.
	species := []struct {
		name   string
		centre float64
		spread float64
	}{
		{"red fox", 1.0, 3.5},
		{"European badger", 0.5, 2.5},
		{"roe deer", 6.0, 4.0},
		{"red squirrel", 11.0, 3.0},
		{"tawny owl", 2.0, 2.5},
		{"European hedgehog", 0.0, 2.0},
		{"pine marten", 23.0, 3.0},
		{"wood mouse", 2.5, 3.0},
	}
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	w := csv.NewWriter(f)
	w.Write([]string{"detection_id", "site", "lat", "lon", "habitat", "timestamp", "species", "count"})
	start := time.Date(2024, 1, 1, 0, 0, 0, 0, loc)
	for i := 0; i < n; i++ {
		s := sites[rng.IntN(len(sites))]
		sp := species[rng.IntN(len(species))]
		h := math.Mod(sp.centre+rng.NormFloat64()*sp.spread+48, 24)
		day := rng.IntN(366)
		t := start.AddDate(0, 0, day).Add(time.Duration(h * float64(time.Hour))).Add(time.Duration(rng.IntN(60)) * time.Second)
		w.Write([]string{
			fmt.Sprintf("HRD-%05d", i+1),
			s.id,
			fmt.Sprintf("%.5f", s.lat),
			fmt.Sprintf("%.5f", s.lon),
			s.habitat,
			t.Format(time.RFC3339),
			sp.name,
			fmt.Sprint(1 + rng.IntN(2)),
		})
	}
	w.Flush()
	if err := w.Error(); err != nil {
		return err
	}
	return f.Close()
}

func clamp(v, lo, hi float64) float64 { return math.Max(lo, math.Min(hi, v)) }
