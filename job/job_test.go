package job

import (
	"bytes"
	"context"
	"encoding/csv"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"go.uber.org/goleak"

	"github.com/heliotag/heliotag/enrich"
)

func TestMain(m *testing.M) { goleak.VerifyTestMain(m) }

// randomInput writes n rows of valid and deliberately bad records and
// returns the path and the ids of the bad rows.
func randomInput(t *testing.T, dir string, seed uint64, n int) (string, map[string]bool) {
	t.Helper()
	rng := rand.New(rand.NewPCG(seed, 7))
	var b strings.Builder
	b.WriteString("id,lat,lon,timestamp,note\n")
	bad := map[string]bool{}
	base := time.Date(2015, 1, 1, 0, 0, 0, 0, time.UTC)
	for i := range n {
		id := fmt.Sprintf("r%05d", i)
		lat := fmt.Sprintf("%.5f", rng.Float64()*170-85)
		lon := fmt.Sprintf("%.5f", rng.Float64()*360-180)
		ts := base.Add(time.Duration(rng.Int64N(int64(10 * 365 * 24 * time.Hour)))).Format(time.RFC3339)
		note := "ok"
		if rng.IntN(20) == 0 {
			bad[id] = true
			switch rng.IntN(6) {
			case 0:
				lat = "91"
			case 1:
				lon = "-200.5"
			case 2:
				lat = "north"
			case 3:
				ts = "2024-02-30T10:00:00Z"
			case 4:
				ts = ""
			case 5:
				fmt.Fprintf(&b, "%s,%s,%s\n", id, lat, lon) // too few fields
				continue
			}
		}
		if rng.IntN(10) == 0 {
			note = "\"quoted, with \"\"quotes\"\"\nand a line break\""
		}
		fmt.Fprintf(&b, "%s,%s,%s,%s,%s\n", id, lat, lon, ts, note)
	}
	path := filepath.Join(dir, fmt.Sprintf("in%d.csv", seed))
	require.NoError(t, os.WriteFile(path, []byte(b.String()), 0o644))
	return path, bad
}

// TestNoLostRowsAndStableOutput: rows read = written + rejected under every
// policy, every rejected row is in the rejects file with its original
// values, and the output bytes do not depend on workers or batch size.
func TestNoLostRowsAndStableOutput(t *testing.T) {
	dir := t.TempDir()
	for _, seed := range []uint64{1, 2} {
		in, bad := randomInput(t, dir, seed, 1500)
		for _, policy := range []enrich.Policy{enrich.PolicySkip, enrich.PolicyKeep} {
			var ref []byte
			for _, workers := range []int{1, 2, 3} {
				for _, batch := range []int{1, 7, 256, 8192} {
					name := fmt.Sprintf("seed%d/%s/w%d/b%d", seed, policy, workers, batch)
					out := filepath.Join(dir, strings.ReplaceAll(name, "/", "_")+".csv")
					o := Options{Input: in, Output: out, Policy: policy, Workers: workers, BatchRows: batch}
					res, err := Enrich(context.Background(), o, nil, nil)
					require.NoError(t, err, name)
					s := res.Summary
					assert.Equal(t, int64(1500), s.Read, name)
					assert.Equal(t, s.Read, s.Written+s.Rejected, name)
					assert.Equal(t, 1, res.ExitCode(nil), name)
					got, err := os.ReadFile(out)
					require.NoError(t, err)
					if ref == nil {
						ref = got
					} else {
						require.True(t, bytes.Equal(ref, got), "%s: output differs from workers=1 batch=1", name)
					}
					rows := readAll(t, out)
					if policy == enrich.PolicySkip {
						assert.Equal(t, int64(len(bad)), s.Rejected, name)
						assert.Len(t, rows, 1+1500-len(bad))
						rej := readAll(t, res.Rejects)
						require.Len(t, rej, 1+len(bad), name)
						assert.Equal(t, []string{"row", "reason", "id", "lat", "lon", "timestamp", "note"}, rej[0])
						for _, r := range rej[1:] {
							assert.True(t, bad[r[2]], "%s: rejected %s was not bad", name, r[2])
							assert.NotEmpty(t, r[1], "reason")
						}
					} else {
						assert.Equal(t, int64(len(bad)), s.Kept, name)
						assert.Len(t, rows, 1+1500)
						errCol := len(rows[0]) - 1
						require.Equal(t, "sun_error", rows[0][errCol])
						for _, r := range rows[1:] {
							assert.Equal(t, bad[r[0]], r[errCol] != "", "%s: row %s sun_error %q", name, r[0], r[errCol])
						}
					}
				}
			}
		}
	}
}

