package stamp

import (
	"errors"
	"fmt"
	"math/rand/v2"
	"strings"
	"sync"
	"testing"
	"time"
)

func mustParser(t testing.TB, o Options) *Parser {
	t.Helper()
	p, err := NewParser(o)
	if err != nil {
		t.Fatalf("NewParser(%+v): %v", o, err)
	}
	return p
}

// local builds an offset-less Stamp.
func local(y int, m time.Month, d, hh, mm, ss, ns int) Stamp {
	return Stamp{Year: y, Month: m, Day: d, Hour: hh, Minute: mm, Second: ss, Nanosecond: ns}
}

func withOffset(s Stamp, off int) Stamp {
	s.HasOffset, s.Offset = true, off
	return s
}

func TestParseAuto(t *testing.T) {
	p := mustParser(t, Options{})
	base := local(2024, time.June, 21, 18, 30, 0, 0)
	tests := []struct {
		name string
		in   string
		want Stamp
	}{
		{"rfc3339 Z", "2024-06-21T18:30:00Z", withOffset(base, 0)},
		{"rfc3339 lower t z", "2024-06-21t18:30:00z", withOffset(base, 0)},
		{"rfc3339 offset", "2024-06-21T18:30:00+02:00", withOffset(base, 7200)},
		{"negative offset", "2024-06-21T18:30:00-05:30", withOffset(base, -19800)},
		{"offset hhmm", "2024-06-21T18:30:00-0530", withOffset(base, -19800)},
		{"offset hh", "2024-06-21T18:30:00+09", withOffset(base, 9*3600)},
		{"minus zero offset", "2024-06-21T18:30:00-00:00", withOffset(base, 0)},
		{"space separator", "2024-06-21 18:30:00Z", withOffset(base, 0)},
		{"no seconds with offset", "2024-06-21T18:30+01:00", withOffset(base, 3600)},
		{"fraction ms", "2024-06-21T18:30:00.250Z", withOffset(local(2024, 6, 21, 18, 30, 0, 250000000), 0)},
		{"fraction comma", "2024-06-21T18:30:00,5Z", withOffset(local(2024, 6, 21, 18, 30, 0, 500000000), 0)},
		{"fraction ns", "2024-06-21T18:30:00.123456789Z", withOffset(local(2024, 6, 21, 18, 30, 0, 123456789), 0)},
		{"fraction truncated past ns", "2024-06-21T18:30:00.1234567899Z", withOffset(local(2024, 6, 21, 18, 30, 0, 123456789), 0)},
		{"space UTC", "2024-06-21 18:30:00 UTC", withOffset(base, 0)},
		{"GMT", "2024-06-21 18:30:00GMT", withOffset(base, 0)},
		{"space before offset", "2024-06-21 18:30:00 +02:00", withOffset(base, 7200)},
		{"iso local space", "2024-03-10 02:30", local(2024, 3, 10, 2, 30, 0, 0)},
		{"iso local T fraction", "2024-03-10T02:30:00.5", local(2024, 3, 10, 2, 30, 0, 500000000)},
		{"iso local seconds", "2024-06-21 18:30:59", local(2024, 6, 21, 18, 30, 59, 0)},
		{"basic with offset", "20240621T183000+0200", withOffset(base, 7200)},
		{"basic no seconds Z", "20240621T1830Z", withOffset(base, 0)},
		{"basic local fraction", "20240621T183000.5", local(2024, 6, 21, 18, 30, 0, 500000000)},
		{"surrounding spaces", "  2024-06-21 18:30\t\r\n", base},
		{"leap day", "2024-02-29 12:00", local(2024, 2, 29, 12, 0, 0, 0)},
		{"leap day 2000", "2000-02-29 12:00", local(2000, 2, 29, 12, 0, 0, 0)},
		{"year 1", "0001-01-01T00:00:00Z", withOffset(local(1, 1, 1, 0, 0, 0, 0), 0)},
		{"year 9999", "9999-12-31T23:59:59.999999999Z", withOffset(local(9999, 12, 31, 23, 59, 59, 999999999), 0)},
		{"midnight", "2024-06-21T00:00", local(2024, 6, 21, 0, 0, 0, 0)},
		{"offset 23:59", "2024-06-21T18:30:00-23:59", withOffset(base, -(23*3600 + 59*60))},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := p.Parse(tc.in)
			if err != nil {
				t.Fatalf("Parse(%q): %v", tc.in, err)
			}
			if got != tc.want {
				t.Errorf("Parse(%q) = %+v, want %+v", tc.in, got, tc.want)
			}
			if err := got.Check(); err != nil {
				t.Errorf("Check: %v", err)
			}
		})
	}
}

