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

// bothFormats runs the reference rows through the Parquet format (lat/lon
// float columns, a UTC timestamp column) and through the CSV format (RFC 3339
// text with the publication's offset) with the given column groups, and
// returns each output column as text by name: Parquet values by valueText,
// CSV fields as written.
func bothFormats(t *testing.T, add string, solarOpts func(*enrich.Options)) (pq, cs map[string][]string, plan *enrich.Plan) {
	t.Helper()
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
	pr := enrichFile(t, in, runOpts{add: add, solar: solarOpts})
	if pr.err != nil {
		t.Fatal(pr.err)
	}
	cmem := checkedMem(t)
	tbl := readTable(t, pr.out, cmem)
	defer tbl.Release()
	pq = map[string][]string{}
	for _, f := range tbl.Schema().Fields() {
		a := column(t, tbl, f.Name, cmem)
		for i := range a.Len() {
			pq[f.Name] = append(pq[f.Name], valueText(a, i))
		}
		a.Release()
	}

	crd, err := csv.NewReader(strings.NewReader(csvText.String()), 0, csv.Options{})
	if err != nil {
		t.Fatal(err)
	}
	plan, err = enrich.NewPlan(enrich.PlanOptions{Add: add, Input: crd.Columns()})
	if err != nil {
		t.Fatal(err)
	}
	var cout bytes.Buffer
	cw, err := csv.NewWriter(&cout, crd, plan)
	if err != nil {
		t.Fatal(err)
	}
	eo := enrich.Options{Plan: plan, Workers: 2, BatchRows: 4}
	if solarOpts != nil {
		solarOpts(&eo)
	}
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
	cs = map[string][]string{}
	for j, name := range recs[0] {
		for _, r := range recs[1:] {
			cs[name] = append(cs[name], r[j])
		}
	}
	return pq, cs, plan
}

// sameValues compares every added column between the two formats: floats
// within the CSV's printed precision, words exactly, instants to the second
// (CSV writes whole seconds in the row's zone, Parquet microseconds in UTC).
func sameValues(t *testing.T, pq, cs map[string][]string, plan *enrich.Plan) {
	t.Helper()
	for _, c := range plan.Columns {
		for i := range referenceRows {
			p, q := pq[c.Name][i], cs[c.Name][i]
			if (p == "") != (q == "") {
				t.Errorf("%s %s: Parquet %q, CSV %q", referenceRows[i].name, c.Name, p, q)
				continue
			}
			if p == "" {
				continue
			}
			switch c.Kind {
			case enrich.KindFloat:
				pv, _ := strconv.ParseFloat(p, 64)
				qv, _ := strconv.ParseFloat(q, 64)
				if math.Abs(pv-qv) > 0.51*math.Pow(10, -float64(c.Decimals)) {
					t.Errorf("%s %s: Parquet %s, CSV %s", referenceRows[i].name, c.Name, p, q)
				}
			case enrich.KindInstant:
				pt, err1 := time.Parse(time.RFC3339Nano, p)
				qt, err2 := time.Parse(time.RFC3339, q)
				if err1 != nil || err2 != nil || pt.Sub(qt).Abs() >= time.Second {
					t.Errorf("%s %s: Parquet %s, CSV %s", referenceRows[i].name, c.Name, p, q)
				}
			default:
				if p != q {
					t.Errorf("%s %s: Parquet %q, CSV %q", referenceRows[i].name, c.Name, p, q)
				}
			}
		}
	}
}

