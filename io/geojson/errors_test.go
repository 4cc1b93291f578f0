package geojson

import (
	"bytes"
	"encoding/csv"
	"errors"
	"io"
	"strings"
	"testing"
	"testing/iotest"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/solar"
)

const okFeature = `{"type":"Feature","geometry":{"type":"Point","coordinates":[13.405,52.52]},"properties":{"time":"2024-06-21T12:00:00Z"}}`

func collection(features ...string) string {
	return `{"type":"FeatureCollection","features":[` + strings.Join(features, ",") + `]}`
}

func TestBadRows(t *testing.T) {
	tests := []struct {
		name    string
		feature string
		want    error
		column  string
	}{
		{"null geometry", `{"type":"Feature","geometry":null,"properties":{"time":"2024-06-21T12:00:00Z"}}`, ErrNoLocation, "geometry"},
		{"no geometry member", `{"type":"Feature","properties":{"time":"2024-06-21T12:00:00Z"}}`, ErrNoLocation, "geometry"},
		{"a geometry, not a Feature", `{"type":"Point","coordinates":[1,2]}`, ErrNotFeature, "type"},
		{"no type", `{"geometry":{"type":"Point","coordinates":[1,2]},"properties":{"time":"2024-06-21T12:00:00Z"}}`, ErrNotFeature, "type"},
		{"not an object", `[1,2]`, ErrNotFeature, ""},
		{"a string", `"Feature"`, ErrNotFeature, ""},
		{"no properties", `{"type":"Feature","geometry":{"type":"Point","coordinates":[1,2]}}`, ErrProperties, "properties"},
		{"null properties", `{"type":"Feature","geometry":{"type":"Point","coordinates":[1,2]},"properties":null}`, ErrProperties, "properties"},
		{"properties an array", `{"type":"Feature","geometry":{"type":"Point","coordinates":[1,2]},"properties":[]}`, ErrProperties, "properties"},
		{"properties a string", `{"type":"Feature","geometry":{"type":"Point","coordinates":[1,2]},"properties":"x"}`, ErrProperties, "properties"},
		{"latitude 91", `{"type":"Feature","geometry":{"type":"Point","coordinates":[10,91]},"properties":{"time":"2024-06-21T12:00:00Z"}}`, solar.ErrLatitude, "geometry"},
		{"longitude 200", `{"type":"Feature","geometry":{"type":"Point","coordinates":[200,10]},"properties":{"time":"2024-06-21T12:00:00Z"}}`, solar.ErrLongitude, "geometry"},
		{"centroid out of range", `{"type":"Feature","geometry":{"type":"Polygon","coordinates":[[[170,0],[190,0],[190,5],[170,0]]]},"properties":{"time":"2024-06-21T12:00:00Z"}}`, solar.ErrLongitude, "geometry"},
		{"empty Point", `{"type":"Feature","geometry":{"type":"Point","coordinates":[]},"properties":{"time":"2024-06-21T12:00:00Z"}}`, ErrGeometry, "geometry"},
		{"one ordinate", `{"type":"Feature","geometry":{"type":"Point","coordinates":[5]},"properties":{"time":"2024-06-21T12:00:00Z"}}`, ErrGeometry, "geometry"},
		{"null coordinates", `{"type":"Feature","geometry":{"type":"Point","coordinates":null},"properties":{"time":"2024-06-21T12:00:00Z"}}`, ErrGeometry, "geometry"},
		{"string coordinate", `{"type":"Feature","geometry":{"type":"Point","coordinates":["1","2"]},"properties":{"time":"2024-06-21T12:00:00Z"}}`, ErrGeometry, "geometry"},
		{"huge coordinate", `{"type":"Feature","geometry":{"type":"Point","coordinates":[1e400,2]},"properties":{"time":"2024-06-21T12:00:00Z"}}`, ErrGeometry, "geometry"},
		{"huge coordinate in a line", `{"type":"Feature","geometry":{"type":"LineString","coordinates":[[1e400,2],[3,4]]},"properties":{"time":"2024-06-21T12:00:00Z"}}`, ErrGeometry, "geometry"},
		{"empty LineString", `{"type":"Feature","geometry":{"type":"LineString","coordinates":[]},"properties":{"time":"2024-06-21T12:00:00Z"}}`, ErrGeometry, "geometry"},
		{"position in a LineString too short", `{"type":"Feature","geometry":{"type":"LineString","coordinates":[[1,2],[3]]},"properties":{"time":"2024-06-21T12:00:00Z"}}`, ErrGeometry, "geometry"},
		{"unknown type", `{"type":"Feature","geometry":{"type":"Circle","coordinates":[1,2]},"properties":{"time":"2024-06-21T12:00:00Z"}}`, ErrGeometry, "geometry"},
		{"geometry a string", `{"type":"Feature","geometry":"POINT (1 2)","properties":{"time":"2024-06-21T12:00:00Z"}}`, ErrGeometry, "geometry"},
		{"null in a collection", `{"type":"Feature","geometry":{"type":"GeometryCollection","geometries":[null]},"properties":{"time":"2024-06-21T12:00:00Z"}}`, ErrGeometry, "geometry"},
		{"empty collection", `{"type":"Feature","geometry":{"type":"GeometryCollection","geometries":[]},"properties":{"time":"2024-06-21T12:00:00Z"}}`, ErrGeometry, "geometry"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			for _, seq := range []bool{false, true} {
				in := collection(okFeature, tc.feature)
				if seq {
					in = okFeature + "\n" + tc.feature + "\n"
				}
				_, sum, err := enrichText(t, in, runOpts{read: Options{Sequence: seq}})
				if !errors.Is(err, tc.want) || !errors.Is(err, enrich.ErrBadRow) && errors.Is(err, enrich.ErrFatal) {
					t.Fatalf("sequence %v: error %v, want one wrapping %v", seq, err, tc.want)
				}
				var re *enrich.RowError
				if !errors.As(err, &re) || re.Row != 2 || re.Column != tc.column || re.Line != map[bool]int64{false: 1, true: 2}[seq] {
					t.Errorf("sequence %v: %#v; want row 2, column %q", seq, re, tc.column)
				}
				_, sum, err = enrichText(t, in, runOpts{read: Options{Sequence: seq}, policy: enrich.PolicySkip})
				if err != nil || sum.Read != 2 || sum.Written != 1 || sum.Rejected != 1 {
					t.Errorf("skip: %v, summary %+v", err, sum)
				}
			}
		})
	}
}

