package camtrap_test

import (
	"bytes"
	"compress/gzip"
	"context"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/memory"
	pq "github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/camtrap"
	"github.com/heliotag/heliotag/job"
)

// csvRows reads a CSV file of the test package (gzipped or not): its header
// and its records.
func csvRows(t testing.TB, path string) ([]string, [][]string) {
	t.Helper()
	b, err := os.ReadFile(path)
	require.NoError(t, err)
	var r io.Reader = bytes.NewReader(b)
	if strings.HasSuffix(path, ".gz") {
		gz, err := gzip.NewReader(r)
		require.NoError(t, err)
		r = gz
	}
	all, err := csv.NewReader(r).ReadAll()
	require.NoError(t, err)
	return all[0], all[1:]
}

// Column kinds of a generated Parquet file; text is the default.
const (
	kindTimestamp = "timestamp[us, UTC]"              // RFC 3339 text parsed into an instant
	kindWall      = "timestamp[us]"                   // ISO local date-time text, no zone
	kindAuckland  = "timestamp[us, Pacific/Auckland]" // RFC 3339 text parsed into an instant
	kindFloat     = "float64"
	kindInt       = "int32"
	kindBool      = "bool"
)

// writeParquet writes header and rows as a Parquet file whose columns are
// all nullable, typed by kinds (by field name; strings otherwise), an empty
// text being a null, in row groups of 3 rows (several per file) or of
// rowGroup rows when given.
func writeParquet(t testing.TB, path string, header []string, rows [][]string, kinds map[string]string, rowGroup ...int) {
	t.Helper()
	mem := memory.NewCheckedAllocator(memory.NewGoAllocator())
	defer mem.AssertSize(t, 0)
	var fields []arrow.Field
	for _, name := range header {
		var ty arrow.DataType = arrow.BinaryTypes.String
		switch kinds[name] {
		case kindTimestamp:
			ty = &arrow.TimestampType{Unit: arrow.Microsecond, TimeZone: "UTC"}
		case kindWall:
			ty = &arrow.TimestampType{Unit: arrow.Microsecond}
		case kindAuckland:
			ty = &arrow.TimestampType{Unit: arrow.Microsecond, TimeZone: "Pacific/Auckland"}
		case kindFloat:
			ty = arrow.PrimitiveTypes.Float64
		case kindInt:
			ty = arrow.PrimitiveTypes.Int32
		case kindBool:
			ty = arrow.FixedWidthTypes.Boolean
		}
		fields = append(fields, arrow.Field{Name: name, Type: ty, Nullable: true})
	}
	sc := arrow.NewSchema(fields, nil)
	b := array.NewRecordBuilder(mem, sc)
	defer b.Release()
	for _, row := range rows {
		for j, v := range row {
			fb := b.Field(j)
			if v == "" {
				fb.AppendNull()
				continue
			}
			switch fb := fb.(type) {
			case *array.StringBuilder:
				fb.Append(v)
			case *array.TimestampBuilder:
				layout := time.RFC3339Nano
				if kinds[header[j]] == kindWall {
					layout = "2006-01-02T15:04:05.999999999"
				}
				tm, err := time.Parse(layout, v)
				require.NoError(t, err, v)
				fb.Append(arrow.Timestamp(tm.UnixMicro()))
			case *array.Float64Builder:
				x, err := strconv.ParseFloat(v, 64)
				require.NoError(t, err, v)
				fb.Append(x)
			case *array.Int32Builder:
				x, err := strconv.ParseInt(v, 10, 32)
				require.NoError(t, err, v)
				fb.Append(int32(x))
			case *array.BooleanBuilder:
				x, err := strconv.ParseBool(v)
				require.NoError(t, err, v)
				fb.Append(x)
			}
		}
	}
	rec := b.NewRecordBatch()
	defer rec.Release()
	f, err := os.Create(path)
	require.NoError(t, err)
	groups := int64(3)
	if len(rowGroup) > 0 {
		groups = int64(rowGroup[0])
	}
	w, err := pqarrow.NewFileWriter(sc, f, pq.NewWriterProperties(pq.WithMaxRowGroupLength(groups), pq.WithAllocator(mem)),
		pqarrow.NewArrowWriterProperties(pqarrow.WithStoreSchema(), pqarrow.WithAllocator(mem)))
	require.NoError(t, err)
	require.NoError(t, w.Write(rec))
	require.NoError(t, w.Close()) // closes f
}

// writeCSV writes header and rows as a CSV file.
func writeCSV(t testing.TB, path string, header []string, rows [][]string) {
	t.Helper()
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	require.NoError(t, w.Write(header))
	require.NoError(t, w.WriteAll(rows))
	require.NoError(t, os.WriteFile(path, buf.Bytes(), 0o644))
}

// inZ rewrites the RFC 3339 times of the named fields in UTC ("Z"), keeping
// any fraction of a second: the text a UTC-adjusted timestamp stands for.
func inZ(t *testing.T, header []string, rows [][]string, names ...string) [][]string {
	t.Helper()
	out := make([][]string, len(rows))
	for i, row := range rows {
		out[i] = append([]string(nil), row...)
		for j, h := range header {
			for _, n := range names {
				if h == n && row[j] != "" {
					tm, err := time.Parse(time.RFC3339Nano, row[j])
					require.NoError(t, err)
					out[i][j] = tm.UTC().Format(time.RFC3339Nano)
				}
			}
		}
	}
	return out
}

