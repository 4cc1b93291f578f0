package stamp

import (
	"errors"
	"strconv"
	"testing"
)

// Seed corpora live in testdata/fuzz/<FuzzName>/; `go test` runs them, `go test -fuzz=FuzzName`
// explores further.

// sentinel reports whether err wraps one of the package's causes through *Error.
func sentinel(err error) bool {
	var e *Error
	if !errors.As(err, &e) {
		return false
	}
	for _, s := range []error{ErrEmpty, ErrSyntax, ErrRange, ErrDateOnly, ErrZoneName, ErrLayout} {
		if errors.Is(err, s) {
			return true
		}
	}
	return false
}

// FuzzParse: the automatic forms never panic; a success passes Check and its String form reads back
// as the same stamp.
func FuzzParse(f *testing.F) {
	p, _ := NewParser(Options{})
	f.Fuzz(func(t *testing.T, s string) {
		st, err := p.Parse(s)
		if err != nil {
			if !sentinel(err) {
				t.Fatalf("Parse(%q): error %v without a sentinel cause", s, err)
			}
			return
		}
		if err := st.Check(); err != nil {
			t.Fatalf("Parse(%q) = %+v fails Check: %v", s, st, err)
		}
		again, err := p.Parse(st.String())
		if err != nil || again != st {
			t.Fatalf("round trip of %q: %q read back as %+v, %v; want %+v", s, st.String(), again, err, st)
		}
	})
}

// FuzzLayout: any layout either fails NewParser with ErrLayout or gives a parser whose Parse and
// ParseDateTime never panic and return checked stamps or sentinel errors.
func FuzzLayout(f *testing.F) {
	f.Fuzz(func(t *testing.T, layout, s string) {
		p, err := NewParser(Options{Layout: layout})
		if err != nil {
			if !errors.Is(err, ErrLayout) {
				t.Fatalf("NewParser(%q): %v, want ErrLayout", layout, err)
			}
			return
		}
		st, err := p.Parse(s)
		if err == nil {
			if err := st.Check(); err != nil {
				t.Fatalf("layout %q: Parse(%q) = %+v fails Check: %v", layout, s, st, err)
			}
		} else if !sentinel(err) {
			t.Fatalf("layout %q: Parse(%q): error %v without a sentinel cause", layout, s, err)
		}
		// The same text split at its first space feeds ParseDateTime.
		date, clock := s, s
		for i := 0; i < len(s); i++ {
			if s[i] == ' ' {
				date, clock = s[:i], s[i+1:]
				break
			}
		}
		st, err = p.ParseDateTime(date, clock)
		if err == nil {
			if err := st.Check(); err != nil {
				t.Fatalf("layout %q: ParseDateTime(%q, %q) = %+v fails Check: %v", layout, date, clock, st, err)
			}
		} else if !sentinel(err) {
			t.Fatalf("layout %q: ParseDateTime(%q, %q): error %v without a sentinel cause", layout, date, clock, err)
		}
	})
}

// FuzzParseDateTime: the automatic date and time-of-day forms never panic; a success passes Check
// and its clock written as HH:MM:SS.fffffffff reads back the same.
func FuzzParseDateTime(f *testing.F) {
	p, _ := NewParser(Options{})
	f.Fuzz(func(t *testing.T, date, clock string) {
		st, err := p.ParseDateTime(date, clock)
		if err != nil {
			if !sentinel(err) {
				t.Fatalf("ParseDateTime(%q, %q): error %v without a sentinel cause", date, clock, err)
			}
			return
		}
		if err := st.Check(); err != nil {
			t.Fatalf("ParseDateTime(%q, %q) = %+v fails Check: %v", date, clock, st, err)
		}
		text := st.String() // yyyy-mm-ddThh:mm:ss[.f][offset]
		again, err := p.ParseDateTime(text[:10], text[11:])
		if err != nil || again != st {
			t.Fatalf("round trip of (%q, %q): %q read back as %+v, %v; want %+v", date, clock, text, again, err, st)
		}
	})
}

// FuzzEpoch: numbers never panic in any unit; a success passes Check, and in seconds it agrees with
// the integer and fraction written back.
func FuzzEpoch(f *testing.F) {
	units := []string{"s", "ms", "us", "ns"}
	parsers := make([]*Parser, len(units))
	for i, u := range units {
		parsers[i], _ = NewParser(Options{Epoch: u})
	}
	f.Fuzz(func(t *testing.T, unit uint8, s string) {
		p := parsers[int(unit)%len(units)]
		st, err := p.Parse(s)
		if err != nil {
			if !sentinel(err) {
				t.Fatalf("Parse(%q): error %v without a sentinel cause", s, err)
			}
			return
		}
		if err := st.Check(); err != nil || !st.HasOffset || st.Offset != 0 {
			t.Fatalf("Parse(%q) = %+v: %v", s, st, err)
		}
		inst, _ := st.Instant()
		sec, ns := inst.Unix(), int64(inst.Nanosecond())
		sign := ""
		if sec < 0 && ns > 0 { // -2 s + 0.5 s is written -1.5
			sign, sec, ns = "-", -(sec + 1), 1e9-ns
		}
		back := sign + strconv.FormatInt(sec, 10) + "." + strconv.FormatInt(1e9+ns, 10)[1:]
		again, err := parsers[0].Parse(back)
		if err != nil || again != st {
			t.Fatalf("%q (%s) written as %q reads back as %+v, %v; want %+v", s, units[int(unit)%len(units)], back, again, err, st)
		}
	})
}

// FuzzFastDateTime: whenever the fast path of ParseDateTime takes a date and time-of-day pair, the general
// path reads the same stamp from it without error.
func FuzzFastDateTime(f *testing.F) {
	for _, c := range [][2]string{
		{"2024-06-21", "0730"}, {"2024-06-21", "730"}, {"2024-02-29", "7:30"}, {"2023-02-29", "07:30"},
		{"2024-12-31", "23:59:59"}, {"0001-01-01", "0:00:00"}, {"0000-01-01", "0000"}, {"2024-06-21", "24:00"},
		{"2024-06-21", "7:30 PM"}, {"2024-06-21", "0730Z"}, {"2024-06-21", "07:60"}, {"2024-13-01", "1200"},
		{"2024-06-21", "7:3"}, {"2024-06-21", "07:30:60"}, {"2024/06/21", "1200"}, {"2024-06-21", "12:30+02"},
	} {
		f.Add(c[0], c[1])
	}
	f.Fuzz(func(t *testing.T, date, clock string) {
		var fast Stamp
		if !fastDateTime(date, clock, &fast) {
			return
		}
		var want Stamp
		if err := parseISODate(date, &want); err != nil {
			t.Fatalf("fast path took %q %q, general path: %v", date, clock, err)
		}
		if err := parseClock(clock, &want); err != nil {
			t.Fatalf("fast path took %q %q, general path: %v", date, clock, err)
		}
		if fast != want {
			t.Fatalf("%q %q: fast path %+v, general path %+v", date, clock, fast, want)
		}
	})
}
