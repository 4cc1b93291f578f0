package geojson

import (
	"bytes"
	"encoding/json"
	"fmt"
	"time"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/internal/num"
)

// chunk is a run of features as JSON text.
type chunk struct {
	rd    *Reader
	first int64 // features before this chunk
	buf   []byte
	ends  []int   // feature i is buf[ends[i-1]:ends[i]]
	offs  []int64 // byte offset of each feature in the input
	lines []int64
	cols  []int64    // 1-based column where each record starts (sequences)
	info  []featInfo // filled by Extract

	out   []byte // encoded by Encode
	nout  int    // features in out
	empty bool   // a collection chunk with nothing to write
}

func (c *chunk) add(off, line, col int64) {
	c.ends = append(c.ends, len(c.buf))
	c.offs = append(c.offs, off)
	c.lines = append(c.lines, line)
	if c.rd.seq {
		c.cols = append(c.cols, col)
	}
}

func (c *chunk) Len() int         { return len(c.ends) }
func (c *chunk) Line(i int) int64 { return c.lines[i] }

func (c *chunk) feature(i int) []byte {
	start := 0
	if i > 0 {
		start = c.ends[i-1]
	}
	return c.buf[start:c.ends[i]]
}

// What a feature's "properties" is.
const (
	propsMissing = iota
	propsNull
	propsObject
	propsOther
)

// featInfo is the layout of one feature's top level.
type featInfo struct {
	valid   bool // well-formed JSON (checked for sequences, known for collections)
	object  bool
	hasType bool
	feature bool // "type": "Feature"
	t0, t1  int  // the type value
	props   uint8
	p0, p1  int // the properties value
	pIns    int // where added members go in a properties object: after its last member
	g0, g1  int // the geometry value; g0 < 0 when missing
	fIns    int // after the feature's last member (for a missing properties member)
}

// scanFeature reads the top-level members of a feature's JSON text.
func scanFeature(f []byte) featInfo {
	inf := featInfo{valid: true, g0: -1}
	i := skipSpace(f, 0)
	if i >= len(f) || f[i] != '{' {
		return inf
	}
	inf.object = true
	inf.fIns = i + 1
	for p := i + 1; ; {
		m, end, ok := nextMember(f, p)
		if !ok {
			break
		}
		p, inf.fIns = end, end
		key := f[m.key0:m.key1]
		switch {
		case keyIs(key, "type"):
			inf.hasType = true
			inf.t0, inf.t1 = m.val0, m.val1
			inf.feature = string(f[m.val0:m.val1]) == `"Feature"` ||
				f[m.val0] == '"' && bytes.IndexByte(f[m.val0:m.val1], '\\') >= 0 && unquote(f[m.val0:m.val1]) == "Feature"
		case keyIs(key, "properties"):
			inf.p0, inf.p1 = m.val0, m.val1
			switch f[m.val0] {
			case '{':
				inf.props = propsObject
			case 'n':
				inf.props = propsNull
			default:
				inf.props = propsOther
			}
		case keyIs(key, "geometry"):
			inf.g0, inf.g1 = m.val0, m.val1
		}
	}
	return inf
}

// Extract reads each feature's location (from its geometry) and time (from
// its properties).
func (c *chunk) Extract(in *enrich.Inputs) {
	rd := c.rd
	n := c.Len()
	if cap(c.info) < n {
		c.info = make([]featInfo, n)
	}
	c.info = c.info[:n]
	rec := make([]string, len(rd.cols))
	var clash []byte // an added column's quoted name found among the properties
	for i := range n {
		f := c.feature(i)
		if rd.seq && !json.Valid(f) {
			c.info[i] = featInfo{}
			in.Err[i] = &enrich.RowError{Err: fmt.Errorf("%w: %w", enrich.ErrFatal, c.syntax(i))}
			continue
		}
		inf := scanFeature(f)
		if inf.props == propsObject {
			// Where added members go, and the properties the time is read
			// from, as text.
			inf.pIns = inf.p0 + 1
			for q := inf.p0 + 1; ; {
				m, end, ok := nextMember(f, q)
				if !ok {
					break
				}
				q, inf.pIns = end, end
				key := f[m.key0:m.key1]
				for _, nd := range rd.need {
					if keyIs(key, nd.name) {
						rec[nd.idx] = valueText(f[m.val0:m.val1])
					}
				}
				for _, k := range rd.added {
					if len(k) == len(key) && string(k) == string(key) && clash == nil {
						clash = k
					}
				}
			}
		}
		c.info[i] = inf
		if clash != nil {
			in.Err[i] = &enrich.RowError{Column: unquote(clash), Err: fmt.Errorf("%w: %w: the feature already has a property %s; choose a prefix for the added columns with --prefix",
				enrich.ErrFatal, ErrPropertyExists, clash)}
			clash = nil
		} else if err := c.locate(f, &inf, i, in); err != nil {
			in.Err[i] = err
		} else if rd.x.Time(rec, i, in.Lat[i], in.Lon[i], in); in.Err[i] == nil {
			c.heading(f, &inf, rec, i, in)
		}
		for _, nd := range rd.need {
			rec[nd.idx] = ""
		}
	}
}

