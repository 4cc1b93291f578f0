package job

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/internal/outfile"
	"github.com/heliotag/heliotag/io/camtrap"
)

const camtrapProfile = "https://raw.githubusercontent.com/tdwg/camtrap-dp/1.0.2/camtrap-dp-profile.json"

// writePackage writes a Camtrap DP package of three CSV tables into dir.
func writePackage(t *testing.T, dir, deployments, media, observations string) string {
	t.Helper()
	require.NoError(t, os.MkdirAll(dir, 0o755))
	desc := `{
  "profile": "` + camtrapProfile + `",
  "name": "invented",
  "resources": [
    {"name": "deployments", "path": "deployments.csv", "profile": "tabular-data-resource"},
    {"name": "media", "path": "media.csv", "profile": "tabular-data-resource"},
    {"name": "observations", "path": "observations.csv", "profile": "tabular-data-resource"}
  ]
}
`
	for name, content := range map[string]string{
		"datapackage.json": desc, "deployments.csv": deployments, "media.csv": media, "observations.csv": observations,
	} {
		require.NoError(t, os.WriteFile(filepath.Join(dir, name), []byte(content), 0o644))
	}
	return dir
}

const (
	smallDeployments = "deploymentID,latitude,longitude,deploymentStart,deploymentEnd,cameraHeading,timestampIssues\n" +
		"d1,51.5,-0.1,2024-01-01T00:00:00Z,2024-12-31T00:00:00Z,180,false\n" +
		"d2,-33.9,151.2,2024-01-01T00:00:00+11:00,2024-12-31T00:00:00+11:00,,true\n"
	smallMedia = "mediaID,deploymentID,timestamp\n" +
		"m1,d1,2024-06-21T13:02:00+01:00\n" +
		"m2,d2,2024-06-21T07:00:00+10:00\n"
	smallObservations = "observationID,deploymentID,mediaID,eventStart,eventEnd,observationType\n" +
		"o1,d1,m1,2024-06-21T13:02:00+01:00,2024-06-21T13:02:00+01:00,animal\n" +
		"o2,d9,,2024-06-21T12:00:00+01:00,2024-06-21T12:01:00+01:00,animal\n" +
		"o3,d2,m2,2024-06-21T07:00:00+10:00,2024-06-21T07:00:00+10:00,blank\n"
)

// TestPackageSameAsCSV enriches the same places and instants as a Camtrap
// DP package and as a CSV file, with every group, and compares the values.
func TestPackageSameAsCSV(t *testing.T) {
	dir := t.TempDir()
	rng := rand.New(rand.NewPCG(10, 3))
	offsets := []int{0, 5*3600 + 1800, -3 * 3600, 12*3600 + 2700, -9*3600 - 1800, 3600}
	var deps, obs, plain strings.Builder
	deps.WriteString("deploymentID,latitude,longitude,deploymentStart,deploymentEnd,cameraHeading,timestampIssues\n")
	obs.WriteString("observationID,deploymentID,mediaID,eventStart,eventEnd,observationType\n")
	plain.WriteString("id,lat,lon,timestamp,heading\n")
	type dep struct {
		lat, lon, heading string
		zone              *time.Location
	}
	var ds []dep
	for i, off := range offsets {
		d := dep{
			lat:     strconv.FormatFloat(rng.Float64()*140-70, 'f', 4, 64),
			lon:     strconv.FormatFloat(rng.Float64()*360-180, 'f', 4, 64),
			heading: strconv.Itoa(rng.IntN(360)),
			zone:    time.FixedZone("", off),
		}
		ds = append(ds, d)
		fmt.Fprintf(&deps, "dep%d,%s,%s,2020-01-01T00:00:00Z,2030-01-01T00:00:00Z,%s,false\n", i, d.lat, d.lon, d.heading)
	}
	base := time.Date(2024, 1, 1, 0, 0, 0, 0, time.UTC)
	for i := range 400 {
		k := rng.IntN(len(ds))
		ts := base.Add(time.Duration(rng.Int64N(int64(366 * 24 * time.Hour)))).Truncate(time.Second).In(ds[k].zone).Format(time.RFC3339)
		fmt.Fprintf(&obs, "o%d,dep%d,,%s,%s,animal\n", i, k, ts, ts)
		fmt.Fprintf(&plain, "o%d,%s,%s,%s,%s\n", i, ds[k].lat, ds[k].lon, ts, ds[k].heading)
	}
	pkg := writePackage(t, filepath.Join(dir, "pkg"), deps.String(), "mediaID,deploymentID,timestamp\n", obs.String())
	csvIn := filepath.Join(dir, "plain.csv")
	require.NoError(t, os.WriteFile(csvIn, []byte(plain.String()), 0o644))

	_, err := Enrich(context.Background(), Options{Input: pkg, Output: filepath.Join(dir, "out"), Add: "all", Workers: 2, BatchRows: 64}, nil, nil)
	require.NoError(t, err)
	_, err = Enrich(context.Background(), Options{Input: csvIn, Output: filepath.Join(dir, "plain_sun.csv"), Add: "all",
		Select: enrich.Select{Heading: "heading"}, Workers: 2, BatchRows: 64}, nil, nil)
	require.NoError(t, err)

	a := readAll(t, filepath.Join(dir, "out", "observations-sun.csv"))
	b := readAll(t, filepath.Join(dir, "plain_sun.csv"))
	require.Equal(t, len(a), len(b))
	col := map[string]int{}
	for j, name := range b[0] {
		col[name] = j
	}
	assert.Contains(t, a[0], "sun_glare", "--add all includes glare when every deployment has a cameraHeading")
	compared := 0
	for i := 1; i < len(a); i++ {
		require.Equal(t, a[i][0], b[i][col["id"]])
		for j := 1; j < len(a[0]); j++ {
			name := a[0][j]
			if name == "sun_time_note" {
				assert.Empty(t, a[i][j])
				continue
			}
			k, ok := col[name]
			require.True(t, ok, "column %s in the CSV output", name)
			// The same kernel on the same instants in the same batches:
			// the same text, digit for digit.
			if a[i][j] != b[i][k] {
				t.Errorf("row %s column %s: package %q, CSV %q", a[i][0], name, a[i][j], b[i][k])
			}
			compared++
		}
	}
	assert.Greater(t, compared, 400*20)
}

