package stamp

import (
	"strconv"
	"time"
)

// Stamp is a timestamp as written: a wall clock, with an offset when the text carried one.
//
// Fields hold the calendar values as read (proleptic Gregorian calendar, years 1..9999). A Stamp made
// by a Parser or by FromUnix always passes Check.
type Stamp struct {
	Year       int
	Month      time.Month
	Day        int
	Hour       int
	Minute     int
	Second     int
	Nanosecond int

	// HasOffset reports that the text had Z or ±hh:mm / ±hhmm / ±hh, or was an epoch (then Offset is 0).
	HasOffset bool
	// Offset is the UTC offset in seconds east of UTC, meaningful when HasOffset.
	Offset int
}

// Unix time of 0001-01-01T00:00:00Z and 9999-12-31T23:59:59Z: the range of years a Stamp may hold.
const (
	minUnix = -62135596800
	maxUnix = 253402300799
)

// Wall returns the wall clock (ignoring Offset) as seconds since 1970-01-01 00:00:00 on the same
// wall clock, i.e. the Unix time the stamp would have if it were written in UTC.
func (s Stamp) Wall() int64 {
	return daysFromCivil(s.Year, int(s.Month), s.Day)*86400 +
		int64(s.Hour)*3600 + int64(s.Minute)*60 + int64(s.Second)
}

// Instant returns the UTC instant of a stamp that carries an offset, and false (with the zero Time)
// for an offset-less stamp, whose instant depends on a time zone.
func (s Stamp) Instant() (time.Time, bool) {
	if !s.HasOffset {
		return time.Time{}, false
	}
	return time.Unix(s.Wall()-int64(s.Offset), int64(s.Nanosecond)).UTC(), true
}

// FromUnix returns the stamp of a Unix time (seconds and nanoseconds since 1970-01-01T00:00:00Z; nsec
// may be any value and is normalised), in UTC: HasOffset is true and Offset 0. A stamp for a local
// wall-clock count (a Parquet timestamp not adjusted to UTC, say) is the same with HasOffset cleared.
// Years outside 1..9999 are an ErrRange error.
func FromUnix(sec, nsec int64) (Stamp, error) {
	sec += nsec / 1e9
	nsec %= 1e9
	if nsec < 0 {
		nsec += 1e9
		sec--
	}
	if sec < minUnix || sec > maxUnix {
		return Stamp{}, &Error{Input: strconv.FormatInt(sec, 10), Err: ErrRange,
			Reason: "Unix time out of range [0001-01-01T00:00:00Z, 9999-12-31T23:59:59Z]"}
	}
	return fromUnixChecked(sec, nsec), nil
}

// fromUnixChecked is FromUnix for sec within [minUnix, maxUnix] and nsec within [0, 1e9).
func fromUnixChecked(sec, nsec int64) Stamp {
	days := sec / 86400
	rem := sec % 86400
	if rem < 0 {
		rem += 86400
		days--
	}
	y, m, d := civilFromDays(days)
	return Stamp{Year: y, Month: time.Month(m), Day: d,
		Hour: int(rem / 3600), Minute: int(rem / 60 % 60), Second: int(rem % 60), Nanosecond: int(nsec),
		HasOffset: true}
}

// FromTime returns the stamp of t as t's own location shows it, with t's offset.
func FromTime(t time.Time) Stamp {
	y, m, d := t.Date()
	hh, mm, ss := t.Clock()
	_, off := t.Zone()
	return Stamp{Year: y, Month: m, Day: d, Hour: hh, Minute: mm, Second: ss, Nanosecond: t.Nanosecond(),
		HasOffset: true, Offset: off}
}

// Check reports whether every field is in range: year 1..9999, a day that exists in its month, hour
// 0..23, minute and second 0..59, nanosecond 0..999999999 and, when HasOffset, an offset within
// ±24 h. The error wraps ErrRange.
func (s Stamp) Check() error {
	reason := dateReason(s.Year, int(s.Month), s.Day)
	if reason == "" {
		reason = clockReason(s.Hour, s.Minute, s.Second)
	}
	if reason == "" && (s.Nanosecond < 0 || s.Nanosecond > 999999999) {
		reason = outOfRange("nanosecond", s.Nanosecond, 0, 999999999)
	}
	if reason == "" && s.HasOffset && (s.Offset <= -86400 || s.Offset >= 86400) {
		reason = "UTC offset of " + strconv.Itoa(s.Offset) + " s out of range (-86400, 86400)"
	}
	if reason == "" {
		return nil
	}
	return &Error{Input: s.String(), Reason: reason, Err: ErrRange}
}

