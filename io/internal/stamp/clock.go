package stamp

// The automatic forms of ParseDateTime's two texts.
//
// Date: ISO yyyy-mm-dd. A midnight time after it ("2024-06-21 00:00:00", "2024-06-21T00:00", as
// spreadsheets and data-frame libraries write date columns) is accepted and ignored; any other time of
// day there is an error, since the time must come from the time-of-day column.
//
// Time of day: H:MM or HH:MM, optionally :SS and a fraction; or digits alone: HMM, HHMM (crash
// records often store 0730 or 730) or HHMMSS. An AM/PM marker may follow, with or without a space,
// in any case, with or without dots ("7:30 PM", "0730pm", "12:05 a.m."); with a marker the hour is
// 1..12 and may stand alone ("7 PM"). Without a marker a UTC offset may follow as in Parse
// ("18:30Z", "18:30:00+02:00"). 24:00 is an error. One or two digits alone are an error: "30" may be
// 00:30 stored as a number or an hour count, and the two cannot be told apart.

// parseISODate reads the date text of ParseDateTime into st.
func parseISODate(in string, st *Stamp) error {
	s := trim(in)
	if s == "" {
		return emptyErr(in, "date")
	}
	y, ok1 := num4(s, 0)
	m, ok2 := num2(s, 5)
	d, ok3 := num2(s, 8)
	if !ok1 || !ok2 || !ok3 || s[4] != '-' || s[7] != '-' {
		return syntaxErr(in, hintDate)
	}
	if len(s) > 10 {
		c := s[10]
		var t Stamp
		i, ok := 11, c == 'T' || c == 't' || c == ' '
		if ok {
			i, ok = clockExtended(s, i, &t)
		}
		if !ok || i != len(s) {
			return syntaxErr(in, hintDate)
		}
		if t.Hour != 0 || t.Minute != 0 || t.Second != 0 || t.Nanosecond != 0 {
			return syntaxErr(in, "the date holds a time of day other than midnight; --date expects a date alone (2024-06-21), or give the full timestamp with --time COL alone")
		}
	}
	if r := dateReason(y, m, d); r != "" {
		return &Error{Input: in, Reason: r, Err: ErrRange}
	}
	st.Year, st.Month, st.Day = y, monthOf(m), d
	return nil
}

// Meridiem markers.
const (
	noMeridiem = iota
	am
	pm
)

// cutMeridiem removes a trailing AM/PM marker (am, pm, a.m., p.m., any case) and the spaces before
// it.
func cutMeridiem(s string) (string, int) {
	n := len(s)
	mer, cut := noMeridiem, 0
	switch {
	case n >= 4 && s[n-1] == '.' && s[n-2]|0x20 == 'm' && s[n-3] == '.':
		mer, cut = meridiemLetter(s[n-4]), 4
	case n >= 2 && s[n-1]|0x20 == 'm':
		mer, cut = meridiemLetter(s[n-2]), 2
	}
	if mer == noMeridiem {
		return s, noMeridiem
	}
	s = s[:n-cut]
	for len(s) > 0 && (s[len(s)-1] == ' ' || s[len(s)-1] == '\t') {
		s = s[:len(s)-1]
	}
	return s, mer
}

func meridiemLetter(c byte) int {
	switch c | 0x20 {
	case 'a':
		return am
	case 'p':
		return pm
	}
	return noMeridiem
}