func TestPackageFailLeavesNothing(t *testing.T) {
	dir := t.TempDir()
	pkg := writePackage(t, filepath.Join(dir, "pkg"), smallDeployments, smallMedia, smallObservations)
	out := filepath.Join(dir, "out")
	res, err := Enrich(context.Background(), Options{Input: pkg, Output: out, Tables: "media,observations", Report: filepath.Join(dir, "r.json")}, nil, nil)
	require.Error(t, err)
	assert.ErrorIs(t, err, enrich.ErrBadRow)
	var re *enrich.RowError
	require.ErrorAs(t, err, &re)
	assert.Equal(t, int64(2), re.Row)
	assert.Equal(t, int64(3), re.Line)
	assert.Equal(t, "deploymentID", re.Column)
	assert.ErrorIs(t, err, camtrap.ErrNoDeployment)
	assert.True(t, strings.HasPrefix(err.Error(), "observations: row 2 (line 3)"), err.Error())
	assert.Equal(t, 2, res.ExitCode(err))
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		assert.Equal(t, "pkg", e.Name(), "nothing but the input: no output folder, temporary folder, rejects or report")
	}
}

func TestPackageCancelLeavesNothing(t *testing.T) {
	dir := t.TempDir()
	pkg := writePackage(t, filepath.Join(dir, "pkg"), smallDeployments, smallMedia, smallObservations)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err := Enrich(ctx, Options{Input: pkg, Output: filepath.Join(dir, "out"), Policy: enrich.PolicySkip}, nil, nil)
	assert.ErrorIs(t, err, context.Canceled)
	entries, _ := os.ReadDir(dir)
	assert.Len(t, entries, 1)
}

func TestPackagePolicies(t *testing.T) {
	dir := t.TempDir()
	pkg := writePackage(t, filepath.Join(dir, "pkg"), smallDeployments, smallMedia, smallObservations)

	out := filepath.Join(dir, "skip")
	res, err := Enrich(context.Background(), Options{Input: filepath.Join(pkg, "datapackage.json"), Output: out, Policy: enrich.PolicySkip, Tables: "observations,media"}, nil, nil)
	require.NoError(t, err)
	assert.Equal(t, 1, res.ExitCode(nil))
	require.Len(t, res.Tables, 2)
	assert.Equal(t, enrich.Summary{Read: 3, Written: 2, Rejected: 1}, pick(res.Tables[0].Summary))
	assert.Equal(t, enrich.Summary{Read: 2, Written: 2}, pick(res.Tables[1].Summary))
	assert.Equal(t, enrich.Summary{Read: 5, Written: 4, Rejected: 1}, pick(res.Summary))
	assert.Equal(t, out+".observations.rejects.csv", res.Tables[0].Rejects)
	rej := readAll(t, out+".observations.rejects.csv")
	require.Len(t, rej, 2)
	assert.Equal(t, []string{"2", `column "deploymentID": deployment not found: "d9" is not in the deployments table`, "o2", "d9"}, rej[1][:4])
	sun := readAll(t, filepath.Join(out, "observations-sun.csv"))
	require.Len(t, sun, 3)
	assert.Equal(t, []string{"o1", "o3"}, []string{sun[1][0], sun[2][0]})
	assert.Equal(t, "timestamp_issues", sun[2][len(sun[2])-1])
	// Media has no bad row: its rejects file holds the header only.
	assert.Len(t, readAll(t, out+".media.rejects.csv"), 1)

	out = filepath.Join(dir, "keep")
	res, err = Enrich(context.Background(), Options{Input: pkg, Output: out, Policy: enrich.PolicyKeep}, nil, nil)
	require.NoError(t, err)
	assert.Equal(t, 1, res.ExitCode(nil))
	assert.Equal(t, enrich.Summary{Read: 3, Written: 3, Kept: 1}, pick(res.Summary))
	sun = readAll(t, filepath.Join(out, "observations-sun.csv"))
	require.Len(t, sun, 4)
	assert.Equal(t, []string{"observationID", "sun_altitude_deg", "sun_azimuth_deg", "sun_phase", "sun_light_condition", "sun_time_note", "sun_error"}, sun[0])
	assert.Equal(t, []string{"o2", "", "", "", "", "", `column "deploymentID": deployment not found: "d9" is not in the deployments table`}, sun[2])
	_, err = os.Stat(filepath.Join(out, "media-sun.csv"))
	assert.ErrorIs(t, err, os.ErrNotExist, "--tables defaults to observations")
}

