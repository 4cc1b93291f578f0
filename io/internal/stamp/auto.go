package stamp

import "time"

// The automatic forms, read by hand:
//
//	date-time  = date sep clock [frac] [" "] [zone]
//	date       = YYYY-MM-DD              (extended)  | YYYYMMDD (basic, only with sep "T")
//	sep        = "T" | "t" | " "
//	clock      = HH:MM[:SS]              (extended)  | HHMM[SS] (basic)
//	frac       = ("." | ",") 1*DIGIT     (after seconds only; digits past the 9th are dropped)
//	zone       = "Z" | "z" | ("+"|"-") HH [[":"] MM] | "UTC" | "GMT"
//
// A single space may stand between the clock and the zone ("2024-06-21 18:30:00 UTC", as some database
// exports write). Leading and trailing spaces, tabs and line ends around the text are ignored.

// parseAuto reads the automatic forms into st (which is left partly filled on error).
func parseAuto(in string, st *Stamp) error {
	s := trim(in)
	if s == "" {
		return emptyErr(in, "timestamp")
	}
	var i int
	basic := false
	switch {
	case len(s) >= 10 && s[4] == '-' && s[7] == '-':
		y, ok1 := num4(s, 0)
		m, ok2 := num2(s, 5)
		d, ok3 := num2(s, 8)
		if !ok1 || !ok2 || !ok3 {
			return syntaxErr(in, hintTimestamp)
		}
		st.Year, st.Month, st.Day = y, monthOf(m), d
		i = 10
	case len(s) >= 9 && (s[8] == 'T' || s[8] == 't'):
		y, ok1 := num4(s, 0)
		m, ok2 := num2(s, 4)
		d, ok3 := num2(s, 6)
		if !ok1 || !ok2 || !ok3 {
			return syntaxErr(in, hintTimestamp)
		}
		st.Year, st.Month, st.Day = y, monthOf(m), d
		i = 8
		basic = true
	default:
		return syntaxErr(in, hintTimestamp)
	}
	if i == len(s) {
		if r := dateReason(st.Year, int(st.Month), st.Day); r != "" {
			return &Error{Input: in, Reason: r, Err: ErrRange}
		}
		return &Error{Input: in, Err: ErrDateOnly,
			Reason: "a date alone is not a timestamp; expected a time of day too (2024-06-21 18:30), or use --date COL --time COL"}
	}
	if c := s[i]; c != 'T' && c != 't' && (c != ' ' || basic) {
		return syntaxErr(in, hintTimestamp)
	}
	i++
	var ok bool
	if basic {
		i, ok = clockBasic(s, i, st)
	} else {
		i, ok = clockExtended(s, i, st)
	}
	if !ok {
		return syntaxErr(in, hintTimestamp)
	}
	if i < len(s) {
		var err error
		if i, err = zoneSuffix(in, s, i, st); err != nil {
			return err
		}
	}
	if i != len(s) {
		return syntaxErr(in, hintTimestamp)
	}
	if !plausible(st) {
		return validate(in, st)
	}
	return nil
}

// plausible is the quick check that the fields of a parsed stamp are in range (validate says which
// one is not). Fields read from digits are never negative.
func plausible(st *Stamp) bool {
	return st.Year >= 1 && st.Month >= 1 && st.Month <= 12 && st.Day >= 1 &&
		(st.Day <= 28 || st.Day <= daysIn(st.Year, int(st.Month))) && st.Hour < 24 && st.Minute < 60 && st.Second < 60
}

// clockExtended reads HH:MM[:SS[frac]] at s[i:].
func clockExtended(s string, i int, st *Stamp) (int, bool) {
	hh, ok1 := num2(s, i)
	mm, ok2 := num2(s, i+3)
	if !ok1 || !ok2 || s[i+2] != ':' {
		return i, false
	}
	st.Hour, st.Minute = hh, mm
	i += 5
	if i < len(s) && s[i] == ':' {
		ss, ok := num2(s, i+1)
		if !ok {
			return i, false
		}
		st.Second = ss
		i += 3
		return fraction(s, i, st)
	}
	return i, true
}

// clockBasic reads HHMM[SS[frac]] at s[i:].
func clockBasic(s string, i int, st *Stamp) (int, bool) {
	hh, ok1 := num2(s, i)
	mm, ok2 := num2(s, i+2)
	if !ok1 || !ok2 {
		return i, false
	}
	st.Hour, st.Minute = hh, mm
	i += 4
	if ss, ok := num2(s, i); ok {
		st.Second = ss
		i += 2
		return fraction(s, i, st)
	}
	return i, true
}

// fraction reads an optional ("." | ",") 1*DIGIT at s[i:] into st.Nanosecond.
func fraction(s string, i int, st *Stamp) (int, bool) {
	if i >= len(s) || (s[i] != '.' && s[i] != ',') {
		return i, true
	}
	ns, j := fracDigits(s, i+1)
	if j == i+1 {
		return i, false
	}
	st.Nanosecond = ns
	return j, true
}

