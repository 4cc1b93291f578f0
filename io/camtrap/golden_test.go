package camtrap_test

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/csv"
	"encoding/json"
	"flag"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/camtrap"
	"github.com/heliotag/heliotag/job"
)

var update = flag.Bool("update", false, "rewrite testdata/*.golden from the actual output")

const (
	input  = "testdata/quarrendale"
	golden = "testdata/quarrendale.golden"
	// rejectsGolden holds the rejects files, which lie beside the output folder.
	rejectsGolden = "testdata/quarrendale.golden.rejects"
)

// tree returns the files under dir (relative, slash-separated) with their content.
func tree(t *testing.T, dir string) map[string][]byte {
	t.Helper()
	out := map[string][]byte{}
	require.NoError(t, filepath.WalkDir(dir, func(path string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		rel, _ := filepath.Rel(dir, path)
		b, err := os.ReadFile(path)
		out[filepath.ToSlash(rel)] = b
		return err
	}))
	return out
}

func digest(files map[string][]byte) map[string][32]byte {
	d := map[string][32]byte{}
	for k, v := range files {
		d[k] = sha256.Sum256(v)
	}
	return d
}

// TestGolden enriches the invented test package (four deployments at
// offsets +01:00, +12:00, -06:00 and Z; one with timestampIssues; an
// observation after its deployment's end; one whose deployment is missing;
// media-level, event-level and blank observations; media in two files, one
// gzipped) and compares the whole output folder with the golden folder.
func TestGolden(t *testing.T) {
	before := digest(tree(t, input))
	tmp := t.TempDir()
	out := filepath.Join(tmp, "out")
	res, err := job.Enrich(context.Background(), job.Options{
		Input: input, Output: out, Tables: "observations,media", Add: "all",
		Policy: enrich.PolicySkip, Workers: 2, BatchRows: 2,
	}, nil, nil)
	require.NoError(t, err)
	assert.Equal(t, 1, res.ExitCode(nil))
	require.Len(t, res.Tables, 2)
	for _, tr := range res.Tables {
		s := tr.Summary
		assert.Equal(t, int64(9), s.Read, tr.Table)
		assert.Equal(t, int64(1), s.Rejected, tr.Table)
		assert.Equal(t, s.Read, s.Written+s.Rejected, "%s: rows read = written + rejected", tr.Table)
	}
	assert.Equal(t, digest(tree(t, input)), before, "the input package is unchanged")

	got := tree(t, out)
	in := tree(t, input)
	for name, b := range in {
		if name == camtrap.DescriptorName {
			continue
		}
		assert.True(t, bytes.Equal(b, got[name]), "%s is copied byte for byte", name)
	}
	gotRejects := map[string][]byte{}
	for _, table := range []string{"observations", "media"} {
		b, err := os.ReadFile(out + "." + table + ".rejects.csv")
		require.NoError(t, err)
		gotRejects[table+".rejects.csv"] = b
	}

	if *update {
		for dir, files := range map[string]map[string][]byte{golden: got, rejectsGolden: gotRejects} {
			require.NoError(t, os.RemoveAll(dir))
			for name, b := range files {
				path := filepath.Join(dir, filepath.FromSlash(name))
				require.NoError(t, os.MkdirAll(filepath.Dir(path), 0o755))
				require.NoError(t, os.WriteFile(path, b, 0o644))
			}
		}
		return
	}
	want := tree(t, golden)
	for k, v := range tree(t, rejectsGolden) {
		want["rejects:"+k] = v
	}
	for k, v := range gotRejects {
		got["rejects:"+k] = v
	}
	var wantNames, gotNames []string
	for k := range want {
		wantNames = append(wantNames, k)
	}
	for k := range got {
		gotNames = append(gotNames, k)
	}
	assert.ElementsMatch(t, wantNames, gotNames, "the files of the output folder")
	for name, w := range want {
		if g, ok := got[name]; ok {
			if strings.HasSuffix(name, ".csv") {
				compareCSV(t, name, w, g)
			} else {
				assert.Equal(t, string(w), string(g), name)
			}
		}
	}
}