// TestReferenceValuesThroughParquet: the published position (with the SPA
// report's atmosphere, elevation and ΔT) and phases around published rise,
// set and twilight times come out of the Parquet format as published, and
// the same as out of the CSV format.
func TestReferenceValuesThroughParquet(t *testing.T) {
	temp, deltaT := 11.0, 67.0
	spa := func(o *enrich.Options) {
		o.Solar.Pressure, o.Solar.Temperature, o.Solar.Elevation, o.Solar.DeltaT = 820, &temp, 1830.14, &deltaT
	}
	pq, cs, plan := bothFormats(t, "", spa)
	for i, r := range referenceRows {
		alt, _ := strconv.ParseFloat(pq["sun_altitude_deg"][i], 64)
		az, _ := strconv.ParseFloat(pq["sun_azimuth_deg"][i], 64)
		if got := pq["sun_phase"][i]; got != r.phase {
			t.Errorf("%s (%s): Parquet sun_phase %s, want %s", r.name, r.published, got, r.phase)
		}
		if r.zenith != 0 {
			// Published ±0.0003° (SPA abstract), plus the batch kernel's 0.0005° agreement with the reference path.
			if math.Abs(90-alt-r.zenith) > 0.001 || math.Abs(az-r.azimuth) > 0.001 {
				t.Errorf("%s (%s): zenith %.5f azimuth %.5f, published %.5f %.5f", r.name, r.published, 90-alt, az, r.zenith, r.azimuth)
			}
		}
	}
	sameValues(t, pq, cs, plan)
}

// TestPublishedEventsThroughParquet: the events group's instants, written as
// timestamp[us, UTC], match the USNO tables of REFERENCE-VALUES §4 (minutes,
// ±1 min), and the events and relative groups match the CSV format.
func TestPublishedEventsThroughParquet(t *testing.T) {
	pq, cs, plan := bothFormats(t, "events,relative", nil)
	for _, c := range plan.Columns {
		if c.Kind == enrich.KindInstant && len(pq[c.Name]) != len(referenceRows) {
			t.Fatalf("no column %s in the Parquet output", c.Name)
		}
	}
	pst, est := time.FixedZone("PST", -8*3600), time.FixedZone("EST", -5*3600)
	published := []struct {
		row    int // index in referenceRows
		column string
		at     time.Time
		source string
	}{
		// USNO, San Francisco W122°26′ N37°46′, 2012-06-21 (REFERENCE-VALUES §4).
		{1, "sun_rise", time.Date(2012, 6, 21, 4, 48, 0, 0, pst), "USNO SF rise"},
		{1, "sun_set", time.Date(2012, 6, 21, 19, 35, 0, 0, pst), "USNO SF set"},
		// USNO, Boston 42.32 N 71.09 W, 2024-06-21.
		{5, "sun_civil_dawn", time.Date(2024, 6, 21, 3, 33, 0, 0, est), "USNO Boston civil dawn"},
		{5, "sun_civil_dusk", time.Date(2024, 6, 21, 19, 59, 0, 0, est), "USNO Boston civil dusk"},
		// USNO, Hartford 41.76 N 72.69 W, 2024-06-21.
		{9, "sun_nautical_dawn", time.Date(2024, 6, 21, 2, 58, 0, 0, est), "USNO Hartford nautical dawn"},
		{9, "sun_nautical_dusk", time.Date(2024, 6, 21, 20, 48, 0, 0, est), "USNO Hartford nautical dusk"},
		{9, "sun_astronomical_dawn", time.Date(2024, 6, 21, 2, 5, 0, 0, est), "USNO Hartford astronomical dawn"},
		{9, "sun_astronomical_dusk", time.Date(2024, 6, 21, 21, 41, 0, 0, est), "USNO Hartford astronomical dusk"},
	}
	for _, p := range published {
		text := pq[p.column][p.row]
		got, err := time.Parse(time.RFC3339Nano, text)
		if err != nil {
			t.Errorf("%s: %s is %q: %v", p.source, p.column, text, err)
			continue
		}
		if d := got.Sub(p.at).Abs(); d > time.Minute {
			t.Errorf("%s: %s %s, published %s (off by %v; tolerance ±1 min)", p.source, p.column, got, p.at.UTC(), d)
		}
	}
	sameValues(t, pq, cs, plan)
}
