package parquet

import (
	"bytes"
	"context"
	"encoding/binary"
	"errors"
	"io"
	"testing"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/memory"
	pq "github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"
	"github.com/paulmach/orb"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/solar"
)

// fuzzSeeds adds valid files of several shapes, and damaged copies of them,
// to a fuzz target's corpus (testdata/fuzz holds more).
func fuzzSeeds(f *testing.F) {
	seeds := [][]byte{
		makeFile(f, allTypes),
		makeFile(f, badRows),
		makeFile(f, fileSpec{schema: schemaOf(fld("timestamp", tsLocal), fld("tz", str)),
			json: `[{"lat": 1, "lon": 2, "timestamp": "2024-06-21T12:00:00", "tz": "Europe/Berlin"}]`}),
	}
	point := mustWKB(f, orb.Point{-87.63, 41.88}, binary.LittleEndian)
	seeds = append(seeds, wkbGeoFile(f, geoWKB, [][]byte{point, nil, []byte{1, 3, 0, 0, 0, 9}}))
	for _, s := range seeds {
		f.Add(s)
		f.Add(s[:len(s)/2])
		flipped := bytes.Clone(s)
		flipped[len(s)/3] ^= 0x5a
		f.Add(flipped)
	}
}

// maxFuzzRows bounds how many rows a fuzz input is read for: a tiny file can
// legitimately declare (and run-length encode) billions of rows.
const maxFuzzRows = 20_000

// FuzzReader feeds arbitrary bytes (mostly damaged Parquet files) to the
// reader: it must return errors, never panic or hang, and hold no Arrow
// memory after Close.
func FuzzReader(f *testing.F) {
	fuzzSeeds(f)
	f.Fuzz(func(t *testing.T, data []byte) {
		mem := memory.NewCheckedAllocator(memory.NewGoAllocator())
		defer mem.AssertSize(t, 0)
		for _, sel := range []enrich.Select{{}, {TZ: "UTC"}, {TZColumn: "tz"}} {
			rd, err := NewReader(bytes.NewReader(data), Options{Select: sel, Allocator: mem})
			if err != nil {
				continue
			}
			plan, err := enrich.NewPlan(enrich.PlanOptions{Input: rd.Columns(), ErrorColumn: true})
			if err != nil {
				rd.Close()
				continue
			}
			rows := 0
			for rows < maxFuzzRows {
				c, err := rd.Next(context.Background(), 257)
				if err != nil {
					if err != io.EOF && !errors.Is(err, ErrFile) {
						t.Errorf("Next: %v, want io.EOF or ErrFile", err)
					}
					break
				}
				rows += c.Len()
				in := new(enrich.Inputs)
				in.Reset(c.Len())
				c.Extract(in)
				_ = c.Values(c.Len() - 1)
				res := &enrich.Results{Plan: plan, Status: make([]enrich.Status, c.Len()), Err: in.Err}
				for i := range res.Status {
					if in.Err[i] != nil {
						res.Status[i] = enrich.RowKept
					}
				}
				res.Altitude = make([]float64, c.Len())
				res.Azimuth = make([]float64, c.Len())
				res.Phase = make([]solar.Phase, c.Len())
				res.Zone, res.Note = in.Zone, in.Note
				if err := c.Encode(res); err != nil && !errors.Is(err, ErrFile) {
					t.Errorf("Encode: %v", err)
				}
				c.(*chunk).release()
			}
			rd.Close()
		}
	})
}

// FuzzRoundTrip reads a file, writes it enriched, and reads the output
// back: whatever the reader accepts, the output holds the same rows and the
// same original columns.
func FuzzRoundTrip(f *testing.F) {
	fuzzSeeds(f)
	f.Fuzz(func(t *testing.T, data []byte) {
		mem := memory.NewCheckedAllocator(memory.NewGoAllocator())
		defer mem.AssertSize(t, 0)
		rd, err := NewReader(bytes.NewReader(data), Options{Allocator: mem})
		if err != nil {
			return
		}
		defer rd.Close()
		if rd.NumRows() > maxFuzzRows {
			return
		}
		plan, err := enrich.NewPlan(enrich.PlanOptions{Input: rd.Columns(), ErrorColumn: true})
		if err != nil {
			return
		}
		var out bytes.Buffer
		w, err := NewWriter(&out, rd, plan, WriterOptions{})
		if err != nil {
			return
		}
		sum, err := enrich.Run(context.Background(), rd, w, enrich.Options{Plan: plan, Policy: enrich.PolicyKeep, Workers: 2, BatchRows: 100})
		if cerr := w.Close(); err == nil {
			err = cerr
		}
		if err != nil {
			return // a damaged file that failed part-way: the job discards the output
		}
		back, err := pqarrow.ReadTable(context.Background(), bytes.NewReader(out.Bytes()), pq.NewReaderProperties(mem),
			pqarrow.ArrowReadProperties{BatchSize: 1024}, mem)
		if err != nil {
			t.Fatalf("the output of a successful run cannot be read: %v", err)
		}
		defer back.Release()
		if back.NumRows() != sum.Written || sum.Written != sum.Read {
			t.Errorf("output has %d rows; the run read %d and wrote %d", back.NumRows(), sum.Read, sum.Written)
		}
		for i, fd := range rd.Schema().Fields() {
			got := back.Schema().Field(i)
			if got.Name != fd.Name || !arrow.TypeEqual(got.Type, fd.Type) {
				t.Errorf("column %d: output %s, input %s", i, got, fd)
			}
		}
	})
}

// FuzzWKB feeds arbitrary bytes to the WKB reader: errors, never panics, and
// a point it returns is what orb reads from the 2D rewrite.
func FuzzWKB(f *testing.F) {
	f.Add(mustWKB(f, orb.Point{1, 2}, binary.LittleEndian))
	f.Add(mustWKB(f, orb.Polygon{{{10, 40}, {12, 40}, {12, 44}, {10, 40}}}, binary.BigEndian))
	f.Add(mustWKB(f, orb.Collection{orb.Point{1, 2}, orb.LineString{{0, 0}, {1, 1}}}, binary.LittleEndian))
	f.Add(isoZ(3, [][][3]float64{{{10, 40, 1}, {12, 40, 1}, {12, 44, 1}, {10, 40, 1}}}))
	f.Add([]byte{1, 0xe9, 3, 0, 0, 0, 0, 0, 0})
	f.Fuzz(func(t *testing.T, b []byte) {
		_, _, _ = wkbPoint(b)
		if flat, err := flatten2D(b); err == nil && len(flat) > len(b) {
			t.Errorf("the 2D rewrite (%d bytes) is longer than the input (%d)", len(flat), len(b))
		}
	})
}