// pkgDescriptor is a package descriptor whose deployments, media and
// observations resources have the given paths (JSON values).
func pkgDescriptor(deps, media, obs string) string {
	return `{"profile": "` + camtrap.ProfilePrefix + `1.0.1/camtrap-dp-profile.json", "name": "quarrendale-parquet", "resources": [
 {"name": "deployments", "path": ` + deps + `, "profile": "tabular-data-resource"},
 {"name": "media", "path": ` + media + `, "profile": "tabular-data-resource"},
 {"name": "observations", "path": ` + obs + `, "profile": "tabular-data-resource"},
 {"name": "site-notes", "path": "extra/site-notes.csv"}]}
`
}

// quarrendaleCopies writes two forms of the test package (testdata/quarrendale):
// one with its tables as Parquet files and one with the same rows as CSV.
//   - strings: every field a string column (empty text as null), the times
//     exactly as in the CSV files (with their offsets), media in two
//     Parquet files like the CSV package's two; the CSV form is the test
//     package itself.
//   - typed: the times as timestamp[us, UTC], coordinates and
//     coordinateUncertainty as float64, cameraHeading as int32,
//     timestampIssues as bool, and one media timestamp with a fraction of
//     a second; the CSV form has the same rows, its times written in UTC.
func quarrendaleCopies(t *testing.T, typed bool) (pqDir, csvDir string) {
	t.Helper()
	root := t.TempDir()
	pqDir, csvDir = filepath.Join(root, "parquet"), filepath.Join(root, "csv")
	for _, d := range []string{pqDir, csvDir} {
		require.NoError(t, os.MkdirAll(filepath.Join(d, "extra"), 0o755))
		notes, err := os.ReadFile(filepath.Join(input, "extra", "site-notes.csv"))
		require.NoError(t, err)
		require.NoError(t, os.WriteFile(filepath.Join(d, "extra", "site-notes.csv"), notes, 0o644))
	}
	dh, drows := csvRows(t, filepath.Join(input, "deployments.csv"))
	oh, orows := csvRows(t, filepath.Join(input, "observations.csv"))
	mh, m1 := csvRows(t, filepath.Join(input, "media-part1.csv"))
	_, m2 := csvRows(t, filepath.Join(input, "media-part2.csv.gz"))
	if !typed {
		writeParquet(t, filepath.Join(pqDir, "deployments.parquet"), dh, drows, nil)
		writeParquet(t, filepath.Join(pqDir, "observations.parquet"), oh, orows, nil)
		writeParquet(t, filepath.Join(pqDir, "media-part1.parquet"), mh, m1, nil)
		writeParquet(t, filepath.Join(pqDir, "media-part2.parquet"), mh, m2, nil)
		require.NoError(t, os.WriteFile(filepath.Join(pqDir, camtrap.DescriptorName),
			[]byte(pkgDescriptor(`"deployments.parquet"`, `["media-part1.parquet", "media-part2.parquet"]`, `"observations.parquet"`)), 0o644))
		return pqDir, input
	}
	media := append(append([][]string(nil), m1...), m2...)
	for j, h := range mh {
		if h == "timestamp" {
			media[1][j] = "2024-06-12T21:47:09.123456+01:00" // med-n2
		}
	}
	drows = inZ(t, dh, drows, "deploymentStart", "deploymentEnd")
	orows = inZ(t, oh, orows, "eventStart", "eventEnd", "classificationTimestamp")
	media = inZ(t, mh, media, "timestamp")
	kinds := map[string]string{
		"deploymentStart": kindTimestamp, "deploymentEnd": kindTimestamp, "eventStart": kindTimestamp, "eventEnd": kindTimestamp,
		"classificationTimestamp": kindTimestamp, "timestamp": kindTimestamp,
		"latitude": kindFloat, "longitude": kindFloat, "coordinateUncertainty": kindFloat,
		"cameraHeading": kindInt, "timestampIssues": kindBool, "count": kindInt,
	}
	writeParquet(t, filepath.Join(pqDir, "deployments.parquet"), dh, drows, kinds)
	writeParquet(t, filepath.Join(pqDir, "observations.parquet"), oh, orows, kinds)
	writeParquet(t, filepath.Join(pqDir, "media.parquet"), mh, media, kinds)
	// Declared by format rather than by extension.
	require.NoError(t, os.Rename(filepath.Join(pqDir, "observations.parquet"), filepath.Join(pqDir, "observations.pq")))
	desc := strings.Replace(pkgDescriptor(`"deployments.parquet"`, `"media.parquet"`, `"observations.pq"`),
		`"path": "observations.pq",`, `"path": "observations.pq", "format": "parquet",`, 1)
	require.NoError(t, os.WriteFile(filepath.Join(pqDir, camtrap.DescriptorName), []byte(desc), 0o644))
	writeCSV(t, filepath.Join(csvDir, "deployments.csv"), dh, drows)
	writeCSV(t, filepath.Join(csvDir, "observations.csv"), oh, orows)
	writeCSV(t, filepath.Join(csvDir, "media.csv"), mh, media)
	require.NoError(t, os.WriteFile(filepath.Join(csvDir, camtrap.DescriptorName),
		[]byte(pkgDescriptor(`"deployments.csv"`, `"media.csv"`, `"observations.csv"`)), 0o644))
	return pqDir, csvDir
}

