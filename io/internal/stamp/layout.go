package stamp

import (
	"strconv"
	"strings"
	"time"
)

// A strftime layout is compiled once into a program: a slice of ops run left to right over the
// text. The directives are listed in the package documentation (doc.go).

type opKind uint8

const (
	opLit      opKind = iota // match lit exactly
	opSpace                  // zero or more spaces or tabs
	opNum                    // a numeric field
	opMonth                  // %b %B
	opWeekday                // %a %A
	opMeridiem               // %p
	opOffset                 // %z
	opZone                   // %Z
)

type field uint8

const (
	fNone field = iota
	fYear
	fYear2
	fMonth
	fDay
	fYday
	fHour
	fHour12
	fMinute
	fSecond
	fFrac
	fMonthName
	fWeekday
	fMeridiem
	fOffset
	fZone
	nFields
)

// op is one step of a compiled layout.
type op struct {
	kind     opKind
	field    field
	min, max int    // digits of a numeric field (max 0: unbounded, %f)
	tail     int    // digits the following adjacent numeric fields take (first field of a run)
	fixed    bool   // a later field of a digit run: exactly max digits
	spaces   bool   // %e: leading spaces allowed
	lit      string // opLit text; for other ops the directive, e.g. "%Y"
	desc     string // what the op expects, for messages
}

// isDate reports whether the op's field belongs to the date part of a layout.
func (o *op) isDate() bool {
	switch o.field {
	case fYear, fYear2, fMonth, fDay, fYday, fMonthName, fWeekday:
		return true
	}
	return false
}

// isClock reports whether the op's field belongs to the time-of-day part (the offset and zone count
// as time of day).
func (o *op) isClock() bool {
	switch o.field {
	case fHour, fHour12, fMinute, fSecond, fFrac, fMeridiem, fOffset, fZone:
		return true
	}
	return false
}

// program is a compiled layout or a part of one.
type program struct {
	ops    []op
	has    [nFields]bool
	layout string // the whole layout, for messages
}

const supported = "%Y %y %m %d %e %j %b %B %a %A %H %I %M %S %f %p %z %Z %T %R %F %D %n %t %%"

func numOp(dir string, f field, min, max int, desc string) op {
	return op{kind: opNum, field: f, min: min, max: max, lit: dir, desc: dir + " (" + desc + ")"}
}

