package geojson

import (
	"fmt"
	"strings"
	"testing"
	"time"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/solar"
)

// rfcCollection is the FeatureCollection example of RFC 7946 §1.5, from
// memory (RFC 7946 §1.5 example), with one change: each feature gets a
// "time" property so that it can be enriched.
const rfcCollection = `{
  "type": "FeatureCollection",
  "features": [{
    "type": "Feature",
    "geometry": {
      "type": "Point",
      "coordinates": [102.0, 0.5]
    },
    "properties": {
      "prop0": "value0",
      "time": "2024-03-20T03:00:00Z"
    }
  }, {
    "type": "Feature",
    "geometry": {
      "type": "LineString",
      "coordinates": [
        [102.0, 0.0],
        [103.0, 1.0],
        [104.0, 0.0],
        [105.0, 1.0]
      ]
    },
    "properties": {
      "prop0": "value0",
      "prop1": 0.0,
      "time": "2024-03-20T03:00:00Z"
    }
  }, {
    "type": "Feature",
    "geometry": {
      "type": "Polygon",
      "coordinates": [
        [
          [100.0, 0.0],
          [101.0, 0.0],
          [101.0, 1.0],
          [100.0, 1.0],
          [100.0, 0.0]
        ]
      ]
    },
    "properties": {
      "prop0": "value0",
      "prop1": {
        "this": "that"
      },
      "time": "2024-03-20T03:00:00Z"
    }
  }]
}
`

// rfcForeign wraps the Feature with foreign members of RFC 7946 §6.1, from
// memory (RFC 7946 §6.1 example: "title" and "custom" beside the standard
// members), in a collection that has foreign members of its own and a bbox
// (§5), one before and one after "features". "time" is added as above.
const rfcForeign = `{"type":"FeatureCollection","title":"Example collection","bbox":[-10.0,-10.0,10.0,10.0],"features":[` +
	`{"type":"Feature","id":"f1","geometry":{"type":"Point","coordinates":[1.0,2.0]},"properties":{"time":"2024-03-20T12:00:00Z"},` +
	`"title":"Example Feature","custom":{"type":"Feature","geometry":null,"properties":{}}}` +
	`],"custom":"after the features"}`

func TestRFC7946Examples(t *testing.T) {
	out := mustEnrich(t, rfcCollection, runOpts{})
	fs := decodeFeatures(t, out, false)
	if len(fs) != 3 {
		t.Fatalf("%d features, want 3", len(fs))
	}
	instant := time.Date(2024, 3, 20, 3, 0, 0, 0, time.UTC)
	tests := []struct {
		name     string
		lon, lat float64 // the documented representative point, worked out by hand
	}{
		{"Point as is", 102.0, 0.5},
		// Three segments of equal length √2: half the length is the middle of the second.
		{"LineString halfway along", 103.5, 0.5},
		// The unit square's centroid.
		{"Polygon centroid", 100.5, 0.5},
	}
	for i, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			p := props(t, fs[i])
			want, err := solar.Position(float64(instant.Unix()), tc.lat, tc.lon, solar.Options{})
			if err != nil {
				t.Fatal(err)
			}
			// 4 decimals in the output; the batch kernel is within 0.0005° of Position (solar.Kernel doc).
			if got := p["sun_altitude_deg"].(float64); !within(got, want.Altitude, 0.0006) {
				t.Errorf("sun_altitude_deg = %v, want %.4f (solar.Position at lon %v, lat %v)", got, want.Altitude, tc.lon, tc.lat)
			}
			if got := p["sun_azimuth_deg"].(float64); !within(got, want.Azimuth, 0.0006) {
				t.Errorf("sun_azimuth_deg = %v, want %.4f", got, want.Azimuth)
			}
			if p["prop0"] != "value0" {
				t.Errorf("prop0 = %v", p["prop0"])
			}
		})
	}
	// Properties keep their order and their values as written (0.0 is not
	// reformatted as 0), and the added columns come last.
	for _, want := range []string{
		`"prop0": "value0",
      "prop1": 0.0,
      "time": "2024-03-20T03:00:00Z","sun_altitude_deg":`,
		`"prop1": {
        "this": "that"
      },
      "time": "2024-03-20T03:00:00Z","sun_altitude_deg":`,
		"[102.0, 0.5]",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
}

func TestForeignMembers(t *testing.T) {
	out := mustEnrich(t, rfcForeign, runOpts{})
	want := `{"type":"FeatureCollection","title":"Example collection","bbox":[-10.0,-10.0,10.0,10.0],"features":[` + "\n" +
		`{"type":"Feature","id":"f1","geometry":{"type":"Point","coordinates":[1.0,2.0]},"properties":{"time":"2024-03-20T12:00:00Z",` +
		`"sun_altitude_deg":ALT,"sun_azimuth_deg":AZ,"sun_phase":"day","sun_light_condition":"daylight"},` +
		`"title":"Example Feature","custom":{"type":"Feature","geometry":null,"properties":{}}}` + "\n" +
		`],"custom":"after the features"}` + "\n"
	got := maskNumbers(out, []string{"sun_altitude_deg", "sun_azimuth_deg"}, []string{"ALT", "AZ"})
	if got != want {
		t.Errorf("got\n%s\nwant\n%s", got, want)
	}
}

