package main

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestPublishedValuesThroughCLI runs published cases through the whole
// command and reads the values back from the CSV output.
func TestPublishedValuesThroughCLI(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "spa.csv")
	// NREL SPA worked example (Reda & Andreas, NREL/TP-560-34302, Table A5.1):
	// 2003-10-17 12:30:30 at UTC−7, 39.742476 N, 105.1786 W, 1830.14 m,
	// 820 mbar, 11 °C, ΔT = 67 s. Published topocentric zenith 50.11162°
	// (altitude 39.88838°) and azimuth 194.34024°.
	require.NoError(t, os.WriteFile(in, []byte(
		"site,lat,lon,timestamp\nspa-example,39.742476,-105.1786,2003-10-17T12:30:30-07:00\n"), 0o644))
	out := filepath.Join(dir, "out.csv")
	var stdout, stderr bytes.Buffer
	code := run(context.Background(), []string{"enrich", in, "-o", out,
		"--pressure", "820", "--temperature", "11", "--elevation", "1830.14", "--delta-t", "67"},
		nil, &stdout, &stderr)
	require.Equal(t, 0, code, stderr.String())
	rows := readCSV(t, out)
	require.Len(t, rows, 2)
	get := func(name string) string { return rows[1][indexOf(t, rows[0], name)] }
	alt, err := strconv.ParseFloat(get("sun_altitude_deg"), 64)
	require.NoError(t, err)
	az, err := strconv.ParseFloat(get("sun_azimuth_deg"), 64)
	require.NoError(t, err)
	// Output has 4 decimals; the batch path is within 0.0005° of the reference.
	assert.InDelta(t, 90-50.11162, alt, 0.0006, "altitude (SPA Table A5.1)")
	assert.InDelta(t, 194.34024, az, 0.0006, "azimuth (SPA Table A5.1)")
	// Common practice: mid-afternoon sun at 40° altitude is day / daylight.
	assert.Equal(t, "day", get("sun_phase"))
	assert.Equal(t, "daylight", get("sun_light_condition"))
}

func TestReportJSON(t *testing.T) {
	dir := t.TempDir()
	t.Chdir(dir)
	require.NoError(t, os.WriteFile("in.csv", []byte("id,lat,lon,timestamp\n"+
		"1,51.5,-0.12,2024-06-21T12:00:00Z\n"+
		"2,51.5,-0.12,2024-06-21T23:00:00Z\n"+
		"3,99,0,2024-06-21T12:00:00Z\n"), 0o644))
	var stdout, stderr bytes.Buffer
	code := run(context.Background(), []string{"enrich", "in.csv", "--on-bad-row", "skip", "--report", "run.json", "-o", "out.csv"}, nil, &stdout, &stderr)
	require.Equal(t, 1, code, stderr.String())
	b, err := os.ReadFile("run.json")
	require.NoError(t, err)
	var rep struct {
		Version    string           `json:"version"`
		RowsRead   int64            `json:"rows_read"`
		RowsOut    int64            `json:"rows_written"`
		Rejected   int64            `json:"rows_rejected"`
		Reasons    map[string]int64 `json:"bad_rows_by_reason"`
		Phases     map[string]int64 `json:"rows_by_sun_phase"`
		Conditions map[string]int64 `json:"rows_by_light_condition"`
		Options    struct {
			OnBadRow  string `json:"on_bad_row"`
			Rejects   string `json:"rejects"`
			BatchRows int    `json:"batch_rows"`
		} `json:"options"`
	}
	require.NoError(t, json.Unmarshal(b, &rep))
	assert.Equal(t, int64(3), rep.RowsRead)
	assert.Equal(t, int64(2), rep.RowsOut)
	assert.Equal(t, int64(1), rep.Rejected)
	assert.Equal(t, rep.RowsRead, rep.RowsOut+rep.Rejected)
	require.Len(t, rep.Reasons, 1)
	for k, v := range rep.Reasons {
		assert.Contains(t, k, "lat")
		assert.Equal(t, int64(1), v)
	}
	// London at 12:00 UTC on the June solstice is day; at 23:00 UTC, an hour
	// before solar midnight, the sun is about 14° below the horizon: between
	// −12° and −18°, astronomical twilight (common practice: no astronomical
	// night in June at 51.5° N, the sun stays above −18°).
	assert.Equal(t, map[string]int64{"day": 1, "evening_astronomical": 1}, rep.Phases)
	assert.Equal(t, map[string]int64{"daylight": 1, "dark": 1}, rep.Conditions)
	assert.Equal(t, "skip", rep.Options.OnBadRow)
	assert.Equal(t, "out.rejects.csv", rep.Options.Rejects)
	assert.Equal(t, 1024, rep.Options.BatchRows, "CSV's default batch")
	assert.NotEmpty(t, rep.Version)
}

