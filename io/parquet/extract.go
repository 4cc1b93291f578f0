package parquet

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/internal/fields"
	"github.com/heliotag/heliotag/io/internal/stamp"
	"github.com/heliotag/heliotag/io/internal/zone"
)

// timeKind says how a chunk's time values are read.
type timeKind uint8

const (
	timeInstant   timeKind = iota + 1 // timestamp adjusted to UTC (the Arrow type has a zone)
	timeLocal                         // timestamp not adjusted to UTC: a wall clock
	timeEpochInt                      // integer Unix time (--epoch)
	timeEpochReal                     // floating-point Unix time (--epoch)
	timeDateClock                     // date32/date64/timestamp date + time32/time64 time of day
	timeText                          // text (or numbers/dates rendered as text) through the stamp parser
)

// extractor reads each row's location and time from a record batch. It is
// immutable after newExtractor and safe for concurrent use.
type extractor struct {
	x       *fields.Extractor
	names   []string
	choices []enrich.Choice

	lat, lon int // coordinate columns, -1 with a geometry
	geo      *geoColumn

	kind               timeKind
	ts, date, clock    int            // time columns (-1 when unused)
	tz                 int            // --tz-column, -1 when unused
	unit               arrow.TimeUnit // of ts (timestamp) or date (timestamp date)
	epochPerSec        float64        // --epoch units per second
	epochNanos         int64          // nanoseconds per --epoch unit
	colZone            *time.Location // zone named by an instant column's type (date zone when no --tz)
	resolve            bool           // instants go through the zone resolver (a zone mode is set)
	text               []int          // columns rendered for the text path
	zoneNames          interner
	timeCol, tzColName string

	heading             int  // --heading column, -1 when unused
	headingFromGeometry bool // --heading-from-geometry
}

// Role names in enrich.Choice, as package fields writes them.
const (
	roleGeometry = "geometry"
)

func newExtractor(sc *arrow.Schema, names []string, geoJSON string, sel enrich.Select) (*extractor, error) {
	e := &extractor{names: names, lat: -1, lon: -1, ts: -1, date: -1, clock: -1, tz: -1}
	useGeo := sel.Geometry != "" || (sel.Lat == "" && sel.Lon == "" && geoJSON != "")
	var err error
	if useGeo {
		if e.geo, err = chooseGeometry(sc, names, geoJSON, sel.Geometry); err != nil {
			return nil, err
		}
		how := "--geometry"
		if sel.Geometry == "" {
			how = "GeoParquet primary column"
		}
		e.choices = append(e.choices, enrich.Choice{Role: roleGeometry, Column: e.geo.name, Index: e.geo.index, How: how})
		if e.x, err = fields.NewTime(names, sel); err != nil {
			return nil, err
		}
	} else {
		if e.x, err = fields.New(names, sel); err != nil {
			return nil, err
		}
	}
	e.choices = append(e.choices, e.x.Choices()...)
	cols := e.x.Columns()
	e.lat, e.lon, e.ts, e.date, e.clock, e.tz = cols.Lat, cols.Lon, cols.Timestamp, cols.Date, cols.Clock, cols.Zone
	for _, c := range []struct {
		idx  int
		what string
	}{{e.lat, "latitude"}, {e.lon, "longitude"}} {
		if c.idx >= 0 && !numberType(sc.Field(c.idx).Type) {
			return nil, typeError(sc.Field(c.idx), c.what, "a float, decimal, integer or text column of decimal degrees")
		}
	}
	e.timeCol = e.x.TimeColumn()
	if e.tz >= 0 {
		e.tzColName = names[e.tz]
		if !textType(sc.Field(e.tz).Type) {
			return nil, typeError(sc.Field(e.tz), "time zone", "a text column of IANA zone names")
		}
	}
	if err := e.chooseTime(sc, sel); err != nil {
		return nil, err
	}
	if err := e.chooseHeading(sc, sel); err != nil {
		return nil, err
	}
	return e, nil
}

func typeError(f arrow.Field, role, want string) error {
	return fmt.Errorf("%w: %w: column %q is %s; as the %s it must be %s", enrich.ErrUsage, ErrColumnType, f.Name, f.Type, role, want)
}