// directive returns the ops of one directive letter (several for %T %R %F %D).
func directive(c byte) ([]op, bool) {
	colon := op{kind: opLit, lit: ":", desc: `":"`}
	switch c {
	case 'Y':
		return []op{numOp("%Y", fYear, 4, 4, "4-digit year")}, true
	case 'y':
		return []op{numOp("%y", fYear2, 2, 2, "2-digit year")}, true
	case 'm':
		return []op{numOp("%m", fMonth, 1, 2, "month 1-12")}, true
	case 'd':
		return []op{numOp("%d", fDay, 1, 2, "day 1-31")}, true
	case 'e':
		o := numOp("%e", fDay, 1, 2, "day 1-31")
		o.spaces = true
		return []op{o}, true
	case 'j':
		return []op{numOp("%j", fYday, 1, 3, "day of year 1-366")}, true
	case 'H':
		return []op{numOp("%H", fHour, 1, 2, "hour 0-23")}, true
	case 'I':
		return []op{numOp("%I", fHour12, 1, 2, "hour 1-12")}, true
	case 'M':
		return []op{numOp("%M", fMinute, 1, 2, "minute 0-59")}, true
	case 'S':
		return []op{numOp("%S", fSecond, 1, 2, "second 0-59")}, true
	case 'f':
		return []op{numOp("%f", fFrac, 1, 0, "fraction of a second")}, true
	case 'b', 'B':
		return []op{{kind: opMonth, field: fMonthName, lit: "%" + string(c), desc: "%" + string(c) + " (month name, e.g. Jun or June)"}}, true
	case 'a', 'A':
		return []op{{kind: opWeekday, field: fWeekday, lit: "%" + string(c), desc: "%" + string(c) + " (weekday name, e.g. Fri or Friday)"}}, true
	case 'p':
		return []op{{kind: opMeridiem, field: fMeridiem, lit: "%p", desc: "%p (AM or PM)"}}, true
	case 'z':
		return []op{{kind: opOffset, field: fOffset, lit: "%z", desc: "%z (UTC offset: Z, +hh:mm, +hhmm or +hh)"}}, true
	case 'Z':
		return []op{{kind: opZone, field: fZone, lit: "%Z", desc: "%Z (UTC or GMT)"}}, true
	case 'T':
		h, _ := directive('H')
		m, _ := directive('M')
		s, _ := directive('S')
		return []op{h[0], colon, m[0], colon, s[0]}, true
	case 'R':
		h, _ := directive('H')
		m, _ := directive('M')
		return []op{h[0], colon, m[0]}, true
	case 'F':
		y, _ := directive('Y')
		m, _ := directive('m')
		d, _ := directive('d')
		dash := op{kind: opLit, lit: "-", desc: `"-"`}
		return []op{y[0], dash, m[0], dash, d[0]}, true
	case 'D':
		m, _ := directive('m')
		d, _ := directive('d')
		y, _ := directive('y')
		slash := op{kind: opLit, lit: "/", desc: `"/"`}
		return []op{m[0], slash, d[0], slash, y[0]}, true
	case 'n', 't':
		return []op{{kind: opSpace, desc: "spaces"}}, true
	case '%':
		return []op{{kind: opLit, lit: "%", desc: `"%"`}}, true
	}
	return nil, false
}

func layoutErr(layout, reason string) error {
	return &Error{Input: layout, Reason: reason, Err: ErrLayout}
}

// tokenize turns a layout into ops and checks that it can describe a date, a time of day or both.
func tokenize(layout string) ([]op, error) {
	if layout == "" {
		return nil, layoutErr(layout, "empty --time-format")
	}
	var ops []op
	for i := 0; i < len(layout); {
		c := layout[i]
		switch {
		case c == '%':
			if i+1 == len(layout) {
				return nil, layoutErr(layout, "--time-format ends with a lone %; write %% for a literal %. Supported: "+supported)
			}
			d, ok := directive(layout[i+1])
			if !ok {
				return nil, layoutErr(layout, "unknown directive %"+quoteDirective(layout[i+1:])+" in --time-format; supported: "+supported)
			}
			ops = append(ops, d...)
			i += 2
		case c == ' ' || c == '\t' || c == '\n' || c == '\r':
			ops = append(ops, op{kind: opSpace, desc: "spaces"})
			i++
		default:
			j := i
			for j < len(layout) && layout[j] != '%' && !isSpace(layout[j]) {
				j++
			}
			ops = append(ops, op{kind: opLit, lit: layout[i:j], desc: strconv.Quote(layout[i:j])})
			i = j
		}
	}
	// Merge adjacent literals (from %% and %T's colons) and adjacent spaces.
	out := ops[:0]
	for _, o := range ops {
		if n := len(out); n > 0 && o.kind == out[n-1].kind && (o.kind == opSpace || o.kind == opLit) {
			if o.kind == opLit {
				out[n-1].lit += o.lit
				out[n-1].desc = strconv.Quote(out[n-1].lit)
			}
			continue
		}
		out = append(out, o)
	}
	ops = out
	if err := checkFields(layout, ops); err != nil {
		return nil, err
	}
	return ops, nil
}

// quoteDirective returns the directive letter (a whole UTF-8 character) after a %.
func quoteDirective(s string) string {
	for i, r := range s {
		if i == 0 {
			return string(r)
		}
	}
	return s
}