// parseClock reads the time-of-day text of ParseDateTime into st's clock and offset fields.
func parseClock(in string, st *Stamp) error {
	s := trim(in)
	if s == "" {
		return emptyErr(in, "time of day")
	}
	s, mer := cutMeridiem(s)
	n := 0
	for n < len(s) && s[n]-'0' <= 9 {
		n++
	}
	var i, hh, mm int
	switch {
	case n == 0:
		return syntaxErr(in, hintClock)
	case n < len(s) && s[n] == ':':
		if n > 2 {
			return syntaxErr(in, hintClock)
		}
		hh = atoi(s[:n])
		m, ok := num2(s, n+1)
		if !ok {
			return syntaxErr(in, hintClock)
		}
		mm = m
		i = n + 3
		if i < len(s) && s[i] == ':' {
			sec, ok := num2(s, i+1)
			if !ok {
				return syntaxErr(in, hintClock)
			}
			st.Second = sec
			if i, ok = fraction(s, i+3, st); !ok {
				return syntaxErr(in, hintClock)
			}
		}
	case n == 3 || n == 4:
		hh, mm = atoi(s[:n-2]), atoi(s[n-2:n])
		i = n
	case n == 6:
		hh, mm, st.Second = atoi(s[:2]), atoi(s[2:4]), atoi(s[4:6])
		var ok bool
		if i, ok = fraction(s, 6, st); !ok {
			return syntaxErr(in, hintClock)
		}
	case n <= 2 && mer != noMeridiem:
		hh = atoi(s[:n])
		i = n
	case n <= 2:
		return syntaxErr(in, "not a time of day: one or two digits alone are ambiguous; expected HH:MM, HHMM or HMM (0030 for 00:30), or an hour with AM/PM (7 PM)")
	default:
		return syntaxErr(in, hintClock)
	}
	if mer == noMeridiem && i < len(s) {
		var err error
		if i, err = zoneSuffix(in, s, i, st); err != nil {
			return err
		}
	}
	if i != len(s) {
		return syntaxErr(in, hintClock)
	}
	if mer != noMeridiem {
		if hh < 1 || hh > 12 {
			return &Error{Input: in, Reason: outOfRange("hour", hh, 1, 12) + " with AM/PM", Err: ErrRange}
		}
		hh %= 12
		if mer == pm {
			hh += 12
		}
	}
	if r := clockReason(hh, mm, st.Second); r != "" {
		return &Error{Input: in, Reason: r, Err: ErrRange}
	}
	st.Hour, st.Minute = hh, mm
	return nil
}

// atoi converts a short run of ASCII digits (checked by the caller).
func atoi(s string) int {
	v := 0
	for i := 0; i < len(s); i++ {
		v = v*10 + int(s[i]-'0')
	}
	return v
}

// fastDateTime reads the commonest pair of texts without the general path's steps: an ISO date
// (2024-06-21) and a time of day as HMM or HHMM digits, H:MM, HH:MM, H:MM:SS or HH:MM:SS, with no spaces,
// marker or offset, and every value in range. It reports false for anything else, which the general path
// then reads (or explains); on true, st holds what the general path would (FuzzFastDateTime checks it).
func fastDateTime(date, clock string, st *Stamp) bool {
	if len(date) != 10 || date[4] != '-' || date[7] != '-' {
		return false
	}
	y0, y1, y2, y3 := date[0]-'0', date[1]-'0', date[2]-'0', date[3]-'0'
	m0, m1, d0, d1 := date[5]-'0', date[6]-'0', date[8]-'0', date[9]-'0'
	if y0 > 9 || y1 > 9 || y2 > 9 || y3 > 9 || m0 > 9 || m1 > 9 || d0 > 9 || d1 > 9 {
		return false
	}
	y := int(y0)*1000 + int(y1)*100 + int(y2)*10 + int(y3)
	m := int(m0)*10 + int(m1)
	d := int(d0)*10 + int(d1)
	if y < 1 || m < 1 || m > 12 || d < 1 || d > daysIn(y, m) {
		return false
	}
	var hh, mm, ss int
	switch n := len(clock); {
	case n == 4 && clock[1] != ':' || n == 3:
		var v [4]byte
		for i := range n {
			if v[i] = clock[i] - '0'; v[i] > 9 {
				return false
			}
		}
		if n == 3 {
			hh, mm = int(v[0]), int(v[1])*10+int(v[2])
		} else {
			hh, mm = int(v[0])*10+int(v[1]), int(v[2])*10+int(v[3])
		}
	case n == 4 || n == 5 || n == 7 || n == 8:
		h := n & 1 // 1 for HH:MM and HH:MM:SS, 0 for H:MM and H:MM:SS
		if n >= 7 {
			h = 1 - n&1
		}
		// clock[:h+1] is the hour, clock[h+1] a colon, then two digits, then for seconds a colon and two.
		var v [2]byte
		for i := 0; i <= h; i++ {
			if v[i] = clock[i] - '0'; v[i] > 9 {
				return false
			}
		}
		hh = int(v[0])
		if h == 1 {
			hh = hh*10 + int(v[1])
		}
		if clock[h+1] != ':' {
			return false
		}
		a, b := clock[h+2]-'0', clock[h+3]-'0'
		if a > 9 || b > 9 {
			return false
		}
		mm = int(a)*10 + int(b)
		if n >= 7 {
			a, b := clock[h+5]-'0', clock[h+6]-'0'
			if clock[h+4] != ':' || a > 9 || b > 9 {
				return false
			}
			ss = int(a)*10 + int(b)
		}
	default:
		return false
	}
	if hh > 23 || mm > 59 || ss > 59 {
		return false
	}
	st.Year, st.Month, st.Day = y, monthOf(m), d
	st.Hour, st.Minute, st.Second = hh, mm, ss
	return true
}
