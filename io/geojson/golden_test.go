package geojson

import (
	"bytes"
	"flag"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/heliotag/heliotag/enrich"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata")

// goldenCases are testdata/<name> (input) beside testdata/<base>.golden<ext>.
var goldenCases = []struct {
	name string
	o    runOpts
}{
	{"rfc7946.geojson", runOpts{}},
	{"foreign.geojson", runOpts{}},
	{"geometries.geojson", runOpts{}},
	{"values.geojson", runOpts{policy: enrich.PolicyKeep}},
	{"keep.geojson", runOpts{policy: enrich.PolicyKeep}},
	{"zones.geojson", runOpts{read: Options{Select: enrich.Select{TZ: "Europe/Berlin"}}, policy: enrich.PolicyKeep}},
	{"epoch.geojson", runOpts{read: Options{Select: enrich.Select{Time: "t", Epoch: "s"}}}},
	{"datetime.geojson", runOpts{read: Options{Select: enrich.Select{Date: "crash_date", Time: "crash_time", TimeFormat: "%m/%d/%Y", TZColumn: "tz"}}}},
	{"lines.geojsons", runOpts{read: Options{Sequence: true}}},
	{"rs.geojsons", runOpts{read: Options{Sequence: true}, write: WriterOptions{RS: true}}},
}

// floatMember matches an added numeric member; goldens compare these
// numbers within goldenTolerance and everything else byte for byte.
var floatMember = regexp.MustCompile(`"(sun_altitude_deg|sun_azimuth_deg)":(-?[0-9.]+)`)

// goldenTolerance is the allowed difference, degrees, in added numbers: the
// last printed digit (4 decimals) may move when the solar kernel changes
// within its stated 0.0005° of the reference.
const goldenTolerance = 0.0006

func TestGolden(t *testing.T) {
	for _, tc := range goldenCases {
		t.Run(tc.name, func(t *testing.T) {
			in, err := os.ReadFile(filepath.Join("testdata", tc.name))
			if err != nil {
				t.Fatal(err)
			}
			got, _, err := enrichText(t, string(in), tc.o)
			if err != nil {
				t.Fatal(err)
			}
			ext := filepath.Ext(tc.name)
			path := filepath.Join("testdata", strings.TrimSuffix(tc.name, ext)+".golden"+ext)
			if *update {
				if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
					t.Fatal(err)
				}
				return
			}
			want, err := os.ReadFile(path)
			if err != nil {
				t.Fatalf("%v (run go test -update to write it)", err)
			}
			compareGolden(t, got, string(want))
		})
	}
}

func compareGolden(t *testing.T, got, want string) {
	t.Helper()
	gm, wm := floatMember.FindAllStringSubmatch(got, -1), floatMember.FindAllStringSubmatch(want, -1)
	mask := func(s string) string { return floatMember.ReplaceAllString(s, `"$1":#`) }
	if mask(got) != mask(want) {
		t.Errorf("output differs from the golden file (numbers masked)\n got: %s\nwant: %s", got, want)
		return
	}
	for i := range gm {
		g, _ := strconv.ParseFloat(gm[i][2], 64)
		w, _ := strconv.ParseFloat(wm[i][2], 64)
		if !within(g, w, goldenTolerance) {
			t.Errorf("%s #%d = %v, golden %v (tolerance %v)", gm[i][1], i, g, w, goldenTolerance)
		}
	}
}

// TestGoldenWorkers checks that the output does not depend on the number of
// workers or the batch size.
func TestGoldenWorkers(t *testing.T) {
	for _, tc := range goldenCases {
		in, err := os.ReadFile(filepath.Join("testdata", tc.name))
		if err != nil {
			t.Fatal(err)
		}
		o := tc.o
		o.workers, o.batch = 1, 1000
		base, _, err := enrichText(t, string(in), o)
		if err != nil {
			t.Fatal(err)
		}
		for _, wb := range [][2]int{{1, 1}, {2, 1}, {3, 2}, {2, 3}} {
			o.workers, o.batch = wb[0], wb[1]
			got, _, err := enrichText(t, string(in), o)
			if err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal([]byte(got), []byte(base)) {
				t.Errorf("%s: workers %d, batch %d: output differs", tc.name, wb[0], wb[1])
			}
		}
	}
}