func TestParseAutoErrors(t *testing.T) {
	p := mustParser(t, Options{})
	tests := []struct {
		name string
		in   string
		want error
		msg  string // exact message when not "", else a substring check on msgPart
		part string
	}{
		{"month 13", "2024-13-01 10:00", ErrRange, `"2024-13-01 10:00": month 13 out of range [1, 12]`, ""},
		{"garbage", "abc", ErrSyntax, `"abc": not a timestamp; expected RFC 3339 (2024-06-21T18:30:00Z), ISO local (2024-06-21 18:30) or use --time-format/--epoch`, ""},
		{"empty", "", ErrEmpty, "", "empty timestamp"},
		{"spaces only", "   ", ErrEmpty, "", "empty timestamp"},
		{"date alone", "2024-06-21", ErrDateOnly, "", "a date alone is not a timestamp"},
		{"date alone basic", "20240621", ErrSyntax, "", "--epoch"},
		{"bad date alone", "2024-02-30", ErrRange, "", "day 30 out of range [1, 29] for 2024-02"},
		{"month 0", "2024-00-10 10:00", ErrRange, "", "month 0 out of range [1, 12]"},
		{"day 31 june", "2024-06-31 10:00", ErrRange, "", "day 31 out of range [1, 30] for 2024-06"},
		{"feb 29 common year", "2023-02-29T10:00Z", ErrRange, "", "day 29 out of range [1, 28] for 2023-02 (not a leap year)"},
		{"feb 29 1900", "1900-02-29 10:00", ErrRange, "", "not a leap year"},
		{"day 0", "2024-06-00 10:00", ErrRange, "", "day 0 out of range"},
		{"year 0", "0000-06-21 10:00", ErrRange, "", "year 0 out of range [1, 9999]"},
		{"hour 24", "2024-06-21T24:00", ErrRange, "", "hour 24 out of range [0, 23]"},
		{"hour 25", "2024-06-21T25:00", ErrRange, "", "hour 25 out of range [0, 23]"},
		{"minute 60", "2024-06-21T10:60", ErrRange, "", "minute 60 out of range [0, 59]"},
		{"leap second", "2016-12-31T23:59:60Z", ErrRange, "", "leap seconds are not accepted"},
		{"offset hour 24", "2024-06-21T10:00+24:00", ErrRange, "", "UTC offset hour 24 out of range [0, 23]"},
		{"offset minute 60", "2024-06-21T10:00+05:60", ErrRange, "", "UTC offset minute 60 out of range [0, 59]"},
		{"short offset", "2024-06-21T18:30:00+2", ErrSyntax, "", `bad UTC offset "+2"`},
		{"one-digit hour", "2024-06-21 7:30", ErrSyntax, "", "not a timestamp"},
		{"one-digit month", "2024-6-21 07:30", ErrSyntax, "", "not a timestamp"},
		{"hour only", "2024-06-21T18Z", ErrSyntax, "", "not a timestamp"},
		{"bad separator", "2024-06-21_18:30", ErrSyntax, "", "not a timestamp"},
		{"two spaces", "2024-06-21  18:30", ErrSyntax, "", "not a timestamp"},
		{"empty fraction", "2024-06-21T18:30:00.Z", ErrSyntax, "", "not a timestamp"},
		{"fraction without seconds", "2024-06-21T18:30.5", ErrSyntax, "", "not a timestamp"},
		{"trailing text", "2024-06-21T18:30:00Z junk", ErrSyntax, "", "not a timestamp"},
		{"zone name", "2024-06-21T18:30:00 EST", ErrSyntax, "", "not a timestamp"},
		{"slashes", "21/06/2024 18:30", ErrSyntax, "", "--time-format"},
		{"basic with space", "20240621 1830", ErrSyntax, "", "not a timestamp"},
		{"mixed basic clock", "2024-06-21T1830", ErrSyntax, "", "not a timestamp"},
		{"five-digit year", "20245-06-21 10:00", ErrSyntax, "", "not a timestamp"},
		{"negative year", "-2024-06-21 10:00", ErrSyntax, "", "not a timestamp"},
		{"epoch number", "1718994600", ErrSyntax, "", "--epoch"},
		{"non-ascii digit", "２０２４-06-21 10:00", ErrSyntax, "", "not a timestamp"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := p.Parse(tc.in)
			if !errors.Is(err, tc.want) {
				t.Fatalf("Parse(%q) error = %v, want %v", tc.in, err, tc.want)
			}
			var se *Error
			if !errors.As(err, &se) {
				t.Fatalf("error %T is not *Error", err)
			}
			if tc.msg != "" && err.Error() != tc.msg {
				t.Errorf("message\n got %s\nwant %s", err, tc.msg)
			}
			if tc.part != "" && !strings.Contains(err.Error(), tc.part) {
				t.Errorf("message %q lacks %q", err, tc.part)
			}
		})
	}
}

// TestParseMatchesTimeParse checks the hand parser against the standard library's RFC 3339 parser on
// random valid stamps in many spellings.
func TestParseMatchesTimeParse(t *testing.T) {
	p := mustParser(t, Options{})
	r := rand.New(rand.NewPCG(1, 2))
	layouts := []string{
		"2006-01-02T15:04:05Z07:00",
		"2006-01-02T15:04:05.999999999Z07:00",
		"2006-01-02T15:04:05.000Z07:00",
		"2006-01-02 15:04:05Z07:00",
		"2006-01-02T15:04Z07:00",
		"2006-01-02T15:04:05-0700",
		"2006-01-02T15:04:05",
		"2006-01-02 15:04",
		"20060102T150405Z0700",
	}
	for i := 0; i < 20000; i++ {
		sec := r.Int64N(maxUnix-minUnix) + minUnix
		ns := r.Int64N(1e9)
		off := (r.IntN(2*24*60-1) - (24*60 - 1)) * 60
		tm := time.Unix(sec, ns).In(time.FixedZone("", off))
		if y := tm.Year(); y < 1 || y > 9999 {
			continue
		}
		layout := layouts[r.IntN(len(layouts))]
		text := tm.Format(layout)
		got, err := p.Parse(text)
		if err != nil {
			t.Fatalf("Parse(%q): %v", text, err)
		}
		want, err := time.Parse(layout, text)
		if err != nil {
			t.Fatalf("time.Parse(%q): %v", text, err)
		}
		if got != FromTime(want) && !(got.HasOffset == false && got == local(want.Year(), want.Month(), want.Day(), want.Hour(), want.Minute(), want.Second(), want.Nanosecond())) {
			t.Fatalf("Parse(%q) = %+v, time.Parse gives %v", text, got, want)
		}
		if inst, ok := got.Instant(); ok && !inst.Equal(want) {
			t.Fatalf("Instant of %q = %v, want %v", text, inst, want)
		}
	}
}