// chooseTime decides how the time columns are read from their types.
func (e *extractor) chooseTime(sc *arrow.Schema, sel enrich.Select) error {
	zoneSet := e.x.ZoneMode() != zone.None
	if e.ts >= 0 {
		f := sc.Field(e.ts)
		t := storageType(f.Type)
		switch {
		case t.ID() == arrow.TIMESTAMP:
			if sel.TimeFormat != "" || sel.Epoch != "" {
				return fmt.Errorf("%w: column %q is already %s; --time-format and --epoch read text or numbers, leave them out", enrich.ErrUsage, f.Name, f.Type)
			}
			tt := t.(*arrow.TimestampType)
			e.unit = tt.Unit
			if tt.TimeZone == "" {
				if !zoneSet {
					return fmt.Errorf("%w: %w: column %q holds %s values without a time zone (local wall-clock times); give their zone with --tz ZONE (e.g. --tz America/Chicago), --tz-column COL or --tz auto",
						enrich.ErrUsage, zone.ErrNoTimeZone, f.Name, f.Type)
				}
				e.kind = timeLocal
				return nil
			}
			e.kind, e.resolve = timeInstant, zoneSet
			if !zoneSet {
				loc, err := columnZone(tt.TimeZone)
				if err != nil {
					return fmt.Errorf("%w: column %q is %s: %w; give the zone of its local dates with --tz ZONE", enrich.ErrUsage, f.Name, f.Type, err)
				}
				e.colZone = loc
			}
			return nil
		case t.ID() == arrow.DATE32 || t.ID() == arrow.DATE64:
			return fmt.Errorf("%w: %w: column %q holds dates without a time of day; name the time-of-day column too: --date %s --time COL",
				enrich.ErrUsage, stamp.ErrDateOnly, f.Name, f.Name)
		case integerType(t) && sel.Epoch != "":
			e.kind = timeEpochInt
		case floatType(t) && sel.Epoch != "":
			e.kind = timeEpochReal
		case (integerType(t) || floatType(t)) && sel.TimeFormat == "":
			return fmt.Errorf("%w: column %q holds numbers (%s); give --epoch s|ms|us|ns to read them as Unix time, or --time-format for numbers such as 20240621183000",
				enrich.ErrUsage, f.Name, f.Type)
		case textType(t) || integerType(t) || decimalType(t):
			e.kind = timeText
			e.text = append(e.text, e.ts)
		default:
			return typeError(f, "timestamp", "a timestamp, text, or with --epoch a number column")
		}
		if e.kind == timeEpochInt || e.kind == timeEpochReal {
			switch sel.Epoch {
			case "s":
				e.epochNanos = 1e9
			case "ms":
				e.epochNanos = 1e6
			case "us":
				e.epochNanos = 1e3
			case "ns":
				e.epochNanos = 1
			default: // the stamp parser has already refused other units
				return fmt.Errorf("%w: --epoch %q; valid: s, ms, us, ns", enrich.ErrUsage, sel.Epoch)
			}
			e.epochPerSec = 1e9 / float64(e.epochNanos)
			e.resolve = zoneSet
		}
		return nil
	}
	// A date column and a time-of-day column.
	df, cf := sc.Field(e.date), sc.Field(e.clock)
	dt, ct := storageType(df.Type), storageType(cf.Type)
	dateTyped := dt.ID() == arrow.DATE32 || dt.ID() == arrow.DATE64 ||
		(dt.ID() == arrow.TIMESTAMP && dt.(*arrow.TimestampType).TimeZone == "")
	clockTyped := ct.ID() == arrow.TIME32 || ct.ID() == arrow.TIME64
	if dateTyped && clockTyped && sel.TimeFormat == "" {
		e.kind = timeDateClock
		if ts, ok := dt.(*arrow.TimestampType); ok {
			e.unit = ts.Unit
		}
		return nil
	}
	for _, f := range []arrow.Field{df, cf} {
		if t := storageType(f.Type); !textType(t) && !integerType(t) && !decimalType(t) && !temporalType(t) {
			return typeError(f, "date or time of day", "a date, time, timestamp, text or integer column")
		}
	}
	e.kind = timeText
	e.text = append(e.text, e.date, e.clock)
	return nil
}

