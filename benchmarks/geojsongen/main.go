// Command geojsongen writes a synthetic GeoJSON FeatureCollection (or text
// sequence) of Point features for benchmarks: invented counts and UTC
// timestamps over one year, places spread over latitudes -60 to 70. The
// output depends only on the flags (fixed seed).
//
//	go run ./benchmarks/geojsongen -n 1000000 -o benchmarks/data/points-1m.geojson
//
// Each feature is about 150 bytes:
//
//	{"type":"Feature","id":17,"geometry":{"type":"Point","coordinates":[-71.093312,42.318207]},
//	 "properties":{"time":"2024-03-05T17:42:09Z","count":3}}
package main

import (
	"bufio"
	"flag"
	"fmt"
	"io"
	"math/rand/v2"
	"os"
	"strconv"
	"time"
)

func main() {
	n := flag.Int("n", 1000000, "number of features")
	out := flag.String("o", "-", "output `FILE` (- for stdout)")
	seq := flag.Bool("seq", false, "write a text sequence (one Feature per line) instead of a FeatureCollection")
	seed := flag.Uint64("seed", 1, "random seed")
	flag.Parse()
	w := io.Writer(os.Stdout)
	if *out != "-" {
		f, err := os.Create(*out)
		if err != nil {
			fmt.Fprintln(os.Stderr, "geojsongen:", err)
			os.Exit(1)
		}
		defer f.Close()
		w = f
	}
	if err := Write(w, *n, *seq, *seed); err != nil {
		fmt.Fprintln(os.Stderr, "geojsongen:", err)
		os.Exit(1)
	}
}

// Write writes n Point features.
func Write(w io.Writer, n int, seq bool, seed uint64) error {
	bw := bufio.NewWriterSize(w, 1<<20)
	r := rand.New(rand.NewPCG(seed, 0x9e3779b97f4a7c15))
	start := time.Date(2024, 1, 1, 0, 0, 0, 0, time.UTC).Unix()
	if !seq {
		bw.WriteString(`{"type":"FeatureCollection","name":"synthetic points","features":[` + "\n")
	}
	var b []byte
	for i := range n {
		b = b[:0]
		if !seq && i > 0 {
			b = append(b, ",\n"...)
		}
		lon := r.Float64()*360 - 180
		lat := r.Float64()*130 - 60
		t := time.Unix(start+r.Int64N(366*86400), 0).UTC()
		b = append(b, `{"type":"Feature","id":`...)
		b = strconv.AppendInt(b, int64(i+1), 10)
		b = append(b, `,"geometry":{"type":"Point","coordinates":[`...)
		b = strconv.AppendFloat(b, lon, 'f', 6, 64)
		b = append(b, ',')
		b = strconv.AppendFloat(b, lat, 'f', 6, 64)
		b = append(b, `]},"properties":{"time":"`...)
		b = t.AppendFormat(b, time.RFC3339)
		b = append(b, `","count":`...)
		b = strconv.AppendInt(b, int64(r.IntN(20)), 10)
		b = append(b, "}}"...)
		if seq {
			b = append(b, '\n')
		}
		if _, err := bw.Write(b); err != nil {
			return err
		}
	}
	if !seq {
		bw.WriteString("\n]}\n")
	}
	return bw.Flush()
}
