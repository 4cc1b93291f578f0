package parquet

import (
	"bytes"
	"context"
	encsv "encoding/csv"
	"fmt"
	"math"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/memory"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/csv"
)

// referenceRows are the published cases of ../shared/REFERENCE-VALUES.md
// that the default columns can show: a position, and phases on either side
// of published rise, set and twilight times (±2 min around times published
// to ±1 min).
var referenceRows = []struct {
	name      string
	at        string // RFC 3339 with the publication's offset
	lat, lon  float64
	phase     string
	zenith    float64 // 0 when not published
	azimuth   float64
	published string
}{
	// NREL SPA report (Reda & Andreas, NREL/TP-560-34302), Table A5.1: zenith 50.11162°, azimuth 194.34024°.
	{"SPA example", "2003-10-17T12:30:30-07:00", 39.742476, -105.1786, "day", 50.11162, 194.34024, "NREL/TP-560-34302 Table A5.1"},
	// USNO tables (REFERENCE-VALUES §4), San Francisco W122°26′ N37°46′, 2012-06-21, PST: rise 04:48, set 19:35.
	{"SF before sunrise", "2012-06-21T04:46:00-08:00", 37 + 46.0/60, -(122 + 26.0/60), "morning_civil", 0, 0, "USNO, SF rise 04:48"},
	{"SF after sunrise", "2012-06-21T04:50:00-08:00", 37 + 46.0/60, -(122 + 26.0/60), "day", 0, 0, "USNO, SF rise 04:48"},
	{"SF before sunset", "2012-06-21T19:33:00-08:00", 37 + 46.0/60, -(122 + 26.0/60), "day", 0, 0, "USNO, SF set 19:35"},
	{"SF after sunset", "2012-06-21T19:37:00-08:00", 37 + 46.0/60, -(122 + 26.0/60), "evening_civil", 0, 0, "USNO, SF set 19:35"},
	// USNO (REFERENCE-VALUES §4), Boston 42.32 N 71.09 W, 2024-06-21, EST: civil dawn 03:33, civil dusk 19:59.
	{"Boston before civil dawn", "2024-06-21T03:31:00-05:00", 42.32, -71.09, "morning_nautical", 0, 0, "USNO, Boston civil dawn 03:33"},
	{"Boston after civil dawn", "2024-06-21T03:35:00-05:00", 42.32, -71.09, "morning_civil", 0, 0, "USNO, Boston civil dawn 03:33"},
	{"Boston before civil dusk", "2024-06-21T19:57:00-05:00", 42.32, -71.09, "evening_civil", 0, 0, "USNO, Boston civil dusk 19:59"},
	{"Boston after civil dusk", "2024-06-21T20:01:00-05:00", 42.32, -71.09, "evening_nautical", 0, 0, "USNO, Boston civil dusk 19:59"},
	// USNO (REFERENCE-VALUES §4), Hartford 41.76 N 72.69 W, 2024-06-21, EST: astronomical dawn 02:05, nautical dawn 02:58.
	{"Hartford before astronomical dawn", "2024-06-21T02:03:00-05:00", 41.76, -72.69, "night", 0, 0, "USNO, Hartford astronomical dawn 02:05"},
	{"Hartford after astronomical dawn", "2024-06-21T02:07:00-05:00", 41.76, -72.69, "morning_astronomical", 0, 0, "USNO, Hartford astronomical dawn 02:05"},
	{"Hartford before nautical dawn", "2024-06-21T02:56:00-05:00", 41.76, -72.69, "morning_astronomical", 0, 0, "USNO, Hartford nautical dawn 02:58"},
	{"Hartford after nautical dawn", "2024-06-21T03:00:00-05:00", 41.76, -72.69, "morning_nautical", 0, 0, "USNO, Hartford nautical dawn 02:58"},
}

