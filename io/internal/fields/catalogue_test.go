package fields_test

import (
	"context"
	"encoding/csv"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/internal/fields"
	"github.com/heliotag/heliotag/job"
)

// TestWKTCatalogue runs the WKT entry of the bad-input catalogue
// (testdata/bad/wkt.csv: a good point, a point with one ordinate, a latitude
// of 91, a multipoint, an empty point) through the whole job.
func TestWKTCatalogue(t *testing.T) {
	in := filepath.Join("testdata", "bad", "wkt.csv")
	sel := enrich.Select{Geometry: "wkt"}
	// By data row (the header is not counted).
	reasons := map[string]string{
		"2": `column "wkt": not a WKT geometry: "POINT (13.405)" cannot be read (wkt: invalid data); expected WKT such as POINT (8.54 47.37) (longitude latitude)`,
		"3": `column "wkt": latitude 91 out of range [-90, 90]`,
		"5": `column "wkt": ` + fields.ErrEmpty.Error() + `: the geometry "POINT EMPTY" has no coordinates`,
	}

	dir := t.TempDir()
	res, err := job.Enrich(context.Background(), job.Options{Input: in, Output: filepath.Join(dir, "fail.csv"), Select: sel}, nil, nil)
	if code := res.ExitCode(err); code != 2 || err == nil || !strings.Contains(err.Error(), `row 2 (line 3), column "wkt"`) ||
		!strings.Contains(err.Error(), "expected WKT such as POINT (8.54 47.37)") {
		t.Errorf("fail: exit %d, %v", code, err)
	}

	res, err = job.Enrich(context.Background(), job.Options{Input: in, Output: filepath.Join(dir, "skip.csv"), Select: sel, Policy: enrich.PolicySkip}, nil, nil)
	if code := res.ExitCode(err); code != 1 || res.Summary.Rejected != 3 || res.Summary.Written != 2 {
		t.Fatalf("skip: exit %d, %v, %+v", code, err, res.Summary)
	}
	f, err := os.Open(res.Rejects)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	got := map[string]string{}
	for _, r := range recs[1:] {
		got[r[0]] = r[1]
	}
	for k, want := range reasons {
		if got[k] != want {
			t.Errorf("rejects: row %s reason %q, want %q", k, got[k], want)
		}
	}

	res, err = job.Enrich(context.Background(), job.Options{Input: in, Output: filepath.Join(dir, "keep.csv"), Select: sel, Policy: enrich.PolicyKeep}, nil, nil)
	if code := res.ExitCode(err); code != 1 || res.Summary.Kept != 3 || res.Summary.Written != 5 {
		t.Fatalf("keep: exit %d, %v, %+v", code, err, res.Summary)
	}
	b, err := os.ReadFile(filepath.Join(dir, "keep.csv"))
	if err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(strings.NewReader(string(b))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	last := len(rows[0]) - 1
	if rows[0][last] != "sun_error" || rows[1][last] != "" || rows[4][last] != "" || rows[2][last] != reasons["2"] {
		t.Errorf("keep output:\n%s", b)
	}
	if rows[4][3] == "" {
		t.Errorf("the multipoint row was not computed:\n%s", b)
	}
}