// TestParquetMatchesCSV enriches the Parquet and the CSV form of the same
// package and compares the outputs: the sun tables byte for byte (same
// rows, same values, same notes), the same bad rows with the same reasons
// and row numbers (a Parquet rejects file holds the fields read: the ID,
// deploymentID and the time fields, each equal to the CSV row's), the same
// row counts, and every input file copied byte for byte.
func TestParquetMatchesCSV(t *testing.T) {
	for _, typed := range []bool{false, true} {
		name := map[bool]string{false: "strings", true: "typed"}[typed]
		t.Run(name, func(t *testing.T) {
			pqDir, csvDir := quarrendaleCopies(t, typed)
			for _, at := range []string{"start", "middle"} {
				t.Run("at="+at, func(t *testing.T) {
					outs := map[string]string{}
					results := map[string]job.Result{}
					for form, in := range map[string]string{"parquet": pqDir, "csv": csvDir} {
						out := filepath.Join(t.TempDir(), "out")
						res, err := job.Enrich(context.Background(), job.Options{
							Input: in, Output: out, Tables: "observations,media", Add: "all", At: at,
							Policy: enrich.PolicySkip, Workers: 2, BatchRows: 2,
						}, nil, nil)
						require.NoError(t, err, form)
						outs[form], results[form] = out, res
					}
					rp, rc := results["parquet"], results["csv"]
					require.Len(t, rp.Tables, 2)
					require.Len(t, rc.Tables, 2)
					for i := range rp.Tables {
						sp, sc := rp.Tables[i].Summary, rc.Tables[i].Summary
						assert.Equal(t, int64(9), sp.Read, rp.Tables[i].Table)
						assert.Equal(t, sc.Read, sp.Read, "rows read")
						assert.Equal(t, sc.Written, sp.Written, "rows written")
						assert.Equal(t, sc.Rejected, sp.Rejected, "rows rejected")
						assert.Equal(t, sp.Read, sp.Written+sp.Rejected, "rows read = written + rejected")
						assert.Equal(t, sc.Reasons, sp.Reasons)
						assert.Equal(t, sc.Phases, sp.Phases)
					}
					for _, table := range camtrap.Tables {
						name := camtrap.SunName(table) + ".csv"
						want, err := os.ReadFile(filepath.Join(outs["csv"], name))
						require.NoError(t, err)
						got, err := os.ReadFile(filepath.Join(outs["parquet"], name))
						require.NoError(t, err)
						assert.Equal(t, string(want), string(got), name)
						if table == camtrap.TableObservations {
							assert.Contains(t, string(got), camtrap.NoteOutsideDeployment)
							assert.Contains(t, string(got), camtrap.NoteTimestampIssues)
						}
						compareRejects(t, outs["csv"]+"."+table+".rejects.csv", outs["parquet"]+"."+table+".rejects.csv")
					}
					for rel, b := range tree(t, pqDir) {
						if rel == camtrap.DescriptorName {
							continue
						}
						got, err := os.ReadFile(filepath.Join(outs["parquet"], filepath.FromSlash(rel)))
						require.NoError(t, err, rel)
						assert.True(t, bytes.Equal(b, got), "%s is copied byte for byte", rel)
					}
				})
			}
		})
	}
}

// compareRejects checks that a Parquet table's rejects file has the rows of
// the CSV table's, each field it holds equal to the CSV row's field of that name.
func compareRejects(t *testing.T, csvPath, pqPath string) {
	t.Helper()
	wh, want := csvRows(t, csvPath)
	gh, got := csvRows(t, pqPath)
	require.Len(t, got, len(want), pqPath)
	assert.Equal(t, []string{"row", "reason"}, gh[:2])
	assert.Less(t, len(gh), len(wh), "only the fields read")
	for i := range want {
		for j, name := range gh {
			k := -1
			for x, n := range wh {
				if n == name {
					k = x
				}
			}
			require.GreaterOrEqual(t, k, 0, "field %s", name)
			assert.Equal(t, want[i][k], got[i][j], "rejected row %d, field %s", i+1, name)
		}
	}
}