// TestReferenceValuesThroughParquet runs the published cases through the
// Parquet reader and writer (lat/lon float columns, a UTC timestamp column)
// and through the CSV format (RFC 3339 text), with the SPA report's
// atmosphere, elevation and ΔT: both give the published values, and the same
// values as each other (CSV prints 4 decimals).
func TestReferenceValuesThroughParquet(t *testing.T) {
	temp, deltaT := 11.0, 67.0
	spa := func(o *enrich.Options) {
		o.Solar.Pressure, o.Solar.Temperature, o.Solar.Elevation, o.Solar.DeltaT = 820, &temp, 1830.14, &deltaT
	}

	// Parquet input.
	mem := memory.NewGoAllocator()
	sc := arrow.NewSchema([]arrow.Field{fld("lat", f64), fld("lon", f64), fld("timestamp", &arrow.TimestampType{Unit: arrow.Second, TimeZone: "UTC"})}, nil)
	b := array.NewRecordBuilder(mem, sc)
	var csvText strings.Builder
	csvText.WriteString("lat,lon,timestamp\n")
	for _, r := range referenceRows {
		at, err := time.Parse(time.RFC3339, r.at)
		if err != nil {
			t.Fatal(err)
		}
		b.Field(0).(*array.Float64Builder).Append(r.lat)
		b.Field(1).(*array.Float64Builder).Append(r.lon)
		b.Field(2).(*array.TimestampBuilder).Append(arrow.Timestamp(at.Unix()))
		fmt.Fprintf(&csvText, "%s,%s,%s\n", strconv.FormatFloat(r.lat, 'f', -1, 64), strconv.FormatFloat(r.lon, 'f', -1, 64), r.at)
	}
	rec := b.NewRecordBatch()
	b.Release()
	in := writeRecords(t, sc, fileSpec{}, rec)
	rec.Release()
	pr := enrichFile(t, in, runOpts{solar: spa})
	if pr.err != nil {
		t.Fatal(pr.err)
	}
	cmem := checkedMem(t)
	tbl := readTable(t, pr.out, cmem)
	defer tbl.Release()
	get := func(name string) []string {
		a := column(t, tbl, name, cmem)
		defer a.Release()
		var s []string
		for i := range a.Len() {
			s = append(s, valueText(a, i))
		}
		return s
	}
	pAlt, pAz, pPhase := get("sun_altitude_deg"), get("sun_azimuth_deg"), get("sun_phase")

	// The same rows through the CSV format.
	crd, err := csv.NewReader(strings.NewReader(csvText.String()), 0, csv.Options{})
	if err != nil {
		t.Fatal(err)
	}
	plan, err := enrich.NewPlan(enrich.PlanOptions{Input: crd.Columns()})
	if err != nil {
		t.Fatal(err)
	}
	var cout bytes.Buffer
	cw, err := csv.NewWriter(&cout, crd, plan)
	if err != nil {
		t.Fatal(err)
	}
	eo := enrich.Options{Plan: plan, Workers: 2, BatchRows: 4}
	spa(&eo)
	if _, err := enrich.Run(context.Background(), crd, cw, eo); err != nil {
		t.Fatal(err)
	}
	if err := cw.Close(); err != nil {
		t.Fatal(err)
	}
	recs, err := encsv.NewReader(&cout).ReadAll()
	if err != nil {
		t.Fatal(err)
	}

	for i, r := range referenceRows {
		alt, _ := strconv.ParseFloat(pAlt[i], 64)
		az, _ := strconv.ParseFloat(pAz[i], 64)
		if pPhase[i] != r.phase {
			t.Errorf("%s (%s): Parquet sun_phase %s, want %s", r.name, r.published, pPhase[i], r.phase)
		}
		if r.zenith != 0 {
			// Published ±0.0003° (SPA abstract), plus the batch kernel's 0.0005° agreement with the reference path.
			if math.Abs(90-alt-r.zenith) > 0.001 || math.Abs(az-r.azimuth) > 0.001 {
				t.Errorf("%s (%s): zenith %.5f azimuth %.5f, published %.5f %.5f", r.name, r.published, 90-alt, az, r.zenith, r.azimuth)
			}
		}
		c := recs[i+1]
		cAlt, _ := strconv.ParseFloat(c[3], 64)
		cAz, _ := strconv.ParseFloat(c[4], 64)
		if math.Abs(cAlt-alt) > 0.00005 || math.Abs(cAz-az) > 0.00005 || c[5] != pPhase[i] {
			t.Errorf("%s: CSV %s %s %s, Parquet %s %s %s", r.name, c[3], c[4], c[5], pAlt[i], pAz[i], pPhase[i])
		}
	}
}
