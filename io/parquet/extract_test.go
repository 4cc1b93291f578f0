package parquet

import (
	"bytes"
	"context"
	"errors"
	"io"
	"math"
	"testing"
	"time"

	"github.com/apache/arrow-go/v18/arrow"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/internal/fields"
	"github.com/heliotag/heliotag/io/internal/stamp"
	"github.com/heliotag/heliotag/io/internal/zone"
)

// extractAll opens a file and extracts every row's inputs (in one chunk).
func extractAll(t *testing.T, in []byte, sel enrich.Select) (*enrich.Inputs, error) {
	t.Helper()
	rd, err := NewReader(bytes.NewReader(in), Options{Select: sel, Allocator: checkedMem(t)})
	if err != nil {
		return nil, err
	}
	defer rd.Close()
	c, err := rd.Next(context.Background(), 1000)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := rd.Next(context.Background(), 1000); err != io.EOF {
		t.Fatalf("second Next: %v, want io.EOF", err)
	}
	in2 := new(enrich.Inputs)
	in2.Reset(c.Len())
	c.Extract(in2)
	c.(*chunk).release()
	return in2, nil
}

func fld(name string, t arrow.DataType) arrow.Field {
	return arrow.Field{Name: name, Type: t, Nullable: true}
}

var (
	f64     = arrow.PrimitiveTypes.Float64
	str     = arrow.BinaryTypes.String
	tsUTC   = &arrow.TimestampType{Unit: arrow.Millisecond, TimeZone: "UTC"}
	tsLocal = &arrow.TimestampType{Unit: arrow.Microsecond}
	latlon  = []arrow.Field{fld("lat", f64), fld("lon", f64)}
)

func schemaOf(extra ...arrow.Field) *arrow.Schema {
	return arrow.NewSchema(append(append([]arrow.Field(nil), latlon...), extra...), nil)
}

func mustZone(t *testing.T, name string) *time.Location {
	t.Helper()
	loc, err := time.LoadLocation(name)
	if err != nil {
		t.Fatal(err)
	}
	return loc
}