// String formats the stamp as RFC 3339 when it has an offset (2024-06-21T18:30:00.5+02:00, Z for a
// zero offset) and as an ISO local date-time otherwise (2024-06-21T18:30:00). Fractional seconds are
// written without trailing zeros; an offset with seconds is written ±hh:mm:ss.
func (s Stamp) String() string {
	var buf [40]byte
	return string(s.AppendText(buf[:0]))
}

// AppendText appends the String form of s to b.
func (s Stamp) AppendText(b []byte) []byte {
	b = appendInt(b, s.Year, 4)
	b = append(b, '-')
	b = appendInt(b, int(s.Month), 2)
	b = append(b, '-')
	b = appendInt(b, s.Day, 2)
	b = append(b, 'T')
	b = appendInt(b, s.Hour, 2)
	b = append(b, ':')
	b = appendInt(b, s.Minute, 2)
	b = append(b, ':')
	b = appendInt(b, s.Second, 2)
	if ns := s.Nanosecond; ns > 0 && ns < 1e9 {
		digits := 9
		for ns%10 == 0 {
			ns /= 10
			digits--
		}
		b = append(b, '.')
		b = appendInt(b, ns, digits)
	}
	if !s.HasOffset {
		return b
	}
	return appendOffset(b, s.Offset)
}

// appendOffset appends Z or ±hh:mm (±hh:mm:ss when the offset has seconds).
func appendOffset(b []byte, off int) []byte {
	if off == 0 {
		return append(b, 'Z')
	}
	sign := byte('+')
	if off < 0 {
		sign = '-'
		off = -off
	}
	b = append(b, sign)
	b = appendInt(b, off/3600, 2)
	b = append(b, ':')
	b = appendInt(b, off/60%60, 2)
	if off%60 != 0 {
		b = append(b, ':')
		b = appendInt(b, off%60, 2)
	}
	return b
}

// appendInt appends v zero-padded to at least width digits (a minus sign first when negative).
func appendInt(b []byte, v, width int) []byte {
	if v < 0 {
		b = append(b, '-')
		v = -v
	}
	var tmp [24]byte
	i := len(tmp)
	for i > 0 && (v > 0 || width > 0 || i == len(tmp)) {
		i--
		tmp[i] = byte('0' + v%10)
		v /= 10
		width--
	}
	return append(b, tmp[i:]...)
}

// daysFromCivil returns the number of days from 1970-01-01 to y-m-d in the proleptic Gregorian
// calendar (H. Hinnant's days_from_civil; valid for any int year).
func daysFromCivil(y, m, d int) int64 {
	yy := int64(y)
	if m <= 2 {
		yy--
	}
	era := yy
	if era < 0 {
		era -= 399
	}
	era /= 400
	yoe := yy - era*400 // [0, 399]
	mp := int64(m) + 9  // March = 0
	if m > 2 {
		mp = int64(m) - 3
	}
	doy := (153*mp+2)/5 + int64(d) - 1
	doe := yoe*365 + yoe/4 - yoe/100 + doy
	return era*146097 + doe - 719468
}

// civilFromDays is the inverse of daysFromCivil.
func civilFromDays(z int64) (y, m, d int) {
	z += 719468
	era := z
	if era < 0 {
		era -= 146096
	}
	era /= 146097
	doe := z - era*146097
	yoe := (doe - doe/1460 + doe/36524 - doe/146096) / 365
	yy := yoe + era*400
	doy := doe - (365*yoe + yoe/4 - yoe/100)
	mp := (5*doy + 2) / 153
	d = int(doy - (153*mp+2)/5 + 1)
	if mp < 10 {
		m = int(mp + 3)
	} else {
		m = int(mp - 9)
	}
	if m <= 2 {
		yy++
	}
	return int(yy), m, d
}

// isLeap reports whether y is a leap year of the Gregorian calendar.
func isLeap(y int) bool { return y%4 == 0 && (y%100 != 0 || y%400 == 0) }

// daysIn returns the number of days of month m (1..12) in year y.
func daysIn(y, m int) int {
	switch m {
	case 2:
		if isLeap(y) {
			return 29
		}
		return 28
	case 4, 6, 9, 11:
		return 30
	}
	return 31
}