// columnZone is the zone named in a timestamp type ("UTC", "+02:00",
// "America/Chicago"): nil for UTC, whose rows use mean solar time.
func columnZone(tz string) (*time.Location, error) {
	switch strings.ToUpper(strings.TrimSpace(tz)) {
	case "UTC", "Z", "+00:00", "-00:00", "+0000", "+00", "ETC/UTC", "GMT", "ETC/GMT", "UCT", "ZULU", "ETC/UCT", "ETC/ZULU":
		return nil, nil
	}
	if len(tz) >= 3 && (tz[0] == '+' || tz[0] == '-') {
		s := strings.ReplaceAll(tz[1:], ":", "")
		if h, err := strconv.Atoi(s); err == nil && len(s) <= 4 {
			m := 0
			if len(s) > 2 {
				h, m = h/100, h%100
			}
			off := h*3600 + m*60
			if tz[0] == '-' {
				off = -off
			}
			if h <= 23 && m <= 59 {
				return time.FixedZone(tz, off), nil
			}
		}
	}
	return zone.Load(tz)
}

func (e *extractor) roles() enrich.Roles {
	r := enrich.Roles{Time: e.timeCol}
	if e.geo != nil {
		r.Lat, r.Lon = e.geo.name, e.geo.name
	} else {
		r.Lat, r.Lon = e.names[e.lat], e.names[e.lon]
	}
	return r
}

// extract fills in the location and time of every row of rec.
func (e *extractor) extract(rec arrow.RecordBatch, in *enrich.Inputs) {
	if e.geo != nil {
		e.geo.read(rec.Column(e.geo.index), in)
	} else {
		readCoord(rec.Column(e.lat), "latitude", 90, e.names[e.lat], in.Lat, in.Err)
		readCoord(rec.Column(e.lon), "longitude", 180, e.names[e.lon], in.Lon, in.Err)
	}
	var tz arrow.Array
	if e.tz >= 0 {
		tz = rec.Column(e.tz)
	}
	switch e.kind {
	case timeInstant, timeLocal:
		e.readTimestamps(rec.Column(e.ts), tz, in)
	case timeEpochInt, timeEpochReal:
		e.readEpochs(rec.Column(e.ts), tz, in)
	case timeDateClock:
		e.readDateClock(rec.Column(e.date), rec.Column(e.clock), tz, in)
	case timeText:
		e.readText(rec, tz, in)
	}
	e.readHeading(rec, in)
}

// rowZone is row i's --tz-column value ("" without one), interned so that
// the zone resolver's cache never holds a view of a batch's memory.
func (e *extractor) rowZone(tz arrow.Array, i int) string {
	if tz == nil {
		return ""
	}
	return e.zoneNames.intern(valueText(tz, i))
}

// nullTime is the error of a null time cell.
func nullTime(what string) error {
	return &stamp.Error{Input: "", Reason: "null " + what + "; expected a value", Err: stamp.ErrEmpty}
}

// instant records an instant read from a typed column.
func (e *extractor) instant(sec, nsec int64, tz arrow.Array, i int, in *enrich.Inputs) {
	if !e.resolve {
		in.Time[i], in.Zone[i] = time.Unix(sec, nsec).UTC(), e.colZone
		return
	}
	st, err := stamp.FromUnix(sec, nsec)
	if err != nil {
		in.Err[i] = &enrich.RowError{Column: e.timeCol, Err: err}
		return
	}
	e.x.Resolve(st, e.rowZone(tz, i), in.Lat[i], in.Lon[i], i, in)
}

// wall records a wall-clock time (seconds counted as if it were UTC).
func (e *extractor) wall(sec, nsec int64, tz arrow.Array, i int, in *enrich.Inputs) {
	st, err := stamp.FromUnix(sec, nsec)
	if err != nil {
		in.Err[i] = &enrich.RowError{Column: e.timeCol, Err: err}
		return
	}
	st.HasOffset = false
	e.x.Resolve(st, e.rowZone(tz, i), in.Lat[i], in.Lon[i], i, in)
}