// maskNumbers replaces the numeric values of the named members by marks.
func maskNumbers(s string, names, marks []string) string {
	for i, n := range names {
		key := `"` + n + `":`
		var b strings.Builder
		for {
			j := strings.Index(s, key)
			if j < 0 {
				b.WriteString(s)
				break
			}
			j += len(key)
			b.WriteString(s[:j])
			k := j
			for k < len(s) && strings.IndexByte("-+.0123456789eE", s[k]) >= 0 {
				k++
			}
			if k > j {
				b.WriteString(marks[i])
			}
			s = s[k:]
		}
		s = b.String()
	}
	return s
}

func TestEmptyCollections(t *testing.T) {
	tests := []struct{ name, in, want string }{
		{"empty features", `{"type":"FeatureCollection","features":[]}`, `{"type":"FeatureCollection","features":[]}` + "\n"},
		{"spaces", " {\n \"type\" : \"FeatureCollection\" ,\n \"features\" : [ ]\n}\n", `{"type":"FeatureCollection","features":[]}` + "\n"},
		{"members around", `{"features":[],"type":"FeatureCollection","name":"n"}`, `{"features":[],"type":"FeatureCollection","name":"n"}` + "\n"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			out, sum, err := enrichText(t, tc.in, runOpts{read: Options{Select: enrich.Select{Time: "when"}}})
			if err != nil {
				t.Fatal(err)
			}
			if out != tc.want || sum.Read != 0 {
				t.Errorf("got %q (%d rows), want %q", out, sum.Read, tc.want)
			}
		})
	}
	for _, in := range []string{"", "\n", "\x1e\n\n"} {
		out, sum, err := enrichText(t, in, runOpts{read: Options{Sequence: true}})
		if err != nil || out != "" || sum.Read != 0 {
			t.Errorf("sequence %q: got %q, %d rows, %v; want no output", in, out, sum.Read, err)
		}
	}
}

// TestZoneModes: offset-less local times in properties resolve through every
// zone mode CSV has; --tz auto looks the zone up at the representative point.
func TestZoneModes(t *testing.T) {
	f := func(lon, lat float64, props string) string {
		return fmt.Sprintf(`{"type":"Feature","geometry":{"type":"Point","coordinates":[%v,%v]},"properties":%s}`, lon, lat, props)
	}
	in := collection(
		f(13.405, 52.52, `{"time":"2024-06-21 12:00","zone":"Europe/Berlin"}`),
		f(-87.6298, 41.8781, `{"time":"2024-06-21 12:00","zone":"America/Chicago"}`),
	)
	utc := collection(
		f(13.405, 52.52, `{"time":"2024-06-21T10:00:00Z","zone":""}`),
		f(-87.6298, 41.8781, `{"time":"2024-06-21T17:00:00Z","zone":""}`),
	)
	want := decodeFeatures(t, mustEnrich(t, utc, runOpts{}), false)
	modes := []enrich.Select{{TZColumn: "zone"}, {TZ: "auto"}}
	if raceEnabled {
		modes = modes[:1] // building the --tz auto index takes 20 s under -race
	}
	for _, sel := range modes {
		got := decodeFeatures(t, mustEnrich(t, in, runOpts{read: Options{Select: sel}}), false)
		for i := range want {
			if a, b := props(t, got[i])["sun_altitude_deg"], props(t, want[i])["sun_altitude_deg"]; a != b {
				t.Errorf("%+v feature %d: altitude %v, want %v (the same instant written in UTC)", sel, i+1, a, b)
			}
		}
	}
}

// TestHeading: the glare group's heading comes from a property (--heading)
// or from the direction of a line geometry (--heading-from-geometry).
func TestHeading(t *testing.T) {
	// Morning at the equator on an equinox: the sun stands low in the east.
	const when = `"2024-03-20T06:30:00Z"`
	line := func(coords string) string {
		return `{"type":"Feature","geometry":{"type":"LineString","coordinates":` + coords + `},"properties":{"time":` + when + `,"dir":"EB"}}`
	}
	point := `{"type":"Feature","geometry":{"type":"Point","coordinates":[0,0]},"properties":{"time":` + when + `,"dir":"WB"}}`
	in := collection(line(`[[-0.01,0],[0.01,0]]`), line(`[[0.01,0],[-0.01,0]]`), point)

	byProp := decodeFeatures(t, mustEnrich(t, in, runOpts{read: Options{Select: enrich.Select{Heading: "dir"}}, add: "glare"}), false)
	for i, want := range []string{"ahead", "ahead", "behind"} { // EB, EB, WB
		if g := props(t, byProp[i])["sun_glare"]; g != want {
			t.Errorf("--heading dir, feature %d: sun_glare %v, want %s", i+1, g, want)
		}
	}
	out, sum, err := enrichText(t, in, runOpts{read: Options{Select: enrich.Select{HeadingFromGeometry: true}}, add: "glare", policy: enrich.PolicySkip})
	if err != nil || sum.Rejected != 1 {
		t.Fatalf("--heading-from-geometry: %v, %+v; want the Point rejected (it has no direction)", err, sum)
	}
	byGeom := decodeFeatures(t, out, false)
	for i, want := range []string{"ahead", "behind"} { // drawn eastward, drawn westward
		if g := props(t, byGeom[i])["sun_glare"]; g != want {
			t.Errorf("--heading-from-geometry, feature %d: sun_glare %v, want %s", i+1, g, want)
		}
	}
}