// TestParquetNoLeak reads every table of both Parquet forms with a checked
// allocator, in full and stopping after the first chunk, and checks that
// the Arrow memory is all released; and that the rows read equal the CSV
// form's (the same text, field for field).
func TestParquetNoLeak(t *testing.T) {
	for _, typed := range []bool{false, true} {
		pqDir, csvDir := quarrendaleCopies(t, typed)
		for _, whole := range []bool{true, false} {
			mem := memory.NewCheckedAllocator(memory.NewGoAllocator())
			o := camtrap.Options{At: camtrap.AtMiddle, Allocator: mem}
			p, err := camtrap.Open(pqDir)
			require.NoError(t, err)
			ds, err := p.LoadDeployments(o)
			require.NoError(t, err)
			mem.AssertSize(t, 0)
			pc, err := camtrap.Open(csvDir)
			require.NoError(t, err)
			dc, err := pc.LoadDeployments(camtrap.Options{})
			require.NoError(t, err)
			require.Equal(t, dc.Len(), ds.Len())
			for _, id := range []string{"dep-north", "dep-south", "dep-west", "dep-equator"} {
				a, b := dc.Get(id), ds.Get(id)
				require.NotNil(t, b, id)
				assert.Equal(t, a.Lat, b.Lat, id)
				assert.Equal(t, a.Lon, b.Lon, id)
				assert.True(t, a.Start.Equal(b.Start) && a.End.Equal(b.End), id)
				assert.Equal(t, math.IsNaN(a.Heading), math.IsNaN(b.Heading), id)
				if !math.IsNaN(a.Heading) {
					assert.Equal(t, a.Heading, b.Heading, id)
				}
				assert.Equal(t, a.TimestampIssues, b.TimestampIssues, id)
				assert.Equal(t, math.IsNaN(a.CoordinateUncertainty), math.IsNaN(b.CoordinateUncertainty), id)
				if !math.IsNaN(a.CoordinateUncertainty) {
					assert.Equal(t, a.CoordinateUncertainty, b.CoordinateUncertainty, id)
				}
			}
			for _, table := range camtrap.Tables {
				rd, err := p.NewReader(table, ds, o)
				require.NoError(t, err)
				rc, err := pc.NewReader(table, dc, camtrap.Options{At: camtrap.AtMiddle})
				require.NoError(t, err)
				for {
					c, err := rd.Next(context.Background(), 4)
					if err == io.EOF {
						break
					}
					require.NoError(t, err)
					cc, err := rc.Next(context.Background(), 4)
					require.NoError(t, err)
					require.Equal(t, cc.Len(), c.Len())
					ip, ic := new(enrich.Inputs), new(enrich.Inputs)
					ip.Reset(c.Len())
					ic.Reset(cc.Len())
					c.Extract(ip)
					cc.Extract(ic)
					for i := range c.Len() {
						assert.Equal(t, cc.Values(i)[0], c.Values(i)[0], "ID")
						assert.True(t, ic.Time[i].Equal(ip.Time[i]), "%s: %v, want %v", c.Values(i)[0], ip.Time[i], ic.Time[i])
						assert.Equal(t, ic.Note[i], ip.Note[i])
						assert.Equal(t, ic.Err[i] == nil, ip.Err[i] == nil)
						assert.Equal(t, int64(0), c.Line(i), "Parquet rows have no lines")
					}
					if !whole {
						break
					}
				}
				require.NoError(t, rd.Close())
				require.NoError(t, rc.Close())
				mem.AssertSize(t, 0)
			}
		}
	}
}

// TestParquetTimes reads an observations table whose times are typed
// columns: an instant with a fraction of a second, a wall-clock time
// without a zone (which needs --tz, as offset-less text does), and a null.
func TestParquetTimes(t *testing.T) {
	dir := t.TempDir()
	require.NoError(t, os.MkdirAll(filepath.Join(dir, "extra"), 0o755))
	writeCSV(t, filepath.Join(dir, "extra", "site-notes.csv"), []string{"note"}, nil)
	writeCSV(t, filepath.Join(dir, "deployments.csv"), []string{"deploymentID", "latitude", "longitude"}, [][]string{{"d1", "10", "20"}})
	writeCSV(t, filepath.Join(dir, "media.csv"), []string{"mediaID", "deploymentID", "timestamp"}, nil)
	header := []string{"observationID", "deploymentID", "eventStart", "eventEnd"}
	writeParquet(t, filepath.Join(dir, "instant.parquet"), header, [][]string{
		{"o1", "d1", "2024-01-10T11:00:00.25Z", "2024-01-10T11:10:00Z"},
		{"o2", "d1", "", "2024-01-10T11:10:00Z"},
	}, map[string]string{"eventStart": kindTimestamp, "eventEnd": kindTimestamp})
	writeParquet(t, filepath.Join(dir, "wall.parquet"), header, [][]string{
		{"o1", "d1", "2024-01-10T12:00:00", "2024-01-10T12:10:00"},
	}, map[string]string{"eventStart": kindWall, "eventEnd": kindWall})
	write := func(obs string) string {
		desc := pkgDescriptor(`"deployments.csv"`, `"media.csv"`, `"`+obs+`"`)
		require.NoError(t, os.WriteFile(filepath.Join(dir, camtrap.DescriptorName), []byte(desc), 0o644))
		return dir
	}
	read := func(o camtrap.Options, columns []string) (enrich.Chunk, *enrich.Inputs) {
		p, err := camtrap.Open(dir)
		require.NoError(t, err)
		ds, err := p.LoadDeployments(o)
		require.NoError(t, err)
		rd, err := p.NewReader(camtrap.TableObservations, ds, o)
		require.NoError(t, err)
		t.Cleanup(func() { rd.Close() })
		assert.Equal(t, columns, rd.Columns(), "the fields read, in the file's order")
		c, err := rd.Next(context.Background(), 10)
		require.NoError(t, err)
		in := new(enrich.Inputs)
		in.Reset(c.Len())
		c.Extract(in)
		return c, in
	}

	write("instant.parquet")
	c, in := read(camtrap.Options{At: camtrap.AtMiddle}, header)
	require.Equal(t, 2, c.Len())
	assert.Equal(t, "2024-01-10T11:00:00.25Z", c.Values(0)[2], "the fraction is kept")
	assert.NoError(t, in.Err[0])
	assert.Equal(t, time.Date(2024, 1, 10, 11, 5, 0, 125e6, time.UTC), in.Time[0], "halfway from 11:00:00.25 to 11:10")
	assert.Nil(t, in.Zone[0], "a UTC instant takes the local mean solar date")
	assert.Equal(t, "", c.Values(1)[2], "null is empty")
	assert.ErrorContains(t, in.Err[1], "expected an ISO 8601 time")

	write("wall.parquet")
	_, in = read(camtrap.Options{}, header[:3])
	assert.ErrorIs(t, in.Err[0], enrich.ErrFatal, "a wall-clock time without --tz stops the run")
	assert.ErrorContains(t, in.Err[0], "--tz")
	c, in = read(camtrap.Options{TZ: "Africa/Lagos", At: camtrap.AtEnd}, []string{"observationID", "deploymentID", "eventEnd"})
	assert.Equal(t, "2024-01-10T12:10:00", c.Values(0)[2])
	require.NoError(t, in.Err[0])
	// Africa/Lagos is UTC+1 all year (common practice: West Africa Time has no daylight saving).
	assert.Equal(t, time.Date(2024, 1, 10, 11, 10, 0, 0, time.UTC), in.Time[0].UTC())
}