// compareCSV compares two CSV texts field by field: numbers within 0.0015
// (the batch kernel's stated accuracy plus rounding to 4 decimals), the rest exactly.
func compareCSV(t *testing.T, name string, want, got []byte) {
	t.Helper()
	if bytes.Equal(want, got) {
		return
	}
	wr, err := csv.NewReader(bytes.NewReader(want)).ReadAll()
	require.NoError(t, err, name)
	gr, err := csv.NewReader(bytes.NewReader(got)).ReadAll()
	require.NoError(t, err, name)
	require.Equal(t, len(wr), len(gr), "%s: rows", name)
	for i := range wr {
		require.Equal(t, len(wr[i]), len(gr[i]), "%s row %d: fields", name, i)
		for j := range wr[i] {
			if wr[i][j] == gr[i][j] {
				continue
			}
			a, errA := strconv.ParseFloat(wr[i][j], 64)
			b, errB := strconv.ParseFloat(gr[i][j], 64)
			if errA == nil && errB == nil && math.Abs(a-b) <= 0.0015 {
				continue
			}
			t.Errorf("%s row %d field %d: want %q, got %q", name, i, j+1, wr[i][j], gr[i][j])
		}
	}
}

// TestDescriptorKeepsEverything checks the output datapackage.json against
// the input's: every original property with its value and in its order,
// every original resource unchanged and first, and a new resource per table
// whose schema lists every column of its file with a type.
func TestDescriptorKeepsEverything(t *testing.T) {
	out := filepath.Join(t.TempDir(), "out")
	_, err := job.Enrich(context.Background(), job.Options{
		Input: filepath.Join(input, "datapackage.json"), Output: out, Tables: "media,observations",
		Add: "position,phase,events,moon", Prefix: "x_", Policy: enrich.PolicyKeep,
	}, nil, nil)
	require.NoError(t, err)

	var in, got map[string]any
	inRaw, err := os.ReadFile(filepath.Join(input, "datapackage.json"))
	require.NoError(t, err)
	gotRaw, err := os.ReadFile(filepath.Join(out, "datapackage.json"))
	require.NoError(t, err)
	require.NoError(t, json.Unmarshal(inRaw, &in))
	require.NoError(t, json.Unmarshal(gotRaw, &got))
	assert.Equal(t, len(in), len(got), "no property added or lost")
	for k, v := range in {
		if k == "resources" {
			continue
		}
		assert.Equal(t, v, got[k], "property %s", k)
	}
	assert.Equal(t, topKeys(t, inRaw), topKeys(t, gotRaw), "properties keep their order")

	inRes := in["resources"].([]any)
	gotRes := got["resources"].([]any)
	require.Len(t, gotRes, len(inRes)+2)
	for i := range inRes {
		assert.Equal(t, inRes[i], gotRes[i], "resource %d", i)
	}
	for i, table := range []string{"observations", "media"} {
		r := gotRes[len(inRes)+i].(map[string]any)
		assert.Equal(t, table+"-sun", r["name"])
		assert.Equal(t, table+"-sun.csv", r["path"])
		assert.Equal(t, "tabular-data-resource", r["profile"])
		schema := r["schema"].(map[string]any)
		id := camtrap.IDField(table)
		assert.Equal(t, id, schema["primaryKey"])
		fk := schema["foreignKeys"].([]any)[0].(map[string]any)
		assert.Equal(t, id, fk["fields"])
		assert.Equal(t, map[string]any{"resource": table, "fields": id}, fk["reference"])

		f, err := os.Open(filepath.Join(out, table+"-sun.csv"))
		require.NoError(t, err)
		header, err := csv.NewReader(f).Read()
		f.Close()
		require.NoError(t, err)
		fields := schema["fields"].([]any)
		require.Len(t, fields, len(header), "%s: one schema field per column", table)
		types := map[string]string{}
		for j, fl := range fields {
			m := fl.(map[string]any)
			assert.Equal(t, header[j], m["name"], "%s field %d", table, j)
			assert.NotEmpty(t, m["description"], "%s field %s", table, header[j])
			ty, _ := m["type"].(string)
			assert.Contains(t, []string{"string", "number", "datetime"}, ty, "%s field %s", table, header[j])
			types[header[j]] = ty
		}
		assert.Equal(t, "number", types["x_sun_altitude_deg"])
		assert.Equal(t, "string", types["x_sun_phase"])
		assert.Equal(t, "datetime", types["x_sun_rise"])
		assert.Equal(t, "string", types["x_sun_error"])
		assert.Equal(t, "string", types[id])
		assert.Equal(t, "degrees", fields[1].(map[string]any)["unit"])
	}
}

// topKeys lists a JSON object's keys in order.
func topKeys(t *testing.T, data []byte) []string {
	dec := json.NewDecoder(bytes.NewReader(data))
	_, err := dec.Token()
	require.NoError(t, err)
	var keys []string
	for dec.More() {
		tok, err := dec.Token()
		require.NoError(t, err)
		keys = append(keys, tok.(string))
		var v json.RawMessage
		require.NoError(t, dec.Decode(&v))
	}
	return keys
}
