package parquet

import (
	"bytes"
	"encoding/base64"
	"encoding/binary"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"testing"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/flight"
	"github.com/apache/arrow-go/v18/arrow/memory"
)

// vectorCounts lists the positions (in the whole blob) of the element
// counts of the Schema's fields vector and of every Field's children vector.
func vectorCounts(t *testing.T, blob []byte) []int {
	t.Helper()
	off := 8 // continuation marker and length
	v := &fbVerifier{buf: blob[off:]}
	var out []int
	f, err := v.table(v.root())
	if err != nil {
		t.Fatal(err)
	}
	h, _ := v.ref(f(2, 4))
	s, _ := v.table(h)
	var walk func(p int)
	walk = func(vecRef int) {
		q, _ := v.ref(vecRef)
		out = append(out, off+q)
		n, first, _ := v.vector(vecRef, 4)
		for i := range n {
			fp, _ := v.ref(first + 4*i)
			ft, _ := v.table(fp)
			if c := ft(5, 4); c != 0 {
				walk(c)
			}
		}
	}
	walk(s(1, 4))
	return out
}

// TestDamagedStoredSchema: a stored Arrow schema whose vector counts exceed
// its bytes (the Arrow decoder would try to allocate them and end the
// process out of memory) is refused as an ErrFile, before decoding; intact
// schemas of every column type pass.
func TestDamagedStoredSchema(t *testing.T) {
	blob := flight.SerializeSchema(allTypes.schema, memory.DefaultAllocator)
	if err := checkStoredSchema(base64.StdEncoding.EncodeToString(blob)); err != nil {
		t.Fatalf("intact schema refused: %v", err)
	}
	counts := vectorCounts(t, blob)
	if len(counts) < 4 { // fields, and the children of list, struct, map...
		t.Fatalf("found %d vectors; the walk is wrong", len(counts))
	}
	for k, pos := range counts {
		bad := bytes.Clone(blob)
		binary.LittleEndian.PutUint32(bad[pos:], 0x40000000)
		enc := base64.StdEncoding.EncodeToString(bad)
		if err := checkStoredSchema(enc); !errors.Is(err, errSchemaBlob) {
			t.Errorf("vector %d with a count of 2^30: %v, want errSchemaBlob", k, err)
		}
		if k == 0 {
			// The same blob in a file: the reader refuses it.
			md := arrow.NewMetadata([]string{"ARROW:schema"}, []string{enc})
			sc := arrow.NewSchema(schemaOf(fld("timestamp", tsUTC)).Fields(), &md)
			file := makeFile(t, fileSpec{schema: sc, noSchema: true, json: `[{"lat": 1, "lon": 2, "timestamp": "2024-06-21T00:00:00Z"}]`})
			_, err := NewReader(bytes.NewReader(file), Options{Allocator: checkedMem(t)})
			if !errors.Is(err, ErrFile) || !errors.Is(err, errSchemaBlob) {
				t.Errorf("file with a damaged stored schema: %v, want ErrFile", err)
			}
			if *updateSeeds {
				writeSeed(t, "FuzzReader", "damaged_arrow_schema", file)
			}
		}
	}
	for _, cut := range []int{0, 7, 12, len(blob) / 2} {
		if err := checkStoredSchema(base64.StdEncoding.EncodeToString(blob[:cut])); err == nil {
			t.Errorf("first %d bytes of the schema accepted", cut)
		}
	}
}

// writeSeed writes a fuzz seed corpus file in Go's format.
func writeSeed(t *testing.T, target, name string, data []byte) {
	t.Helper()
	dir := filepath.Join("testdata", "fuzz", target)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	body := fmt.Sprintf("go test fuzz v1\n[]byte(%q)\n", data)
	if err := os.WriteFile(filepath.Join(dir, name), []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
}
