package camtrap

import (
	"context"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/heliotag/heliotag/enrich"
)

const testPackage = "testdata/quarrendale"

// miniPackage writes a package with the given descriptor resources section
// and files into a temporary folder and returns the folder.
func miniPackage(t *testing.T, profile string, resources string, files map[string]string) string {
	t.Helper()
	dir := t.TempDir()
	desc := `{"profile": "` + profile + `", "name": "mini", "resources": ` + resources + `}`
	require.NoError(t, os.WriteFile(filepath.Join(dir, DescriptorName), []byte(desc), 0o644))
	for name, content := range files {
		require.NoError(t, os.MkdirAll(filepath.Dir(filepath.Join(dir, name)), 0o755))
		require.NoError(t, os.WriteFile(filepath.Join(dir, name), []byte(content), 0o644))
	}
	return dir
}

func profileURL(v string) string { return ProfilePrefix + v + "/camtrap-dp-profile.json" }

const threeTables = `[
 {"name": "deployments", "path": "deployments.csv"},
 {"name": "media", "path": "media.csv"},
 {"name": "observations", "path": "observations.csv"}]`

var miniFiles = map[string]string{
	"deployments.csv":  "deploymentID,latitude,longitude,deploymentStart,deploymentEnd,cameraHeading,timestampIssues\nd1,10,20,2024-01-01T00:00:00Z,2024-02-01T00:00:00Z,360,false\n",
	"media.csv":        "mediaID,deploymentID,timestamp\nm1,d1,2024-01-10T12:00:00+01:00\n",
	"observations.csv": "observationID,deploymentID,mediaID,eventStart,eventEnd,observationType\no1,d1,m1,2024-01-10T12:00:00+01:00,2024-01-10T12:10:00+01:00,animal\n",
}

func TestOpenVersions(t *testing.T) {
	for _, v := range Versions {
		t.Run(v, func(t *testing.T) {
			dir := miniPackage(t, profileURL(v), threeTables, miniFiles)
			for _, path := range []string{dir, filepath.Join(dir, DescriptorName)} {
				assert.True(t, IsPackage(path), path)
				p, err := Open(path)
				require.NoError(t, err)
				assert.Equal(t, v, p.Version)
				assert.Equal(t, dir, p.Dir)
			}
		})
	}
	assert.False(t, IsPackage(filepath.Join(testPackage, "deployments.csv")))
	assert.False(t, IsPackage("testdata/no-such-folder"))
}

func TestOpenErrors(t *testing.T) {
	cases := []struct {
		name      string
		profile   string
		resources string
		files     map[string]string
		want      error
		msg       string
	}{
		{"other profile", "tabular-data-package", threeTables, miniFiles, ErrNotPackage, "camtrap-dp-profile.json"},
		{"unknown version", profileURL("0.9"), threeTables, miniFiles, ErrNotPackage, "1.0, 1.0.1, 1.0.2"},
		{"no media", profileURL("1.0"), `[{"name": "deployments", "path": "d.csv"}, {"name": "observations", "path": "o.csv"}]`, nil, ErrResource, `"media"`},
		{"csv and parquet in one resource", profileURL("1.0"), `[{"name": "deployments", "path": "d.csv"}, {"name": "media", "path": ["m.csv", "m2.parquet"]}, {"name": "observations", "path": "o.csv"}]`, nil, ErrUnsupported, "mixes Parquet (m2.parquet) and CSV (m.csv)"},
		{"gzipped parquet", profileURL("1.0"), `[{"name": "deployments", "path": "d.csv"}, {"name": "media", "path": "m.parquet.gz"}, {"name": "observations", "path": "o.csv"}]`, nil, ErrUnsupported, "gzipped Parquet"},
		{"remote", profileURL("1.0"), `[{"name": "deployments", "path": "https://example.org/d.csv"}, {"name": "media", "path": "m.csv"}, {"name": "observations", "path": "o.csv"}]`, nil, ErrUnsupported, "remote"},
		{"climbing out", profileURL("1.0"), `[{"name": "deployments", "path": "../d.csv"}, {"name": "media", "path": "m.csv"}, {"name": "observations", "path": "o.csv"}]`, nil, ErrResource, "leaves the package"},
		{"absolute", profileURL("1.0"), `[{"name": "deployments", "path": "/etc/d.csv"}, {"name": "media", "path": "m.csv"}, {"name": "observations", "path": "o.csv"}]`, nil, ErrResource, "relative"},
		{"no resources", profileURL("1.0"), `"none"`, nil, ErrNotPackage, "resources"},
		{"missing file", profileURL("1.0"), threeTables, map[string]string{"deployments.csv": "x\n", "observations.csv": "x\n"}, ErrResource, "media.csv"},
		{"other resource outside", profileURL("1.0"), strings.Replace(threeTables, `]`, `, {"name": "notes", "path": "../notes.txt"}]`, 1), miniFiles, ErrResource, "leaves the package"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := miniPackage(t, c.profile, c.resources, c.files)
			_, err := Open(dir)
			require.Error(t, err)
			assert.ErrorIs(t, err, c.want)
			assert.Contains(t, err.Error(), c.msg)
		})
	}
	dir := t.TempDir()
	require.NoError(t, os.WriteFile(filepath.Join(dir, DescriptorName), []byte(`{"profile": 1`), 0o644))
	_, err := Open(dir)
	assert.ErrorIs(t, err, ErrNotPackage)
	_, err = Open(t.TempDir())
	assert.ErrorIs(t, err, ErrNotPackage)
}

