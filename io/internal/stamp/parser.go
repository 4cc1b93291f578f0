package stamp

import "strconv"

// Options choose how text is read. The zero value reads the automatic forms.
type Options struct {
	// Layout is a strftime layout (--time-format), e.g. "%Y-%m-%d %H:%M" or "%d/%m/%Y %I:%M %p";
	// "" reads the automatic forms. See the package's layout documentation for the directives.
	Layout string
	// Epoch, when not "", reads numbers as Unix time in that unit: "s", "ms", "us" or "ns" (--epoch).
	// It excludes Layout.
	Epoch string
}

// Parser reads timestamps as its Options say. It is immutable after NewParser and safe for concurrent
// use; successful parses do not allocate.
type Parser struct {
	opts  Options
	epoch int64 // units per second, 0 when not reading epochs

	// Compiled layout parts: full (date and time of day together), date alone, clock alone. A part is
	// nil when the layout does not have it.
	full, date, clock *program
	// Why Parse / ParseDateTime cannot work with these options (nil when they can).
	fullErr, splitErr error
}

// NewParser validates the options once: an unknown strftime directive is an error naming it and
// listing the supported ones, as is a layout that cannot describe a date or a time of day, an epoch
// unit other than s, ms, us or ns, or Layout together with Epoch. Errors wrap ErrLayout.
func NewParser(o Options) (*Parser, error) {
	p := &Parser{opts: o}
	if o.Epoch != "" {
		switch o.Epoch {
		case "s":
			p.epoch = 1
		case "ms":
			p.epoch = 1e3
		case "us":
			p.epoch = 1e6
		case "ns":
			p.epoch = 1e9
		default:
			return nil, layoutErr(o.Epoch, "unknown --epoch unit; expected s, ms, us or ns")
		}
		if o.Layout != "" {
			return nil, layoutErr(o.Layout, "--time-format cannot be combined with --epoch; use one of them")
		}
		p.splitErr = layoutErr(o.Epoch, "--epoch reads one column of Unix times; it cannot be combined with --date/--time")
		return p, nil
	}
	if o.Layout == "" {
		return p, nil
	}
	ops, err := tokenize(o.Layout)
	if err != nil {
		return nil, err
	}
	dFirst, dLast, cFirst, cLast := -1, -1, -1, -1
	for i := range ops {
		if ops[i].isDate() {
			if dFirst < 0 {
				dFirst = i
			}
			dLast = i
		}
		if ops[i].isClock() {
			if cFirst < 0 {
				cFirst = i
			}
			cLast = i
		}
	}
	part := func(from, to int) (*program, error) {
		pr, err := compile(o.Layout, ops[from:to])
		return &pr, err
	}
	switch {
	case cFirst < 0: // a date alone: for --date
		if p.date, err = part(0, len(ops)); err != nil {
			return nil, err
		}
		p.fullErr = &Error{Input: o.Layout, Err: ErrLayout,
			Reason: "--time-format has no time of day; a date alone is not a timestamp: use it with --date COL --time COL, or add %H:%M"}
	case dFirst < 0: // a time of day alone: for --time
		if p.clock, err = part(0, len(ops)); err != nil {
			return nil, err
		}
		p.fullErr = &Error{Input: o.Layout, Err: ErrLayout,
			Reason: "--time-format has no date; a time of day alone is not a timestamp: use it with --date COL --time COL, or add %Y-%m-%d"}
	default:
		if p.full, err = part(0, len(ops)); err != nil {
			return nil, err
		}
		switch {
		case dLast < cFirst:
			p.date, err = part(dFirst, dLast+1)
			if err == nil {
				p.clock, err = part(cFirst, cLast+1)
			}
		case cLast < dFirst:
			p.clock, err = part(cFirst, cLast+1)
			if err == nil {
				p.date, err = part(dFirst, dLast+1)
			}
		default:
			p.splitErr = &Error{Input: o.Layout, Err: ErrLayout,
				Reason: "--time-format mixes date and time-of-day directives, so it cannot be split between --date and --time; give each column's part"}
		}
		if err != nil {
			return nil, err
		}
	}
	return p, nil
}

// Options returns the options the parser was made with.
func (p *Parser) Options() Options { return p.opts }

// CheckParse reports why Parse cannot succeed with these options (a layout without a date or without
// a time of day), or nil.
func (p *Parser) CheckParse() error { return p.fullErr }

// CheckParseDateTime reports why ParseDateTime cannot succeed with these options (Epoch set, or a layout
// that interleaves date and time-of-day directives), or nil.
func (p *Parser) CheckParseDateTime() error { return p.splitErr }

// Parse reads a full timestamp.
//
// Automatic forms (no Layout, no Epoch): RFC 3339 / ISO 8601 with Z or an offset (±hh:mm, ±hhmm,
// ±hh), with T, t or a space between date and time, optional seconds and fraction
// ("2024-06-21T18:30:00Z", "2024-06-21 18:30+02:00", "2024-06-21T18:30:00.250-0500"); ISO local
// date-times without offset ("2024-06-21 18:30", "2024-06-21T02:30:00.5"); ISO 8601 basic form with
// T ("20240621T183000Z"); and UTC or GMT after a space ("2024-06-21 18:30:00 UTC"). A date alone is
// not a timestamp (ErrDateOnly). With Layout, only the layout is read; with Epoch, only numbers.
//
// Leading and trailing spaces are ignored. Errors are *Error values wrapping ErrEmpty, ErrSyntax,
// ErrRange, ErrDateOnly, ErrZoneName or ErrLayout.
func (p *Parser) Parse(s string) (Stamp, error) {
	switch {
	case p.epoch != 0:
		return parseEpoch(s, p.epoch, p.opts.Epoch)
	case p.opts.Layout == "":
		var st Stamp
		if err := parseAuto(s, &st); err != nil {
			return Stamp{}, err
		}
		return st, nil
	case p.full == nil:
		return Stamp{}, p.fullErr
	}
	t := trim(s)
	if t == "" {
		return Stamp{}, emptyErr(s, "timestamp")
	}
	var v values
	var st Stamp
	if err := p.full.run(s, t, &v); err != nil {
		return Stamp{}, err
	}
	if err := p.full.date(s, &v, &st); err != nil {
		return Stamp{}, err
	}
	if err := p.full.clock(s, &v, &st); err != nil {
		return Stamp{}, err
	}
	return st, nil
}

