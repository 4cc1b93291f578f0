// Command gen writes deterministic synthetic inputs for heliotag's benchmarks.
// The records are generated, not real: random places and times in shapes
// that resemble the two main uses.
//
//	go run ./benchmarks/gen -n 1000000 -shape crash -o benchmarks/data/crash_1m.csv
//
// Shapes:
//   - crash: every row its own place (inside a 4°×6° box at mid latitude),
//     local date and HHMM time in separate columns over ten years (read with
//     --date crash_date --time crash_time --tz America/Chicago);
//   - camera: 40 fixed sites, RFC 3339 timestamps with the site's offset.
//
// -wide adds 30 passthrough columns of mixed types (text, integers, decimals,
// booleans, dates) so that the cost of copying realistic rows is measured.
package main

import (
	"bufio"
	"flag"
	"fmt"
	"math/rand/v2"
	"os"
	"strconv"
	"time"
)

func main() {
	n := flag.Int("n", 1_000_000, "number of rows")
	shape := flag.String("shape", "crash", "crash|camera")
	wide := flag.Bool("wide", false, "add 30 passthrough columns of mixed types")
	seed := flag.Uint64("seed", 1, "random seed")
	out := flag.String("o", "-", "output file (- for stdout)")
	flag.Parse()
	if err := write(*out, *n, *shape, *wide, *seed); err != nil {
		fmt.Fprintln(os.Stderr, "gen:", err)
		os.Exit(1)
	}
}

func write(path string, n int, shape string, wide bool, seed uint64) error {
	f := os.Stdout
	if path != "-" {
		var err error
		if f, err = os.Create(path); err != nil {
			return err
		}
		defer f.Close()
	}
	w := bufio.NewWriterSize(f, 1<<20)
	rng := rand.New(rand.NewPCG(seed, 0x5eed))
	var row func(i int, b []byte) []byte
	switch shape {
	case "crash":
		w.WriteString("id,crash_date,crash_time,lat,lon,severity,vehicles")
		chicago, err := time.LoadLocation("America/Chicago")
		if err != nil {
			return err
		}
		start := time.Date(2014, 1, 1, 0, 0, 0, 0, chicago)
		sev := []string{"property damage", "minor injury", "serious injury", "fatal"}
		row = func(i int, b []byte) []byte {
			t := start.AddDate(0, 0, rng.IntN(3652)).Add(time.Duration(rng.IntN(1440)) * time.Minute)
			b = strconv.AppendInt(append(b, 'c'), int64(i), 10)
			b = append(b, ',')
			b = t.AppendFormat(b, "2006-01-02,1504")
			b = append(b, ',')
			b = strconv.AppendFloat(b, 39+rng.Float64()*4, 'f', 5, 64)
			b = append(b, ',')
			b = strconv.AppendFloat(b, -91+rng.Float64()*6, 'f', 5, 64)
			b = append(b, ',')
			b = append(b, sev[rng.IntN(len(sev))]...)
			b = append(b, ',')
			return strconv.AppendInt(b, int64(1+rng.IntN(4)), 10)
		}
	case "camera":
		w.WriteString("id,site,lat,lon,timestamp,species,count")
		type site struct{ lat, lon float64 }
		sites := make([]site, 40)
		for i := range sites {
			sites[i] = site{-40 + rng.Float64()*100, -150 + rng.Float64()*300}
		}
		species := []string{"fox", "badger", "deer", "hare", "owl", "boar", "marten", "squirrel"}
		start := time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC)
		row = func(i int, b []byte) []byte {
			s := rng.IntN(len(sites))
			off := time.FixedZone("", 3600*int(sites[s].lon/15))
			t := start.Add(time.Duration(rng.Int64N(int64(3 * 365 * 24 * time.Hour)))).In(off)
			b = strconv.AppendInt(append(b, 'd'), int64(i), 10)
			b = append(b, fmt.Sprintf(",S%02d,", s)...)
			b = strconv.AppendFloat(b, sites[s].lat, 'f', 5, 64)
			b = append(b, ',')
			b = strconv.AppendFloat(b, sites[s].lon, 'f', 5, 64)
			b = append(b, ',')
			b = t.AppendFormat(b, time.RFC3339)
			b = append(b, ',')
			b = append(b, species[rng.IntN(len(species))]...)
			b = append(b, ',')
			return strconv.AppendInt(b, int64(1+rng.IntN(3)), 10)
		}
	default:
		return fmt.Errorf("unknown shape %q (crash or camera)", shape)
	}
	if wide {
		for j := range 30 {
			fmt.Fprintf(w, ",x%02d", j)
		}
	}
	w.WriteString("\n")
	var b []byte
	for i := range n {
		b = row(i, b[:0])
		if wide {
			b = appendWide(b, rng)
		}
		b = append(b, '\n')
		if _, err := w.Write(b); err != nil {
			return err
		}
	}
	return w.Flush()
}

// appendWide appends 30 fields of mixed types.
func appendWide(b []byte, rng *rand.Rand) []byte {
	words := []string{"alpha", "bravo", "charlie", "delta", "echo", "foxtrot", "golf", "hotel"}
	for j := range 30 {
		b = append(b, ',')
		switch j % 5 {
		case 0:
			b = append(b, words[rng.IntN(len(words))]...)
		case 1:
			b = strconv.AppendInt(b, rng.Int64N(1_000_000), 10)
		case 2:
			b = strconv.AppendFloat(b, rng.Float64()*1000, 'f', 3, 64)
		case 3:
			b = strconv.AppendBool(b, rng.IntN(2) == 0)
		case 4:
			b = time.Date(2000+rng.IntN(25), time.Month(1+rng.IntN(12)), 1+rng.IntN(28), 0, 0, 0, 0, time.UTC).AppendFormat(b, "2006-01-02")
		}
	}
	return b
}