// TestTimeColumns reads each kind of time column and compares the instant
// and the date zone with values computed with the time package.
func TestTimeColumns(t *testing.T) {
	chicago := mustZone(t, "America/Chicago")
	berlin := mustZone(t, "Europe/Berlin")
	ny := mustZone(t, "America/New_York")
	utc := func(y int, m time.Month, d, h, mi, s, ns int) time.Time {
		return time.Date(y, m, d, h, mi, s, ns, time.UTC)
	}
	type want struct {
		t    time.Time
		zone string // "" for nil (mean solar time)
		note string
	}
	cases := []struct {
		name   string
		fields []arrow.Field
		json   string
		sel    enrich.Select
		want   []want
	}{
		{"timestamp in UTC is an instant, no date zone",
			[]arrow.Field{fld("timestamp", tsUTC)},
			`[{"lat": 1, "lon": 2, "timestamp": "2024-06-21T18:30:00.250Z"}, {"lat": 1, "lon": 2, "timestamp": "1969-12-31T23:59:59.999Z"}]`,
			enrich.Select{},
			[]want{{t: utc(2024, 6, 21, 18, 30, 0, 250e6)}, {t: utc(1969, 12, 31, 23, 59, 59, 999e6)}}},
		{"timestamp with a zone name: that zone decides the date",
			[]arrow.Field{fld("timestamp", &arrow.TimestampType{Unit: arrow.Nanosecond, TimeZone: "America/Chicago"})},
			`[{"lat": 1, "lon": 2, "timestamp": "2024-06-21T03:00:00.000000001Z"}]`,
			enrich.Select{},
			[]want{{t: utc(2024, 6, 21, 3, 0, 0, 1), zone: "America/Chicago"}}},
		{"timestamp with an offset zone",
			[]arrow.Field{fld("timestamp", &arrow.TimestampType{Unit: arrow.Millisecond, TimeZone: "+05:30"})},
			`[{"lat": 1, "lon": 2, "timestamp": "2024-06-21T03:00:00Z"}]`,
			enrich.Select{},
			[]want{{t: utc(2024, 6, 21, 3, 0, 0, 0), zone: "+05:30"}}},
		{"an instant with --tz takes --tz as its date zone",
			[]arrow.Field{fld("timestamp", tsUTC)},
			`[{"lat": 1, "lon": 2, "timestamp": "2024-06-21T22:30:00Z"}]`,
			enrich.Select{TZ: "Europe/Berlin"},
			[]want{{t: utc(2024, 6, 21, 22, 30, 0, 0), zone: "Europe/Berlin"}}},
		{"local timestamp read in --tz",
			[]arrow.Field{fld("timestamp", tsLocal)},
			`[{"lat": 1, "lon": 2, "timestamp": "2024-06-21T18:30:00.5"}, {"lat": 1, "lon": 2, "timestamp": "2024-01-05T07:00:00"}]`,
			enrich.Select{TZ: "America/New_York"},
			[]want{{t: time.Date(2024, 6, 21, 18, 30, 0, 5e8, ny).UTC(), zone: "America/New_York"}, {t: time.Date(2024, 1, 5, 7, 0, 0, 0, ny).UTC(), zone: "America/New_York"}}},
		{"local timestamp in the fall-back overlap takes the earlier instant and a note",
			[]arrow.Field{fld("timestamp", tsLocal)},
			`[{"lat": 1, "lon": 2, "timestamp": "2024-11-03T01:30:00"}]`,
			enrich.Select{TZ: "America/Chicago"},
			[]want{{t: utc(2024, 11, 3, 6, 30, 0, 0), zone: "America/Chicago", note: zone.NoteAmbiguous}}},
		{"local timestamp with --tz-column (text and dictionary)",
			[]arrow.Field{fld("timestamp", tsLocal), fld("tz", &arrow.DictionaryType{IndexType: arrow.PrimitiveTypes.Int8, ValueType: str})},
			`[{"lat": 1, "lon": 2, "timestamp": "2024-06-21T12:00:00", "tz": "Europe/Berlin"}, {"lat": 1, "lon": 2, "timestamp": "2024-06-21T12:00:00", "tz": "America/Chicago"}]`,
			enrich.Select{TZColumn: "tz"},
			[]want{{t: time.Date(2024, 6, 21, 12, 0, 0, 0, berlin).UTC(), zone: "Europe/Berlin"}, {t: time.Date(2024, 6, 21, 12, 0, 0, 0, chicago).UTC(), zone: "America/Chicago"}}},
		{"date32 and time32[s]",
			[]arrow.Field{fld("day", arrow.FixedWidthTypes.Date32), fld("clock", arrow.FixedWidthTypes.Time32s)},
			`[{"lat": 1, "lon": 2, "day": "2024-06-21", "clock": "17:45:30"}]`,
			enrich.Select{Date: "day", Time: "clock", TZ: "America/Chicago"},
			[]want{{t: time.Date(2024, 6, 21, 17, 45, 30, 0, chicago).UTC(), zone: "America/Chicago"}}},
		{"date64 and time64[ns]",
			[]arrow.Field{fld("day", arrow.FixedWidthTypes.Date64), fld("clock", arrow.FixedWidthTypes.Time64ns)},
			`[{"lat": 1, "lon": 2, "day": "1999-12-31", "clock": "23:59:59.123456789"}]`,
			enrich.Select{Date: "day", Time: "clock", TZ: "UTC"},
			[]want{{t: utc(1999, 12, 31, 23, 59, 59, 123456789), zone: "UTC"}}},
		{"a local timestamp as the date, with time64[us]",
			[]arrow.Field{fld("day", tsLocal), fld("clock", arrow.FixedWidthTypes.Time64us)},
			`[{"lat": 1, "lon": 2, "day": "2024-03-01T00:00:00", "clock": "06:00:00"}]`,
			enrich.Select{Date: "day", Time: "clock", TZ: "Europe/Berlin"},
			[]want{{t: time.Date(2024, 3, 1, 6, 0, 0, 0, berlin).UTC(), zone: "Europe/Berlin"}}},
		{"epoch seconds in int64",
			[]arrow.Field{fld("t", arrow.PrimitiveTypes.Int64)},
			`[{"lat": 1, "lon": 2, "t": 1718994600}, {"lat": 1, "lon": 2, "t": -1}]`,
			enrich.Select{Time: "t", Epoch: "s"},
			[]want{{t: time.Unix(1718994600, 0).UTC()}, {t: time.Unix(-1, 0).UTC()}}},
		{"epoch milliseconds in int64",
			[]arrow.Field{fld("t", arrow.PrimitiveTypes.Int64)},
			`[{"lat": 1, "lon": 2, "t": -1500}]`,
			enrich.Select{Time: "t", Epoch: "ms"},
			[]want{{t: time.Unix(-2, 5e8).UTC()}}},
		{"epoch seconds in uint32",
			[]arrow.Field{fld("t", arrow.PrimitiveTypes.Uint32)},
			`[{"lat": 1, "lon": 2, "t": 4000000000}]`,
			enrich.Select{Time: "t", Epoch: "s"},
			[]want{{t: time.Unix(4000000000, 0).UTC()}}},
		{"epoch seconds with a fraction in float64",
			[]arrow.Field{fld("t", f64)},
			`[{"lat": 1, "lon": 2, "t": 1718994600.25}]`,
			enrich.Select{Time: "t", Epoch: "s"},
			[]want{{t: time.Unix(1718994600, 25e7).UTC()}}},
		{"epoch with --tz for the date zone",
			[]arrow.Field{fld("t", arrow.PrimitiveTypes.Int32)},
			`[{"lat": 1, "lon": 2, "t": 1718994600}]`,
			enrich.Select{Time: "t", Epoch: "s", TZ: "America/Chicago"},
			[]want{{t: time.Unix(1718994600, 0).UTC(), zone: "America/Chicago"}}},
		{"RFC 3339 text with offsets",
			[]arrow.Field{fld("timestamp", str)},
			`[{"lat": 1, "lon": 2, "timestamp": "2024-06-21T18:30:00+02:00"}, {"lat": 1, "lon": 2, "timestamp": "2024-06-21 18:30Z"}]`,
			enrich.Select{},
			[]want{{t: utc(2024, 6, 21, 16, 30, 0, 0), zone: "+02:00"}, {t: utc(2024, 6, 21, 18, 30, 0, 0)}}},
		{"ISO local text in --tz (large_string)",
			[]arrow.Field{fld("timestamp", arrow.BinaryTypes.LargeString)},
			`[{"lat": 1, "lon": 2, "timestamp": "2024-06-21 18:30"}]`,
			enrich.Select{TZ: "America/Chicago"},
			[]want{{t: time.Date(2024, 6, 21, 18, 30, 0, 0, chicago).UTC(), zone: "America/Chicago"}}},
		{"strftime layout",
			[]arrow.Field{fld("when", str)},
			`[{"lat": 1, "lon": 2, "when": "21/06/2024 07:05"}]`,
			enrich.Select{Time: "when", TimeFormat: "%d/%m/%Y %H:%M", TZ: "Europe/Berlin"},
			[]want{{t: time.Date(2024, 6, 21, 7, 5, 0, 0, berlin).UTC(), zone: "Europe/Berlin"}}},
		{"dictionary-encoded text timestamps",
			[]arrow.Field{fld("timestamp", &arrow.DictionaryType{IndexType: arrow.PrimitiveTypes.Int32, ValueType: str})},
			`[{"lat": 1, "lon": 2, "timestamp": "2024-06-21T18:30:00Z"}, {"lat": 1, "lon": 2, "timestamp": "2024-06-21T18:30:00Z"}]`,
			enrich.Select{},
			[]want{{t: utc(2024, 6, 21, 18, 30, 0, 0)}, {t: utc(2024, 6, 21, 18, 30, 0, 0)}}},
		{"text date and an integer HHMM time of day",
			[]arrow.Field{fld("crash_date", str), fld("crash_time", arrow.PrimitiveTypes.Int16)},
			`[{"lat": 1, "lon": 2, "crash_date": "2024-06-21", "crash_time": 1730}, {"lat": 1, "lon": 2, "crash_date": "2024-06-21", "crash_time": 905}]`,
			enrich.Select{Date: "crash_date", Time: "crash_time", TZ: "America/Chicago"},
			[]want{{t: time.Date(2024, 6, 21, 17, 30, 0, 0, chicago).UTC(), zone: "America/Chicago"}, {t: time.Date(2024, 6, 21, 9, 5, 0, 0, chicago).UTC(), zone: "America/Chicago"}}},
		{"date32 with a text time of day",
			[]arrow.Field{fld("d", arrow.FixedWidthTypes.Date32), fld("c", str)},
			`[{"lat": 1, "lon": 2, "d": "2024-06-21", "c": "7:30 PM"}]`,
			enrich.Select{Date: "d", Time: "c", TZ: "UTC"},
			[]want{{t: utc(2024, 6, 21, 19, 30, 0, 0), zone: "UTC"}}},
		{"integer timestamps with a layout",
			[]arrow.Field{fld("t", arrow.PrimitiveTypes.Int64)},
			`[{"lat": 1, "lon": 2, "t": 20240621183000}]`,
			enrich.Select{Time: "t", TimeFormat: "%Y%m%d%H%M%S", TZ: "UTC"},
			[]want{{t: utc(2024, 6, 21, 18, 30, 0, 0), zone: "UTC"}}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			in := makeFile(t, fileSpec{schema: schemaOf(tc.fields...), json: tc.json})
			got, err := extractAll(t, in, tc.sel)
			if err != nil {
				t.Fatal(err)
			}
			for i, w := range tc.want {
				if got.Err[i] != nil {
					t.Errorf("row %d: %v", i+1, got.Err[i])
					continue
				}
				if !got.Time[i].Equal(w.t) {
					t.Errorf("row %d: instant %v, want %v", i+1, got.Time[i].UTC(), w.t)
				}
				zn := ""
				if got.Zone[i] != nil {
					zn = got.Zone[i].String()
				}
				if zn != w.zone {
					t.Errorf("row %d: date zone %q, want %q", i+1, zn, w.zone)
				}
				if got.Note[i] != w.note {
					t.Errorf("row %d: note %q, want %q", i+1, got.Note[i], w.note)
				}
			}
		})
	}
}