func TestParseAtAndTables(t *testing.T) {
	for s, want := range map[string]At{"": AtStart, "start": AtStart, "middle": AtMiddle, "end": AtEnd} {
		got, err := ParseAt(s)
		require.NoError(t, err)
		assert.Equal(t, want, got, s)
	}
	_, err := ParseAt("centre")
	assert.ErrorIs(t, err, enrich.ErrUsage)

	for s, want := range map[string][]string{
		"":                   {TableObservations},
		"media":              {TableMedia},
		"media,observations": {TableObservations, TableMedia},
		" Observations , ":   {TableObservations},
	} {
		got, err := ParseTables(s)
		require.NoError(t, err)
		assert.Equal(t, want, got, s)
	}
	for _, s := range []string{"deployments", ",", "obs"} {
		_, err := ParseTables(s)
		assert.ErrorIs(t, err, enrich.ErrUsage, s)
	}
}

func TestJoinNotes(t *testing.T) {
	assert.Equal(t, "", joinNotes("", ""))
	assert.Equal(t, "a", joinNotes("", "a"))
	assert.Equal(t, "a", joinNotes("a", ""))
	assert.Equal(t, "a;b", joinNotes("a", "b"))
	assert.Equal(t, "a;b", joinNotes("a;b", "b"))
}