func TestCivilDays(t *testing.T) {
	// Checked against the standard library's calendar for every day of years 1..9999 in steps, and
	// every day around the Gregorian century rules.
	for days := int64(minUnix / 86400); days <= maxUnix/86400; days += 37 {
		y, m, d := civilFromDays(days)
		want := time.Unix(days*86400, 0).UTC()
		if y != want.Year() || time.Month(m) != want.Month() || d != want.Day() {
			t.Fatalf("civilFromDays(%d) = %d-%d-%d, want %v", days, y, m, d, want)
		}
		if back := daysFromCivil(y, m, d); back != days {
			t.Fatalf("daysFromCivil(%d-%d-%d) = %d, want %d", y, m, d, back, days)
		}
	}
	for _, y := range []int{1, 4, 100, 400, 1600, 1700, 1900, 2000, 2100, 9999} {
		for m := 1; m <= 12; m++ {
			if got, want := daysIn(y, m), time.Date(y, time.Month(m)+1, 0, 0, 0, 0, 0, time.UTC).Day(); got != want {
				t.Errorf("daysIn(%d, %d) = %d, want %d", y, m, got, want)
			}
		}
	}
}

func TestStampMethods(t *testing.T) {
	s := withOffset(local(2024, 6, 21, 18, 30, 0, 250000000), -5*3600)
	if got, want := s.String(), "2024-06-21T18:30:00.25-05:00"; got != want {
		t.Errorf("String = %q, want %q", got, want)
	}
	inst, ok := s.Instant()
	if want := time.Date(2024, 6, 21, 23, 30, 0, 250000000, time.UTC); !ok || !inst.Equal(want) || inst.Location() != time.UTC {
		t.Errorf("Instant = %v, %v; want %v in UTC", inst, ok, want)
	}
	l := local(2024, 3, 10, 2, 30, 0, 0)
	if _, ok := l.Instant(); ok {
		t.Error("Instant of an offset-less stamp reports ok")
	}
	if got, want := l.String(), "2024-03-10T02:30:00"; got != want {
		t.Errorf("String = %q, want %q", got, want)
	}
	if got, want := l.Wall(), time.Date(2024, 3, 10, 2, 30, 0, 0, time.UTC).Unix(); got != want {
		t.Errorf("Wall = %d, want %d", got, want)
	}
	lmt := withOffset(local(1880, 1, 1, 0, 0, 0, 0), -(4*3600 + 56*60 + 2))
	if got, want := lmt.String(), "1880-01-01T00:00:00-04:56:02"; got != want {
		t.Errorf("String = %q, want %q", got, want)
	}
	bad := []Stamp{
		{},
		local(2023, 2, 29, 0, 0, 0, 0),
		local(2024, 1, 1, 24, 0, 0, 0),
		local(2024, 1, 1, 0, 0, 0, 1e9),
		withOffset(local(2024, 1, 1, 0, 0, 0, 0), 86400),
	}
	for _, b := range bad {
		if err := b.Check(); !errors.Is(err, ErrRange) {
			t.Errorf("Check(%+v) = %v, want ErrRange", b, err)
		}
	}
}

func TestFromUnix(t *testing.T) {
	for _, c := range []struct{ sec, nsec int64 }{
		{0, 0}, {1718994600, 0}, {-1, 999999999}, {0, -1}, {5, 2e9 + 7}, {minUnix, 0}, {maxUnix, 999999999},
	} {
		got, err := FromUnix(c.sec, c.nsec)
		if err != nil {
			t.Fatalf("FromUnix(%d, %d): %v", c.sec, c.nsec, err)
		}
		if want := FromTime(time.Unix(c.sec, c.nsec).UTC()); got != want {
			t.Errorf("FromUnix(%d, %d) = %v, want %v", c.sec, c.nsec, got, want)
		}
	}
	for _, sec := range []int64{minUnix - 1, maxUnix + 1} {
		if _, err := FromUnix(sec, 0); !errors.Is(err, ErrRange) {
			t.Errorf("FromUnix(%d) error = %v, want ErrRange", sec, err)
		}
	}
}