// fracDigits reads digits at s[i:] as a fraction of a second in nanoseconds (digits past the ninth
// are dropped: truncation, not rounding) and returns the index after the last digit.
func fracDigits(s string, i int) (ns, j int) {
	j = i
	for ; j < len(s); j++ {
		c := s[j] - '0'
		if c > 9 {
			break
		}
		if j-i < 9 {
			ns = ns*10 + int(c)
		}
	}
	if n := j - i; n < 9 {
		ns *= pow10[9-n]
	}
	return ns, j
}

var pow10 = [...]int{1, 10, 100, 1000, 10000, 100000, 1000000, 10000000, 100000000, 1000000000}

// zoneSuffix reads an optional single space then Z, ±hh[[:]mm], UTC or GMT at s[i:], setting the
// offset. It returns i unchanged when nothing zone-like is there.
func zoneSuffix(in, s string, i int, st *Stamp) (int, error) {
	j := i
	if s[j] == ' ' {
		j++
		if j == len(s) {
			return i, nil
		}
	}
	switch c := s[j]; c {
	case 'Z', 'z':
		st.HasOffset, st.Offset = true, 0
		return j + 1, nil
	case 'U', 'G':
		if j+3 <= len(s) && (s[j:j+3] == "UTC" || s[j:j+3] == "GMT") {
			st.HasOffset, st.Offset = true, 0
			return j + 3, nil
		}
		return i, nil
	case '+', '-':
		off, k, reason := offset(s, j)
		if k == j {
			return i, syntaxErr(in, "bad UTC offset "+quoteShort(s[j:])+"; expected Z, ±hh:mm, ±hhmm or ±hh (+02:00, -0530, +09)")
		}
		if reason != "" {
			return i, &Error{Input: in, Reason: reason, Err: ErrRange}
		}
		st.HasOffset, st.Offset = true, off
		return k, nil
	}
	return i, nil
}

// offset reads ±hh, ±hhmm or ±hh:mm at s[i:] (s[i] is the sign). It returns the offset in seconds and
// the index after it; the index is i when the form is wrong, and reason is non-empty when the form is
// right but hours exceed 23 or minutes 59.
func offset(s string, i int) (off, j int, reason string) {
	hh, ok := num2(s, i+1)
	if !ok {
		return 0, i, ""
	}
	j = i + 3
	mm := 0
	if j < len(s) && s[j] == ':' {
		if mm, ok = num2(s, j+1); !ok {
			return 0, i, ""
		}
		j += 3
	} else if m, ok := num2(s, j); ok {
		mm = m
		j += 2
	}
	if hh > 23 {
		return 0, j, outOfRange("UTC offset hour", hh, 0, 23)
	}
	if mm > 59 {
		return 0, j, outOfRange("UTC offset minute", mm, 0, 59)
	}
	off = hh*3600 + mm*60
	if s[i] == '-' {
		off = -off
	}
	return off, j, ""
}

// quoteShort quotes the first few bytes of s for a message.
func quoteShort(s string) string {
	if len(s) > 12 {
		s = s[:12]
	}
	b := []byte{'"'}
	for i := 0; i < len(s); i++ {
		if c := s[i]; c >= 0x20 && c < 0x7f && c != '"' && c != '\\' {
			b = append(b, c)
		} else {
			b = append(b, '\\', 'x', "0123456789abcdef"[c>>4], "0123456789abcdef"[c&15])
		}
	}
	return string(append(b, '"'))
}

// num2 reads exactly two ASCII digits at s[i:].
func num2(s string, i int) (int, bool) {
	if i < 0 || i+2 > len(s) {
		return 0, false
	}
	a, b := s[i]-'0', s[i+1]-'0'
	if a > 9 || b > 9 {
		return 0, false
	}
	return int(a)*10 + int(b), true
}

// num4 reads exactly four ASCII digits at s[i:].
func num4(s string, i int) (int, bool) {
	hi, ok1 := num2(s, i)
	lo, ok2 := num2(s, i+2)
	return hi*100 + lo, ok1 && ok2
}

// monthOf converts without a range check (validate checks the range); out-of-range values stay
// visible in messages.
func monthOf(m int) time.Month { return time.Month(m) }

// isSpace reports the bytes trimmed around values: space, tab, CR, LF.
func isSpace(c byte) bool { return c == ' ' || c == '\t' || c == '\r' || c == '\n' }

// trim removes leading and trailing spaces, tabs and line ends.
func trim(s string) string {
	for len(s) > 0 && isSpace(s[0]) {
		s = s[1:]
	}
	for len(s) > 0 && isSpace(s[len(s)-1]) {
		s = s[:len(s)-1]
	}
	return s
}
