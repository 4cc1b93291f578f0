package geojson

import (
	"encoding/json"
	"errors"
	"math"
	"testing"

	"github.com/heliotag/heliotag/enrich"
)

// fuzzOnce enriches data under the keep policy and, when that succeeds,
// checks the output: well-formed JSON, as many features as were read, and a
// second pass over it (with a prefix) reads the same number of features.
func fuzzOnce(t *testing.T, data []byte, seq bool) {
	o := runOpts{read: Options{Sequence: seq, Select: enrich.Select{Time: "time"}}, policy: enrich.PolicyKeep, batch: 3}
	out, sum, err := enrichText(t, string(data), o)
	if err != nil {
		var se *SyntaxError
		var re *enrich.RowError
		if !errors.As(err, &se) && !errors.As(err, &re) && !errors.Is(err, enrich.ErrUsage) {
			t.Fatalf("error of an unexpected kind: %v", err)
		}
		return
	}
	if sum.Read != sum.Written+sum.Rejected {
		t.Fatalf("summary %+v: rows lost", sum)
	}
	if !seq && !json.Valid([]byte(out)) {
		t.Fatalf("output is not JSON:\n%s", out)
	}
	if n := len(rawFeatures(t, out, seq)); !seq && int64(n) != sum.Written {
		t.Fatalf("%d features written, summary says %d", n, sum.Written)
	}
	o.prefix = "r_"
	_, sum2, err := enrichText(t, out, o)
	if err != nil && !errors.Is(err, enrich.ErrFatal) && !errors.Is(err, enrich.ErrUsage) {
		t.Fatalf("reading the output again: %v\n%s", err, out)
	}
	if err == nil && sum2.Read != sum.Written {
		t.Fatalf("second pass read %d features, first wrote %d", sum2.Read, sum.Written)
	}
}

// FuzzCollection feeds arbitrary bytes to the FeatureCollection walker: no
// panic, no hang, a typed error or a well-formed output that reads back.
func FuzzCollection(f *testing.F) {
	f.Add([]byte(collection(okFeature)))
	f.Add([]byte(`{"type":"FeatureCollection","features":[]}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		fuzzOnce(t, data, false)
	})
}

// FuzzSequence is FuzzCollection for text sequences.
func FuzzSequence(f *testing.F) {
	f.Add([]byte(okFeature + "\n"))
	f.Add([]byte("\x1e" + okFeature + "\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		fuzzOnce(t, data, true)
	})
}

// FuzzPoint checks the Point fast path against orb's decoding.
func FuzzPoint(f *testing.F) {
	for _, c := range []string{`[1,2]`, `[ -105.1786 , 39.742476 , 1830.14 ]`, `[1e2,-0.5e-3]`, `[1]`, `[]`, `[[1,2]]`, `[1,"2"]`, `[1e400,2]`, `[-0,0.0]`} {
		f.Add(c)
	}
	f.Fuzz(func(t *testing.T, coords string) {
		g := []byte(`{"type":"Point","coordinates":` + coords + `}`)
		if !json.Valid(g) {
			return
		}
		fast, ferr := location(g)
		if ferr != nil {
			if !errors.Is(ferr, ErrGeometry) {
				t.Fatalf("%s: %v does not wrap ErrGeometry", coords, ferr)
			}
			return
		}
		slow, serr := orbLocation(g)
		if serr != nil {
			t.Fatalf("%s: fast path read %v, orb fails: %v", coords, fast, serr)
		}
		if fast != slow && !(math.IsNaN(fast[0]) && math.IsNaN(slow[0])) {
			t.Fatalf("%s: fast path %v, orb %v", coords, fast, slow)
		}
	})
}