// pick keeps the row counts of a summary.
func pick(s enrich.Summary) enrich.Summary {
	return enrich.Summary{Read: s.Read, Written: s.Written, Rejected: s.Rejected, Kept: s.Kept}
}

func TestPackageOutputChecks(t *testing.T) {
	dir := t.TempDir()
	pkg := writePackage(t, filepath.Join(dir, "pkg"), "deploymentID,latitude,longitude\nd1,51.5,-0.1\n", smallMedia, "observationID,deploymentID,eventStart\no1,d1,2024-06-21T12:00:00+01:00\n")
	ctx := context.Background()
	cases := []struct {
		name string
		o    Options
		want error
		msg  string
	}{
		{"no output", Options{}, enrich.ErrUsage, "-o DIR"},
		{"into the input", Options{Output: pkg}, outfile.ErrInsideInput, "overlaps"},
		{"inside the input", Options{Output: filepath.Join(pkg, "sun")}, outfile.ErrInsideInput, "overlaps"},
		{"column flag", Options{Output: filepath.Join(dir, "o"), Select: enrich.Select{Lat: "lat"}}, enrich.ErrUsage, "--lat does not apply"},
		{"tz column", Options{Output: filepath.Join(dir, "o"), Select: enrich.Select{TZColumn: "tz"}}, enrich.ErrUsage, "--tz-column"},
		{"bad at", Options{Output: filepath.Join(dir, "o"), At: "noon"}, enrich.ErrUsage, "--at"},
		{"bad tables", Options{Output: filepath.Join(dir, "o"), Tables: "deployments"}, enrich.ErrUsage, "--tables"},
		{"glare without heading", Options{Output: filepath.Join(dir, "o"), Add: "glare"}, enrich.ErrUsage, "cameraHeading"},
		{"rejects inside the output", Options{Output: filepath.Join(dir, "o"), Policy: enrich.PolicySkip, Rejects: filepath.Join(dir, "o", "r.csv")}, enrich.ErrUsage, "outside the input and output"},
		{"report inside the input", Options{Output: filepath.Join(dir, "o"), Report: filepath.Join(pkg, "r.json")}, enrich.ErrUsage, "outside the input and output"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			c.o.Input = pkg
			_, err := Enrich(ctx, c.o, nil, nil)
			require.Error(t, err)
			assert.ErrorIs(t, err, c.want)
			assert.Contains(t, err.Error(), c.msg)
		})
	}
	entries, _ := os.ReadDir(dir)
	assert.Len(t, entries, 1, "nothing written")
	pkgEntries, _ := os.ReadDir(pkg)
	assert.Len(t, pkgEntries, 4, "nothing written into the input")

	// A folder is a package only with its datapackage.json.
	_, err := Enrich(ctx, Options{Input: dir, Output: filepath.Join(dir, "x")}, nil, nil)
	assert.ErrorIs(t, err, enrich.ErrUsage)
	assert.Contains(t, err.Error(), "folder without a datapackage.json")

	// --at and --tables belong to packages.
	csvIn := filepath.Join(dir, "in.csv")
	require.NoError(t, os.WriteFile(csvIn, []byte("lat,lon,timestamp\n1,2,2024-01-01T00:00:00Z\n"), 0o644))
	_, err = Enrich(ctx, Options{Input: csvIn, Output: filepath.Join(dir, "x.csv"), At: "end"}, nil, nil)
	assert.ErrorIs(t, err, enrich.ErrUsage)
	require.NoError(t, os.Remove(csvIn))

	// An existing output is replaced only with --force.
	out := filepath.Join(dir, "out")
	_, err = Enrich(ctx, Options{Input: pkg, Output: out}, nil, nil)
	require.NoError(t, err)
	_, err = Enrich(ctx, Options{Input: pkg, Output: out}, nil, nil)
	assert.ErrorIs(t, err, outfile.ErrExists)
	require.NoError(t, os.WriteFile(filepath.Join(out, "stale.txt"), []byte("x"), 0o644))
	_, err = Enrich(ctx, Options{Input: pkg, Output: out, Force: true, Add: "position"}, nil, nil)
	require.NoError(t, err)
	_, err = os.Stat(filepath.Join(out, "stale.txt"))
	assert.ErrorIs(t, err, os.ErrNotExist, "the folder is replaced as a whole")
	sun := readAll(t, filepath.Join(out, "observations-sun.csv"))
	assert.Equal(t, []string{"observationID", "sun_altitude_deg", "sun_azimuth_deg", "sun_time_note"}, sun[0])
	entries, _ = os.ReadDir(dir)
	for _, e := range entries {
		assert.False(t, outfile.IsTemp(e.Name()), e.Name())
	}
}

