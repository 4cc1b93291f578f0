package parquet

import (
	"github.com/apache/arrow-go/v18/arrow"

	"github.com/heliotag/heliotag/enrich"
)

// A batch holds every column of its rows decoded, and the batches in flight
// are a large part of a run's memory on wide tables: the default batch is
// enrich.DefaultBatchRows rows, halved while the rows' estimated decoded
// size makes it larger than batchBytes, down to minBatchRows
// (benchmarks/RESULTS.md, "Parquet memory").
const (
	batchBytes   = 2 << 20
	minBatchRows = 1024
)

// BatchRows is the number of rows per batch a run should use on this file
// when none is given.
func (rd *Reader) BatchRows() int {
	per := rowBytes(rd.schema.Fields())
	n := enrich.DefaultBatchRows
	for n > minBatchRows && n*per > batchBytes {
		n /= 2
	}
	return n
}

// rowBytes estimates the decoded size of a row of these fields: fixed-width
// values at their width, a struct as the sum of its fields, a fixed-size
// list as its length times its element, a list or map as an 8-byte offset
// and four elements, and 32 bytes for a string or binary value (its offset
// and typical text).
func rowBytes(fields []arrow.Field) int {
	n := 0
	for _, f := range fields {
		n += typeBytes(f.Type)
	}
	return n
}

func typeBytes(t arrow.DataType) int {
	switch t := t.(type) {
	case *arrow.DictionaryType:
		return max(t.IndexType.(arrow.FixedWidthDataType).BitWidth()/8, 1)
	case arrow.FixedWidthDataType:
		return max(t.BitWidth()/8, 1)
	case *arrow.StructType:
		return rowBytes(t.Fields())
	case *arrow.FixedSizeListType:
		return int(t.Len()) * typeBytes(t.Elem())
	case arrow.ListLikeType:
		return 8 + 4*typeBytes(t.Elem())
	case arrow.ExtensionType:
		return typeBytes(t.StorageType())
	}
	return 32
}