// TestParquetStoredSchema: the Arrow schema stored in a file gives an
// instant column's zone (its values read at that zone's offset), and a file
// whose stored schema is damaged is refused before it is decoded.
func TestParquetStoredSchema(t *testing.T) {
	dir := t.TempDir()
	require.NoError(t, os.MkdirAll(filepath.Join(dir, "extra"), 0o755))
	writeCSV(t, filepath.Join(dir, "extra", "site-notes.csv"), []string{"note"}, nil)
	writeCSV(t, filepath.Join(dir, "deployments.csv"), []string{"deploymentID", "latitude", "longitude"}, [][]string{{"d1", "10", "20"}})
	writeCSV(t, filepath.Join(dir, "media.csv"), []string{"mediaID", "deploymentID", "timestamp"}, nil)
	header := []string{"observationID", "deploymentID", "eventStart"}
	writeParquet(t, filepath.Join(dir, "zoned.parquet"), header, [][]string{{"o1", "d1", "2024-06-12T20:47:05Z"}},
		map[string]string{"eventStart": kindAuckland})

	// A file whose "ARROW:schema" entry is not an Arrow schema message.
	md := arrow.NewMetadata([]string{"ARROW:schema"}, []string{"/////wAAAAA="})
	sc := arrow.NewSchema([]arrow.Field{{Name: "observationID", Type: arrow.BinaryTypes.String}}, &md)
	f, err := os.Create(filepath.Join(dir, "damaged.parquet"))
	require.NoError(t, err)
	w, err := pqarrow.NewFileWriter(sc, f, pq.NewWriterProperties(), pqarrow.NewArrowWriterProperties())
	require.NoError(t, err)
	require.NoError(t, w.Close())

	open := func(obs string) *camtrap.Package {
		desc := pkgDescriptor(`"deployments.csv"`, `"media.csv"`, `"`+obs+`"`)
		require.NoError(t, os.WriteFile(filepath.Join(dir, camtrap.DescriptorName), []byte(desc), 0o644))
		p, err := camtrap.Open(dir)
		require.NoError(t, err)
		return p
	}
	mem := memory.NewCheckedAllocator(memory.NewGoAllocator())
	defer mem.AssertSize(t, 0)
	o := camtrap.Options{Allocator: mem}
	p := open("zoned.parquet")
	ds, err := p.LoadDeployments(o)
	require.NoError(t, err)
	rd, err := p.NewReader(camtrap.TableObservations, ds, o)
	require.NoError(t, err)
	c, err := rd.Next(context.Background(), 10)
	require.NoError(t, err)
	in := new(enrich.Inputs)
	in.Reset(c.Len())
	c.Extract(in)
	// Pacific/Auckland is UTC+12 in June (common practice: New Zealand Standard Time; daylight saving is September to April).
	assert.Equal(t, "2024-06-13T08:47:05+12:00", c.Values(0)[2])
	require.NoError(t, in.Err[0])
	assert.True(t, in.Time[0].Equal(time.Date(2024, 6, 12, 20, 47, 5, 0, time.UTC)), "%v", in.Time[0])
	require.NotNil(t, in.Zone[0], "the local date at the value's offset, as the same text in a CSV file gives")
	_, off := in.Time[0].In(in.Zone[0]).Zone()
	assert.Equal(t, 12*3600, off)
	require.NoError(t, rd.Close())

	p = open("damaged.parquet")
	_, err = p.NewReader(camtrap.TableObservations, ds, o)
	assert.ErrorIs(t, err, camtrap.ErrResource)
	assert.ErrorContains(t, err, "damaged.parquet (")
	assert.ErrorContains(t, err, "is not a readable Parquet file")
	assert.ErrorContains(t, err, "damaged stored Arrow schema")
}