// TestLocationColumns reads coordinates from each kind of number column.
func TestLocationColumns(t *testing.T) {
	ts := fld("timestamp", tsUTC)
	cases := []struct {
		name     string
		lat, lon arrow.DataType
		json     string
		wantLat  []float64
		wantLon  []float64
	}{
		{"float32", arrow.PrimitiveTypes.Float32, arrow.PrimitiveTypes.Float32,
			`[{"lat": 41.88, "lon": -87.63, "timestamp": "2024-06-21T00:00:00Z"}]`,
			[]float64{float64(float32(41.88))}, []float64{float64(float32(-87.63))}},
		{"decimal128 and decimal256", &arrow.Decimal128Type{Precision: 9, Scale: 6}, &arrow.Decimal256Type{Precision: 10, Scale: 6},
			`[{"lat": "41.881832", "lon": "-87.623177", "timestamp": "2024-06-21T00:00:00Z"}]`,
			[]float64{41.881832}, []float64{-87.623177}},
		{"integers", arrow.PrimitiveTypes.Int8, arrow.PrimitiveTypes.Int32,
			`[{"lat": -45, "lon": 170, "timestamp": "2024-06-21T00:00:00Z"}]`,
			[]float64{-45}, []float64{170}},
		{"numeric text", str, arrow.BinaryTypes.LargeString,
			`[{"lat": " 41.5 ", "lon": "-87.25", "timestamp": "2024-06-21T00:00:00Z"}]`,
			[]float64{41.5}, []float64{-87.25}},
		{"dictionary-encoded text", &arrow.DictionaryType{IndexType: arrow.PrimitiveTypes.Int32, ValueType: str}, &arrow.DictionaryType{IndexType: arrow.PrimitiveTypes.Int32, ValueType: f64},
			`[{"lat": "10.5", "lon": 20.25, "timestamp": "2024-06-21T00:00:00Z"}, {"lat": "10.5", "lon": 20.25, "timestamp": "2024-06-21T00:00:00Z"}]`,
			[]float64{10.5, 10.5}, []float64{20.25, 20.25}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			sc := arrow.NewSchema([]arrow.Field{fld("lat", tc.lat), fld("lon", tc.lon), ts}, nil)
			got, err := extractAll(t, makeFile(t, fileSpec{schema: sc, json: tc.json}), enrich.Select{})
			if err != nil {
				t.Fatal(err)
			}
			for i := range tc.wantLat {
				if got.Err[i] != nil {
					t.Fatalf("row %d: %v", i+1, got.Err[i])
				}
				if math.Abs(got.Lat[i]-tc.wantLat[i]) > 1e-12 || math.Abs(got.Lon[i]-tc.wantLon[i]) > 1e-12 {
					t.Errorf("row %d: (%v, %v), want (%v, %v)", i+1, got.Lat[i], got.Lon[i], tc.wantLat[i], tc.wantLon[i])
				}
			}
		})
	}
}