// TestBatchRowsFlag: --batch-rows takes 1 to 1,048,576; 0 and larger sizes are refused (leaving the flag out
// gives the format's default).
func TestBatchRowsFlag(t *testing.T) {
	dir := t.TempDir()
	t.Chdir(dir)
	require.NoError(t, os.WriteFile("in.csv", []byte("id,lat,lon,timestamp\n1,51.5,-0.12,2024-06-21T12:00:00Z\n"), 0o644))
	for _, c := range []struct {
		value  string
		code   int
		stderr string
	}{
		{"0", 2, "--batch-rows must be at least 1"},
		{"-5", 2, "--batch-rows must be at least 1"},
		{"1", 0, ""},
		{"1048576", 0, ""},
		{"1048577", 2, "at most 1048576 rows per batch"},
		{"1000000000", 2, "at most 1048576 rows per batch"},
	} {
		t.Run(c.value, func(t *testing.T) {
			var stdout, stderr bytes.Buffer
			code := run(context.Background(), []string{"enrich", "in.csv", "--batch-rows", c.value, "-q", "-o", "out.csv", "--force"}, nil, &stdout, &stderr)
			assert.Equal(t, c.code, code, stderr.String())
			assert.Contains(t, stderr.String(), c.stderr)
		})
	}
}

func TestHelpHasExamples(t *testing.T) {
	for _, cmd := range []string{"enrich", "inspect"} {
		var stdout, stderr bytes.Buffer
		code := run(context.Background(), []string{cmd, "--help"}, nil, &stdout, &stderr)
		assert.Equal(t, 0, code)
		assert.Contains(t, stderr.String(), "heliotag "+cmd+" testdata/demo/", "worked example in %s --help", cmd)
	}
}

func TestUsageErrors(t *testing.T) {
	cases := []struct {
		args []string
		msg  string
	}{
		{[]string{}, "Usage"},
		{[]string{"frobnicate"}, `unknown command "frobnicate"`},
		{[]string{"enrich"}, "missing INPUT"},
		{[]string{"enrich", "a.csv", "b.csv"}, "one INPUT expected"},
		{[]string{"enrich", "a.csv", "--on-bad-row", "ignore"}, "valid: fail, skip, keep"},
		{[]string{"enrich", "a.xyz"}, "give --from"},
		{[]string{"enrich", "-", "--from", "csv", "--on-bad-row", "skip"}, "needs --rejects"},
		{[]string{"enrich", "a.csv", "--add", "sunshine"}, `unknown column group "sunshine"`},
		{[]string{"enrich", "a.csv", "--progress", "sometimes"}, "valid: auto, never, always"},
	}
	for _, c := range cases {
		t.Run(strings.Join(c.args, " "), func(t *testing.T) {
			var stdout, stderr bytes.Buffer
			code := run(context.Background(), c.args, strings.NewReader(""), &stdout, &stderr)
			assert.Equal(t, 2, code)
			assert.Contains(t, stderr.String(), c.msg)
		})
	}
}

// TestPublishedEventsThroughCLI: rise, set and twilight times from published
// tables come out of the whole command (events group), within the tables'
// one-minute printing plus the output's rounding to the second.
func TestPublishedEventsThroughCLI(t *testing.T) {
	type check struct {
		column string
		want   string // local clock time hh:mm as printed in the source
	}
	cases := []struct {
		source    string
		lat, lon  float64
		timestamp string // noon of the date, with the table's UTC offset
		checks    []check
	}{
		// USNO sun rise/set table, San Francisco (W122°26′, N37°46′), PST (UTC−8), 2012
		// (REFERENCE-VALUES.md §4).
		{"USNO SF 2012-01-01", 37 + 46.0/60, -(122 + 26.0/60), "2012-01-01T12:00:00-08:00", []check{{"sun_rise", "07:25"}, {"sun_set", "17:01"}}},
		{"USNO SF 2012-03-20", 37 + 46.0/60, -(122 + 26.0/60), "2012-03-20T12:00:00-08:00", []check{{"sun_rise", "06:12"}, {"sun_set", "18:22"}}},
		{"USNO SF 2012-06-21", 37 + 46.0/60, -(122 + 26.0/60), "2012-06-21T12:00:00-08:00", []check{{"sun_rise", "04:48"}, {"sun_set", "19:35"}}},
		{"USNO SF 2012-09-22", 37 + 46.0/60, -(122 + 26.0/60), "2012-09-22T12:00:00-08:00", []check{{"sun_rise", "05:58"}, {"sun_set", "18:06"}}},
		{"USNO SF 2012-12-21", 37 + 46.0/60, -(122 + 26.0/60), "2012-12-21T12:00:00-08:00", []check{{"sun_rise", "07:22"}, {"sun_set", "16:55"}}},
		// USNO twilight tables, 2024-06-21, EST (UTC−5) (REFERENCE-VALUES.md §4).
		{"USNO Boston civil", 42.32, -71.09, "2024-06-21T12:00:00-05:00", []check{{"sun_civil_dawn", "03:33"}, {"sun_civil_dusk", "19:59"}}},
		{"USNO Hartford nautical/astronomical", 41.76, -72.69, "2024-06-21T12:00:00-05:00", []check{
			{"sun_nautical_dawn", "02:58"}, {"sun_nautical_dusk", "20:48"},
			{"sun_astronomical_dawn", "02:05"}, {"sun_astronomical_dusk", "21:41"}}},
		// Astronomical Almanac rise/set at longitude 0°, UT, as quoted in NREL/TP-560-34302
		// Table A2.1 (REFERENCE-VALUES.md §1).
		{"AA 1994-01-02 35N", 35, 0, "1994-01-02T12:00:00Z", []check{{"sun_rise", "07:08"}, {"sun_set", "17:00"}}},
		{"AA 2004-12-04 35S", -35, 0, "2004-12-04T12:00:00Z", []check{{"sun_rise", "04:39"}, {"sun_set", "19:02"}}},
	}
	dir := t.TempDir()
	var b strings.Builder
	b.WriteString("case,lat,lon,timestamp\n")
	for i, c := range cases {
		fmt.Fprintf(&b, "%d,%.6f,%.6f,%s\n", i, c.lat, c.lon, c.timestamp)
	}
	in := filepath.Join(dir, "published.csv")
	require.NoError(t, os.WriteFile(in, []byte(b.String()), 0o644))
	out := filepath.Join(dir, "out.csv")
	var stdout, stderr bytes.Buffer
	code := run(context.Background(), []string{"enrich", in, "--add", "events", "-o", out}, nil, &stdout, &stderr)
	require.Equal(t, 0, code, stderr.String())
	rows := readCSV(t, out)
	require.Len(t, rows, len(cases)+1)
	for i, c := range cases {
		for _, ch := range c.checks {
			got := rows[i+1][indexOf(t, rows[0], ch.column)]
			tm, err := time.Parse(time.RFC3339, got)
			require.NoError(t, err, "%s %s: %q", c.source, ch.column, got)
			want, err := time.Parse("2006-01-02 15:04 -07:00", c.timestamp[:10]+" "+ch.want+" "+tm.Format("-07:00"))
			require.NoError(t, err)
			// The table rounds to the minute: ±1 min, as the reference file says.
			assert.InDelta(t, 0, tm.Sub(want).Seconds(), 60, "%s %s: got %s, published %s", c.source, ch.column, got, ch.want)
		}
	}
}