func TestLoadDeployments(t *testing.T) {
	p, err := Open(testPackage)
	require.NoError(t, err)
	ds, err := p.LoadDeployments(Options{})
	require.NoError(t, err)
	assert.Equal(t, 4, ds.Len())
	assert.Equal(t, 3, ds.Headings())
	n := ds.Get("dep-north")
	require.NotNil(t, n)
	assert.NoError(t, n.Err)
	assert.Equal(t, 54.512, n.Lat)
	assert.Equal(t, -2.931, n.Lon)
	assert.Equal(t, 30.0, n.CoordinateUncertainty)
	assert.Equal(t, 270.0, n.Heading)
	// 2024-06-01T10:00:00+01:00 is 09:00 UTC.
	assert.Equal(t, time.Date(2024, 6, 1, 9, 0, 0, 0, time.UTC), n.Start.UTC())
	assert.True(t, ds.Get("dep-south").TimestampIssues)
	assert.True(t, math.IsNaN(ds.Get("dep-equator").Heading))
	assert.Nil(t, ds.Get("dep-missing"))

	// 360 is north; a bad latitude stays with its deployment.
	files := map[string]string{}
	for k, v := range miniFiles {
		files[k] = v
	}
	files["deployments.csv"] += "d2,91,20,,,,\nd3,x,20,,,,yes\n"
	dir := miniPackage(t, profileURL("1.0.2"), threeTables, files)
	p, err = Open(dir)
	require.NoError(t, err)
	ds, err = p.LoadDeployments(Options{})
	require.NoError(t, err)
	assert.Equal(t, 0.0, ds.Get("d1").Heading)
	assert.ErrorIs(t, ds.Get("d2").Err, ErrDeployment)
	assert.Contains(t, ds.Get("d2").Err.Error(), "latitude 91 out of range [-90, 90]")
	assert.ErrorIs(t, ds.Get("d3").Err, ErrDeployment)

	// A deploymentID twice is a problem of the whole table.
	files["deployments.csv"] = miniFiles["deployments.csv"] + "d1,1,2,,,,\n"
	p, err = Open(miniPackage(t, profileURL("1.0"), threeTables, files))
	require.NoError(t, err)
	_, err = p.LoadDeployments(Options{})
	assert.ErrorIs(t, err, ErrResource)
	assert.Contains(t, err.Error(), `"d1" appears twice`)

	// Offset-less deployment times need --tz.
	files["deployments.csv"] = "deploymentID,latitude,longitude,deploymentStart\nd1,10,20,2024-01-01 00:00\n"
	p, err = Open(miniPackage(t, profileURL("1.0"), threeTables, files))
	require.NoError(t, err)
	_, err = p.LoadDeployments(Options{})
	assert.ErrorIs(t, err, enrich.ErrUsage)
	assert.Contains(t, err.Error(), "--tz")
	ds, err = p.LoadDeployments(Options{TZ: "Africa/Lagos"})
	require.NoError(t, err)
	// Africa/Lagos is UTC+1 all year (common practice: West Africa Time has no daylight saving).
	assert.Equal(t, time.Date(2023, 12, 31, 23, 0, 0, 0, time.UTC), ds.Get("d1").Start.UTC())
}

// extract reads every row of table into Inputs, in one chunk.
func extract(t *testing.T, dir, table string, o Options) (*Reader, enrich.Chunk, *enrich.Inputs) {
	t.Helper()
	p, err := Open(dir)
	require.NoError(t, err)
	ds, err := p.LoadDeployments(o)
	require.NoError(t, err)
	rd, err := p.NewReader(table, ds, o)
	require.NoError(t, err)
	t.Cleanup(func() { rd.Close() })
	c, err := rd.Next(context.Background(), 1000)
	require.NoError(t, err)
	_, err = rd.Next(context.Background(), 1000)
	require.ErrorIs(t, err, io.EOF)
	in := new(enrich.Inputs)
	in.Reset(c.Len())
	c.Extract(in)
	return rd, c, in
}

func TestExtractObservations(t *testing.T) {
	_, c, in := extract(t, testPackage, TableObservations, Options{})
	require.Equal(t, 9, c.Len())
	row := func(id string) int {
		for i := range c.Len() {
			if c.Values(i)[0] == id {
				return i
			}
		}
		t.Fatalf("no row %s", id)
		return -1
	}
	o1, o2 := row("obs-1"), row("obs-2")
	// The same instant written with +01:00 and with Z.
	assert.True(t, in.Time[o1].Equal(in.Time[o2]))
	assert.Equal(t, time.Date(2024, 6, 12, 20, 47, 5, 0, time.UTC), in.Time[o1].UTC())
	_, off := time.Date(2024, 6, 12, 0, 0, 0, 0, in.Zone[o1]).Zone()
	assert.Equal(t, 3600, off, "the local date of +01:00 times is in +01:00")
	assert.Nil(t, in.Zone[o2], "UTC times take the local mean solar date")
	assert.Equal(t, 54.512, in.Lat[o1])
	assert.Equal(t, -2.931, in.Lon[o1])
	assert.Equal(t, 270.0, in.Heading[o1])

	// The southern deployment: +12:00, timestampIssues.
	o4 := row("obs-4")
	assert.Equal(t, time.Date(2024, 5, 10, 5, 20, 0, 0, time.UTC), in.Time[o4].UTC())
	assert.Equal(t, NoteTimestampIssues, in.Note[o4])
	// Negative offset, after the deployment's end.
	o5 := row("obs-5")
	assert.Equal(t, time.Date(2024, 9, 16, 13, 5, 0, 0, time.UTC), in.Time[o5].UTC())
	assert.Equal(t, NoteOutsideDeployment, in.Note[o5])
	// A blank observation is a row like any other.
	assert.NoError(t, in.Err[row("obs-3")])
	// The missing deployment is a bad row naming the field.
	var re *enrich.RowError
	require.ErrorAs(t, in.Err[row("obs-7")], &re)
	assert.ErrorIs(t, re, ErrNoDeployment)
	assert.Equal(t, "deploymentID", re.Column)
	for i := range c.Len() {
		if i != row("obs-7") {
			assert.NoError(t, in.Err[i], c.Values(i)[0])
		}
		assert.Equal(t, int64(i+2), c.Line(i), "line of row %d (header on line 1)", i+1)
	}
}