func (e *extractor) readTimestamps(a, tz arrow.Array, in *enrich.Inputs) {
	a = storage(a)
	ts, ok := a.(*array.Timestamp)
	if !ok {
		fillErr(in.Err, &enrich.RowError{Column: e.timeCol, Err: fmt.Errorf("%w: %s", ErrColumnType, a.DataType())})
		return
	}
	vals := ts.Values()
	for i := range vals {
		if in.Err[i] != nil {
			continue
		}
		if ts.IsNull(i) {
			in.Err[i] = &enrich.RowError{Column: e.timeCol, Err: nullTime("timestamp")}
			continue
		}
		sec, nsec := splitUnit(int64(vals[i]), e.unit)
		if e.kind == timeInstant {
			e.instant(sec, nsec, tz, i, in)
		} else {
			e.wall(sec, nsec, tz, i, in)
		}
	}
}

func (e *extractor) readEpochs(a, tz arrow.Array, in *enrich.Inputs) {
	a = storage(a)
	n := a.Len()
	for i := range n {
		if in.Err[i] != nil {
			continue
		}
		if a.IsNull(i) {
			in.Err[i] = &enrich.RowError{Column: e.timeCol, Err: nullTime("Unix time")}
			continue
		}
		var sec, nsec int64
		if e.kind == timeEpochInt {
			v, ok := intValue(a, i)
			if !ok {
				in.Err[i] = &enrich.RowError{Column: e.timeCol, Err: &stamp.Error{Input: valueText(a, i), Reason: "Unix time out of range", Err: stamp.ErrRange}}
				continue
			}
			per := 1e9 / e.epochNanos
			sec, nsec = floorDiv(v, per), floorMod(v, per)*e.epochNanos
		} else {
			v := floatValue(a, i)
			s := v / e.epochPerSec
			if math.IsNaN(s) || math.IsInf(s, 0) || math.Abs(s) > 1e12 {
				in.Err[i] = &enrich.RowError{Column: e.timeCol, Err: &stamp.Error{Input: valueText(a, i), Reason: "not a finite Unix time within years 1..9999", Err: stamp.ErrRange}}
				continue
			}
			fs := math.Floor(s)
			sec, nsec = int64(fs), int64(math.Round((s-fs)*1e9))
		}
		e.instant(sec, nsec, tz, i, in)
	}
}

func (e *extractor) readDateClock(d, c, tz arrow.Array, in *enrich.Inputs) {
	d, c = storage(d), storage(c)
	n := d.Len()
	for i := range n {
		if in.Err[i] != nil {
			continue
		}
		if d.IsNull(i) {
			in.Err[i] = &enrich.RowError{Column: e.timeCol, Err: nullTime("date")}
			continue
		}
		if c.IsNull(i) {
			in.Err[i] = &enrich.RowError{Column: e.timeCol, Err: nullTime("time of day")}
			continue
		}
		var days int64
		switch v := d.(type) {
		case *array.Date32:
			days = int64(v.Value(i))
		case *array.Date64:
			days = floorDiv(int64(v.Value(i)), 86400000)
		case *array.Timestamp:
			sec, _ := splitUnit(int64(v.Value(i)), e.unit)
			days = floorDiv(sec, 86400)
		}
		var nanos int64
		switch v := c.(type) {
		case *array.Time32:
			nanos = int64(v.Value(i)) * int64(v.DataType().(*arrow.Time32Type).Unit.Multiplier())
		case *array.Time64:
			nanos = int64(v.Value(i)) * int64(v.DataType().(*arrow.Time64Type).Unit.Multiplier())
		}
		if nanos < 0 || nanos >= 86400e9 {
			in.Err[i] = &enrich.RowError{Column: e.timeCol, Err: &stamp.Error{Input: valueText(c, i), Reason: "time of day out of range [00:00, 24:00)", Err: stamp.ErrRange}}
			continue
		}
		if days > math.MaxInt64/86400/2 || days < math.MinInt64/86400/2 {
			in.Err[i] = &enrich.RowError{Column: e.timeCol, Err: &stamp.Error{Input: valueText(d, i), Reason: "date out of range", Err: stamp.ErrRange}}
			continue
		}
		e.wall(days*86400+nanos/1e9, nanos%1e9, tz, i, in)
	}
}

// readText renders the time columns as text and reads them like the text
// formats do.
func (e *extractor) readText(rec arrow.RecordBatch, tz arrow.Array, in *enrich.Inputs) {
	fieldsRow := make([]string, len(e.names))
	n := int(rec.NumRows())
	for i := range n {
		if in.Err[i] != nil {
			continue
		}
		for _, j := range e.text {
			fieldsRow[j] = valueText(rec.Column(j), i)
		}
		if e.tz >= 0 {
			fieldsRow[e.tz] = e.rowZone(tz, i)
		}
		e.x.Time(fieldsRow, i, in.Lat[i], in.Lon[i], in)
	}
}