func TestBadTimes(t *testing.T) {
	f := func(props string) string {
		return `{"type":"Feature","geometry":{"type":"Point","coordinates":[13.405,52.52]},"properties":` + props + `}`
	}
	tests := []struct {
		name, props string
		sel         enrich.Select
	}{
		{"garbage", `{"time":"soon"}`, enrich.Select{}},
		{"null", `{"time":null}`, enrich.Select{}},
		{"missing", `{"other":"2024-06-21T12:00:00Z"}`, enrich.Select{}},
		{"boolean", `{"time":true}`, enrich.Select{}},
		{"object", `{"time":{"t":1}}`, enrich.Select{}},
		{"number without --epoch", `{"time":1718971200}`, enrich.Select{}},
		{"spring-forward gap", `{"time":"2024-03-31 02:30"}`, enrich.Select{TZ: "Europe/Berlin"}},
		{"unknown zone name", `{"time":"2024-06-21 12:00","tz":"Mars/Olympus"}`, enrich.Select{TZColumn: "tz"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			in := collection(f(`{"time":"2024-06-21T12:00:00Z","tz":"UTC"}`), f(tc.props))
			_, _, err := enrichText(t, in, runOpts{read: Options{Select: tc.sel}})
			var re *enrich.RowError
			if !errors.Is(err, enrich.ErrBadRow) && !errors.As(err, &re) {
				t.Fatalf("error %v, want a bad row", err)
			}
			if !errors.As(err, &re) || re.Row != 2 {
				t.Fatalf("error %v, want row 2", err)
			}
			if want := map[bool]string{false: "time", true: "tz"}[tc.sel.TZColumn != ""]; re.Column != want {
				t.Errorf("column %q, want %q (%v)", re.Column, want, err)
			}
		})
	}
	// Offset-less times with no zone stop the run whatever the policy, and
	// the message names the three ways to give one.
	_, _, err := enrichText(t, collection(f(`{"time":"2024-06-21 12:00"}`)), runOpts{policy: enrich.PolicySkip})
	if !errors.Is(err, enrich.ErrFatal) || !strings.Contains(err.Error(), "--tz") {
		t.Errorf("offset-less time without a zone: %v, want a fatal error naming --tz", err)
	}
}