// TestParquetErrors: a missing field, a later file without a field read, a
// file that is not Parquet, and a resource mixing CSV and Parquet.
func TestParquetErrors(t *testing.T) {
	dir := t.TempDir()
	require.NoError(t, os.MkdirAll(filepath.Join(dir, "extra"), 0o755))
	writeCSV(t, filepath.Join(dir, "extra", "site-notes.csv"), []string{"note"}, nil)
	writeCSV(t, filepath.Join(dir, "deployments.csv"), []string{"deploymentID", "latitude", "longitude"}, [][]string{{"d1", "10", "20"}})
	writeCSV(t, filepath.Join(dir, "media.csv"), []string{"mediaID", "deploymentID", "timestamp"}, nil)
	writeParquet(t, filepath.Join(dir, "o1.parquet"), []string{"observationID", "deploymentID", "eventStart"},
		[][]string{{"o1", "d1", "2024-01-10T11:00:00Z"}}, nil)
	writeParquet(t, filepath.Join(dir, "o2.parquet"), []string{"observationID", "deploymentID", "eventEnd"},
		[][]string{{"o2", "d1", "2024-01-10T11:00:00Z"}}, nil)
	require.NoError(t, os.WriteFile(filepath.Join(dir, "bad.parquet"), []byte("observationID\no1\n"), 0o644))
	open := func(obs string) *camtrap.Package {
		desc := pkgDescriptor(`"deployments.csv"`, `"media.csv"`, obs)
		require.NoError(t, os.WriteFile(filepath.Join(dir, camtrap.DescriptorName), []byte(desc), 0o644))
		p, err := camtrap.Open(dir)
		require.NoError(t, err)
		return p
	}
	p := open(`"o2.parquet"`)
	ds, err := p.LoadDeployments(camtrap.Options{})
	require.NoError(t, err)
	_, err = p.NewReader(camtrap.TableObservations, ds, camtrap.Options{})
	assert.ErrorIs(t, err, camtrap.ErrResource)
	assert.ErrorContains(t, err, "no field eventStart")

	p = open(`["o1.parquet", "o2.parquet"]`)
	rd, err := p.NewReader(camtrap.TableObservations, ds, camtrap.Options{})
	require.NoError(t, err)
	_, err = rd.Next(context.Background(), 10)
	assert.ErrorIs(t, err, camtrap.ErrResource)
	assert.ErrorContains(t, err, "o2.parquet has no field eventStart")
	rd.Close()

	p = open(`"bad.parquet"`)
	_, err = p.NewReader(camtrap.TableObservations, ds, camtrap.Options{})
	assert.ErrorIs(t, err, camtrap.ErrResource)
	assert.ErrorContains(t, err, "not a readable Parquet file")

	// A problem of the deployments table names the file's row.
	writeParquet(t, filepath.Join(dir, "d.parquet"), []string{"deploymentID", "latitude", "longitude"},
		[][]string{{"d1", "10", "20"}, {"d1", "11", "21"}}, map[string]string{"latitude": kindFloat, "longitude": kindFloat})
	require.NoError(t, os.WriteFile(filepath.Join(dir, camtrap.DescriptorName), []byte(pkgDescriptor(`"d.parquet"`, `"media.csv"`, `"o1.parquet"`)), 0o644))
	p, err = camtrap.Open(dir)
	require.NoError(t, err)
	_, err = p.LoadDeployments(camtrap.Options{})
	assert.ErrorIs(t, err, camtrap.ErrResource)
	assert.ErrorContains(t, err, `d.parquet row 2: deploymentID "d1" appears twice`)

	desc := pkgDescriptor(`"deployments.csv"`, `"media.csv"`, `["o1.parquet", "media.csv"]`)
	require.NoError(t, os.WriteFile(filepath.Join(dir, camtrap.DescriptorName), []byte(desc), 0o644))
	_, err = camtrap.Open(dir)
	assert.ErrorIs(t, err, camtrap.ErrUnsupported)
	assert.ErrorContains(t, err, "mixes Parquet (o1.parquet) and CSV (media.csv)")
}