// checkFields rejects layouts that repeat a field, combine fields that exclude each other, or leave a
// date or a time of day incomplete.
func checkFields(layout string, ops []op) error {
	var seen [nFields]string
	for _, o := range ops {
		if o.field == fNone {
			continue
		}
		if seen[o.field] != "" {
			return layoutErr(layout, "--time-format has "+o.lit+" twice")
		}
		seen[o.field] = o.lit
	}
	has := func(fs ...field) string {
		for _, f := range fs {
			if seen[f] != "" {
				return seen[f]
			}
		}
		return ""
	}
	pairs := [][2][]field{
		{{fYear}, {fYear2}},
		{{fMonth}, {fMonthName}},
		{{fYday}, {fMonth, fMonthName, fDay}},
		{{fHour}, {fHour12}},
		{{fHour}, {fMeridiem}},
		{{fOffset}, {fZone}},
	}
	for _, p := range pairs {
		if a, b := has(p[0]...), has(p[1]...); a != "" && b != "" {
			return layoutErr(layout, "--time-format has both "+a+" and "+b+"; use one of them")
		}
	}
	date := has(fYear, fYear2, fMonth, fMonthName, fDay, fYday, fWeekday)
	clock := has(fHour, fHour12, fMinute, fSecond, fFrac, fMeridiem, fOffset, fZone)
	switch {
	case date == "" && clock == "":
		return layoutErr(layout, "--time-format has no date or time-of-day directives; supported: "+supported)
	case date != "" && has(fYear, fYear2) == "":
		return layoutErr(layout, "--time-format has a date without a year; add %Y or %y")
	case date != "" && has(fYday) == "" && (has(fMonth, fMonthName) == "" || has(fDay) == ""):
		return layoutErr(layout, "--time-format has an incomplete date; a date needs %Y (or %y) with %m (or %b) and %d, or %j")
	case clock != "" && has(fHour, fHour12) == "":
		return layoutErr(layout, "--time-format has "+clock+" without an hour; add %H, or %I with %p")
	case seen[fHour12] != "" && seen[fMeridiem] == "":
		return layoutErr(layout, "--time-format has %I without %p; 12-hour clocks need AM/PM, or use %H")
	case seen[fSecond] != "" && seen[fMinute] == "":
		return layoutErr(layout, "--time-format has %S without %M")
	case seen[fFrac] != "" && seen[fSecond] == "":
		return layoutErr(layout, "--time-format has %f without %S; a fraction follows the seconds, as in %S.%f")
	}
	return nil
}

// compile builds a program from a run of ops: it marks digit runs (numeric fields with nothing
// between them) so that all but the first field of a run read their full width.
func compile(layout string, src []op) (program, error) {
	ops := make([]op, len(src))
	copy(ops, src)
	p := program{ops: ops, layout: layout}
	for i := range ops {
		if ops[i].field != fNone {
			p.has[ops[i].field] = true
		}
	}
	for i := 0; i < len(ops); {
		if ops[i].kind != opNum {
			i++
			continue
		}
		j := i + 1
		for j < len(ops) && ops[j].kind == opNum {
			j++
		}
		if j-i > 1 {
			tail := 0
			for k := i; k < j; k++ {
				if ops[k].field == fFrac {
					return program{}, layoutErr(layout, "--time-format has %f next to another number directive; separate them, as in %S.%f")
				}
				if k > i {
					ops[k].fixed = true
					tail += ops[k].max
				}
			}
			ops[i].tail = tail
		}
		i = j
	}
	return p, nil
}

// values collects what a program read.
type values struct {
	year, year2, month, day, yday int
	hour, minute, second, ns      int
	meridiem, weekday             int // meridiem: am/pm; weekday: 1+time.Weekday
	hasOffset                     bool
	offset                        int
}

// mismatch reports text that does not fit the layout.
func (p *program) mismatch(in, s string, i int, o *op) error {
	found := "end of text"
	if i < len(s) {
		found = quoteShort(s[i:])
	}
	return syntaxErr(in, "does not match --time-format "+strconv.Quote(p.layout)+": expected "+o.desc+
		" at byte "+strconv.Itoa(i+1)+", found "+found)
}