func TestEpoch(t *testing.T) {
	tests := []struct {
		unit, in string
		sec, ns  int64
	}{
		{"s", "1718994600", 1718994600, 0},
		{"s", "+1718994600", 1718994600, 0},
		{"s", "1718994600.25", 1718994600, 250000000},
		{"s", ".5", 0, 500000000},
		{"s", "7.", 7, 0},
		{"s", "-1.5", -2, 500000000},
		{"s", "-0", 0, 0},
		{"s", " 0 ", 0, 0},
		{"s", "-62135596800", minUnix, 0},
		{"s", "253402300799.999999999", maxUnix, 999999999},
		{"ms", "1718994600123", 1718994600, 123000000},
		{"ms", "1718994600123.5", 1718994600, 123500000},
		{"ms", "-1", -1, 999000000},
		{"us", "1718994600123456", 1718994600, 123456000},
		{"us", "1718994600123456.789", 1718994600, 123456789},
		{"ns", "1718994600123456789", 1718994600, 123456789},
		{"ns", "9223372036854775807", 9223372036, 854775807},
		{"ns", "-9223372036854775807", -9223372037, 145224193},
		{"ns", "5.9", 0, 5},
	}
	for _, tc := range tests {
		t.Run(tc.unit+" "+tc.in, func(t *testing.T) {
			p := mustParser(t, Options{Epoch: tc.unit})
			got, err := p.Parse(tc.in)
			if err != nil {
				t.Fatal(err)
			}
			if want := FromTime(time.Unix(tc.sec, tc.ns).UTC()); got != want {
				t.Errorf("Parse(%q) = %v, want %v", tc.in, got, want)
			}
			if !got.HasOffset || got.Offset != 0 {
				t.Errorf("epoch stamp has offset %v %d, want UTC", got.HasOffset, got.Offset)
			}
		})
	}
	errTests := []struct {
		unit, in string
		want     error
		part     string
	}{
		{"s", "", ErrEmpty, "empty Unix time"},
		{"s", "abc", ErrSyntax, "not a number"},
		{"s", "1e9", ErrSyntax, "not a number"},
		{"s", "1,5", ErrSyntax, "not a number"},
		{"s", ".", ErrSyntax, "not a number"},
		{"s", "-", ErrSyntax, "not a number"},
		{"s", "2024-06-21T18:30:00Z", ErrSyntax, "not a number"},
		{"s", "1718994600123", ErrRange, "use --epoch ms"},
		{"s", "1718994600123456", ErrRange, "use --epoch us"},
		{"s", "-62135596801", ErrRange, "out of range"},
		{"s", "253402300800", ErrRange, "out of range"},
		{"ms", "99999999999999999999", ErrRange, "out of range"},
		{"ns", "9223372036854775808", ErrRange, "out of range"},
		{"s", "123456789012345678901234567890", ErrRange, "out of range"},
	}
	for _, tc := range errTests {
		t.Run("error "+tc.unit+" "+tc.in, func(t *testing.T) {
			p := mustParser(t, Options{Epoch: tc.unit})
			_, err := p.Parse(tc.in)
			if !errors.Is(err, tc.want) || !strings.Contains(err.Error(), tc.part) {
				t.Errorf("Parse(%q) error = %v, want %v containing %q", tc.in, err, tc.want, tc.part)
			}
		})
	}
}

func TestParseDateTime(t *testing.T) {
	p := mustParser(t, Options{})
	tests := []struct {
		date, clock string
		want        Stamp
	}{
		{"2024-06-21", "18:30", local(2024, 6, 21, 18, 30, 0, 0)},
		{"2024-06-21", "7:30", local(2024, 6, 21, 7, 30, 0, 0)},
		{"2024-06-21", "07:30:15", local(2024, 6, 21, 7, 30, 15, 0)},
		{"2024-06-21", "07:30:15.25", local(2024, 6, 21, 7, 30, 15, 250000000)},
		{"2024-06-21", "0730", local(2024, 6, 21, 7, 30, 0, 0)},
		{"2024-06-21", "730", local(2024, 6, 21, 7, 30, 0, 0)},
		{"2024-06-21", "0005", local(2024, 6, 21, 0, 5, 0, 0)},
		{"2024-06-21", "005", local(2024, 6, 21, 0, 5, 0, 0)},
		{"2024-06-21", "2359", local(2024, 6, 21, 23, 59, 0, 0)},
		{"2024-06-21", "073015", local(2024, 6, 21, 7, 30, 15, 0)},
		{"2024-06-21", "7:30 PM", local(2024, 6, 21, 19, 30, 0, 0)},
		{"2024-06-21", "7:30 pm", local(2024, 6, 21, 19, 30, 0, 0)},
		{"2024-06-21", "0730PM", local(2024, 6, 21, 19, 30, 0, 0)},
		{"2024-06-21", "730am", local(2024, 6, 21, 7, 30, 0, 0)},
		{"2024-06-21", "12:05 am", local(2024, 6, 21, 0, 5, 0, 0)},
		{"2024-06-21", "12:05 PM", local(2024, 6, 21, 12, 5, 0, 0)},
		{"2024-06-21", "12:05:30 p.m.", local(2024, 6, 21, 12, 5, 30, 0)},
		{"2024-06-21", "7 PM", local(2024, 6, 21, 19, 0, 0, 0)},
		{"2024-06-21", "11:59 P.M.", local(2024, 6, 21, 23, 59, 0, 0)},
		{"2024-06-21", "18:30Z", withOffset(local(2024, 6, 21, 18, 30, 0, 0), 0)},
		{"2024-06-21", "18:30:00+02:00", withOffset(local(2024, 6, 21, 18, 30, 0, 0), 7200)},
		{"2024-06-21 00:00:00", "18:30", local(2024, 6, 21, 18, 30, 0, 0)},
		{"2024-06-21T00:00", "18:30", local(2024, 6, 21, 18, 30, 0, 0)},
		{" 2024-02-29 ", " 00:00 ", local(2024, 2, 29, 0, 0, 0, 0)},
	}
	for _, tc := range tests {
		t.Run(tc.date+" "+tc.clock, func(t *testing.T) {
			got, err := p.ParseDateTime(tc.date, tc.clock)
			if err != nil {
				t.Fatal(err)
			}
			if got != tc.want {
				t.Errorf("ParseDateTime(%q, %q) = %v, want %v", tc.date, tc.clock, got, tc.want)
			}
		})
	}
	errTests := []struct {
		date, clock string
		want        error
		part        string
	}{
		{"2024-06-21", "24:00", ErrRange, "hour 24 out of range [0, 23]"},
		{"2024-06-21", "2400", ErrRange, "hour 24 out of range [0, 23]"},
		{"2024-06-21", "1260", ErrRange, "minute 60 out of range [0, 59]"},
		{"2024-06-21", "0:00 PM", ErrRange, "hour 0 out of range [1, 12] with AM/PM"},
		{"2024-06-21", "13:00 PM", ErrRange, "hour 13 out of range [1, 12] with AM/PM"},
		{"2024-06-21", "30", ErrSyntax, "ambiguous"},
		{"2024-06-21", "7", ErrSyntax, "ambiguous"},
		{"2024-06-21", "07.30", ErrSyntax, "not a time of day"},
		{"2024-06-21", "07:3", ErrSyntax, "not a time of day"},
		{"2024-06-21", "123:45", ErrSyntax, "not a time of day"},
		{"2024-06-21", "07305", ErrSyntax, "not a time of day"},
		{"2024-06-21", "7:30 XM", ErrSyntax, "not a time of day"},
		{"2024-06-21", "7:30Z PM", ErrSyntax, "not a time of day"},
		{"2024-06-21", "PM", ErrSyntax, "not a time of day"},
		{"2024-06-21", "", ErrEmpty, "empty time of day"},
		{"", "07:30", ErrEmpty, "empty date"},
		{"2024-13-01", "07:30", ErrRange, "month 13 out of range"},
		{"2023-02-29", "07:30", ErrRange, "not a leap year"},
		{"21/06/2024", "07:30", ErrSyntax, "not a date; expected ISO yyyy-mm-dd"},
		{"2024-06-21 18:30", "07:30", ErrSyntax, "other than midnight"},
		{"2024-06-21x", "07:30", ErrSyntax, "not a date"},
	}
	for _, tc := range errTests {
		t.Run("error "+tc.date+" "+tc.clock, func(t *testing.T) {
			_, err := p.ParseDateTime(tc.date, tc.clock)
			if !errors.Is(err, tc.want) || !strings.Contains(err.Error(), tc.part) {
				t.Errorf("ParseDateTime(%q, %q) error = %v, want %v containing %q", tc.date, tc.clock, err, tc.want, tc.part)
			}
		})
	}
}

