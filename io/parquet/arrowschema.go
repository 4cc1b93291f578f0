package parquet

import (
	"encoding/base64"
	"encoding/binary"
	"errors"
	"fmt"
)

// The Arrow schema that Arrow writers store in a Parquet file (the
// "ARROW:schema" key: base64 of an Arrow IPC schema message) is decoded by
// the Arrow library without bounds checks on the counts it declares: a
// damaged one can ask for a slice of billions of fields and end the process
// out of memory, which no recover() catches. checkStoredSchema walks the
// message's FlatBuffer first and refuses counts that do not fit in its bytes.
//
// Layout (Arrow's Message.fbs, Schema.fbs): Message{version, header_type,
// header: Schema, bodyLength, custom_metadata: [KeyValue]};
// Schema{endianness, fields: [Field], custom_metadata: [KeyValue],
// features: [long]}; Field{name, nullable, type_type, type, dictionary,
// children: [Field], custom_metadata: [KeyValue]}; Union{mode, typeIds: [int]}.

// errSchemaBlob is the cause of a stored Arrow schema that cannot be right.
var errSchemaBlob = errors.New("damaged stored Arrow schema")

// maxSchemaTables bounds the tables visited: a damaged message can make
// children vectors point at the same table over and over.
const maxSchemaTables = 1 << 16

func checkStoredSchema(encoded string) error {
	var raw []byte
	var err error
	if len(encoded)%4 == 0 {
		raw, err = base64.StdEncoding.DecodeString(encoded)
	}
	if len(raw) == 0 || err != nil {
		if raw, err = base64.RawStdEncoding.DecodeString(encoded); err != nil {
			return fmt.Errorf("%w: not base64: %w", errSchemaBlob, err)
		}
	}
	if len(raw) < 8 {
		return fmt.Errorf("%w: %d bytes", errSchemaBlob, len(raw))
	}
	off := 0
	if binary.LittleEndian.Uint32(raw) == 0xFFFFFFFF { // continuation marker
		off = 4
	}
	n := int64(int32(binary.LittleEndian.Uint32(raw[off:])))
	off += 4
	if n < 4 || int64(off)+n > int64(len(raw)) {
		return fmt.Errorf("%w: message length %d in %d bytes", errSchemaBlob, n, len(raw))
	}
	v := &fbVerifier{buf: raw[off : off+int(n)], rest: int64(len(raw) - off - int(n))}
	return v.message()
}

type fbVerifier struct {
	buf    []byte
	rest   int64 // bytes after the message (its body)
	tables int
}

func (v *fbVerifier) fail(what string) error {
	return fmt.Errorf("%w: %s", errSchemaBlob, what)
}

func (v *fbVerifier) u32(p int) (uint32, bool) {
	if p < 0 || p+4 > len(v.buf) {
		return 0, false
	}
	return binary.LittleEndian.Uint32(v.buf[p:]), true
}

// table checks the table at p and returns a lookup of its fields' positions
// by slot and byte size (0 when the field is absent).
func (v *fbVerifier) table(p int) (func(slot, size int) int, error) {
	v.tables++
	if v.tables > maxSchemaTables {
		return nil, v.fail("too many tables")
	}
	so, ok := v.u32(p)
	if !ok {
		return nil, v.fail("table out of bounds")
	}
	vt := p - int(int32(so))
	if vt < 0 || vt+4 > len(v.buf) {
		return nil, v.fail("vtable out of bounds")
	}
	vtSize := int(binary.LittleEndian.Uint16(v.buf[vt:]))
	tSize := int(binary.LittleEndian.Uint16(v.buf[vt+2:]))
	if vtSize < 4 || vtSize%2 != 0 || vt+vtSize > len(v.buf) || p+tSize > len(v.buf) {
		return nil, v.fail("vtable out of bounds")
	}
	return func(slot, size int) int {
		e := 4 + 2*slot
		if e+2 > vtSize {
			return 0
		}
		o := int(binary.LittleEndian.Uint16(v.buf[vt+e:]))
		if o == 0 || o+size > tSize {
			return 0
		}
		return p + o
	}, nil
}