// run executes the program over s (already trimmed; in is the original text for messages).
func (p *program) run(in, s string, v *values) error {
	i := 0
	for k := range p.ops {
		o := &p.ops[k]
		switch o.kind {
		case opLit:
			if !strings.HasPrefix(s[i:], o.lit) {
				return p.mismatch(in, s, i, o)
			}
			i += len(o.lit)
		case opSpace:
			for i < len(s) && (s[i] == ' ' || s[i] == '\t') {
				i++
			}
		case opNum:
			if o.spaces {
				for i < len(s) && s[i] == ' ' {
					i++
				}
			}
			limit := o.max + o.tail
			if o.max == 0 {
				limit = len(s)
			}
			n := 0
			for i+n < len(s) && n < limit && s[i+n]-'0' <= 9 {
				n++
			}
			w := n
			switch {
			case o.fixed:
				if n < o.max {
					return p.mismatch(in, s, i, o)
				}
				w = o.max
			case o.max > 0:
				w = n - o.tail
				if w > o.max {
					w = o.max
				}
			}
			if w < o.min {
				return p.mismatch(in, s, i, o)
			}
			if o.field == fFrac {
				v.ns, _ = fracDigits(s[:i+w], i)
			} else {
				x := atoi(s[i : i+w])
				switch o.field {
				case fYear:
					v.year = x
				case fYear2:
					v.year2 = x
				case fMonth:
					v.month = x
				case fDay:
					v.day = x
				case fYday:
					v.yday = x
				case fHour, fHour12:
					v.hour = x
				case fMinute:
					v.minute = x
				case fSecond:
					v.second = x
				}
			}
			i += w
		case opMonth:
			m, n := matchName(s[i:], monthNames[:])
			if n == 0 {
				return p.mismatch(in, s, i, o)
			}
			v.month = m%12 + 1
			i += n
		case opWeekday:
			d, n := matchName(s[i:], weekdayNames[:])
			if n == 0 {
				return p.mismatch(in, s, i, o)
			}
			v.weekday = d%7 + 1
			i += n
		case opMeridiem:
			mer, n := matchMeridiem(s[i:])
			if n == 0 {
				return p.mismatch(in, s, i, o)
			}
			v.meridiem = mer
			i += n
		case opOffset:
			if i < len(s) && (s[i] == 'Z' || s[i] == 'z') {
				v.hasOffset, v.offset = true, 0
				i++
				break
			}
			if i >= len(s) || (s[i] != '+' && s[i] != '-') {
				return p.mismatch(in, s, i, o)
			}
			off, j, reason := offset(s, i)
			if j == i {
				return p.mismatch(in, s, i, o)
			}
			if reason != "" {
				return &Error{Input: in, Reason: reason, Err: ErrRange}
			}
			v.hasOffset, v.offset = true, off
			i = j
		case opZone:
			j := i
			for j < len(s) && (s[j]|0x20 >= 'a' && s[j]|0x20 <= 'z') {
				j++
			}
			switch w := s[i:j]; {
			case w == "":
				return p.mismatch(in, s, i, o)
			case len(w) == 3 && (equalFold(w, "utc") || equalFold(w, "gmt")):
				v.hasOffset, v.offset = true, 0
			default:
				return &Error{Input: in, Err: ErrZoneName, Reason: "zone abbreviation " + strconv.Quote(s[i:j]) +
					" is not accepted: %Z reads only UTC or GMT (abbreviations such as CST are ambiguous); give offsets with %z, or the zone with --tz"}
			}
			i = j
		}
	}
	if i != len(s) {
		return syntaxErr(in, "unexpected "+quoteShort(s[i:])+" after the end of --time-format "+strconv.Quote(p.layout))
	}
	return nil
}

