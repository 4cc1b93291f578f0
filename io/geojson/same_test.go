package geojson

import (
	"bytes"
	"context"
	"strconv"
	"strings"
	"testing"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/csv"
	"github.com/heliotag/heliotag/solar"
)

// TestSameAsCSV enriches the example of NREL/TP-560-34302 (Reda & Andreas,
// rev. Jan 2008), §A.5 and Table A5.1, through GeoJSON and through CSV with
// every column group the input can feed, and checks that both give the same
// values and the published position and sunrise.
func TestSameAsCSV(t *testing.T) {
	// §A.5 inputs: 2003-10-17 12:30:30 at UTC−7, longitude −105.1786°,
	// latitude 39.742476°, elevation 1830.14 m, 820 mbar, 11 °C, ΔT = 67 s.
	temp, dt := 11.0, 67.0
	so := solar.Options{Pressure: 820, Temperature: &temp, Elevation: 1830.14, DeltaT: &dt}
	const when = "2003-10-17T12:30:30-07:00"

	csvIn := "id,lat,lon,timestamp\nspa,39.742476,-105.1786," + when + "\n"
	gjIn := `{"type":"FeatureCollection","features":[{"type":"Feature","geometry":{"type":"Point","coordinates":[-105.1786,39.742476]},"properties":{"id":"spa","timestamp":"` + when + `"}}]}`
	seqIn := `{"type":"Feature","geometry":{"type":"Point","coordinates":[-105.1786,39.742476,1830.14]},"properties":{"id":"spa","timestamp":"` + when + `"}}` + "\n"

	csvOut := csvEnrich(t, csvIn, so, "all")
	lines := strings.Split(strings.TrimSpace(csvOut), "\n")
	if len(lines) != 2 {
		t.Fatalf("CSV output: %q", csvOut)
	}
	names := strings.Split(lines[0], ",")[4:]
	vals := strings.Split(lines[1], ",")[4:]
	if len(names) < 10 {
		t.Fatalf("CSV added only %v", names)
	}

	for _, tc := range []struct {
		name, in string
		seq      bool
	}{{"FeatureCollection", gjIn, false}, {"sequence, 3D point", seqIn, true}} {
		t.Run(tc.name, func(t *testing.T) {
			out := mustEnrich(t, tc.in, runOpts{read: Options{Sequence: tc.seq}, solar: so, add: "all"})
			for i, n := range names {
				want := vals[i]
				if want == "" {
					want = "null"
				} else if _, err := strconv.ParseFloat(want, 64); err != nil {
					want = strconv.Quote(want)
				}
				if !strings.Contains(out, `"`+n+`":`+want) {
					t.Errorf("GeoJSON output lacks %s = %s (the CSV value):\n%s", n, want, out)
				}
			}
			p := props(t, decodeFeatures(t, out, tc.seq)[0])
			// Table A5.1: topocentric zenith angle 50.11162°, azimuth 194.34024°.
			// Output has 4 decimals; the batch kernel is within 0.0005° of the reference.
			if alt := p["sun_altitude_deg"].(float64); !within(alt, 90-50.11162, 0.0006) {
				t.Errorf("altitude %v, want 90 − 50.11162 (NREL/TP-560-34302 Table A5.1)", alt)
			}
			if az := p["sun_azimuth_deg"].(float64); !within(az, 194.34024, 0.0006) {
				t.Errorf("azimuth %v, want 194.34024 (NREL/TP-560-34302 Table A5.1)", az)
			}
			// Table A5.1: sunrise 06:12:43.46 local standard time (UTC−7); the
			// column is written to the second in the row's zone (within 1 s).
			if rise, _ := p["sun_rise"].(string); rise != "2003-10-17T06:12:43-07:00" && rise != "2003-10-17T06:12:44-07:00" {
				t.Errorf("sun_rise %q, want 06:12:43.46 −07:00 to the second (NREL/TP-560-34302 Table A5.1)", rise)
			}
		})
	}
}

func csvEnrich(t *testing.T, in string, so solar.Options, add string) string {
	t.Helper()
	rd, err := csv.NewReader(strings.NewReader(in), 0, csv.Options{})
	if err != nil {
		t.Fatal(err)
	}
	plan, err := enrich.NewPlan(enrich.PlanOptions{Input: rd.Columns(), Add: add})
	if err != nil {
		t.Fatal(err)
	}
	var out bytes.Buffer
	w, err := csv.NewWriter(&out, rd, plan)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := enrich.Run(context.Background(), rd, w, enrich.Options{Plan: plan, Solar: so}); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	return out.String()
}