// ParseDateTime reads a date and a time of day held in two columns (--date COL --time COL).
//
// Without Layout the date is ISO yyyy-mm-dd (a trailing midnight time, as spreadsheets write, is
// ignored) and the time of day is HH:MM, H:MM, HH:MM:SS(.fff), HHMM, HMM or HHMMSS, with an optional
// AM/PM marker ("7:30 PM", "0730PM", "12:05 am") or, without a marker, a UTC offset ("18:30Z"). 24:00
// is an error.
//
// With Layout, the layout is applied where it fits: a layout with only date directives ("%d/%m/%Y")
// reads the date, and the time of day is read automatically; a layout with only time-of-day directives
// ("%H%M", "%I:%M %p") reads the time of day, and the date is ISO; a layout with both
// ("%d/%m/%Y %H:%M") is split at the boundary between its date and time-of-day directives, the date
// part reading the date and the time part the time of day (literal text outside the two parts is
// not expected in either column).
func (p *Parser) ParseDateTime(date, clock string) (Stamp, error) {
	if p.splitErr != nil {
		return Stamp{}, p.splitErr
	}
	var st Stamp
	if p.date == nil && p.clock == nil && fastDateTime(date, clock, &st) {
		return st, nil
	}
	var v values
	if p.date != nil {
		t := trim(date)
		if t == "" {
			return Stamp{}, emptyErr(date, "date")
		}
		if err := p.date.run(date, t, &v); err != nil {
			return Stamp{}, err
		}
		if err := p.date.date(date, &v, &st); err != nil {
			return Stamp{}, err
		}
	} else if err := parseISODate(date, &st); err != nil {
		return Stamp{}, err
	}
	if p.clock != nil {
		t := trim(clock)
		if t == "" {
			return Stamp{}, emptyErr(clock, "time of day")
		}
		if err := p.clock.run(clock, t, &v); err != nil {
			return Stamp{}, err
		}
		if err := p.clock.clock(clock, &v, &st); err != nil {
			return Stamp{}, err
		}
	} else if err := parseClock(clock, &st); err != nil {
		return Stamp{}, err
	}
	return st, nil
}

// parseEpoch reads an integer or decimal number of Unix time units (perSec units per second).
func parseEpoch(in string, perSec int64, unit string) (Stamp, error) {
	s := trim(in)
	if s == "" {
		return Stamp{}, emptyErr(in, "Unix time")
	}
	neg := false
	i := 0
	if s[0] == '-' || s[0] == '+' {
		neg = s[0] == '-'
		i++
	}
	start := i
	var ip uint64
	overflow := false
	for ; i < len(s) && s[i]-'0' <= 9; i++ {
		d := uint64(s[i] - '0')
		if i-start >= 18 && (overflow || ip > (1<<63-1-d)/10) { // 18 digits cannot overflow
			overflow = true
			continue
		}
		ip = ip*10 + d
	}
	intDigits := i - start
	// frac is the fraction of one unit, in billionths (digits past the ninth are dropped).
	frac, nFrac := 0, 0
	if i < len(s) && s[i] == '.' {
		j := i + 1
		frac, i = fracDigits(s, j)
		nFrac = i - j
	}
	if i != len(s) || intDigits+nFrac == 0 {
		return Stamp{}, syntaxErr(in, hintNumber)
	}
	if overflow {
		return Stamp{}, epochRange(in, unit, perSec)
	}
	// ip units + frac·1e-9 units → sec, nsec.
	var sec, nsec int64
	switch v := int64(ip); perSec { // constant divisors: no hardware division
	case 1:
		sec, nsec = v, int64(frac)
	case 1e3:
		sec, nsec = v/1e3, v%1e3*1e6+int64(frac)/1e3
	case 1e6:
		sec, nsec = v/1e6, v%1e6*1e3+int64(frac)/1e6
	default:
		sec, nsec = v/1e9, v%1e9
	}
	if neg {
		sec, nsec = -sec, -nsec
		if nsec < 0 {
			nsec += 1e9
			sec--
		}
	}
	if sec < minUnix || sec > maxUnix {
		return Stamp{}, epochRange(in, unit, perSec)
	}
	return fromUnixChecked(sec, nsec), nil
}

// epochRange builds the out-of-range error, hinting at a smaller or larger unit when the number would
// fit one.
func epochRange(in, unit string, perSec int64) error {
	reason := "Unix time in " + unit + " out of range [0001-01-01T00:00:00Z, 9999-12-31T23:59:59Z]"
	for _, u := range []struct {
		name string
		per  int64
	}{{"ms", 1e3}, {"us", 1e6}, {"ns", 1e9}} {
		if u.per <= perSec {
			continue
		}
		if v, err := strconv.ParseFloat(trim(in), 64); err == nil {
			if sec := v / float64(u.per); sec >= minUnix && sec <= maxUnix && v > -(1<<63) && v < 1<<63 {
				reason += "; if the numbers are in " + u.name + ", use --epoch " + u.name
				break
			}
		}
	}
	return &Error{Input: in, Reason: reason, Err: ErrRange}
}