// date turns the date fields a program read into st's date, checking ranges and the weekday.
func (p *program) date(in string, v *values, st *Stamp) error {
	y := v.year
	if p.has[fYear2] {
		y = 1900 + v.year2
		if v.year2 < 69 {
			y += 100
		}
	}
	m, d := v.month, v.day
	if p.has[fYday] {
		n := 365
		if isLeap(y) {
			n = 366
		}
		if v.yday < 1 || v.yday > n {
			return &Error{Input: in, Err: ErrRange, Reason: outOfRange("day of year", v.yday, 1, n) + " for " + strconv.Itoa(y)}
		}
		m, d = 1, v.yday
		for d > daysIn(y, m) {
			d -= daysIn(y, m)
			m++
		}
	}
	if r := dateReason(y, m, d); r != "" {
		return &Error{Input: in, Reason: r, Err: ErrRange}
	}
	if p.has[fWeekday] {
		want := time.Weekday((daysFromCivil(y, m, d)%7 + 11) % 7) // 1970-01-01 was a Thursday
		if got := time.Weekday(v.weekday - 1); got != want {
			return &Error{Input: in, Err: ErrRange, Reason: "weekday " + got.String() + " does not match the date, a " + want.String()}
		}
	}
	st.Year, st.Month, st.Day = y, time.Month(m), d
	return nil
}

// clock turns the time-of-day fields a program read into st's clock and offset.
func (p *program) clock(in string, v *values, st *Stamp) error {
	hh := v.hour
	if p.has[fHour12] {
		if hh < 1 || hh > 12 {
			return &Error{Input: in, Reason: outOfRange("hour", hh, 1, 12) + " for %I", Err: ErrRange}
		}
		hh %= 12
		if v.meridiem == pm {
			hh += 12
		}
	}
	if r := clockReason(hh, v.minute, v.second); r != "" {
		return &Error{Input: in, Reason: r, Err: ErrRange}
	}
	st.Hour, st.Minute, st.Second, st.Nanosecond = hh, v.minute, v.second, v.ns
	st.HasOffset, st.Offset = v.hasOffset, v.offset
	return nil
}

var monthNames = [...]string{
	"january", "february", "march", "april", "may", "june", "july", "august", "september", "october", "november", "december",
	"jan", "feb", "mar", "apr", "may", "jun", "jul", "aug", "sept", "oct", "nov", "dec",
	"jan", "feb", "mar", "apr", "may", "jun", "jul", "aug", "sep", "oct", "nov", "dec",
}

var weekdayNames = [...]string{
	"sunday", "monday", "tuesday", "wednesday", "thursday", "friday", "saturday",
	"sun", "mon", "tue", "wed", "thu", "fri", "sat",
}

// matchName returns the index of the first name (lower case) that s starts with, in any case, and
// its length; n is 0 when none matches.
func matchName(s string, names []string) (idx, n int) {
	for k, name := range names {
		if len(s) >= len(name) && equalFold(s[:len(name)], name) {
			return k, len(name)
		}
	}
	return 0, 0
}

// equalFold compares ASCII s with lower-case ASCII letters t, ignoring case.
func equalFold(s, t string) bool {
	for i := 0; i < len(t); i++ {
		c := s[i]
		if 'A' <= c && c <= 'Z' {
			c += 'a' - 'A'
		}
		if c != t[i] {
			return false
		}
	}
	return true
}

// matchMeridiem reads AM, PM, A.M. or P.M. in any case.
func matchMeridiem(s string) (mer, n int) {
	if len(s) >= 4 && s[1] == '.' && s[2]|0x20 == 'm' && s[3] == '.' {
		if m := meridiemLetter(s[0]); m != noMeridiem {
			return m, 4
		}
	}
	if len(s) >= 2 && s[1]|0x20 == 'm' {
		if m := meridiemLetter(s[0]); m != noMeridiem {
			return m, 2
		}
	}
	return noMeridiem, 0
}
