package parquet

import (
	"fmt"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/memory"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/solar"
)

// Arrow types of the added columns, by enrich.Kind.
var (
	floatType64  = arrow.PrimitiveTypes.Float64
	categoryType = &arrow.DictionaryType{IndexType: arrow.PrimitiveTypes.Int32, ValueType: arrow.BinaryTypes.String}
	textType64   = arrow.BinaryTypes.String
	instantType  = &arrow.TimestampType{Unit: arrow.Microsecond, TimeZone: "UTC"}
)

func kindType(k enrich.Kind) arrow.DataType {
	switch k {
	case enrich.KindFloat:
		return floatType64
	case enrich.KindCategory:
		return categoryType
	case enrich.KindInstant:
		return instantType
	}
	return textType64
}

// outSchema is the output's Arrow schema for one plan, with the fixed
// dictionaries of its category columns.
type outSchema struct {
	plan   *enrich.Plan
	schema *arrow.Schema
	dicts  []*category // per plan column; nil unless KindCategory
}

// category is the dictionary of a category column. Every batch uses the same
// dictionary array, so the Parquet writer keeps one dictionary page per row
// group; a word outside the vocabulary (from a group this package does not
// know the words of) gets a per-batch dictionary instead, which is correct but
// makes the writer fall back to plain encoding for that column chunk.
type category struct {
	words []string
	dict  arrow.Array
}

// vocabulary lists the words of a category field in dictionary order.
func vocabulary(f enrich.Field) []string {
	switch f {
	case enrich.FieldPhase:
		var w []string
		for p := 1; p < solar.NumPhases; p++ {
			w = append(w, solar.Phase(p).String())
		}
		return w
	case enrich.FieldCondition:
		var w []string
		seen := map[string]bool{}
		for p := 1; p < solar.NumPhases; p++ {
			if s := solar.Phase(p).Condition().String(); !seen[s] {
				seen[s] = true
				w = append(w, s)
			}
		}
		return w
	case enrich.FieldMoonPhase: // the product contract's words
		return []string{"new", "waxing_crescent", "first_quarter", "waxing_gibbous", "full", "waning_gibbous", "last_quarter", "waning_crescent"}
	case enrich.FieldGlare:
		return []string{"ahead", "behind", "none"}
	}
	return nil
}

// output returns the output schema for plan, made once per plan.
func (rd *Reader) output(plan *enrich.Plan) *outSchema {
	rd.mu.Lock()
	defer rd.mu.Unlock()
	if rd.out != nil && rd.out.plan == plan {
		return rd.out
	}
	if rd.out != nil {
		rd.out.release()
	}
	fs := append([]arrow.Field(nil), rd.schema.Fields()...)
	o := &outSchema{plan: plan, dicts: make([]*category, len(plan.Columns))}
	for k, c := range plan.Columns {
		fs = append(fs, arrow.Field{Name: c.Name, Type: kindType(c.Kind), Nullable: true})
		if c.Kind == enrich.KindCategory {
			words := vocabulary(c.Field)
			b := array.NewStringBuilder(rd.mem)
			b.AppendValues(words, nil)
			o.dicts[k] = &category{words: words, dict: b.NewArray()}
			b.Release()
		}
	}
	md := rd.outMetadata()
	o.schema = arrow.NewSchema(fs, &md)
	rd.out = o
	return o
}

func (o *outSchema) release() {
	for _, d := range o.dicts {
		if d != nil {
			d.dict.Release()
		}
	}
}

// outMetadata is the output schema's metadata: the file's key-value metadata
// in order (without the stored Arrow schema, which the writer makes anew),
// then any key of the input's Arrow schema metadata not already there. The
// writer stores it as the file's key-value metadata and in the Arrow schema.
func (rd *Reader) outMetadata() arrow.Metadata {
	var keys, values []string
	seen := map[string]bool{}
	for _, kv := range rd.kv {
		if kv.key == "ARROW:schema" || seen[kv.key] {
			continue
		}
		seen[kv.key] = true
		keys, values = append(keys, kv.key), append(values, kv.value)
	}
	am := rd.schema.Metadata()
	for i, k := range am.Keys() {
		if !seen[k] && k != "ARROW:schema" {
			seen[k] = true
			keys, values = append(keys, k), append(values, am.Values()[i])
		}
	}
	return arrow.NewMetadata(keys, values)
}

