package parquet

import (
	"bytes"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/paulmach/orb/encoding/wkb"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/internal/fields"
	"github.com/heliotag/heliotag/io/internal/geom"
)

// ErrGeometry is the cause of a row whose geometry cannot be read: null,
// malformed WKB, or non-finite coordinates. (An empty one is geom.ErrEmpty.)
var ErrGeometry = errors.New("unreadable geometry")

// geoEncoding is how a geometry column stores its shapes.
type geoEncoding uint8

const (
	encWKB   geoEncoding = iota + 1 // ISO WKB (EWKB and Z/M dimensions tolerated)
	encPoint                        // GeoParquet 1.1 native point: struct<x: double, y: double[, z, m]>
)

// geoColumn is the geometry column in use.
type geoColumn struct {
	name  string
	index int
	enc   geoEncoding
	x, y  int // child indexes of a native point struct
}

// geoMetadata is the part of GeoParquet's "geo" file metadata heliotag reads
// (GeoParquet 1.0 and 1.1).
type geoMetadata struct {
	Version       string                  `json:"version"`
	PrimaryColumn string                  `json:"primary_column"`
	Columns       map[string]geoColumnDoc `json:"columns"`
}

type geoColumnDoc struct {
	Encoding string          `json:"encoding"`
	CRS      json.RawMessage `json:"crs"` // nil when absent, "null" when explicitly undefined
}

// chooseGeometry finds the geometry column: named by --geometry, else the
// GeoParquet primary column; checks its encoding, type and CRS.
func chooseGeometry(sc *arrow.Schema, names []string, geoJSON, name string) (*geoColumn, error) {
	var md *geoMetadata
	if geoJSON != "" {
		md = new(geoMetadata)
		if err := json.Unmarshal([]byte(geoJSON), md); err != nil {
			return nil, fmt.Errorf("%w: the \"geo\" file metadata is not valid JSON: %w", ErrGeo, err)
		}
	}
	how := "--geometry"
	if name == "" {
		how = "the GeoParquet primary_column"
		name = md.PrimaryColumn
		if name == "" {
			return nil, fmt.Errorf("%w: the \"geo\" file metadata names no primary_column; name the geometry column with --geometry, or use --lat and --lon", ErrGeo)
		}
	}
	idx := -1
	for i, n := range names {
		if n == name {
			idx = i
			break
		}
	}
	if idx < 0 {
		return nil, fmt.Errorf("%w: %s %q: no such column; columns are %s", enrich.ErrUsage, how, name, quoteList(names))
	}
	g := &geoColumn{name: name, index: idx}
	f := sc.Field(idx)
	enc := ""
	if md != nil {
		if doc, ok := md.Columns[name]; ok {
			enc = doc.Encoding
			if err := checkCRS(name, doc.CRS); err != nil {
				return nil, err
			}
		} else if how != "--geometry" {
			return nil, fmt.Errorf("%w: the primary_column %q is not described under \"columns\"", ErrGeo, name)
		}
	}
	t := storageType(f.Type)
	switch strings.ToLower(enc) {
	case "wkb":
		g.enc = encWKB
	case "point":
		g.enc = encPoint
	case "":
		// Not described by GeoParquet metadata: tell from the type.
		if st, ok := t.(*arrow.StructType); ok && st.NumFields() >= 2 {
			g.enc = encPoint
		} else {
			g.enc = encWKB
		}
	default:
		return nil, fmt.Errorf("%w: column %q has the GeoParquet encoding %q; this version reads WKB and point; write the geometry as WKB (or give --lat and --lon)", ErrGeo, name, enc)
	}
	switch g.enc {
	case encWKB:
		switch t.ID() {
		case arrow.BINARY, arrow.LARGE_BINARY, arrow.BINARY_VIEW:
		default:
			return nil, typeError(f, "geometry", "a binary column of WKB")
		}
	case encPoint:
		st, ok := t.(*arrow.StructType)
		if !ok {
			return nil, typeError(f, "geometry", "a struct<x: double, y: double> column (GeoParquet native point)")
		}
		x, okx := st.FieldIdx("x")
		y, oky := st.FieldIdx("y")
		if !okx || !oky || st.Field(x).Type.ID() != arrow.FLOAT64 || st.Field(y).Type.ID() != arrow.FLOAT64 {
			return nil, typeError(f, "geometry", "a struct<x: double, y: double> column (GeoParquet native point)")
		}
		g.x, g.y = x, y
	}
	return g, nil
}