func TestExtractAt(t *testing.T) {
	// obs-9: eventStart 07:05+12:00, eventEnd 07:25+12:00.
	for _, c := range []struct {
		at   At
		want time.Time
	}{
		{AtStart, time.Date(2024, 5, 9, 19, 5, 0, 0, time.UTC)},
		{AtMiddle, time.Date(2024, 5, 9, 19, 15, 0, 0, time.UTC)},
		{AtEnd, time.Date(2024, 5, 9, 19, 25, 0, 0, time.UTC)},
	} {
		t.Run(c.at.String(), func(t *testing.T) {
			_, ch, in := extract(t, testPackage, TableObservations, Options{At: c.at})
			i := 8
			require.Equal(t, "obs-9", ch.Values(i)[0])
			assert.Equal(t, c.want, in.Time[i].UTC())
			_, off := time.Date(2024, 5, 10, 0, 0, 0, 0, in.Zone[i]).Zone()
			assert.Equal(t, 12*3600, off)
		})
	}
	files := map[string]string{}
	for k, v := range miniFiles {
		files[k] = v
	}
	files["observations.csv"] += "o2,d1,,2024-01-10T12:00:00+01:00,2024-01-10T11:00:00+01:00,animal\n" +
		"o3,d1,,2024-01-10T12:00:00+01:00,,animal\n" +
		"o4,d1,,2024-01-10 12:00,,animal\n"
	dir := miniPackage(t, profileURL("1.0"), threeTables, files)
	_, _, in := extract(t, dir, TableObservations, Options{At: AtMiddle})
	assert.NoError(t, in.Err[0])
	assert.Equal(t, time.Date(2024, 1, 10, 11, 5, 0, 0, time.UTC), in.Time[0].UTC())
	assert.ErrorIs(t, in.Err[1], ErrEventOrder)
	assert.Contains(t, in.Err[2].Error(), "expected an ISO 8601 time")
	assert.ErrorIs(t, in.Err[3], enrich.ErrFatal, "an offset-less time without --tz stops the run")

	// With --tz the offset-less time is read in that zone.
	_, _, in = extract(t, dir, TableObservations, Options{TZ: "UTC"})
	assert.NoError(t, in.Err[3])
	assert.Equal(t, time.Date(2024, 1, 10, 12, 0, 0, 0, time.UTC), in.Time[3].UTC())
}

func TestExtractMedia(t *testing.T) {
	rd, c, in := extract(t, testPackage, TableMedia, Options{})
	assert.Equal(t, "timestamp", rd.Roles().Time)
	require.Equal(t, 9, c.Len(), "two files, each with its header")
	assert.Equal(t, "med-s1", c.Values(3)[0])
	assert.Equal(t, "med-s2", c.Values(4)[0], "the gzipped second file")
	assert.Equal(t, int64(0), c.Line(4), "no line numbers for a resource of several files")
	assert.Equal(t, time.Date(2024, 5, 10, 5, 20, 30, 0, time.UTC), in.Time[4].UTC())
	assert.Equal(t, NoteOutsideDeployment, in.Note[5])
	assert.ErrorIs(t, in.Err[8], ErrNoDeployment)
}