// TestRowErrors checks per-row problems: their cause, and the column named.
func TestRowErrors(t *testing.T) {
	cases := []struct {
		name   string
		fields []arrow.Field
		json   string
		sel    enrich.Select
		column string
		cause  error
		fatal  bool
	}{
		{"null latitude", []arrow.Field{fld("timestamp", tsUTC)},
			`[{"lat": null, "lon": 2, "timestamp": "2024-06-21T00:00:00Z"}]`, enrich.Select{}, "lat", fields.ErrEmpty, false},
		{"NaN longitude", []arrow.Field{fld("timestamp", tsUTC)},
			`[{"lat": 1, "lon": "NaN", "timestamp": "2024-06-21T00:00:00Z"}]`, enrich.Select{}, "lon", fields.ErrNotFloat, false},
		{"infinite longitude", []arrow.Field{fld("timestamp", tsUTC)},
			`[{"lat": 1, "lon": "+Inf", "timestamp": "2024-06-21T00:00:00Z"}]`, enrich.Select{}, "lon", fields.ErrNotFloat, false},
		{"null timestamp", []arrow.Field{fld("timestamp", tsUTC)},
			`[{"lat": 1, "lon": 2, "timestamp": null}]`, enrich.Select{}, "timestamp", stamp.ErrEmpty, false},
		{"garbage text time", []arrow.Field{fld("timestamp", str)},
			`[{"lat": 1, "lon": 2, "timestamp": "yesterday"}]`, enrich.Select{}, "timestamp", stamp.ErrSyntax, false},
		{"empty text time", []arrow.Field{fld("timestamp", str)},
			`[{"lat": 1, "lon": 2, "timestamp": ""}]`, enrich.Select{}, "timestamp", stamp.ErrEmpty, false},
		{"local time in the spring-forward gap", []arrow.Field{fld("timestamp", tsLocal)},
			`[{"lat": 1, "lon": 2, "timestamp": "2024-03-10T02:30:00"}]`, enrich.Select{TZ: "America/Chicago"}, "timestamp", zone.ErrNonexistent, false},
		{"unknown zone name in --tz-column", []arrow.Field{fld("timestamp", tsLocal), fld("tz", str)},
			`[{"lat": 1, "lon": 2, "timestamp": "2024-03-10T12:30:00", "tz": "Mars/Olympus"}]`, enrich.Select{TZColumn: "tz"}, "tz", zone.ErrUnknownZone, false},
		{"null time of day", []arrow.Field{fld("d", arrow.FixedWidthTypes.Date32), fld("c", arrow.FixedWidthTypes.Time32s)},
			`[{"lat": 1, "lon": 2, "d": "2024-06-21", "c": null}]`, enrich.Select{Date: "d", Time: "c", TZ: "UTC"}, "d+c", stamp.ErrEmpty, false},
		{"null epoch", []arrow.Field{fld("t", arrow.PrimitiveTypes.Int64)},
			`[{"lat": 1, "lon": 2, "t": null}]`, enrich.Select{Time: "t", Epoch: "s"}, "t", stamp.ErrEmpty, false},
		{"empty zone in --tz-column", []arrow.Field{fld("timestamp", tsLocal), fld("tz", str)},
			`[{"lat": 1, "lon": 2, "timestamp": "2024-03-10T12:30:00", "tz": ""}]`, enrich.Select{TZColumn: "tz"}, "tz", zone.ErrUnknownZone, false},
		{"null zone in --tz-column", []arrow.Field{fld("timestamp", tsLocal), fld("tz", str)},
			`[{"lat": 1, "lon": 2, "timestamp": "2024-03-10T12:30:00", "tz": null}]`, enrich.Select{TZColumn: "tz"}, "tz", zone.ErrUnknownZone, false},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got, err := extractAll(t, makeFile(t, fileSpec{schema: schemaOf(tc.fields...), json: tc.json}), tc.sel)
			if err != nil {
				t.Fatal(err)
			}
			var re *enrich.RowError
			if !errors.As(got.Err[0], &re) {
				t.Fatalf("row error %v (%T), want *enrich.RowError", got.Err[0], got.Err[0])
			}
			if re.Column != tc.column || !errors.Is(re, tc.cause) || errors.Is(re, enrich.ErrFatal) != tc.fatal {
				t.Errorf("got %v (column %q, fatal %v); want column %q, cause %v, fatal %v",
					re, re.Column, errors.Is(re, enrich.ErrFatal), tc.column, tc.cause, tc.fatal)
			}
		})
	}
}