func TestPropertyNameClash(t *testing.T) {
	clash := `{"type":"Feature","geometry":{"type":"Point","coordinates":[1,2]},"properties":{"time":"2024-06-21T12:00:00Z","sun_phase":"mine"}}`
	// In the first features: refused before reading on, as for CSV.
	_, _, err := enrichText(t, collection(clash), runOpts{policy: enrich.PolicySkip})
	if !errors.Is(err, enrich.ErrUsage) || !strings.Contains(err.Error(), "--prefix") {
		t.Errorf("clash in the first feature: %v, want a usage error suggesting --prefix", err)
	}
	if _, _, err := enrichText(t, collection(clash), runOpts{prefix: "x_"}); err != nil {
		t.Errorf("with a prefix: %v", err)
	}
	// Past the features read ahead: fatal under every policy.
	features := make([]string, LookaheadFeatures+1)
	for i := range features {
		features[i] = okFeature
	}
	features[len(features)-1] = clash
	for _, p := range []enrich.Policy{enrich.PolicyFail, enrich.PolicySkip, enrich.PolicyKeep} {
		_, _, err := enrichText(t, collection(features...), runOpts{policy: p, rejects: new(bytes.Buffer)})
		var re *enrich.RowError
		if !errors.Is(err, ErrPropertyExists) || !errors.Is(err, enrich.ErrFatal) || !errors.As(err, &re) ||
			re.Row != int64(len(features)) || re.Column != "sun_phase" || !strings.Contains(err.Error(), "--prefix") {
			t.Errorf("policy %v: %v, want a fatal clash at row %d naming sun_phase and --prefix", p, err, len(features))
		}
	}
}

func TestRejectsFile(t *testing.T) {
	bad := `{"type":"Feature","id":7,"geometry":null,"properties":{"time":"2024-06-21T12:00:00Z","n":1.50,"obj":{"a":[1]},"s":"x\"y"}}`
	var rej bytes.Buffer
	out, sum, err := enrichText(t, collection(okFeature, bad, okFeature), runOpts{policy: enrich.PolicySkip, rejects: &rej})
	if err != nil {
		t.Fatal(err)
	}
	if sum.Read != 3 || sum.Written != 2 || sum.Rejected != 1 || len(decodeFeatures(t, out, false)) != 2 {
		t.Errorf("summary %+v", sum)
	}
	recs, err := csv.NewReader(&rej).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	want := [][]string{
		{"row", "reason", "time", "n", "obj", "s", "feature"},
		{"2", `column "geometry": feature has no location: the geometry is null`, "2024-06-21T12:00:00Z", "1.50", `{"a":[1]}`, `x"y`, bad},
	}
	if len(recs) != 2 || strings.Join(recs[0], "|") != strings.Join(want[0], "|") || strings.Join(recs[1], "|") != strings.Join(want[1], "|") {
		t.Errorf("rejects:\n%q\nwant\n%q", recs, want)
	}
}