// Encode makes the output batch: the input columns without the rejected rows,
// then the added columns.
func (c *chunk) Encode(res *enrich.Results) (err error) {
	defer recoverInto(&err)
	rd := c.rd
	out := rd.output(res.Plan)
	n := c.Len()
	runs := keptRuns(res.Status[:n])
	kept := 0
	for _, r := range runs {
		kept += r[1] - r[0]
	}
	cols := make([]arrow.Array, 0, int(c.rec.NumCols())+len(res.Plan.Columns))
	defer func() {
		for _, a := range cols {
			a.Release()
		}
	}()
	for _, col := range c.rec.Columns() {
		a, err := keepRows(col, runs, kept == n, rd.mem)
		if err != nil {
			return fmt.Errorf("parquet: leaving out rejected rows: %w", err)
		}
		cols = append(cols, a)
	}
	for k, pc := range res.Plan.Columns {
		cols = append(cols, buildColumn(rd.mem, pc, res, kept, out.dicts[k]))
	}
	if c.out != nil {
		c.out.Release()
	}
	c.out = array.NewRecordBatch(out.schema, cols, int64(kept))
	return nil
}

// keptRuns lists the half-open row ranges whose rows are written.
func keptRuns(status []enrich.Status) [][2]int {
	var runs [][2]int
	start := -1
	for i, s := range status {
		if s != enrich.RowRejected {
			if start < 0 {
				start = i
			}
			continue
		}
		if start >= 0 {
			runs = append(runs, [2]int{start, i})
			start = -1
		}
	}
	if start >= 0 {
		runs = append(runs, [2]int{start, len(status)})
	}
	return runs
}

// keepRows returns col restricted to runs (a new reference).
func keepRows(col arrow.Array, runs [][2]int, all bool, mem memory.Allocator) (arrow.Array, error) {
	switch {
	case all:
		col.Retain()
		return col, nil
	case len(runs) == 0:
		return array.NewSlice(col, 0, 0), nil
	case len(runs) == 1:
		return array.NewSlice(col, int64(runs[0][0]), int64(runs[0][1])), nil
	}
	parts := make([]arrow.Array, len(runs))
	for k, r := range runs {
		parts[k] = array.NewSlice(col, int64(r[0]), int64(r[1]))
	}
	defer func() {
		for _, p := range parts {
			p.Release()
		}
	}()
	return array.Concatenate(parts, mem)
}

// buildColumn makes the Arrow array of an added column for the written rows.
func buildColumn(mem memory.Allocator, pc enrich.Column, res *enrich.Results, kept int, cat *category) arrow.Array {
	n := len(res.Status)
	switch pc.Kind {
	case enrich.KindFloat:
		b := array.NewFloat64Builder(mem)
		defer b.Release()
		b.Reserve(kept)
		for i := range n {
			if res.Status[i] == enrich.RowRejected {
				continue
			}
			if v, ok := res.Float(pc.Field, i); ok {
				b.UnsafeAppend(v)
			} else {
				b.UnsafeAppendBoolToBitmap(false)
			}
		}
		return b.NewArray()
	case enrich.KindCategory:
		return buildCategory(mem, pc, res, kept, cat)
	case enrich.KindInstant:
		b := array.NewTimestampBuilder(mem, instantType)
		defer b.Release()
		b.Reserve(kept)
		for i := range n {
			if res.Status[i] == enrich.RowRejected {
				continue
			}
			if t, ok := res.Instant(pc.Field, i); ok {
				b.UnsafeAppend(arrow.Timestamp(t.UnixMicro()))
			} else {
				b.UnsafeAppendBoolToBitmap(false)
			}
		}
		return b.NewArray()
	}
	b := array.NewStringBuilder(mem)
	defer b.Release()
	b.Reserve(kept)
	for i := range n {
		if res.Status[i] == enrich.RowRejected {
			continue
		}
		if s := res.Text(pc.Field, i); s != "" {
			b.Append(s)
		} else {
			b.AppendNull()
		}
	}
	return b.NewArray()
}

// buildCategory makes a dictionary array over the column's fixed dictionary
// (extended for this batch by any word outside it).
func buildCategory(mem memory.Allocator, pc enrich.Column, res *enrich.Results, kept int, cat *category) arrow.Array {
	n := len(res.Status)
	ib := array.NewInt32Builder(mem)
	defer ib.Release()
	ib.Reserve(kept)
	words := cat.words
	extra := false
	last := 0
	for i := range n {
		if res.Status[i] == enrich.RowRejected {
			continue
		}
		w := res.Word(pc.Field, i)
		if w == "" {
			ib.UnsafeAppendBoolToBitmap(false)
			continue
		}
		if last < len(words) && words[last] == w {
			ib.UnsafeAppend(int32(last))
			continue
		}
		k := -1
		for j, x := range words {
			if x == w {
				k = j
				break
			}
		}
		if k < 0 {
			if !extra {
				words = append(words[:len(words):len(words)], w)
				extra = true
			} else {
				words = append(words, w)
			}
			k = len(words) - 1
		}
		last = k
		ib.UnsafeAppend(int32(k))
	}
	idx := ib.NewArray()
	defer idx.Release()
	dict := cat.dict
	if extra {
		b := array.NewStringBuilder(mem)
		b.AppendValues(words, nil)
		dict = b.NewArray()
		b.Release()
		defer dict.Release()
	}
	return array.NewDictionaryArray(categoryType, idx, dict)
}
