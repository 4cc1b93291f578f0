package parquet

import (
	"encoding/hex"
	"math"
	"strconv"
	"time"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
)

// valueText renders a[i] as text, for the rejects file and for reading times
// and coordinates held in non-text columns through the text parsers:
//   - null: "" (empty);
//   - strings as they are; binary (WKB geometry, say) as lowercase hex;
//   - integers and decimals in decimal; floats in the shortest form that
//     reads back to the same value (no exponent for ordinary magnitudes);
//   - timestamps with a zone as RFC 3339 in UTC ("2024-06-21T18:30:00Z"),
//     without one as ISO local date-times ("2024-06-21T18:30:00"); dates as
//     yyyy-mm-dd; times of day as HH:MM:SS with the fraction when present;
//   - dictionary values by their value; anything else in Arrow's own text
//     form (JSON for lists, structs and maps: ["a","b"], {"x":1}).
func valueText(a arrow.Array, i int) string {
	if a.IsNull(i) {
		return ""
	}
	switch v := a.(type) {
	case *array.String:
		return v.Value(i)
	case *array.LargeString:
		return v.Value(i)
	case *array.StringView:
		return v.Value(i)
	case *array.Binary:
		return hex.EncodeToString(v.Value(i))
	case *array.LargeBinary:
		return hex.EncodeToString(v.Value(i))
	case *array.BinaryView:
		return hex.EncodeToString(v.Value(i))
	case *array.FixedSizeBinary:
		return hex.EncodeToString(v.Value(i))
	case *array.Boolean:
		return strconv.FormatBool(v.Value(i))
	case *array.Float64:
		return formatFloat(v.Value(i), 64)
	case *array.Float32:
		return formatFloat(float64(v.Value(i)), 32)
	case *array.Uint64:
		return strconv.FormatUint(v.Value(i), 10)
	case *array.Timestamp:
		t := v.DataType().(*arrow.TimestampType)
		sec, nsec := splitUnit(int64(v.Value(i)), t.Unit)
		tm := time.Unix(sec, nsec).UTC()
		if t.TimeZone != "" {
			return tm.Format("2006-01-02T15:04:05.999999999Z07:00")
		}
		return tm.Format("2006-01-02T15:04:05.999999999")
	case *array.Date32:
		return time.Unix(int64(v.Value(i))*86400, 0).UTC().Format(time.DateOnly)
	case *array.Date64:
		return time.UnixMilli(int64(v.Value(i))).UTC().Format(time.DateOnly)
	case *array.Time32:
		return clockText(int64(v.Value(i)) * int64(v.DataType().(*arrow.Time32Type).Unit.Multiplier()))
	case *array.Time64:
		return clockText(int64(v.Value(i)) * int64(v.DataType().(*arrow.Time64Type).Unit.Multiplier()))
	case *array.Dictionary:
		return valueText(v.Dictionary(), v.GetValueIndex(i))
	case array.ExtensionArray:
		return valueText(v.Storage(), i)
	}
	if x, ok := intValue(a, i); ok {
		return strconv.FormatInt(x, 10)
	}
	return a.ValueStr(i)
}

// formatFloat writes v in the shortest form that reads back exactly, without
// an exponent between 1e-6 and 1e21 (so Unix times stay plain numbers).
func formatFloat(v float64, bits int) string {
	if abs := math.Abs(v); abs == 0 || (abs >= 1e-6 && abs < 1e21) {
		return strconv.FormatFloat(v, 'f', -1, bits)
	}
	return strconv.FormatFloat(v, 'g', -1, bits)
}

// clockText formats nanoseconds since midnight as HH:MM:SS[.fffffffff].
func clockText(ns int64) string {
	if ns < 0 || ns >= 86400e9 {
		return strconv.FormatInt(ns, 10) + "ns"
	}
	return time.Unix(0, ns).UTC().Format("15:04:05.999999999")
}
