package parquet

import (
	"encoding/csv"
	"errors"
	"fmt"
	"strings"
	"testing"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/solar"
)

// badRows has three bad rows among nine: a latitude out of range (row 3), a
// null longitude (row 5) and a time that is not one (row 8).
var badRows = fileSpec{
	schema: arrow.NewSchema([]arrow.Field{
		fld("id", arrow.PrimitiveTypes.Int64), fld("lat", f64), fld("lon", f64), fld("timestamp", str),
		fld("tags", arrow.ListOf(str)), fld("seen", tsUTC),
	}, nil),
	json: `[
{"id": 1, "lat": 41.88, "lon": -87.63, "timestamp": "2024-06-21T12:00:00Z", "tags": ["a", "b"], "seen": "2024-06-21T12:00:00Z"},
{"id": 2, "lat": 41.88, "lon": -87.63, "timestamp": "2024-06-21T13:00:00Z"},
{"id": 3, "lat": 91.2, "lon": -87.63, "timestamp": "2024-06-21T14:00:00Z", "tags": ["x,y", "q\"uote"], "seen": "2024-06-21T14:00:00.5Z"},
{"id": 4, "lat": 41.88, "lon": -87.63, "timestamp": "2024-06-21T15:00:00Z"},
{"id": 5, "lat": 41.88, "lon": null, "timestamp": "2024-06-21T16:00:00Z"},
{"id": 6, "lat": 41.88, "lon": -87.63, "timestamp": "2024-06-21T17:00:00Z"},
{"id": 7, "lat": 41.88, "lon": -87.63, "timestamp": "2024-06-21T18:00:00Z"},
{"id": 8, "lat": 41.88, "lon": -87.63, "timestamp": "soon"},
{"id": 9, "lat": 41.88, "lon": -87.63, "timestamp": "2024-06-21T20:00:00Z"}
]`,
}

// TestPolicyFail stops at the first bad row with its number and column, for
// several batch sizes and worker counts; no Arrow memory is left held.
func TestPolicyFail(t *testing.T) {
	in := makeFile(t, badRows)
	for _, batch := range []int{1, 2, 4, 100} {
		for _, workers := range []int{1, 2, 4} {
			t.Run(fmt.Sprintf("batch=%d/workers=%d", batch, workers), func(t *testing.T) {
				r := enrichFile(t, in, runOpts{batch: batch, workers: workers})
				var re *enrich.RowError
				if !errors.As(r.err, &re) {
					t.Fatalf("error %v, want a *enrich.RowError", r.err)
				}
				if re.Row != 3 || re.Column != "lat" || !errors.Is(re, solar.ErrLatitude) {
					t.Errorf("%v: want row 3, column \"lat\", latitude out of range", re)
				}
				if !strings.Contains(r.err.Error(), "91.2") || !strings.Contains(r.err.Error(), "[-90, 90]") {
					t.Errorf("message %q should give the value and the valid range", r.err)
				}
			})
		}
	}
}

// TestPolicySkip leaves the bad rows out of the output and writes them, with
// their row number, reason and original values, to the rejects file.
func TestPolicySkip(t *testing.T) {
	in := makeFile(t, badRows)
	for _, batch := range []int{1, 3, 100} {
		t.Run(fmt.Sprintf("batch=%d", batch), func(t *testing.T) {
			r := enrichFile(t, in, runOpts{policy: enrich.PolicySkip, batch: batch})
			if r.err != nil {
				t.Fatal(r.err)
			}
			if r.sum.Read != 9 || r.sum.Written != 6 || r.sum.Rejected != 3 || r.sum.Read != r.sum.Written+r.sum.Rejected {
				t.Errorf("summary %+v; want 9 read = 6 written + 3 rejected", r.sum)
			}
			recs, err := csv.NewReader(strings.NewReader(r.rejects)).ReadAll()
			if err != nil {
				t.Fatal(err)
			}
			want := [][]string{
				{"row", "reason", "id", "lat", "lon", "timestamp", "tags", "seen"},
				{"3", "", "3", "91.2", "-87.63", "2024-06-21T14:00:00Z", `["x,y","q\"uote"]`, "2024-06-21T14:00:00.5Z"},
				{"5", "", "5", "41.88", "", "2024-06-21T16:00:00Z", "", ""},
				{"8", "", "8", "41.88", "-87.63", "soon", "", ""},
			}
			if len(recs) != len(want) {
				t.Fatalf("rejects file:\n%s", r.rejects)
			}
			reasons := []struct {
				col  string
				part string
			}{{"lat", "out of range"}, {"lon", "null"}, {"timestamp", "soon"}}
			for i := 1; i < len(want); i++ {
				got := recs[i]
				if !strings.Contains(got[1], fmt.Sprintf("column %q", reasons[i-1].col)) || !strings.Contains(got[1], reasons[i-1].part) {
					t.Errorf("rejects row %d reason %q; want it to name column %q and say %q", i, got[1], reasons[i-1].col, reasons[i-1].part)
				}
				got[1] = ""
			}
			for i := range want {
				if strings.Join(recs[i], "|") != strings.Join(want[i], "|") {
					t.Errorf("rejects line %d:\n got %q\nwant %q", i+1, recs[i], want[i])
				}
			}
			mem := checkedMem(t)
			tbl := readTable(t, r.out, mem)
			defer tbl.Release()
			ids := column(t, tbl, "id", mem)
			defer ids.Release()
			if got := fmt.Sprint(ids.(*array.Int64).Int64Values()); got != "[1 2 4 6 7 9]" {
				t.Errorf("output ids %s, want [1 2 4 6 7 9]", got)
			}
		})
	}
}