// TestParquetBatches reads 20000 observations (three decoded batches of
// camtrap.ParquetBatchRows at most, in row groups of 7000 rows) from Parquet
// and from CSV in chunks of 1000, and checks every row's ID and instant, the
// row count, and that progress reaches the files' size.
func TestParquetBatches(t *testing.T) {
	dir := t.TempDir()
	const n = 20000
	require.Greater(t, n, 2*camtrap.ParquetBatchRows)
	require.NoError(t, os.MkdirAll(filepath.Join(dir, "extra"), 0o755))
	writeCSV(t, filepath.Join(dir, "extra", "site-notes.csv"), []string{"note"}, nil)
	writeCSV(t, filepath.Join(dir, "deployments.csv"), []string{"deploymentID", "latitude", "longitude"}, [][]string{{"d1", "10", "20"}})
	writeCSV(t, filepath.Join(dir, "media.csv"), []string{"mediaID", "deploymentID", "timestamp"}, nil)
	header := []string{"observationID", "deploymentID", "eventStart", "scientificName"}
	rows := make([][]string, n)
	base := time.Date(2024, 1, 2, 0, 0, 0, 0, time.UTC)
	for i := range rows {
		rows[i] = []string{"o" + strconv.Itoa(i), "d1", base.Add(time.Duration(i) * 97 * time.Second).Format(time.RFC3339), "Vulpes vulpes"}
	}
	writeParquet(t, filepath.Join(dir, "o.parquet"), header, rows, map[string]string{"eventStart": kindTimestamp}, 7000)
	writeCSV(t, filepath.Join(dir, "o.csv"), header, rows)
	mem := memory.NewCheckedAllocator(memory.NewGoAllocator())
	defer mem.AssertSize(t, 0)
	for _, obs := range []string{"o.parquet", "o.csv"} {
		desc := pkgDescriptor(`"deployments.csv"`, `"media.csv"`, `"`+obs+`"`)
		require.NoError(t, os.WriteFile(filepath.Join(dir, camtrap.DescriptorName), []byte(desc), 0o644))
		p, err := camtrap.Open(dir)
		require.NoError(t, err)
		o := camtrap.Options{Allocator: mem}
		ds, err := p.LoadDeployments(o)
		require.NoError(t, err)
		rd, err := p.NewReader(camtrap.TableObservations, ds, o)
		require.NoError(t, err)
		row := 0
		for {
			c, err := rd.Next(context.Background(), 1000)
			if err == io.EOF {
				break
			}
			require.NoError(t, err)
			in := new(enrich.Inputs)
			in.Reset(c.Len())
			c.Extract(in)
			for i := range c.Len() {
				require.Equal(t, rows[row][0], c.Values(i)[0], obs)
				require.NoError(t, in.Err[i])
				require.Equal(t, base.Add(time.Duration(row)*97*time.Second), in.Time[i], "%s row %d", obs, row+1)
				row++
			}
		}
		assert.Equal(t, n, row, obs)
		done, total := rd.Position()
		assert.Equal(t, p.Size(camtrap.TableObservations), total, obs)
		assert.Equal(t, total, done, "%s: progress at the end", obs)
		require.NoError(t, rd.Close())
	}
}

// BenchmarkReaderFormats reads and joins n observations (Next and Extract)
// from the same rows as CSV and as Parquet (eventStart as timestamp[us, UTC],
// row groups of 50000 rows), for the ratio of the two in one run.
func BenchmarkReaderFormats(b *testing.B) {
	const n = 100000
	dir := b.TempDir()
	require.NoError(b, os.MkdirAll(filepath.Join(dir, "extra"), 0o755))
	writeCSV(b, filepath.Join(dir, "extra", "site-notes.csv"), []string{"note"}, nil)
	writeCSV(b, filepath.Join(dir, "media.csv"), []string{"mediaID", "deploymentID", "timestamp"}, nil)
	var deps [][]string
	for d := range 50 {
		deps = append(deps, []string{fmt.Sprintf("dep-%02d", d), strconv.FormatFloat(40+float64(d)/10, 'f', 4, 64), strconv.FormatFloat(-3+float64(d)/20, 'f', 4, 64)})
	}
	writeCSV(b, filepath.Join(dir, "deployments.csv"), []string{"deploymentID", "latitude", "longitude"}, deps)
	header := []string{"observationID", "deploymentID", "mediaID", "eventID", "eventStart", "eventEnd", "observationLevel", "observationType", "scientificName", "count"}
	rows := make([][]string, n)
	base := time.Date(2024, 1, 2, 0, 0, 0, 0, time.UTC)
	for i := range rows {
		ts := base.Add(time.Duration(i) * 97 * time.Second).Format(time.RFC3339)
		rows[i] = []string{fmt.Sprintf("obs-%07d", i), fmt.Sprintf("dep-%02d", i%50), "", fmt.Sprintf("ev-%07d", i), ts, ts, "event", "animal", "Vulpes vulpes", "1"}
	}
	kinds := map[string]string{"eventStart": kindTimestamp, "eventEnd": kindTimestamp, "count": kindInt}
	writeParquet(b, filepath.Join(dir, "o.parquet"), header, rows, kinds, 50000)
	writeCSV(b, filepath.Join(dir, "o.csv"), header, rows)
	for _, obs := range []string{"o.csv", "o.parquet"} {
		b.Run(fmt.Sprintf("format=%s/n=%d", strings.TrimPrefix(filepath.Ext(obs), "."), n), func(b *testing.B) {
			desc := pkgDescriptor(`"deployments.csv"`, `"media.csv"`, `"`+obs+`"`)
			require.NoError(b, os.WriteFile(filepath.Join(dir, camtrap.DescriptorName), []byte(desc), 0o644))
			p, err := camtrap.Open(dir)
			require.NoError(b, err)
			ds, err := p.LoadDeployments(camtrap.Options{})
			require.NoError(b, err)
			in := new(enrich.Inputs)
			b.ReportAllocs()
			b.ResetTimer()
			for range b.N {
				rd, err := p.NewReader(camtrap.TableObservations, ds, camtrap.Options{})
				if err != nil {
					b.Fatal(err)
				}
				for {
					c, err := rd.Next(context.Background(), enrich.DefaultBatchRows)
					if err == io.EOF {
						break
					}
					if err != nil {
						b.Fatal(err)
					}
					in.Reset(c.Len())
					c.Extract(in)
				}
				rd.Close()
			}
			b.ReportMetric(float64(n*b.N)/b.Elapsed().Seconds(), "rows/s")
		})
	}
}

