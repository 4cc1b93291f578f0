package geojson_test

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/job"
)

// TestBadInputCatalogue runs the GeoJSON entries of the bad-input catalogue
// (testdata/bad) through the whole job under each policy: the exit code, the
// message (row or byte offset, the member at fault, what would be valid),
// the rejects file under skip, sun_error under keep, and no output file
// when the run fails.
func TestBadInputCatalogue(t *testing.T) {
	tests := []struct {
		file string
		// fatal: every policy stops with exit 2 and this message.
		fatal []string
		// Otherwise: the bad row's message under fail, and its reason in
		// the rejects file and in sun_error.
		row, reason string
	}{
		{file: "cut_mid_feature.geojson", fatal: []string{"byte offset 234 (line 3, column 63), in feature 2", "unexpected end of input", "cut off"}},
		{file: "deep_nesting.geojson", fatal: []string{"byte offset 10234", "in feature 2", "exceeded max depth"}},
		{file: "not_a_collection.geojson", fatal: []string{"byte offset 0", "not a FeatureCollection", `expected a FeatureCollection object {"type": "FeatureCollection"`}},
		{file: "empty.geojson", fatal: []string{"byte offset 0", "the input is empty"}},
		{file: "malformed_record.geojsonl", fatal: []string{"row 2 (line 2)", "byte offset 148 (line 2, column 19), in feature 2", "malformed JSON"}},
		{file: "null_geometry.geojson", row: `row 2 (line 3), column "geometry"`, reason: `column "geometry": feature has no location: the geometry is null`},
		{file: "latitude_91.geojson", row: `row 2 (line 3), column "geometry"`, reason: `column "geometry": latitude 91 out of range [-90, 90]`},
		{file: "not_a_feature.geojson", row: `row 2 (line 3), column "type"`, reason: `column "type": not a Feature: "type" is "Point"; expected "Feature"`},
		{file: "no_properties.geojson", row: `row 2 (line 3), column "properties"`, reason: `column "properties": no properties object: the feature has no "properties" member`},
		{file: "bad_time.geojson", row: `row 2 (line 3), column "time"`, reason: `column "time": "21/06/2024 noon": not a timestamp; expected RFC 3339`},
	}
	for _, tc := range tests {
		for _, policy := range []enrich.Policy{enrich.PolicyFail, enrich.PolicySkip, enrich.PolicyKeep} {
			t.Run(tc.file+"/"+policy.String(), func(t *testing.T) {
				dir := t.TempDir()
				out := filepath.Join(dir, "out"+filepath.Ext(tc.file))
				o := job.Options{Input: filepath.Join("testdata", "bad", tc.file), Output: out, Policy: policy, Workers: 2}
				res, err := job.Enrich(context.Background(), o, nil, nil)
				code := res.ExitCode(err)
				switch {
				case tc.fatal != nil || policy == enrich.PolicyFail:
					want := tc.fatal
					if want == nil {
						want = []string{tc.row, "--on-bad-row skip or keep"}
					}
					if code != 2 || err == nil {
						t.Fatalf("exit %d, %v; want 2", code, err)
					}
					for _, w := range want {
						if !strings.Contains(err.Error(), w) {
							t.Errorf("message %q lacks %q", err, w)
						}
					}
					if _, serr := os.Stat(out); !os.IsNotExist(serr) {
						t.Errorf("the failed run left %s", out)
					}
				case policy == enrich.PolicySkip:
					if code != 1 || res.Summary.Rejected != 1 || res.Summary.Read != res.Summary.Written+1 {
						t.Fatalf("exit %d, %v, %+v; want 1 with one row rejected", code, err, res.Summary)
					}
					rej, rerr := os.ReadFile(res.Rejects)
					if rerr != nil || !strings.Contains(string(rej), "2,\""+strings.ReplaceAll(tc.reason, `"`, `""`)) {
						t.Errorf("rejects file %q (%v) lacks row 2 with %q", rej, rerr, tc.reason)
					}
				case policy == enrich.PolicyKeep:
					b, rerr := os.ReadFile(out)
					if code != 1 || rerr != nil || res.Summary.Kept != 1 || res.Summary.Written != res.Summary.Read {
						t.Fatalf("exit %d, %v, %+v; want 1 with one row kept", code, err, res.Summary)
					}
					if tc.file == "not_a_feature.geojson" {
						// Not a Feature: nothing to hold sun_error; written as read.
						if !strings.Contains(string(b), `{"type":"Point","coordinates":[13.405,52.52]}`) {
							t.Errorf("output lost the item that is not a Feature:\n%s", b)
						}
						return
					}
					if !strings.Contains(string(b), `"sun_error":`+quoteJSON(tc.reason)[:len(quoteJSON(tc.reason))-1]) {
						t.Errorf("output lacks sun_error %q:\n%s", tc.reason, b)
					}
				}
			})
		}
	}
}

func quoteJSON(s string) string {
	return `"` + strings.ReplaceAll(s, `"`, `\"`) + `"`
}