func TestLayout(t *testing.T) {
	tests := []struct {
		layout, in string
		want       Stamp
	}{
		{"%Y-%m-%d %H:%M", "2024-06-21 18:30", local(2024, 6, 21, 18, 30, 0, 0)},
		{"%Y-%m-%d %H:%M", "2024-6-1 7:05", local(2024, 6, 1, 7, 5, 0, 0)},
		{"%d/%m/%Y %I:%M %p", "21/06/2024 07:30 PM", local(2024, 6, 21, 19, 30, 0, 0)},
		{"%d/%m/%Y %I:%M %p", "21/06/2024 12:00 am", local(2024, 6, 21, 0, 0, 0, 0)},
		{"%d/%m/%Y %I:%M %p", "21/06/2024 12:00 p.m.", local(2024, 6, 21, 12, 0, 0, 0)},
		{"%d/%m/%Y %I:%M %p", "21/06/2024 7:30PM", local(2024, 6, 21, 19, 30, 0, 0)},
		{"%m/%d/%Y %H:%M:%S", "06/21/2024 18:30:59", local(2024, 6, 21, 18, 30, 59, 0)},
		{"%Y%m%d%H%M", "202406210730", local(2024, 6, 21, 7, 30, 0, 0)},
		{"%Y%m%d %H%M", "20240621 730", local(2024, 6, 21, 7, 30, 0, 0)},
		{"%d%m%Y %H%M", "1062024 0730", local(2024, 6, 1, 7, 30, 0, 0)},
		{"%d %b %Y %H:%M", "21 Jun 2024 18:30", local(2024, 6, 21, 18, 30, 0, 0)},
		{"%d %b %Y %H:%M", "21 june 2024 18:30", local(2024, 6, 21, 18, 30, 0, 0)},
		{"%d %B %Y %H:%M", "5 SEPT 2024 18:30", local(2024, 9, 5, 18, 30, 0, 0)},
		{"%d %B %Y %H:%M", "5 September 2024 18:30", local(2024, 9, 5, 18, 30, 0, 0)},
		{"%d %b %Y %H:%M", "5 May 2024 18:30", local(2024, 5, 5, 18, 30, 0, 0)},
		{"%b %e %Y %H:%M", "Jun  1 2024 18:30", local(2024, 6, 1, 18, 30, 0, 0)},
		{"%a, %d %b %Y %T %Z", "Fri, 21 Jun 2024 18:30:00 GMT", withOffset(local(2024, 6, 21, 18, 30, 0, 0), 0)},
		{"%A %d %B %Y %R", "friday 21 June 2024 18:30", local(2024, 6, 21, 18, 30, 0, 0)},
		{"%F %T.%f %z", "2024-06-21 18:30:00.25 +0530", withOffset(local(2024, 6, 21, 18, 30, 0, 250000000), 19800)},
		{"%F %T%z", "2024-06-21 18:30:00Z", withOffset(local(2024, 6, 21, 18, 30, 0, 0), 0)},
		{"%F %T %z", "2024-06-21 18:30:00 -03:00", withOffset(local(2024, 6, 21, 18, 30, 0, 0), -3*3600)},
		{"%D %R", "06/21/24 18:30", local(2024, 6, 21, 18, 30, 0, 0)},
		{"%D %R", "06/21/69 18:30", local(1969, 6, 21, 18, 30, 0, 0)},
		{"%D %R", "06/21/68 18:30", local(2068, 6, 21, 18, 30, 0, 0)},
		{"%Y-%j %H:%M", "2024-060 12:00", local(2024, 2, 29, 12, 0, 0, 0)},
		{"%Y-%j %H:%M", "2023-060 12:00", local(2023, 3, 1, 12, 0, 0, 0)},
		{"%Y-%j %H:%M", "2024-366 12:00", local(2024, 12, 31, 12, 0, 0, 0)},
		{"%Y %j %H", "2024 1 7", local(2024, 1, 1, 7, 0, 0, 0)},
		{"%Y-%m-%dT%H:%M:%S%%", "2024-06-21T18:30:00%", local(2024, 6, 21, 18, 30, 0, 0)},
		{"%Y-%m-%d%n%H:%M", "2024-06-2118:30", local(2024, 6, 21, 18, 30, 0, 0)},
		{"%Y-%m-%d %H:%M", "2024-06-21\t 18:30", local(2024, 6, 21, 18, 30, 0, 0)},
		{"%Y-%m-%d %H:%M", " 2024-06-21 18:30 ", local(2024, 6, 21, 18, 30, 0, 0)},
		{"%H:%M %d.%m.%Y", "18:30 21.06.2024", local(2024, 6, 21, 18, 30, 0, 0)},
		{"%Y-%m-%d %H", "2024-06-21 18", local(2024, 6, 21, 18, 0, 0, 0)},
		{"time %Y-%m-%d %H:%M UTC", "time 2024-06-21 18:30 UTC", local(2024, 6, 21, 18, 30, 0, 0)},
	}
	for _, tc := range tests {
		t.Run(tc.layout+" "+tc.in, func(t *testing.T) {
			p := mustParser(t, Options{Layout: tc.layout})
			if err := p.CheckParse(); err != nil {
				t.Fatalf("CheckParse: %v", err)
			}
			got, err := p.Parse(tc.in)
			if err != nil {
				t.Fatal(err)
			}
			if got != tc.want {
				t.Errorf("Parse(%q) = %v, want %v", tc.in, got, tc.want)
			}
		})
	}
}