// TestFiles describes the files of each resource: Parquet files with their
// footer's row count, CSV files (gzipped or not) not counted, and the
// deployments in the table's order.
func TestFiles(t *testing.T) {
	pqDir, _ := quarrendaleCopies(t, true)
	p, err := camtrap.Open(pqDir)
	require.NoError(t, err)
	got := map[string][]camtrap.FileInfo{}
	for _, r := range p.Resources() {
		got[r.Name] = p.Files(r)
	}
	assert.Equal(t, map[string][]camtrap.FileInfo{
		"deployments":  {{Path: "deployments.parquet", Format: "parquet", Rows: 4}},
		"media":        {{Path: "media.parquet", Format: "parquet", Rows: 9}},
		"observations": {{Path: "observations.pq", Format: "parquet", Rows: 9}},
		"site-notes":   {{Path: "extra/site-notes.csv", Format: "csv", Rows: -1}},
	}, got)

	p, err = camtrap.Open(input)
	require.NoError(t, err)
	r, err := p.Resource(camtrap.TableMedia)
	require.NoError(t, err)
	assert.Equal(t, []camtrap.FileInfo{{Path: "media-part1.csv", Format: "csv", Rows: -1}, {Path: "media-part2.csv.gz", Format: "csv, gzipped", Rows: -1}}, p.Files(r))
	ds, err := p.LoadDeployments(camtrap.Options{})
	require.NoError(t, err)
	var ids []string
	for _, d := range ds.All() {
		ids = append(ids, d.ID)
	}
	assert.Equal(t, []string{"dep-north", "dep-south", "dep-west", "dep-equator"}, ids)
}

// FuzzParquetResource reads arbitrary bytes as an observations Parquet
// file: a file that cannot be read is an ErrResource error (never a panic
// or a runaway allocation), a readable one gives rows of the fields read
// and leaves no Arrow memory behind. (After some errors arrow-go v18.8.0
// does not release a buffer it had allocated, e.g. a page reader's when the
// column's codec is unknown: file.serializedPageReader.init. The Go
// allocator's buffers are then reclaimed by the garbage collector; the
// check is made on readable files only.) The seeds are valid files with
// string and timestamp columns, and testdata/fuzz holds inputs that
// failed before.
func FuzzParquetResource(f *testing.F) {
	seedDir := f.TempDir()
	header := []string{"observationID", "deploymentID", "eventStart"}
	rows := [][]string{{"o1", "d1", "2024-01-10T11:00:00.5Z"}, {"o2", "", ""}}
	for i, kinds := range []map[string]string{nil, {"eventStart": kindTimestamp}} {
		path := filepath.Join(seedDir, strconv.Itoa(i)+".parquet")
		writeParquet(f, path, header, rows, kinds)
		b, err := os.ReadFile(path)
		require.NoError(f, err)
		f.Add(b)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		dir := t.TempDir()
		require.NoError(t, os.MkdirAll(filepath.Join(dir, "extra"), 0o755))
		for name, content := range map[string]string{
			"extra/site-notes.csv": "note\n", "deployments.csv": "deploymentID,latitude,longitude\nd1,10,20\n",
			"media.csv": "mediaID,deploymentID,timestamp\n", "o.parquet": string(data),
			camtrap.DescriptorName: pkgDescriptor(`"deployments.csv"`, `"media.csv"`, `"o.parquet"`),
		} {
			require.NoError(t, os.WriteFile(filepath.Join(dir, name), []byte(content), 0o644))
		}
		mem := memory.NewCheckedAllocator(memory.NewGoAllocator())
		o := camtrap.Options{Allocator: mem}
		p, err := camtrap.Open(dir)
		require.NoError(t, err)
		ds, err := p.LoadDeployments(o)
		require.NoError(t, err)
		rd, err := p.NewReader(camtrap.TableObservations, ds, o)
		if err != nil {
			require.ErrorIs(t, err, camtrap.ErrResource)
			return
		}
		for {
			c, err := rd.Next(context.Background(), 100)
			if err == io.EOF {
				require.NoError(t, rd.Close())
				mem.AssertSize(t, 0)
				return
			}
			if err != nil {
				require.ErrorIs(t, err, camtrap.ErrResource)
				rd.Close()
				return
			}
			in := new(enrich.Inputs)
			in.Reset(c.Len())
			c.Extract(in)
			for i := range c.Len() {
				require.Len(t, c.Values(i), len(rd.Columns()))
			}
		}
	})
}