// TestPolicyKeep writes every row; bad rows have null sun columns and the
// reason in sun_error.
func TestPolicyKeep(t *testing.T) {
	in := makeFile(t, badRows)
	r := enrichFile(t, in, runOpts{policy: enrich.PolicyKeep})
	if r.err != nil {
		t.Fatal(r.err)
	}
	if r.sum.Read != 9 || r.sum.Written != 9 || r.sum.Kept != 3 || r.sum.Rejected != 0 {
		t.Errorf("summary %+v; want 9 written, 3 kept with errors", r.sum)
	}
	mem := checkedMem(t)
	tbl := readTable(t, r.out, mem)
	defer tbl.Release()
	errs := column(t, tbl, "sun_error", mem)
	defer errs.Release()
	alt := column(t, tbl, "sun_altitude_deg", mem)
	defer alt.Release()
	cond := column(t, tbl, "sun_light_condition", mem)
	defer cond.Release()
	for i := range 9 {
		bad := i == 2 || i == 4 || i == 7
		if bad != !errs.IsNull(i) || bad != alt.IsNull(i) || bad != cond.IsNull(i) {
			t.Errorf("row %d: sun_error %q, altitude null %v, condition null %v", i+1, valueText(errs, i), alt.IsNull(i), cond.IsNull(i))
		}
	}
	if got := valueText(errs, 4); !strings.Contains(got, `column "lon"`) || !strings.Contains(got, "null") {
		t.Errorf("row 5 sun_error %q; want the null longitude", got)
	}
}

// TestNoLostRows runs every policy over random bad rows with several batch
// sizes and worker counts: rows read = written + rejected, and the output's
// bytes do not depend on the number of workers.
func TestNoLostRows(t *testing.T) {
	var b strings.Builder
	b.WriteString("[")
	bad := 0
	for i := range 200 {
		if i > 0 {
			b.WriteString(",")
		}
		lat := fmt.Sprint(-60 + (i*37)%120)
		if i%7 == 3 || i%11 == 5 {
			lat, bad = "95", bad+1
		}
		fmt.Fprintf(&b, `{"id": %d, "lat": %s, "lon": %d, "timestamp": "2024-%02d-10T%02d:15:00Z"}`, i, lat, (i*53)%360-180, 1+i%12, i%24)
	}
	b.WriteString("]")
	in := makeFile(t, fileSpec{schema: arrow.NewSchema([]arrow.Field{fld("id", arrow.PrimitiveTypes.Int64), fld("lat", f64), fld("lon", arrow.PrimitiveTypes.Int32), fld("timestamp", str)}, nil),
		json: b.String(), rowGroupLen: 37})
	for _, policy := range []enrich.Policy{enrich.PolicySkip, enrich.PolicyKeep} {
		var first []byte
		for _, batch := range []int{7, 64, 1000} {
			for _, workers := range []int{1, 2, 3} {
				r := enrichFile(t, in, runOpts{policy: policy, batch: batch, workers: workers})
				if r.err != nil {
					t.Fatal(r.err)
				}
				if r.sum.Read != 200 || r.sum.Read != r.sum.Written+r.sum.Rejected || int(r.sum.Rejected+r.sum.Kept) != bad {
					t.Errorf("%s batch %d workers %d: %+v; want 200 read, %d bad", policy, batch, workers, r.sum, bad)
				}
				if policy == enrich.PolicySkip && strings.Count(r.rejects, "\n") != bad+1 {
					t.Errorf("%s batch %d workers %d: rejects file has %d lines, want %d", policy, batch, workers, strings.Count(r.rejects, "\n"), bad+1)
				}
				if batch == 64 {
					if first == nil {
						first = r.out
					} else if string(first) != string(r.out) {
						t.Errorf("%s: output bytes differ between worker counts", policy)
					}
				}
			}
		}
	}
}
