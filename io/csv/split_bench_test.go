package csv

import (
	"bytes"
	stdcsv "encoding/csv"
	"fmt"
	"io"
	"math/rand/v2"
	"strconv"
	"testing"
)

// splitRecords returns n records (without line terminators) of one shape,
// like benchmarks/gen's rows, and the columns the extractor reads from them
// (need: up to and including the last of them):
//   - crash: 7 fields, no quotes (id, date, HHMM time, lat, lon, words, int); the
//     extractor reads fields 2–5;
//   - wide: the crash fields and 30 more of mixed types;
//   - quoted: the crash fields with the words quoted, one in four holding a
//     comma and one in eight a doubled quote.
func splitRecords(shape string, n int) (recs [][]byte, need int) {
	rng := rand.New(rand.NewPCG(3, 5))
	words := []string{"property damage", "minor injury", "serious injury", "fatal"}
	for i := range n {
		var b []byte
		b = strconv.AppendInt(append(b, 'c'), int64(i), 10)
		b = fmt.Appendf(b, ",20%02d-%02d-%02d,%02d%02d,", 14+rng.IntN(10), 1+rng.IntN(12), 1+rng.IntN(28), rng.IntN(24), rng.IntN(60))
		b = strconv.AppendFloat(b, 39+4*rng.Float64(), 'f', 5, 64)
		b = strconv.AppendFloat(append(b, ','), -91+6*rng.Float64(), 'f', 5, 64)
		w := words[rng.IntN(len(words))]
		switch shape {
		case "quoted":
			switch {
			case i%8 == 0:
				w = `said "stop", then ` + w
				b = fmt.Appendf(b, `,"%s"`, bytes.ReplaceAll([]byte(w), []byte(`"`), []byte(`""`)))
			case i%4 == 1:
				b = fmt.Appendf(b, `,"%s, at night"`, w)
			default:
				b = fmt.Appendf(b, `,"%s"`, w)
			}
		default:
			b = append(append(b, ','), w...)
		}
		b = strconv.AppendInt(append(b, ','), int64(1+rng.IntN(4)), 10)
		if shape == "wide" {
			for j := range 30 {
				b = append(b, ',')
				switch j % 5 {
				case 0:
					b = append(b, "charlie"...)
				case 1:
					b = strconv.AppendInt(b, rng.Int64N(1_000_000), 10)
				case 2:
					b = strconv.AppendFloat(b, 1000*rng.Float64(), 'f', 3, 64)
				case 3:
					b = strconv.AppendBool(b, rng.IntN(2) == 0)
				case 4:
					b = fmt.Appendf(b, "20%02d-%02d-%02d", rng.IntN(25), 1+rng.IntN(12), 1+rng.IntN(28))
				}
			}
		}
		recs = append(recs, b)
	}
	return recs, 5
}

// BenchmarkSplit measures splitting records into fields, 4096 records per op,
// on the paths the reader takes: splitRecord (every field; quoted records),
// splitCount (a record without quotes: the fields are counted and split only
// as far as the last column read, need) and, as a baseline measured in the
// same run, the standard library's encoding/csv reading the same records
// (which also finds the line ends, and copies every field into strings).
// Rates are records and input bytes per second of wall-clock time.
func BenchmarkSplit(b *testing.B) {
	const n = 4096
	for _, shape := range []string{"crash", "wide", "quoted"} {
		recs, need := splitRecords(shape, n)
		var size int
		for _, r := range recs {
			size += len(r)
		}
		first, err := splitRecord(nil, recs[0], ',')
		if err != nil {
			b.Fatal(err)
		}
		fields := len(first)
		report := func(b *testing.B) {
			sec := b.Elapsed().Seconds()
			b.ReportMetric(float64(n*b.N)/sec, "rows/s")
			b.ReportMetric(float64(size*b.N)/1e6/sec, "MB/s")
		}
		b.Run(fmt.Sprintf("%s/splitRecord/n=%d", shape, n), func(b *testing.B) {
			b.ReportAllocs()
			var dst []string
			var err error
			for b.Loop() {
				for _, r := range recs {
					if dst, err = splitRecord(dst, r, ','); err != nil {
						b.Fatal(err)
					}
				}
			}
			report(b)
		})
		if shape != "quoted" {
			b.Run(fmt.Sprintf("%s/splitCount/n=%d", shape, n), func(b *testing.B) {
				b.ReportAllocs()
				var dst []string
				for b.Loop() {
					for _, r := range recs {
						if bytes.IndexByte(r, '"') >= 0 {
							b.Fatal("quoted record")
						}
						dst, _ = splitCount(dst, r, ',', fields, need)
					}
				}
				if len(dst) != fields {
					b.Fatalf("%d fields, want %d", len(dst), fields)
				}
				report(b)
			})
		}
		b.Run(fmt.Sprintf("%s/encoding-csv/n=%d", shape, n), func(b *testing.B) {
			text := append(bytes.Join(recs, []byte{'\n'}), '\n')
			b.ReportAllocs()
			for b.Loop() {
				r := stdcsv.NewReader(bytes.NewReader(text))
				r.ReuseRecord = true
				rows := 0
				for {
					rec, err := r.Read()
					if err == io.EOF {
						break
					}
					if err != nil {
						b.Fatal(err)
					}
					if len(rec) != fields {
						b.Fatalf("%d fields", len(rec))
					}
					rows++
				}
				if rows != n {
					b.Fatalf("%d rows", rows)
				}
			}
			report(b)
		})
	}
}
