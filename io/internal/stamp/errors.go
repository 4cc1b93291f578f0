package stamp

import (
	"errors"
	"strconv"
	"unicode/utf8"
)

// Causes of a failed parse, matched with errors.Is. Every error returned by this package wraps exactly
// one of them (through *Error).
var (
	// ErrEmpty: the text is empty or only spaces.
	ErrEmpty = errors.New("stamp: empty time value")
	// ErrSyntax: the text is not in any accepted form.
	ErrSyntax = errors.New("stamp: malformed time value")
	// ErrRange: the form is right but a field is out of range (month 13, 31 June, 29 February of a
	// common year, hour 24, an epoch outside years 1..9999, ...).
	ErrRange = errors.New("stamp: time field out of range")
	// ErrDateOnly: a date with no time of day where a full timestamp is needed.
	ErrDateOnly = errors.New("stamp: date without a time of day")
	// ErrZoneName: a zone abbreviation other than UTC/GMT (%Z). Abbreviations such as CST are
	// ambiguous; offsets (%z) or a time zone name are needed.
	ErrZoneName = errors.New("stamp: zone abbreviation not accepted")
	// ErrLayout: the options cannot be used: an unknown strftime directive, a layout that cannot yield
	// what is asked of it, an unknown epoch unit, or options that exclude each other.
	ErrLayout = errors.New("stamp: unusable time format options")
)

// Error is a parse failure: the text, what is wrong with it and what would be valid, and its cause.
type Error struct {
	// Input is the text that failed (for ParseDateTime, the date or the time-of-day text).
	Input string
	// Reason says what is wrong and what would be valid.
	Reason string
	// Err is one of the package's sentinel errors.
	Err error
}

// maxQuoted bounds how much of a long input an error message repeats.
const maxQuoted = 64

// Error returns the quoted input (cut to its first 64 bytes, marked with "..."), a colon and the reason,
// e.g. "2024-13-01 10:00": month 13 out of range [1, 12].
func (e *Error) Error() string {
	in := e.Input
	cut := ""
	if len(in) > maxQuoted {
		n := maxQuoted
		for n > 0 && !utf8.RuneStart(in[n]) {
			n--
		}
		in, cut = in[:n], "..."
	}
	return strconv.Quote(in) + cut + ": " + e.Reason
}

// Unwrap returns the sentinel cause.
func (e *Error) Unwrap() error { return e.Err }

const (
	hintTimestamp = "not a timestamp; expected RFC 3339 (2024-06-21T18:30:00Z), ISO local (2024-06-21 18:30) or use --time-format/--epoch"
	hintDate      = "not a date; expected ISO yyyy-mm-dd (2024-06-21) or use --time-format"
	hintClock     = "not a time of day; expected HH:MM, HH:MM:SS, H:MM, HHMM or HMM, optionally with AM/PM (18:30, 0730, 7:30 PM), or use --time-format"
	hintNumber    = "not a number; --epoch expects Unix time as an integer or decimal number (1718994600, 1718994600.25)"
)

func syntaxErr(in, reason string) error { return &Error{Input: in, Reason: reason, Err: ErrSyntax} }

func emptyErr(in, what string) error {
	return &Error{Input: in, Reason: "empty " + what, Err: ErrEmpty}
}

// outOfRange formats "month 13 out of range [1, 12]".
func outOfRange(field string, v, lo, hi int) string {
	return field + " " + strconv.Itoa(v) + " out of range [" + strconv.Itoa(lo) + ", " + strconv.Itoa(hi) + "]"
}

// dateReason returns "" when y-m-d is a date of years 1..9999, or what is out of range.
func dateReason(y, m, d int) string {
	if y < 1 || y > 9999 {
		return outOfRange("year", y, 1, 9999)
	}
	if m < 1 || m > 12 {
		return outOfRange("month", m, 1, 12)
	}
	if n := daysIn(y, m); d < 1 || d > n {
		var b []byte
		b = append(b, outOfRange("day", d, 1, n)...)
		b = append(b, " for "...)
		b = appendInt(b, y, 4)
		b = append(b, '-')
		b = appendInt(b, m, 2)
		if m == 2 && d == 29 {
			b = append(b, " (not a leap year)"...)
		}
		return string(b)
	}
	return ""
}

// clockReason returns "" when hh:mm:ss is a time of day, or what is out of range.
func clockReason(hh, mm, ss int) string {
	switch {
	case hh == 24 && mm == 0 && ss == 0:
		return "hour 24 out of range [0, 23] (write 24:00 as 00:00 of the next day)"
	case hh < 0 || hh > 23:
		return outOfRange("hour", hh, 0, 23)
	case mm < 0 || mm > 59:
		return outOfRange("minute", mm, 0, 59)
	case ss == 60:
		return "second 60 out of range [0, 59] (leap seconds are not accepted)"
	case ss < 0 || ss > 59:
		return outOfRange("second", ss, 0, 59)
	}
	return ""
}

// validate checks the calendar and clock fields of st; in is the text for the message.
func validate(in string, st *Stamp) error {
	if r := dateReason(st.Year, int(st.Month), st.Day); r != "" {
		return &Error{Input: in, Reason: r, Err: ErrRange}
	}
	if r := clockReason(st.Hour, st.Minute, st.Second); r != "" {
		return &Error{Input: in, Reason: r, Err: ErrRange}
	}
	return nil
}