func TestSyntaxErrors(t *testing.T) {
	f2 := `{"type":"Feature","geometry":{"type":"Point","coordinates":[1,2]},"properties":{"time":"2024-06-21T12:00:00Z"}}`
	head := `{"type":"FeatureCollection","features":[` + okFeature + ","
	deep := `{"type":"Feature","geometry":null,"properties":{"deep":` + strings.Repeat("[", 20000) + strings.Repeat("]", 20000) + `}}`
	tests := []struct {
		name    string
		in      string
		want    error
		offset  int64
		line    int64
		column  int64
		feature int64
	}{
		{"cut off mid-feature", head + f2[:40], ErrSyntax, int64(len(head) + 40), 1, int64(len(head) + 41), 2},
		{"cut off between features", head + f2, ErrSyntax, int64(len(head + f2)), 1, int64(len(head+f2)) + 1, 0},
		{"cut off in the header", `{"type":"FeatureColl`, ErrSyntax, 20, 1, 21, 0},
		{"bad character in a feature", head + strings.Replace(f2, `"geometry"`, `geometry`, 1), ErrSyntax, int64(len(head) + 18), 1, int64(len(head) + 19), 2},
		{"missing comma", head + f2 + " " + f2 + "]}", ErrSyntax, int64(len(head+f2) + 1), 1, int64(len(head+f2)) + 2, 3},
		{"on a later line", head + "\n\n  " + `{"type":"Feature",,}]}`, ErrSyntax, int64(len(head)) + 4 + 18, 3, 21, 2},
		// encoding/json allows 10000 nested values; the feature and its
		// properties are two of them, so the 9999th '[' is one too many.
		{"deeply nested", head + deep + "]}", ErrSyntax, int64(len(head) + strings.Index(deep, "[") + 9998), 1, int64(len(head)+strings.Index(deep, "[")) + 9999, 2},
		{"data after the collection", collection(okFeature) + "\n{}", ErrSyntax, int64(len(collection(okFeature))) + 1, 2, 1, 0},
		{"not an object", `[` + okFeature + `]`, ErrNotCollection, 0, 1, 1, 0},
		{"empty input", ``, ErrNotCollection, 0, 1, 1, 0},
		{"a single Feature", okFeature, ErrNotCollection, 8, 1, 9, 0},
		{"no features member", `{"type":"FeatureCollection"}`, ErrNotCollection, 27, 1, 28, 0},
		{"features not an array", `{"type":"FeatureCollection","features":{}}`, ErrNotCollection, 39, 1, 40, 0},
		{"no type", `{"features":[]}`, ErrNotCollection, 15, 1, 16, 0},
		{"two features members", `{"type":"FeatureCollection","features":[],"features":[]}`, ErrNotCollection, 52, 1, 53, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			for _, policy := range []enrich.Policy{enrich.PolicyFail, enrich.PolicyKeep} {
				_, _, err := enrichText(t, tc.in, runOpts{policy: policy})
				var se *SyntaxError
				if !errors.Is(err, tc.want) || !errors.As(err, &se) {
					t.Fatalf("error %v, want a *SyntaxError wrapping %v", err, tc.want)
				}
				if se.Offset != tc.offset || se.Line != tc.line || se.Column != tc.column || se.Feature != tc.feature {
					t.Errorf("%v: offset %d line %d column %d feature %d; want %d, %d, %d, %d",
						err, se.Offset, se.Line, se.Column, se.Feature, tc.offset, tc.line, tc.column, tc.feature)
				}
				if !strings.Contains(err.Error(), "byte offset") {
					t.Errorf("message %q does not name the byte offset", err)
				}
			}
		})
	}
}

func TestSequenceSyntaxErrors(t *testing.T) {
	tests := []struct {
		name                 string
		in                   string
		offset, line, column int64
		feature              int64
	}{
		{"bad record", okFeature + "\n" + `{"type":"Feature",}` + "\n", int64(len(okFeature)) + 1 + 18, 2, 19, 2},
		{"two values on a line", okFeature + "\n" + okFeature + " {}\n", int64(2*len(okFeature)) + 2, 2, int64(len(okFeature)) + 2, 2},
		{"cut off", okFeature + "\n" + okFeature[:30], int64(len(okFeature)) + 31, 2, 31, 2},
		{"RS record over lines", "\x1e" + okFeature + "\n\x1e{\n \"type\": x}\n", int64(len(okFeature)) + 2 + 1 + 11, 3, 10, 2},
		{"after a separator on a line", "\x1e" + okFeature + "\n\x1e{]\n", int64(len(okFeature)) + 4, 2, 3, 2},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, _, err := enrichText(t, tc.in, runOpts{read: Options{Sequence: true}, policy: enrich.PolicyKeep})
			var se *SyntaxError
			if !errors.Is(err, ErrSyntax) || !errors.Is(err, enrich.ErrFatal) || !errors.As(err, &se) {
				t.Fatalf("error %v, want a fatal *SyntaxError", err)
			}
			if se.Offset != tc.offset || se.Line != tc.line || se.Column != tc.column || se.Feature != tc.feature {
				t.Errorf("%v: offset %d line %d column %d feature %d; want %d, %d, %d, %d",
					err, se.Offset, se.Line, se.Column, se.Feature, tc.offset, tc.line, tc.column, tc.feature)
			}
		})
	}
}