// ref follows the offset stored at p (to a table, vector or string).
func (v *fbVerifier) ref(p int) (int, error) {
	u, ok := v.u32(p)
	if !ok || int64(p)+int64(u) >= int64(len(v.buf)) {
		return 0, v.fail("offset out of bounds")
	}
	return p + int(u), nil
}

// vector checks the vector referenced at p and returns its length and the
// position of its first element.
func (v *fbVerifier) vector(p, elem int) (n, first int, err error) {
	q, err := v.ref(p)
	if err != nil {
		return 0, 0, err
	}
	u, ok := v.u32(q)
	if !ok || int64(q)+4+int64(u)*int64(elem) > int64(len(v.buf)) {
		return 0, 0, v.fail("vector length out of bounds")
	}
	return int(u), q + 4, nil
}

// tables checks a vector of tables at p with check.
func (v *fbVerifier) tableVector(p int, check func(int) error) error {
	if p == 0 {
		return nil
	}
	n, first, err := v.vector(p, 4)
	if err != nil {
		return err
	}
	for i := range n {
		q, err := v.ref(first + 4*i)
		if err != nil {
			return err
		}
		if err := check(q); err != nil {
			return err
		}
	}
	return nil
}

func (v *fbVerifier) message() error {
	f, err := v.table(v.root())
	if err != nil {
		return err
	}
	if p := f(1, 1); p == 0 || v.buf[p] != 1 { // header_type Schema
		return v.fail("not a schema message")
	}
	if p := f(3, 8); p != 0 {
		if body := int64(binary.LittleEndian.Uint64(v.buf[p:])); body < 0 || body > v.rest {
			return v.fail(fmt.Sprintf("body length %d, %d bytes follow", body, v.rest))
		}
	}
	if err := v.tableVector(f(4, 4), v.keyValue); err != nil {
		return err
	}
	hp := f(2, 4)
	if hp == 0 {
		return v.fail("no schema")
	}
	h, err := v.ref(hp)
	if err != nil {
		return err
	}
	s, err := v.table(h)
	if err != nil {
		return err
	}
	if err := v.tableVector(s(1, 4), func(q int) error { return v.field(q, 0) }); err != nil {
		return err
	}
	if err := v.tableVector(s(2, 4), v.keyValue); err != nil {
		return err
	}
	if p := s(3, 4); p != 0 {
		if _, _, err := v.vector(p, 8); err != nil {
			return err
		}
	}
	return nil
}

// root is the position of the root table (the first word's offset).
func (v *fbVerifier) root() int {
	u, ok := v.u32(0)
	if !ok || int(u) >= len(v.buf) {
		return -1
	}
	return int(u)
}

const maxSchemaDepth = 64

func (v *fbVerifier) field(p, depth int) error {
	if depth > maxSchemaDepth {
		return v.fail("fields nested too deep")
	}
	f, err := v.table(p)
	if err != nil {
		return err
	}
	if tt := f(2, 1); tt != 0 && v.buf[tt] == 14 { // Union: check typeIds
		if tp := f(3, 4); tp != 0 {
			q, err := v.ref(tp)
			if err != nil {
				return err
			}
			u, err := v.table(q)
			if err != nil {
				return err
			}
			if ids := u(1, 4); ids != 0 {
				if _, _, err := v.vector(ids, 4); err != nil {
					return err
				}
			}
		}
	}
	if err := v.tableVector(f(5, 4), func(q int) error { return v.field(q, depth+1) }); err != nil {
		return err
	}
	return v.tableVector(f(6, 4), v.keyValue)
}

func (v *fbVerifier) keyValue(p int) error {
	_, err := v.table(p)
	return err
}