// TestColumnChoiceErrors checks the problems found when the file is opened.
func TestColumnChoiceErrors(t *testing.T) {
	cases := []struct {
		name   string
		fields []arrow.Field
		sel    enrich.Select
		causes []error
	}{
		{"local timestamps without a zone", []arrow.Field{fld("timestamp", tsLocal)}, enrich.Select{},
			[]error{enrich.ErrUsage, zone.ErrNoTimeZone}},
		{"integers without --epoch", []arrow.Field{fld("timestamp", arrow.PrimitiveTypes.Int64)}, enrich.Select{},
			[]error{enrich.ErrUsage}},
		{"a date alone", []arrow.Field{fld("timestamp", arrow.FixedWidthTypes.Date32)}, enrich.Select{},
			[]error{enrich.ErrUsage, stamp.ErrDateOnly}},
		{"a boolean time", []arrow.Field{fld("timestamp", arrow.FixedWidthTypes.Boolean)}, enrich.Select{},
			[]error{enrich.ErrUsage, ErrColumnType}},
		{"--epoch on a timestamp", []arrow.Field{fld("timestamp", tsUTC)}, enrich.Select{Epoch: "s"},
			[]error{enrich.ErrUsage}},
		{"a list as latitude", []arrow.Field{fld("timestamp", tsUTC)}, enrich.Select{Lat: "lst"},
			[]error{enrich.ErrUsage, ErrColumnType}},
		{"an integer zone column", []arrow.Field{fld("timestamp", tsLocal), fld("tz", arrow.PrimitiveTypes.Int32)}, enrich.Select{TZColumn: "tz"},
			[]error{enrich.ErrUsage, ErrColumnType}},
		{"no such time column", []arrow.Field{fld("timestamp", tsUTC)}, enrich.Select{Time: "when"},
			[]error{enrich.ErrUsage}},
		{"unknown --tz", []arrow.Field{fld("timestamp", tsUTC)}, enrich.Select{TZ: "Mars/Olympus"},
			[]error{enrich.ErrUsage, zone.ErrUnknownZone}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			fs := append(tc.fields, fld("lst", arrow.ListOf(f64)))
			_, err := extractAll(t, makeFile(t, fileSpec{schema: schemaOf(fs...), json: `[]`}), tc.sel)
			if err == nil {
				t.Fatal("no error")
			}
			for _, c := range tc.causes {
				if !errors.Is(err, c) {
					t.Errorf("%v: does not match %v", err, c)
				}
			}
		})
	}
}