// locate checks that feature i is a Feature with properties and a usable
// geometry, and sets its location.
func (c *chunk) locate(f []byte, inf *featInfo, i int, in *enrich.Inputs) error {
	if err := checkFeature(f, inf); err != nil {
		return err
	}
	if inf.g0 < 0 {
		return &enrich.RowError{Column: "geometry", Err: fmt.Errorf("%w: the feature has no \"geometry\" member", ErrNoLocation)}
	}
	if f[inf.g0] == 'n' {
		return &enrich.RowError{Column: "geometry", Err: fmt.Errorf("%w: the geometry is null", ErrNoLocation)}
	}
	p, err := location(f[inf.g0:inf.g1])
	if err != nil {
		return &enrich.RowError{Column: "geometry", Err: err}
	}
	in.Lat[i], in.Lon[i] = p[1], p[0]
	return nil
}

// heading reads row i's heading (the glare group): from the --heading
// property, or with --heading-from-geometry from the direction of the line
// geometry; NaN when neither is asked for.
func (c *chunk) heading(f []byte, inf *featInfo, rec []string, i int, in *enrich.Inputs) {
	if !c.rd.headingFromGeometry {
		c.rd.x.Heading(rec, i, in)
		return
	}
	h, err := lineHeading(f[inf.g0:inf.g1])
	if err != nil {
		in.Err[i] = &enrich.RowError{Column: "geometry", Err: err}
		return
	}
	in.Heading[i] = h
}

// checkFeature reports an item that is not a Feature, or a Feature with no
// properties object.
func checkFeature(f []byte, inf *featInfo) error {
	switch {
	case !inf.object:
		return &enrich.RowError{Err: fmt.Errorf("%w: the item is %s; expected a Feature object {\"type\": \"Feature\", ...}", ErrNotFeature, kindName(f[skipSpace(f, 0)]))}
	case !inf.hasType:
		return &enrich.RowError{Column: "type", Err: fmt.Errorf("%w: the object has no \"type\"; expected \"type\": \"Feature\"", ErrNotFeature)}
	case !inf.feature:
		return &enrich.RowError{Column: "type", Err: fmt.Errorf("%w: \"type\" is %s; expected \"Feature\"", ErrNotFeature, f[inf.t0:inf.t1])}
	case inf.p1 == 0:
		return &enrich.RowError{Column: "properties", Err: fmt.Errorf("%w: the feature has no \"properties\" member; the time is read from a property", ErrProperties)}
	case inf.props == propsNull:
		return &enrich.RowError{Column: "properties", Err: fmt.Errorf("%w: \"properties\" is null; the time is read from a property", ErrProperties)}
	case inf.props == propsOther:
		return &enrich.RowError{Column: "properties", Err: fmt.Errorf("%w: \"properties\" is %s; expected an object", ErrProperties, kindName(f[inf.p0]))}
	}
	return nil
}

// syntax is the fatal error for sequence record i, which is not well-formed.
func (c *chunk) syntax(i int) *SyntaxError {
	f := c.feature(i)
	off, msg, _ := firstProblem(f, true)
	line := c.lines[i] + int64(bytes.Count(f[:off], []byte{'\n'}))
	col := c.cols[i] + off
	if j := bytes.LastIndexByte(f[:off], '\n'); j >= 0 {
		col = off - int64(j)
	}
	return &SyntaxError{Offset: c.offs[i] + off, Line: line, Column: col, Feature: c.first + int64(i) + 1,
		Err: fmt.Errorf("%w: %s", ErrSyntax, msg)}
}