// splitUnit splits a count of unit since the Unix epoch into seconds and
// nanoseconds (0 ≤ nsec < 1e9).
func splitUnit(v int64, unit arrow.TimeUnit) (sec, nsec int64) {
	switch unit {
	case arrow.Second:
		return v, 0
	case arrow.Millisecond:
		return floorDiv(v, 1e3), floorMod(v, 1e3) * 1e6
	case arrow.Microsecond:
		return floorDiv(v, 1e6), floorMod(v, 1e6) * 1e3
	}
	return floorDiv(v, 1e9), floorMod(v, 1e9)
}

func floorDiv(a, b int64) int64 {
	q := a / b
	if (a%b != 0) && ((a < 0) != (b < 0)) {
		q--
	}
	return q
}

func floorMod(a, b int64) int64 { return a - floorDiv(a, b)*b }

func fillErr(errs []error, err error) {
	for i := range errs {
		if errs[i] == nil {
			errs[i] = err
		}
	}
}

// readCoord reads decimal degrees from column a into dst for the rows that
// have no error yet; problems go in errs as *enrich.RowError naming col.
func readCoord(a arrow.Array, what string, limit int, col string, dst []float64, errs []error) {
	a = storage(a)
	bad := func(i int, err error) { errs[i] = &enrich.RowError{Column: col, Err: err} }
	check := func(i int, v float64) {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			bad(i, fmt.Errorf("%w: %s %v is not a finite number; expected decimal degrees in [%d, %d]", fields.ErrNotFloat, what, v, -limit, limit))
			return
		}
		dst[i] = v
	}
	null := func(i int) {
		bad(i, fmt.Errorf("%w: %s is null; expected decimal degrees in [%d, %d]", fields.ErrEmpty, what, -limit, limit))
	}
	switch v := a.(type) {
	case *array.Float64:
		vals := v.Float64Values()
		for i, x := range vals {
			if errs[i] != nil {
				continue
			}
			if v.IsNull(i) {
				null(i)
				continue
			}
			if math.IsNaN(x) || math.IsInf(x, 0) {
				check(i, x)
				continue
			}
			dst[i] = x
		}
		return
	case *array.Float32:
		vals := v.Float32Values()
		for i, x := range vals {
			if errs[i] != nil {
				continue
			}
			if v.IsNull(i) {
				null(i)
				continue
			}
			check(i, float64(x))
		}
		return
	case *array.Dictionary:
		// Read each dictionary entry once, then index.
		dict := v.Dictionary()
		dv := make([]float64, dict.Len())
		de := make([]error, dict.Len())
		readCoord(dict, what, limit, col, dv, de)
		for i := range v.Len() {
			if errs[i] != nil {
				continue
			}
			if v.IsNull(i) {
				null(i)
				continue
			}
			k := v.GetValueIndex(i)
			if de[k] != nil {
				errs[i] = de[k]
				continue
			}
			dst[i] = dv[k]
		}
		return
	}
	text := textType(a.DataType())
	for i := range a.Len() {
		if errs[i] != nil {
			continue
		}
		if a.IsNull(i) {
			null(i)
			continue
		}
		if text {
			x, err := fields.Coordinate(valueText(a, i), what, limit)
			if err != nil {
				bad(i, err)
				continue
			}
			dst[i] = x
			continue
		}
		check(i, floatValue(a, i))
	}
}

// floatValue converts a number array's value i (integers, floats, decimals).
func floatValue(a arrow.Array, i int) float64 {
	switch v := a.(type) {
	case *array.Float64:
		return v.Value(i)
	case *array.Float32:
		return float64(v.Value(i))
	case *array.Float16:
		return float64(v.Value(i).Float32())
	case *array.Decimal32:
		return v.Value(i).ToFloat64(v.DataType().(arrow.DecimalType).GetScale())
	case *array.Decimal64:
		return v.Value(i).ToFloat64(v.DataType().(arrow.DecimalType).GetScale())
	case *array.Decimal128:
		return v.Value(i).ToFloat64(v.DataType().(arrow.DecimalType).GetScale())
	case *array.Decimal256:
		return v.Value(i).ToFloat64(v.DataType().(arrow.DecimalType).GetScale())
	}
	if x, ok := intValue(a, i); ok {
		return float64(x)
	}
	if u, ok := a.(*array.Uint64); ok {
		return float64(u.Value(i))
	}
	return math.NaN()
}