// checkCRS accepts an absent crs (GeoParquet's default, OGC:CRS84) and the
// longitude/latitude WGS84 systems OGC:CRS84 and EPSG:4326, as PROJJSON with
// an "id", or as "AUTHORITY:CODE" text.
func checkCRS(col string, raw json.RawMessage) error {
	if len(bytes.TrimSpace(raw)) == 0 {
		return nil
	}
	bad := func(what string) error {
		return fmt.Errorf("%w: column %q has the crs %s; heliotag needs longitude/latitude degrees on WGS84 (crs absent, OGC:CRS84 or EPSG:4326): reproject the file first", ErrCRS, col, what)
	}
	var v any
	if err := json.Unmarshal(raw, &v); err != nil {
		return fmt.Errorf("%w: column %q: crs is not valid JSON: %w", ErrGeo, col, err)
	}
	switch c := v.(type) {
	case nil:
		return bad("null (undefined)")
	case string:
		if lonLatWGS84(c) {
			return nil
		}
		return bad(strconv.Quote(c))
	case map[string]any:
		id, _ := c["id"].(map[string]any)
		authority, _ := id["authority"].(string)
		code := ""
		switch k := id["code"].(type) {
		case string:
			code = k
		case float64:
			code = strconv.FormatFloat(k, 'f', -1, 64)
		}
		if authority != "" && lonLatWGS84(authority+":"+code) {
			return nil
		}
		what := ""
		if n, ok := c["name"].(string); ok {
			what = strconv.Quote(n)
		}
		if authority != "" {
			what = strings.TrimSpace(what + " (" + authority + ":" + code + ")")
		}
		if what == "" {
			what = "given as PROJJSON without an id"
		}
		return bad(what)
	}
	return bad(string(raw))
}

func lonLatWGS84(s string) bool {
	switch strings.ToUpper(strings.TrimSpace(s)) {
	case "OGC:CRS84", "EPSG:4326":
		return true
	}
	return false
}

func quoteList(names []string) string {
	q := make([]string, len(names))
	for i, n := range names {
		q[i] = strconv.Quote(n)
	}
	return strings.Join(q, ", ")
}

// read fills in every row's location from the geometry column a.
func (g *geoColumn) read(a arrow.Array, in *enrich.Inputs) {
	a = storage(a)
	set := func(i int, x, y float64) {
		if math.IsNaN(x) || math.IsNaN(y) {
			in.Err[i] = &enrich.RowError{Column: g.name, Err: fmt.Errorf("%w: the point is empty (NaN coordinates)", geom.ErrEmpty)}
			return
		}
		if math.IsInf(x, 0) || math.IsInf(y, 0) {
			in.Err[i] = &enrich.RowError{Column: g.name, Err: fmt.Errorf("%w: %w: coordinates (%v, %v) are not finite; expected longitude in [-180, 180] and latitude in [-90, 90]", ErrGeometry, fields.ErrNotFloat, x, y)}
			return
		}
		in.Lon[i], in.Lat[i] = x, y
	}
	null := func(i int) {
		in.Err[i] = &enrich.RowError{Column: g.name, Err: fmt.Errorf("%w: the geometry is null", ErrGeometry)}
	}
	if g.enc == encPoint {
		st, ok := a.(*array.Struct)
		if !ok {
			fillErr(in.Err, &enrich.RowError{Column: g.name, Err: fmt.Errorf("%w: %s", ErrColumnType, a.DataType())})
			return
		}
		xs := st.Field(g.x).(*array.Float64)
		ys := st.Field(g.y).(*array.Float64)
		for i := range st.Len() {
			if st.IsNull(i) || xs.IsNull(i) || ys.IsNull(i) {
				null(i)
				continue
			}
			set(i, xs.Value(i), ys.Value(i))
		}
		return
	}
	value, ok := binaryValues(a)
	if !ok {
		fillErr(in.Err, &enrich.RowError{Column: g.name, Err: fmt.Errorf("%w: %s", ErrColumnType, a.DataType())})
		return
	}
	for i := range a.Len() {
		if a.IsNull(i) {
			null(i)
			continue
		}
		x, y, err := wkbPoint(value(i))
		if err != nil {
			in.Err[i] = &enrich.RowError{Column: g.name, Err: err}
			continue
		}
		set(i, x, y)
	}
}

// binaryValues returns the accessor of a binary array's values; ok is false
// for other types.
func binaryValues(a arrow.Array) (value func(i int) []byte, ok bool) {
	switch v := a.(type) {
	case *array.Binary:
		return v.Value, true
	case *array.LargeBinary:
		return v.Value, true
	case *array.BinaryView:
		return v.Value, true
	}
	return nil, false
}

// wkbPoint returns the representative point (see geom.Representative) of a
// WKB geometry. Points are read directly; other shapes through orb's WKB
// decoder, after dropping Z and M ordinates, which it does not read.
func wkbPoint(b []byte) (x, y float64, err error) {
	if len(b) < 5 {
		return 0, 0, fmt.Errorf("%w: %d bytes is too short for WKB", ErrGeometry, len(b))
	}
	order, typ, dims, body, err := wkbHeader(b)
	if err != nil {
		return 0, 0, err
	}
	if typ == 1 {
		if len(body) < 8*dims {
			return 0, 0, fmt.Errorf("%w: WKB point cut short (%d bytes)", ErrGeometry, len(b))
		}
		return math.Float64frombits(order.Uint64(body)), math.Float64frombits(order.Uint64(body[8:])), nil
	}
	if dims != 2 || order.Uint32(b[1:]) != typ {
		// Z/M ordinates, ISO dimension codes or EWKB flags: rewrite as 2D WKB.
		if b, err = flatten2D(b); err != nil {
			return 0, 0, err
		}
	}
	g, err := wkb.Unmarshal(b)
	if err != nil {
		return 0, 0, fmt.Errorf("%w: %w", ErrGeometry, err)
	}
	p, err := geom.Representative(g)
	if err != nil {
		return 0, 0, fmt.Errorf("%w: %w", ErrGeometry, err)
	}
	return p[0], p[1], nil
}

