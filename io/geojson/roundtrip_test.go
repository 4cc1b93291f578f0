package geojson

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/heliotag/heliotag/enrich"
)

// addedMember matches one added column written by Encode, with the comma
// that Encode puts before it when the properties were not empty.
var addedMember = regexp.MustCompile(`,?"(?:r_)?sun_[a-z_]+":(?:null|"(?:[^"\\]|\\.)*"|-?[0-9]+(?:\.[0-9]+)?)`)

// rawFeatures splits a collection or a sequence into its features' text.
func rawFeatures(t testing.TB, s string, seq bool) [][]byte {
	t.Helper()
	var out [][]byte
	if seq {
		for _, rec := range strings.FieldsFunc(s, func(r rune) bool { return r == '\x1e' || r == '\n' }) {
			if strings.TrimSpace(rec) != "" {
				out = append(out, []byte(strings.TrimSpace(rec)))
			}
		}
		return out
	}
	var fc struct{ Features []json.RawMessage }
	if err := json.Unmarshal([]byte(s), &fc); err != nil {
		t.Fatalf("not a collection: %v", err)
	}
	for _, f := range fc.Features {
		out = append(out, f)
	}
	return out
}

// TestRoundTrip reads, writes and reads again: taking the added columns out
// of the output gives back every input feature byte for byte, and enriching
// the output again (with a prefix) gives the same sun values.
func TestRoundTrip(t *testing.T) {
	for _, tc := range []struct {
		name string
		seq  bool
		rs   bool
	}{
		{"values.geojson", false, false}, {"geometries.geojson", false, false}, {"foreign.geojson", false, false},
		{"keep.geojson", false, false}, {"lines.geojsons", true, false}, {"lines.geojsons", true, true},
	} {
		t.Run(fmt.Sprintf("%s rs=%v", tc.name, tc.rs), func(t *testing.T) {
			in, err := os.ReadFile(filepath.Join("testdata", tc.name))
			if err != nil {
				t.Fatal(err)
			}
			o := runOpts{read: Options{Sequence: tc.seq}, write: WriterOptions{RS: tc.rs}, policy: enrich.PolicyKeep}
			out1 := mustEnrich(t, string(in), o)
			o.prefix = "r_"
			out2 := mustEnrich(t, out1, o)

			src, f1, f2 := rawFeatures(t, string(in), tc.seq), rawFeatures(t, out1, tc.seq), rawFeatures(t, out2, tc.seq)
			if len(f1) != len(src) || len(f2) != len(src) {
				t.Fatalf("%d features in, %d after one pass, %d after two", len(src), len(f1), len(f2))
			}
			for i := range src {
				back := addedMember.ReplaceAll(f2[i], nil)
				// Added columns go into a new object where properties were
				// null or missing (for a Feature).
				switch inf := scanFeature(src[i]); {
				case inf.feature && inf.props == propsNull:
					back = bytes.Replace(back, []byte(`"properties":{}`), []byte(`"properties":null`), 1)
				case inf.feature && inf.props == propsMissing:
					back = bytes.Replace(back, []byte(`,"properties":{}`), nil, 1)
				}
				if !bytes.Equal(back, src[i]) {
					t.Errorf("feature %d: with the added columns taken out\n%s\nis not the input\n%s", i+1, back, src[i])
				}
				var p1, p2 map[string]any
				json.Unmarshal(f1[i], &struct{ Properties *map[string]any }{&p1})
				json.Unmarshal(f2[i], &struct{ Properties *map[string]any }{&p2})
				for _, k := range []string{"sun_altitude_deg", "sun_azimuth_deg", "sun_phase", "sun_light_condition"} {
					if p1 == nil {
						break
					}
					if fmt.Sprint(p2[k]) != fmt.Sprint(p1[k]) {
						t.Errorf("feature %d: %s changed in the second pass: %v → %v", i+1, k, p1[k], p2[k])
					}
					if p1["sun_error"] == nil && fmt.Sprint(p2["r_"+k]) != fmt.Sprint(p1[k]) {
						t.Errorf("feature %d: r_%s = %v, first pass %v", i+1, k, p2["r_"+k], p1[k])
					}
				}
			}
		})
	}
}

// TestPassthrough: with no added columns the output is the input's features
// unchanged, and a compact collection comes back byte for byte.
func TestPassthrough(t *testing.T) {
	in := collection(okFeature, `{"type":"Feature","geometry":null,"properties":null}`, `17`) + "\n"
	out, sum, err := enrichText(t, in, runOpts{add: "none"})
	want := strings.Replace(in, "[", "[\n", 1)
	want = strings.ReplaceAll(want, "},{", "},\n{")
	want = strings.Replace(want, "},17]", "},\n17\n]", 1)
	if err != nil || out != want || sum.Written != 3 {
		t.Errorf("got %q, %v\nwant %q", out, err, want)
	}
}