// intValue returns an integer array's value i; ok is false for other types
// and for uint64 values above MaxInt64.
func intValue(a arrow.Array, i int) (int64, bool) {
	switch v := a.(type) {
	case *array.Int8:
		return int64(v.Value(i)), true
	case *array.Int16:
		return int64(v.Value(i)), true
	case *array.Int32:
		return int64(v.Value(i)), true
	case *array.Int64:
		return v.Value(i), true
	case *array.Uint8:
		return int64(v.Value(i)), true
	case *array.Uint16:
		return int64(v.Value(i)), true
	case *array.Uint32:
		return int64(v.Value(i)), true
	case *array.Uint64:
		if x := v.Value(i); x <= math.MaxInt64 {
			return int64(x), true
		}
	}
	return 0, false
}

// storageType looks through extension types to their storage.
func storageType(t arrow.DataType) arrow.DataType {
	if x, ok := t.(arrow.ExtensionType); ok {
		return x.StorageType()
	}
	return t
}

// storage looks through extension arrays to their storage.
func storage(a arrow.Array) arrow.Array {
	if x, ok := a.(array.ExtensionArray); ok {
		return x.Storage()
	}
	return a
}

func integerType(t arrow.DataType) bool {
	switch t.ID() {
	case arrow.INT8, arrow.INT16, arrow.INT32, arrow.INT64, arrow.UINT8, arrow.UINT16, arrow.UINT32, arrow.UINT64:
		return true
	}
	return false
}

func floatType(t arrow.DataType) bool {
	switch t.ID() {
	case arrow.FLOAT16, arrow.FLOAT32, arrow.FLOAT64:
		return true
	}
	return false
}

func decimalType(t arrow.DataType) bool {
	switch t.ID() {
	case arrow.DECIMAL32, arrow.DECIMAL64, arrow.DECIMAL128, arrow.DECIMAL256:
		return true
	}
	return false
}

func temporalType(t arrow.DataType) bool {
	switch t.ID() {
	case arrow.DATE32, arrow.DATE64, arrow.TIME32, arrow.TIME64, arrow.TIMESTAMP:
		return true
	}
	return false
}

// textType reports string columns, dictionary-encoded ones included.
func textType(t arrow.DataType) bool {
	t = storageType(t)
	switch t.ID() {
	case arrow.STRING, arrow.LARGE_STRING, arrow.STRING_VIEW:
		return true
	case arrow.DICTIONARY:
		return textType(t.(*arrow.DictionaryType).ValueType)
	}
	return false
}

// numberType reports columns that can hold decimal degrees.
func numberType(t arrow.DataType) bool {
	t = storageType(t)
	if d, ok := t.(*arrow.DictionaryType); ok {
		t = d.ValueType
	}
	return integerType(t) || floatType(t) || decimalType(t) || textType(t)
}

// interner keeps one copy of each distinct string (zone names); lookups of
// known strings neither lock nor allocate.
type interner struct {
	m  atomic.Pointer[map[string]string]
	mu sync.Mutex
}

// maxInterned bounds the table (a column of garbage must not grow it without
// bound); past it, strings are copied each time.
const maxInterned = 4096

func (t *interner) intern(s string) string {
	if m := t.m.Load(); m != nil {
		if v, ok := (*m)[s]; ok {
			return v
		}
	}
	t.mu.Lock()
	defer t.mu.Unlock()
	old := t.m.Load()
	if old != nil {
		if v, ok := (*old)[s]; ok {
			return v
		}
	}
	c := strings.Clone(s)
	if old != nil && len(*old) >= maxInterned {
		return c
	}
	m := make(map[string]string, 1+lenMap(old))
	if old != nil {
		for k, v := range *old {
			m[k] = v
		}
	}
	m[c] = c
	t.m.Store(&m)
	return c
}

func lenMap(m *map[string]string) int {
	if m == nil {
		return 0
	}
	return len(*m)
}