// Values returns feature i's property values as text, aligned with the
// reader's Columns (strings as their text, null as "", other values as
// JSON), and last the whole feature's JSON text as read.
func (c *chunk) Values(i int) []string {
	f := c.feature(i)
	out := make([]string, len(c.rd.columns))
	out[len(out)-1] = string(f)
	if !json.Valid(f) {
		return out
	}
	inf := scanFeature(f)
	if inf.props != propsObject {
		return out
	}
	for q := inf.p0 + 1; ; {
		m, end, ok := nextMember(f, q)
		if !ok {
			return out
		}
		q = end
		if j, ok := c.rd.colIndex[unquote(f[m.key0:m.key1])]; ok {
			out[j] = valueText(f[m.val0:m.val1])
		}
	}
}

// Encode writes each feature that is not rejected, with the added columns
// as the last members of its properties.
func (c *chunk) Encode(res *enrich.Results) error {
	cols := res.Plan.Columns
	keys := make([][]byte, len(cols)) // `"name"`
	for j, col := range cols {
		keys[j] = appendString(nil, col.Name)
	}
	need := len(c.buf) + c.Len()*(8+32*len(cols))
	b := c.out[:0]
	if b == nil {
		b = make([]byte, 0, need)
	}
	c.nout = 0
	// With no added columns (a passthrough) Extract has not run: every
	// feature is copied as read.
	pass := len(cols) == 0 || len(c.info) != c.Len()
	for i := range c.Len() {
		if res.Status[i] == enrich.RowRejected {
			continue
		}
		f := c.feature(i)
		var inf featInfo
		if !pass {
			inf = c.info[i]
		}
		if c.rd.seq {
			if c.rd.outRS {
				b = append(b, 0x1E)
			}
		} else if c.nout > 0 {
			b = append(b, ",\n"...)
		}
		c.nout++
		switch {
		case pass || !inf.valid || !inf.object || !inf.feature || inf.props == propsOther:
			// Nothing can hold the added columns: written as read (keep policy).
			b = append(b, f...)
		case inf.props == propsObject:
			b = append(b, f[:inf.pIns]...)
			b = appendMembers(b, res, i, keys, skipSpace(f, inf.p0+1) != inf.p1-1)
			b = append(b, f[inf.pIns:]...)
		case inf.props == propsNull:
			b = append(b, f[:inf.p0]...)
			b = append(b, '{')
			b = appendMembers(b, res, i, keys, false)
			b = append(b, '}')
			b = append(b, f[inf.p1:]...)
		default: // no properties member
			b = append(b, f[:inf.fIns]...)
			b = append(b, `,"properties":{`...)
			b = appendMembers(b, res, i, keys, false)
			b = append(b, '}')
			b = append(b, f[inf.fIns:]...)
		}
		if c.rd.seq {
			b = append(b, '\n')
		}
	}
	c.out = b
	return nil
}

// appendMembers appends the added columns of row i as object members.
func appendMembers(b []byte, res *enrich.Results, i int, keys [][]byte, comma bool) []byte {
	for j, col := range res.Plan.Columns {
		if comma {
			b = append(b, ',')
		}
		comma = true
		b = append(b, keys[j]...)
		b = append(b, ':')
		switch col.Kind {
		case enrich.KindFloat:
			if v, ok := res.Float(col.Field, i); ok {
				b = num.AppendFixed(b, v, col.Decimals)
				continue
			}
		case enrich.KindCategory:
			if w := res.Word(col.Field, i); w != "" {
				b = appendString(b, w)
				continue
			}
		case enrich.KindText:
			if t := res.Text(col.Field, i); t != "" {
				b = appendString(b, t)
				continue
			}
		case enrich.KindInstant:
			if t, ok := res.Instant(col.Field, i); ok {
				b = append(b, '"')
				b = t.AppendFormat(b, time.RFC3339)
				b = append(b, '"')
				continue
			}
		}
		b = append(b, "null"...)
	}
	return b
}