// TestMoonThroughCLI: the moon group through the whole command at two
// instants known as common practice: the full moon of 23 April 2024 (23:49
// UTC, from memory) and the new moon of 8 April 2024 (18:21 UTC, the day of
// the total solar eclipse over North America, from memory).
func TestMoonThroughCLI(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "moon.csv")
	require.NoError(t, os.WriteFile(in, []byte("id,lat,lon,timestamp\n"+
		"full,0,0,2024-04-23T23:49:00Z\n"+
		"new,0,0,2024-04-08T18:21:00Z\n"), 0o644))
	out := filepath.Join(dir, "out.csv")
	var stdout, stderr bytes.Buffer
	code := run(context.Background(), []string{"enrich", in, "--add", "position,moon", "-o", out}, nil, &stdout, &stderr)
	require.Equal(t, 0, code, stderr.String())
	rows := readCSV(t, out)
	require.Len(t, rows, 3)
	col := func(r int, name string) string { return rows[r][indexOf(t, rows[0], name)] }
	num := func(r int, name string) float64 {
		v, err := strconv.ParseFloat(col(r, name), 64)
		require.NoError(t, err, name)
		return v
	}
	assert.Greater(t, num(1, "moon_illumination"), 0.995)
	assert.Equal(t, "full", col(1, "moon_phase"))
	// A full moon stands roughly opposite the sun (common practice).
	sep := math.Mod(num(1, "moon_azimuth_deg")-num(1, "sun_azimuth_deg")+360, 360)
	assert.InDelta(t, 180, sep, 20, "full moon opposite the sun in azimuth")
	assert.Less(t, num(2, "moon_illumination"), 0.005)
	assert.Equal(t, "new", col(2, "moon_phase"))
}

// TestFullDevice: output that cannot be written (stdout on /dev/full, or
// -o /dev/full) is a fatal error with a clear message and exit code 2.
func TestFullDevice(t *testing.T) {
	full, err := os.OpenFile("/dev/full", os.O_WRONLY, 0)
	if err != nil {
		t.Skip("no /dev/full on this system")
	}
	defer full.Close()
	dir := t.TempDir()
	in := filepath.Join(dir, "in.csv")
	var b strings.Builder
	b.WriteString("id,lat,lon,timestamp\n")
	for i := range 50000 { // more than the writer's buffer, so a write reaches the device
		fmt.Fprintf(&b, "%d,51.5,-0.12,2024-06-21T12:00:00Z\n", i)
	}
	require.NoError(t, os.WriteFile(in, []byte(b.String()), 0o644))
	var stderr bytes.Buffer
	code := run(context.Background(), []string{"enrich", in}, nil, full, &stderr)
	assert.Equal(t, 2, code)
	assert.Contains(t, stderr.String(), "writing output")
	assert.Contains(t, stderr.String(), "no space left on device")

	stderr.Reset()
	code = run(context.Background(), []string{"enrich", in, "--force", "-o", "/dev/full"}, nil, io.Discard, &stderr)
	assert.Equal(t, 2, code)
	assert.Contains(t, stderr.String(), "/dev/full")
}