func TestTableErrors(t *testing.T) {
	files := map[string]string{}
	for k, v := range miniFiles {
		files[k] = v
	}
	files["media2.csv"] = "mediaID,timestamp,deploymentID\nm2,2024-01-10T12:00:00Z,d1\n"
	res := strings.Replace(threeTables, `"path": "media.csv"`, `"path": ["media.csv", "media2.csv"]`, 1)
	p, err := Open(miniPackage(t, profileURL("1.0"), res, files))
	require.NoError(t, err)
	ds, err := p.LoadDeployments(Options{})
	require.NoError(t, err)
	rd, err := p.NewReader(TableMedia, ds, Options{})
	require.NoError(t, err)
	defer rd.Close()
	_, err = rd.Next(context.Background(), 10)
	assert.ErrorIs(t, err, ErrResource)
	assert.Contains(t, err.Error(), "differs")

	files["observations.csv"] = "observationID,deploymentID,eventEnd\no1,d1,2024-01-10T12:00:00Z\n"
	p, err = Open(miniPackage(t, profileURL("1.0"), threeTables, files))
	require.NoError(t, err)
	_, err = p.NewReader(TableObservations, ds, Options{})
	assert.ErrorIs(t, err, ErrResource)
	assert.Contains(t, err.Error(), "no field eventStart")
	_, err = p.NewReader(TableObservations, ds, Options{At: AtEnd})
	assert.NoError(t, err)
	_, err = p.NewReader(TableDeployments, ds, Options{})
	assert.ErrorIs(t, err, enrich.ErrUsage)

	files["observations.csv"] = "observationID,deploymentID,eventStart\no1,d1\n,d1,2024-01-10T12:00:00Z\n"
	dir := miniPackage(t, profileURL("1.0"), threeTables, files)
	_, _, in := extract(t, dir, TableObservations, Options{})
	assert.ErrorIs(t, in.Err[0], ErrFieldCount)
	assert.ErrorIs(t, in.Err[1], ErrEmptyID)
}

func TestCheckAdd(t *testing.T) {
	p, err := Open(testPackage)
	require.NoError(t, err)
	assert.NoError(t, p.CheckAdd(Tables))
	files := map[string]string{"x.csv": "a\n", "observations-sun.csv": "a\n"}
	for k, v := range miniFiles {
		files[k] = v
	}
	res := strings.Replace(threeTables, `]`, `, {"name": "media-sun", "path": "x.csv"}]`, 1)
	p, err = Open(miniPackage(t, profileURL("1.0"), res, files))
	require.NoError(t, err)
	assert.NoError(t, p.CheckAdd([]string{TableObservations}))
	assert.ErrorIs(t, p.CheckAdd(Tables), ErrResource)
	res = strings.Replace(threeTables, `]`, `, {"name": "other", "path": "observations-sun.csv"}]`, 1)
	p, err = Open(miniPackage(t, profileURL("1.0"), res, files))
	require.NoError(t, err)
	assert.ErrorIs(t, p.CheckAdd([]string{TableObservations}), ErrResource)
}

func TestDialectAndSize(t *testing.T) {
	files := map[string]string{}
	for k, v := range miniFiles {
		files[k] = v
	}
	files["observations.csv"] = "observationID;deploymentID;eventStart\no1;d1;2024-01-10T12:00:00+01:00\n"
	res := strings.Replace(threeTables, `"path": "observations.csv"`, `"path": "observations.csv", "dialect": {"delimiter": ";"}`, 1)
	dir := miniPackage(t, profileURL("1.0"), res, files)
	_, c, in := extract(t, dir, TableObservations, Options{})
	require.Equal(t, 1, c.Len())
	assert.NoError(t, in.Err[0])
	assert.Equal(t, time.Date(2024, 1, 10, 11, 0, 0, 0, time.UTC), in.Time[0].UTC())

	p, err := Open(dir)
	require.NoError(t, err)
	assert.Equal(t, int64(len(files["observations.csv"])), p.Size(TableObservations))
	p, err = Open(testPackage)
	require.NoError(t, err)
	assert.Equal(t, int64(0), p.Size(TableMedia), "a gzipped file: unknown")
}