func readAll(t *testing.T, path string) [][]string {
	t.Helper()
	f, err := os.Open(path)
	require.NoError(t, err)
	defer f.Close()
	r := csv.NewReader(f)
	r.FieldsPerRecord = -1
	rows, err := r.ReadAll()
	require.NoError(t, err)
	return rows
}

// TestCancelLeavesNoOutput: an interrupted run (SIGINT/SIGTERM cancel the
// context in main) removes its temporary output and rejects files.
func TestCancelLeavesNoOutput(t *testing.T) {
	dir := t.TempDir()
	in, _ := randomInput(t, dir, 3, 20000)
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	o := Options{
		Input: in, Output: filepath.Join(dir, "out.csv"), Policy: enrich.PolicySkip,
		BatchRows: 100, Workers: 2,
		OnProgress: func(rows, _, _ int64) {
			if rows >= 1000 {
				cancel()
			}
		},
	}
	_, err := Enrich(ctx, o, nil, nil)
	require.ErrorIs(t, err, context.Canceled)
	entries, err := os.ReadDir(dir)
	require.NoError(t, err)
	for _, e := range entries {
		assert.True(t, strings.HasPrefix(e.Name(), "in"), "left behind: %s", e.Name())
	}
}

// TestFailPolicyReportsFirstBadRowInReadOrder: with many workers and tiny
// batches the error is still the first bad row of the file.
func TestFailPolicyReportsFirstBadRowInReadOrder(t *testing.T) {
	dir := t.TempDir()
	var b strings.Builder
	b.WriteString("id,lat,lon,timestamp\n")
	for i := range 2000 {
		lat := "10"
		if i == 1234 || i == 1500 || i == 1999 {
			lat = "95"
		}
		fmt.Fprintf(&b, "%d,%s,20,2024-01-01T00:00:00Z\n", i, lat)
	}
	in := filepath.Join(dir, "in.csv")
	require.NoError(t, os.WriteFile(in, []byte(b.String()), 0o644))
	for range 5 {
		_, err := Enrich(context.Background(), Options{Input: in, Output: filepath.Join(dir, "out.csv"), Workers: 4, BatchRows: 3}, nil, nil)
		var re *enrich.RowError
		require.ErrorAs(t, err, &re)
		assert.Equal(t, int64(1235), re.Row)
		assert.Equal(t, int64(1236), re.Line)
		assert.Equal(t, "lat", re.Column)
		assert.NoFileExists(t, filepath.Join(dir, "out.csv"))
	}
}

func TestSuggestOutput(t *testing.T) {
	assert.Equal(t, "a/b_sun.csv", SuggestOutput("a/b.csv"))
	assert.Equal(t, "b_sun.csv.gz", SuggestOutput("b.csv.gz"))
	assert.Equal(t, "dir.x/b_sun", SuggestOutput("dir.x/b"))
	assert.Equal(t, "out.rejects.csv", DefaultRejects("out.csv"))
	assert.Equal(t, "d/out.rejects.csv", DefaultRejects("d/out.tsv.gz"))
}

func TestFailPolicyErrorIsBadRow(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in.csv")
	require.NoError(t, os.WriteFile(in, []byte("id,lat,lon,timestamp\n1,95,0,2024-01-01T00:00:00Z\n"), 0o644))
	_, err := Enrich(context.Background(), Options{Input: in, Output: filepath.Join(dir, "out.csv")}, nil, nil)
	require.ErrorIs(t, err, enrich.ErrBadRow)
	assert.Contains(t, err.Error(), "stopping at the first bad row")
}