func TestReadFailure(t *testing.T) {
	in := collection(okFeature, okFeature)
	for _, seq := range []bool{false, true} {
		r := io.MultiReader(strings.NewReader(in[:60]), iotest.ErrReader(io.ErrUnexpectedEOF))
		_, err := NewReader(r, 0, Options{Sequence: seq})
		if seq && err == nil {
			continue // the sequence reader reports it on the first Next
		}
		if err == nil || errors.Is(err, ErrSyntax) || !errors.Is(err, io.ErrUnexpectedEOF) || !strings.Contains(err.Error(), "reading input") {
			t.Errorf("sequence %v: %v; want a read error, not a syntax error", seq, err)
		}
	}
}

func TestLargeProperty(t *testing.T) {
	big := strings.Repeat("x", 10<<20)
	f := `{"type":"Feature","geometry":{"type":"Point","coordinates":[1,2]},"properties":{"note":"` + big + `","time":"2024-06-21T12:00:00Z"}}`
	out, sum, err := enrichText(t, collection(f), runOpts{})
	if err != nil || sum.Written != 1 || !strings.Contains(out, big+`","time":"2024-06-21T12:00:00Z","sun_altitude_deg":`) {
		t.Errorf("10 MB property: %v, %+v", err, sum)
	}
}

func TestLocationFlagsRefused(t *testing.T) {
	for _, sel := range []enrich.Select{{Lat: "y", Lon: "x"}, {Geometry: "geom"}} {
		_, err := NewReader(strings.NewReader(collection(okFeature)), 0, Options{Select: sel})
		if !errors.Is(err, enrich.ErrUsage) {
			t.Errorf("%+v: %v, want a usage error", sel, err)
		}
	}
	_, err := NewReader(strings.NewReader(collection(okFeature)), 0, Options{Select: enrich.Select{Time: "when"}})
	if !errors.Is(err, enrich.ErrUsage) || !strings.Contains(err.Error(), `"time"`) {
		t.Errorf("--time naming no property: %v, want a usage error listing the properties", err)
	}
	_, err = NewWriter(io.Discard, mustReader(t, collection(okFeature), Options{}), &enrich.Plan{}, WriterOptions{RS: true})
	if !errors.Is(err, enrich.ErrUsage) {
		t.Errorf("--rs on a collection: %v, want a usage error", err)
	}
}

func mustReader(t *testing.T, in string, o Options) *Reader {
	t.Helper()
	rd, err := NewReader(strings.NewReader(in), 0, o)
	if err != nil {
		t.Fatal(err)
	}
	return rd
}

// TestEscapedNames: member names and the "Feature" type may be written with
// JSON escapes.
func TestEscapedNames(t *testing.T) {
	f := `{"typ\u0065":"Fe\u0061ture","geom\u0065try":{"type":"Point","coordinates":[13.405,52.52]},"propert\u0069es":{"t\u0069me":"2024-06-21T12:00:00Z"}}`
	out, sum, err := enrichText(t, collection(f), runOpts{})
	if err != nil || sum.Written != 1 || !strings.Contains(out, `{"t\u0069me":"2024-06-21T12:00:00Z","sun_altitude_deg":`) {
		t.Errorf("%v, %+v:\n%s", err, sum, out)
	}
}

// TestByteOrderMark: a UTF-8 byte order mark is read past (RFC 8259 §8.1
// lets a parser ignore it), not written, and counted in byte offsets.
func TestByteOrderMark(t *testing.T) {
	const bom = "\xEF\xBB\xBF"
	for _, seq := range []bool{false, true} {
		in := collection(okFeature)
		if seq {
			in = okFeature + "\n"
		}
		out, sum, err := enrichText(t, bom+in, runOpts{read: Options{Sequence: seq}})
		if err != nil || sum.Written != 1 || strings.HasPrefix(out, bom) {
			t.Errorf("sequence %v: %v, %+v, output %q", seq, err, sum, out)
		}
	}
	_, _, err := enrichText(t, bom+`{"type":"FeatureCollection","features":[x]}`, runOpts{})
	var se *SyntaxError
	if !errors.As(err, &se) || se.Offset != 3+40 || se.Column != 41 {
		t.Errorf("%v: want byte offset 43, column 41", err)
	}
	_, _, err = enrichText(t, bom+okFeature+"\n{]\n", runOpts{read: Options{Sequence: true}})
	if !errors.As(err, &se) || se.Offset != 3+int64(len(okFeature))+2 || se.Line != 2 || se.Column != 2 {
		t.Errorf("%v: want byte offset %d, line 2, column 2", err, 3+len(okFeature)+2)
	}
}