func TestLayoutErrors(t *testing.T) {
	tests := []struct {
		layout, in string
		want       error
		part       string
	}{
		{"%Y-%m-%d %H:%M", "21/06/2024 18:30", ErrSyntax, `does not match --time-format "%Y-%m-%d %H:%M": expected %Y (4-digit year) at byte 1, found "21/06/2024 1"`},
		{"%Y-%m-%d %H:%M", "2024-06-21 18:30:00", ErrSyntax, `unexpected ":00" after the end of --time-format`},
		{"%Y-%m-%d %H:%M", "2024-06-21", ErrSyntax, "expected %H (hour 0-23) at byte 11, found end of text"},
		{"%Y-%m-%d %H:%M", "24-06-21 18:30", ErrSyntax, "expected %Y (4-digit year)"},
		{"%Y-%m-%d %H:%M", "2024-13-21 18:30", ErrRange, "month 13 out of range [1, 12]"},
		{"%Y-%m-%d %H:%M", "2023-02-29 18:30", ErrRange, "not a leap year"},
		{"%Y-%m-%d %H:%M", "2024-06-21 24:00", ErrRange, "hour 24 out of range"},
		{"%Y-%m-%d %H:%M", "", ErrEmpty, "empty timestamp"},
		{"%d/%m/%Y %I:%M %p", "21/06/2024 13:30 PM", ErrRange, "hour 13 out of range [1, 12] for %I"},
		{"%d/%m/%Y %I:%M %p", "21/06/2024 00:30 AM", ErrRange, "hour 0 out of range [1, 12] for %I"},
		{"%d/%m/%Y %I:%M %p", "21/06/2024 07:30", ErrSyntax, "expected %p (AM or PM)"},
		{"%Y%m%d%H%M", "2024062173", ErrSyntax, "expected %Y (4-digit year) at byte 1"},
		{"%H%M %d/%m/%Y", "12345 21/06/2024", ErrSyntax, `expected "/" at byte 6`},
		{"%d %b %Y %H:%M", "21 Jux 2024 18:30", ErrSyntax, "expected %b (month name"},
		{"%a, %d %b %Y %T %Z", "Sat, 21 Jun 2024 18:30:00 GMT", ErrRange, "weekday Saturday does not match the date, a Friday"},
		{"%a, %d %b %Y %T %Z", "Fri, 21 Jun 2024 18:30:00 EST", ErrZoneName, `zone abbreviation "EST" is not accepted`},
		{"%F %T %z", "2024-06-21 18:30:00 +2", ErrSyntax, "expected %z"},
		{"%F %T %z", "2024-06-21 18:30:00 +25:00", ErrRange, "UTC offset hour 25"},
		{"%Y-%j %H:%M", "2023-366 12:00", ErrRange, "day of year 366 out of range [1, 365] for 2023"},
		{"%Y-%j %H:%M", "2023-000 12:00", ErrRange, "day of year 0 out of range"},
		{"%Y-%m-%d %H:%M:%S", "2024-06-21 18:30:60", ErrRange, "leap seconds"},
		{"%Y-%m-%d", "2024-06-21", ErrLayout, "has no time of day"},
		{"%H:%M", "18:30", ErrLayout, "has no date"},
	}
	for _, tc := range tests {
		t.Run(tc.layout+" "+tc.in, func(t *testing.T) {
			p := mustParser(t, Options{Layout: tc.layout})
			_, err := p.Parse(tc.in)
			if !errors.Is(err, tc.want) || !strings.Contains(err.Error(), tc.part) {
				t.Errorf("Parse(%q) error = %v\nwant %v containing %q", tc.in, err, tc.want, tc.part)
			}
		})
	}
}