// wkbHeader reads a (E)WKB header: byte order, the base type (1 point ...
// 7 collection), the number of ordinates per coordinate, and the bytes after
// the header (after the SRID of EWKB).
func wkbHeader(b []byte) (order byteOrder, typ uint32, dims int, body []byte, err error) {
	switch b[0] {
	case 0:
		order = binary.BigEndian
	case 1:
		order = binary.LittleEndian
	default:
		return nil, 0, 0, nil, fmt.Errorf("%w: byte order %d is not WKB (0 or 1)", ErrGeometry, b[0])
	}
	raw := order.Uint32(b[1:])
	body = b[5:]
	dims = 2
	if raw&0xE0000000 != 0 { // EWKB flags: Z, M, SRID
		if raw&0x80000000 != 0 {
			dims++
		}
		if raw&0x40000000 != 0 {
			dims++
		}
		if raw&0x20000000 != 0 {
			if len(body) < 4 {
				return nil, 0, 0, nil, fmt.Errorf("%w: EWKB header cut short", ErrGeometry)
			}
			body = body[4:]
		}
		typ = raw & 0x0FFFFFFF
	} else {
		typ = raw % 1000
		switch raw / 1000 {
		case 0:
		case 1, 2:
			dims = 3
		case 3:
			dims = 4
		default:
			return nil, 0, 0, nil, fmt.Errorf("%w: WKB geometry type %d is not one of 1..7 (with Z/M: +1000, +2000, +3000)", ErrGeometry, raw)
		}
	}
	if typ < 1 || typ > 7 {
		return nil, 0, 0, nil, fmt.Errorf("%w: WKB geometry type %d is not one of 1..7 (point ... collection)", ErrGeometry, raw)
	}
	return order, typ, dims, body, nil
}

// byteOrder is binary.LittleEndian or binary.BigEndian.
type byteOrder interface {
	binary.ByteOrder
	binary.AppendByteOrder
}

// maxWKBDepth bounds the nesting of geometry collections.
const maxWKBDepth = 32

// flatten2D rewrites a WKB or EWKB geometry of any dimension as 2D ISO WKB
// (x and y of every coordinate, no SRID).
func flatten2D(b []byte) ([]byte, error) {
	out, _, err := flattenInto(make([]byte, 0, len(b)), b, 0)
	return out, err
}

func flattenInto(dst, b []byte, depth int) (out, rest []byte, err error) {
	if depth > maxWKBDepth {
		return nil, nil, fmt.Errorf("%w: geometry collections nested deeper than %d", ErrGeometry, maxWKBDepth)
	}
	short := fmt.Errorf("%w: WKB cut short", ErrGeometry)
	if len(b) < 5 {
		return nil, nil, short
	}
	order, typ, dims, body, err := wkbHeader(b)
	if err != nil {
		return nil, nil, err
	}
	dst = append(dst, b[0])
	dst = order.AppendUint32(dst, typ)
	coords := func(n uint32) error {
		size := uint64(n) * uint64(dims) * 8
		if size > uint64(len(body)) {
			return short
		}
		for k := uint32(0); k < n; k++ {
			dst = append(dst, body[:16]...)
			body = body[dims*8:]
		}
		return nil
	}
	count := func() (uint32, error) {
		if len(body) < 4 {
			return 0, short
		}
		n := order.Uint32(body)
		body = body[4:]
		dst = order.AppendUint32(dst, n)
		return n, nil
	}
	switch typ {
	case 1:
		err = coords(1)
	case 2:
		var n uint32
		if n, err = count(); err == nil {
			err = coords(n)
		}
	case 3:
		var rings uint32
		if rings, err = count(); err != nil {
			break
		}
		if uint64(rings)*4 > uint64(len(body)) {
			return nil, nil, short
		}
		for r := uint32(0); r < rings && err == nil; r++ {
			var n uint32
			if n, err = count(); err == nil {
				err = coords(n)
			}
		}
	default: // 4..7: a count of whole geometries
		var n uint32
		if n, err = count(); err != nil {
			break
		}
		if uint64(n)*5 > uint64(len(body)) {
			return nil, nil, short
		}
		for k := uint32(0); k < n; k++ {
			if dst, body, err = flattenInto(dst, body, depth+1); err != nil {
				return nil, nil, err
			}
		}
	}
	if err != nil {
		return nil, nil, err
	}
	return dst, body, nil
}
