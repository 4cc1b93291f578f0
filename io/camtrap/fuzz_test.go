package camtrap

import (
	"bytes"
	"encoding/json"
	"os"
	"testing"
)

// FuzzDescriptor reads a descriptor and writes it back (with no table
// added): the output must decode to the same members, in the same order,
// each value token for token the same (the writer only re-indents).
func FuzzDescriptor(f *testing.F) {
	for _, path := range []string{"testdata/quarrendale/datapackage.json", "../../testdata/demo/hollin_ridge_package/datapackage.json"} {
		if b, err := os.ReadFile(path); err == nil {
			f.Add(b)
		}
	}
	f.Add([]byte(`{"resources": [], "a": 1.50, "b": "\u00e9<>&", "a": [1, {"x": null}]}`))
	f.Add([]byte(`{}`))
	f.Add([]byte(`{"resources": "none"}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		members, err := decodeObject(data)
		if err != nil {
			return
		}
		p := &Package{members: members}
		if raw, ok := p.member("resources"); ok {
			if json.Unmarshal(raw, &p.resources) != nil {
				return // Open refuses a package whose resources are not a list
			}
		}
		out, err := p.OutputDescriptor(nil)
		if err != nil {
			t.Fatalf("OutputDescriptor: %v", err)
		}
		back, err := decodeObject(out)
		if err != nil {
			t.Fatalf("the output does not decode: %v\n%s", err, out)
		}
		if len(back) != len(members) {
			t.Fatalf("%d members in, %d out", len(members), len(back))
		}
		for i := range members {
			if back[i].key != members[i].key {
				t.Fatalf("member %d: key %q, want %q", i, back[i].key, members[i].key)
			}
			if members[i].key == "resources" {
				continue // rebuilt from the decoded list: compared below
			}
			if a, b := compact(t, members[i].value), compact(t, back[i].value); !bytes.Equal(a, b) {
				t.Fatalf("member %q: %s, want %s", members[i].key, b, a)
			}
		}
		if raw, ok := p.member("resources"); ok {
			for i := range back {
				if back[i].key == "resources" && !bytes.Equal(compact(t, raw), compact(t, back[i].value)) {
					t.Fatalf("resources: %s, want %s", back[i].value, raw)
				}
			}
		}
	})
}

func compact(t *testing.T, b []byte) []byte {
	var out bytes.Buffer
	if err := json.Compact(&out, b); err != nil {
		t.Fatalf("compact %s: %v", b, err)
	}
	return out.Bytes()
}