func TestNewParserErrors(t *testing.T) {
	tests := []struct {
		name string
		o    Options
		part string
	}{
		{"unknown directive", Options{Layout: "%Y-%m-%d %H:%Q"}, "unknown directive %Q in --time-format; supported: %Y %y %m %d %e %j %b %B %a %A %H %I %M %S %f %p %z %Z %T %R %F %D %n %t %%"},
		{"unknown multibyte directive", Options{Layout: "%Y%é"}, "unknown directive %é"},
		{"lone percent", Options{Layout: "%Y-%m-%d %"}, "lone %"},
		{"empty layout epoch", Options{Epoch: "min"}, "unknown --epoch unit; expected s, ms, us or ns"},
		{"both", Options{Layout: "%s", Epoch: "s"}, "cannot be combined with --epoch"},
		{"no directives", Options{Layout: "hello"}, "no date or time-of-day directives"},
		{"year twice", Options{Layout: "%Y %Y %m %d %H"}, "has %Y twice"},
		{"Y and y", Options{Layout: "%Y %y %m %d"}, "both %Y and %y"},
		{"m and b", Options{Layout: "%Y %m %b %d"}, "both %m and %b"},
		{"j and d", Options{Layout: "%Y %j %d"}, "both %j and %d"},
		{"H and I", Options{Layout: "%F %H %I %p"}, "both %H and %I"},
		{"H and p", Options{Layout: "%F %H:%M %p"}, "both %H and %p"},
		{"I without p", Options{Layout: "%F %I:%M"}, "%I without %p"},
		{"z and Z", Options{Layout: "%F %H %z %Z"}, "both %z and %Z"},
		{"no year", Options{Layout: "%d/%m %H:%M"}, "without a year"},
		{"no day", Options{Layout: "%Y-%m %H:%M"}, "incomplete date"},
		{"weekday only", Options{Layout: "%a %H:%M"}, "without a year"},
		{"minutes only", Options{Layout: "%F %M"}, "without an hour"},
		{"zone only", Options{Layout: "%F %z"}, "without an hour"},
		{"S without M", Options{Layout: "%F %H %S"}, "%S without %M"},
		{"f without S", Options{Layout: "%F %H:%M.%f"}, "%f without %S"},
		{"f in a run", Options{Layout: "%F %H:%M:%S%f"}, "%f next to another number directive"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := NewParser(tc.o)
			if !errors.Is(err, ErrLayout) || !strings.Contains(err.Error(), tc.part) {
				t.Errorf("NewParser(%+v) error = %v, want ErrLayout containing %q", tc.o, err, tc.part)
			}
		})
	}
}

func TestParseDateTimeLayout(t *testing.T) {
	tests := []struct {
		layout, date, clock string
		want                Stamp
	}{
		{"%d/%m/%Y", "21/06/2024", "0730", local(2024, 6, 21, 7, 30, 0, 0)},
		{"%m/%d/%Y", "6/1/2024", "7:30 PM", local(2024, 6, 1, 19, 30, 0, 0)},
		{"%H%M", "2024-06-21", "730", local(2024, 6, 21, 7, 30, 0, 0)},
		{"%H%M", "2024-06-21", "0005", local(2024, 6, 21, 0, 5, 0, 0)},
		{"%I:%M %p", "2024-06-21", "7:30 pm", local(2024, 6, 21, 19, 30, 0, 0)},
		{"%d/%m/%Y %H:%M", "21/06/2024", "18:30", local(2024, 6, 21, 18, 30, 0, 0)},
		{"%H:%M %d.%m.%Y", "21.06.2024", "18:30", local(2024, 6, 21, 18, 30, 0, 0)},
		{"%Y%m%d%H%M", "20240621", "730", local(2024, 6, 21, 7, 30, 0, 0)},
		{"%Y-%m-%dT%H:%M:%S%z", "2024-06-21", "18:30:00+0200", withOffset(local(2024, 6, 21, 18, 30, 0, 0), 7200)},
	}
	for _, tc := range tests {
		t.Run(tc.layout+" "+tc.date+" "+tc.clock, func(t *testing.T) {
			p := mustParser(t, Options{Layout: tc.layout})
			if err := p.CheckParseDateTime(); err != nil {
				t.Fatal(err)
			}
			got, err := p.ParseDateTime(tc.date, tc.clock)
			if err != nil {
				t.Fatal(err)
			}
			if got != tc.want {
				t.Errorf("ParseDateTime(%q, %q) = %v, want %v", tc.date, tc.clock, got, tc.want)
			}
		})
	}
	for _, o := range []Options{{Epoch: "s"}, {Layout: "%Y-%m-%d %H:%M %d"}, {Layout: "%d %H:%M %m/%Y"}} {
		p, err := NewParser(o)
		if err != nil {
			if !errors.Is(err, ErrLayout) {
				t.Errorf("NewParser(%+v): %v", o, err)
			}
			continue
		}
		if err := p.CheckParseDateTime(); !errors.Is(err, ErrLayout) {
			t.Errorf("CheckParseDateTime(%+v) = %v, want ErrLayout", o, err)
		}
		if _, err := p.ParseDateTime("2024-06-21", "18:30"); !errors.Is(err, ErrLayout) {
			t.Errorf("ParseDateTime with %+v error = %v, want ErrLayout", o, err)
		}
	}
}