func TestPackageGlare(t *testing.T) {
	dir := t.TempDir()
	pkg := writePackage(t, filepath.Join(dir, "pkg"), smallDeployments, smallMedia, smallObservations)
	// d2 has no cameraHeading: --add all leaves glare out ...
	out := filepath.Join(dir, "all")
	_, err := Enrich(context.Background(), Options{Input: pkg, Output: out, Add: "all", Policy: enrich.PolicySkip}, nil, nil)
	require.NoError(t, err)
	assert.NotContains(t, readAll(t, filepath.Join(out, "observations-sun.csv"))[0], "sun_glare")
	// ... and --add glare makes its rows bad rows.
	out = filepath.Join(dir, "glare")
	res, err := Enrich(context.Background(), Options{Input: pkg, Output: out, Add: "position,glare", Policy: enrich.PolicyKeep}, nil, nil)
	require.NoError(t, err)
	sun := readAll(t, filepath.Join(out, "observations-sun.csv"))
	assert.Equal(t, []string{"observationID", "sun_altitude_deg", "sun_azimuth_deg", "sun_relative_azimuth_deg", "sun_glare", "sun_time_note", "sun_error"}, sun[0])
	assert.Equal(t, int64(2), res.Summary.Kept)
	assert.Contains(t, sun[3][6], enrich.ErrNoHeading.Error(), "o3's deployment d2 has no cameraHeading")
	// o1: a camera facing south (180) at 51.5 N, 0.1 W at 12:02 UTC on 21
	// June, about when the sun crosses the meridian (the equation of time is
	// near -2 minutes at the June solstice, from memory): the sun stands
	// in the camera's view, but about 62 degrees high, too high for glare.
	az, err := strconv.ParseFloat(sun[1][3], 64)
	require.NoError(t, err)
	assert.Less(t, math.Abs(az), 2.0)
	assert.Equal(t, "none", sun[1][4])

}

func TestPackageReport(t *testing.T) {
	dir := t.TempDir()
	pkg := writePackage(t, filepath.Join(dir, "pkg"), smallDeployments, smallMedia, smallObservations)
	report := filepath.Join(dir, "run.json")
	_, err := Enrich(context.Background(), Options{Input: pkg, Output: filepath.Join(dir, "out"), Tables: "media,observations",
		At: "middle", Policy: enrich.PolicySkip, Report: report}, nil, nil)
	require.NoError(t, err)
	b, err := os.ReadFile(report)
	require.NoError(t, err)
	s := string(b)
	for _, want := range []string{`"format": "camtrap-dp"`, `"at": "middle"`, `"table": "observations"`, `"table": "media"`, `"rows_read": 3`, `"rows_rejected": 1`, `"rows_read": 5`} {
		assert.Contains(t, s, want)
	}
}

func TestPackageProgress(t *testing.T) {
	dir := t.TempDir()
	pkg := writePackage(t, filepath.Join(dir, "pkg"), smallDeployments, smallMedia, smallObservations)
	var rows, done, total int64
	calls := 0
	_, err := Enrich(context.Background(), Options{Input: pkg, Output: filepath.Join(dir, "out"), Tables: "observations,media",
		Policy: enrich.PolicySkip, BatchRows: 1, Workers: 1,
		OnProgress: func(r, d, tot int64) {
			assert.GreaterOrEqual(t, r, rows, "rows only grow")
			rows, done, total = r, d, tot
			calls++
		}}, nil, nil)
	require.NoError(t, err)
	assert.Equal(t, 5, calls, "one call per batch of one row over both tables")
	assert.Equal(t, int64(5), rows)
	assert.Equal(t, int64(len(smallObservations)+len(smallMedia)), total)
	assert.Equal(t, total, done)
}