// TestLayoutRoundTrip formats random instants with the standard library and reads them back with the
// equivalent strftime layout.
func TestLayoutRoundTrip(t *testing.T) {
	pairs := []struct{ strftime, goLayout string }{
		{"%Y-%m-%d %H:%M:%S", "2006-01-02 15:04:05"},
		{"%d/%m/%Y %I:%M:%S %p", "02/01/2006 03:04:05 PM"},
		{"%a, %d %b %Y %H:%M:%S %z", "Mon, 02 Jan 2006 15:04:05 -0700"},
		{"%A %B %e %Y %H:%M:%S.%f", "Monday January _2 2006 15:04:05.000000"},
		{"%Y%m%dT%H%M%S", "20060102T150405"},
		{"%m/%d/%y %H:%M:%S", "01/02/06 15:04:05"},
		{"%Y-%j %H:%M:%S", "2006-002 15:04:05"},
	}
	r := rand.New(rand.NewPCG(3, 4))
	for _, pair := range pairs {
		p := mustParser(t, Options{Layout: pair.strftime})
		for i := 0; i < 2000; i++ {
			sec := r.Int64N(4102444800) // 1970..2100
			tm := time.Unix(sec, r.Int64N(1e9)/1000*1000).In(time.FixedZone("", (r.IntN(48)-24)*1800))
			if strings.Contains(pair.strftime, "%y") && (tm.Year() < 1969 || tm.Year() > 2068) {
				continue
			}
			text := tm.Format(pair.goLayout)
			got, err := p.Parse(text)
			if err != nil {
				t.Fatalf("%s: Parse(%q): %v", pair.strftime, text, err)
			}
			want, err := time.Parse(pair.goLayout, text)
			if err != nil {
				t.Fatal(err)
			}
			w := FromTime(want)
			if !strings.Contains(pair.strftime, "%z") {
				w.HasOffset, w.Offset = false, 0
			}
			if got != w {
				t.Fatalf("%s: Parse(%q) = %v, want %v", pair.strftime, text, got, w)
			}
		}
	}
}

func TestErrorMessageBounded(t *testing.T) {
	p := mustParser(t, Options{})
	long := strings.Repeat("é", 5<<20) // 10 MB of two-byte characters
	_, err := p.Parse(long)
	if !errors.Is(err, ErrSyntax) {
		t.Fatalf("error = %v, want ErrSyntax", err)
	}
	if n := len(err.Error()); n > 400 {
		t.Errorf("message is %d bytes; want it bounded", n)
	}
	if !strings.Contains(err.Error(), `é..."`) && !strings.Contains(err.Error(), `"...`) {
		t.Errorf("message %q does not mark the cut", err.Error()[:100])
	}
}

func TestConcurrentUse(t *testing.T) {
	ps := []*Parser{mustParser(t, Options{}), mustParser(t, Options{Layout: "%d/%m/%Y %H:%M"}), mustParser(t, Options{Epoch: "ms"})}
	in := []string{"2024-06-21T18:30:00Z", "21/06/2024 18:30", "1718994600000"}
	var wg sync.WaitGroup
	for g := 0; g < 4; g++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := 0; i < 1000; i++ {
				k := i % len(ps)
				got, err := ps[k].Parse(in[k])
				if err != nil || got.Year != 2024 || got.Hour != 18 {
					t.Errorf("Parse(%q) = %v, %v", in[k], got, err)
					return
				}
			}
		}()
	}
	wg.Wait()
}

func TestNoAllocs(t *testing.T) {
	if raceEnabled {
		t.Skip("allocation counts differ under -race")
	}
	auto := mustParser(t, Options{})
	layout := mustParser(t, Options{Layout: "%d/%m/%Y %I:%M %p"})
	split := mustParser(t, Options{Layout: "%d/%m/%Y %H:%M"})
	epoch := mustParser(t, Options{Epoch: "ms"})
	cases := map[string]func(){
		"rfc3339":       func() { _, _ = auto.Parse("2024-06-21T18:30:00.250+02:00") },
		"iso local":     func() { _, _ = auto.Parse("2024-03-10 02:30") },
		"layout":        func() { _, _ = layout.Parse("21/06/2024 07:30 PM") },
		"date+clock":    func() { _, _ = auto.ParseDateTime("2024-06-21", "0730PM") },
		"layout split":  func() { _, _ = split.ParseDateTime("21/06/2024", "18:30") },
		"epoch decimal": func() { _, _ = epoch.Parse("1718994600123.5") },
	}
	for name, f := range cases {
		if n := testing.AllocsPerRun(100, f); n != 0 {
			t.Errorf("%s: %v allocations per parse, want 0", name, n)
		}
	}
}

func ExampleParser_Parse() {
	p, err := NewParser(Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, s := range []string{"2024-06-21T18:30:00+02:00", "2024-03-10 02:30", "2024-06-21", "2024-13-01 10:00"} {
		st, err := p.Parse(s)
		if err != nil {
			fmt.Println("error:", err)
			continue
		}
		fmt.Println(st, st.HasOffset)
	}
	// Output:
	// 2024-06-21T18:30:00+02:00 true
	// 2024-03-10T02:30:00 false
	// error: "2024-06-21": a date alone is not a timestamp; expected a time of day too (2024-06-21 18:30), or use --date COL --time COL
	// error: "2024-13-01 10:00": month 13 out of range [1, 12]
}

func ExampleParser_ParseDateTime() {
	p, _ := NewParser(Options{Layout: "%m/%d/%Y"}) // the layout reads the date column
	for _, clock := range []string{"0730", "730", "7:30 PM", "12:05 am", "24:00"} {
		st, err := p.ParseDateTime("06/21/2024", clock)
		if err != nil {
			fmt.Println("error:", err)
			continue
		}
		fmt.Println(st)
	}
	// Output:
	// 2024-06-21T07:30:00
	// 2024-06-21T07:30:00
	// 2024-06-21T19:30:00
	// 2024-06-21T00:05:00
	// error: "24:00": hour 24 out of range [0, 23] (write 24:00 as 00:00 of the next day)
}

func ExampleNewParser() {
	_, err := NewParser(Options{Layout: "%Y-%m-%d %H:%M:%Q"})
	fmt.Println(err)
	p, _ := NewParser(Options{Epoch: "ms"})
	st, _ := p.Parse("1718994600250")
	fmt.Println(st)
	// Output:
	// "%Y-%m-%d %H:%M:%Q": unknown directive %Q in --time-format; supported: %Y %y %m %d %e %j %b %B %a %A %H %I %M %S %f %p %z %Z %T %R %F %D %n %t %%
	// 2024-06-21T18:30:00.25Z
}
