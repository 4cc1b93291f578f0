// Package zone turns timestamps as written (stamp.Stamp) into UTC instants, and names the zone that
// decides each row's local calendar date: a fixed zone (--tz NAME), a zone per row (--tz-column COL)
// or the zone at the row's coordinates (--tz auto).
//
// Local times are resolved exactly with the zone's real rules: a wall clock inside a spring-forward
// gap is an error (ErrNonexistent), and one inside a fall-back overlap takes the earlier of its two
// instants with the note NoteAmbiguous.
//
// The package imports time/tzdata, so the binary carries the IANA time zone database and works on a
// machine without one; where the system has its own (/usr/share/zoneinfo), the time package prefers
// that, so results for rule changes newer than either database may differ between machines.
//
// Each zone's rules are turned once into a table of wall-clock ranges (unique, gap, overlap) up to
// the year 2100, so resolving a local time is an O(1) bucket lookup; later times are resolved by a
// direct search of the rules.
//
// --tz auto uses the time zone boundaries bundled with github.com/ringsaturn/tzf (tzf-rel-lite,
// simplified boundaries that include the oceans; data under the ODbL). The finder is built once per
// process, on first use (about 3 s and 30 MB of heap), and shared by every Resolver. Its answer is
// exactly that of tzf's DefaultFinder; lookups are cached by grid cell (1/64°, where the cell lies
// wholly inside one of tzf's single-zone tiles), by map tile, and by exact coordinates. Open ocean
// resolves to the nautical zones Etc/GMT±N (POSIX sign: Etc/GMT+10 is UTC−10), each 15° wide, so
// the date there follows nautical time; the North Pole resolves to Etc/GMT and the South Pole to
// Antarctica/McMurdo in the bundled data (2025b).
package zone

import (
	"errors"
	"math"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"time"
	_ "time/tzdata" // the zone database travels with the binary

	"github.com/heliotag/heliotag/io/internal/stamp"
)

// Causes, matched with errors.Is.
var (
	// ErrNoTimeZone: a time without a UTC offset and no zone to read it in (Mode None: no --tz,
	// --tz-column or --tz auto). It is a problem of the options rather than of one row.
	ErrNoTimeZone = errors.New("zone: no time zone for a local time")
	// ErrNonexistent: a local time inside a spring-forward gap, which never happened on the clocks of
	// that zone.
	ErrNonexistent = errors.New("zone: local time does not exist in its zone")
	// ErrUnknownZone: a name that is not an IANA time zone name, including an empty --tz-column value.
	ErrUnknownZone = errors.New("zone: unknown time zone name")
	// ErrNoZoneFound: --tz auto found no zone at the coordinates (they are out of range or NaN, or
	// the boundary data has no zone there).
	ErrNoZoneFound = errors.New("zone: no time zone at the coordinates")
	// ErrOptions: Options that cannot be used (an unknown Mode, a Name with a mode that takes none).
	ErrOptions = errors.New("zone: invalid time zone options")
)

// NoteAmbiguous is the note Resolve returns for a local time in a fall-back overlap, which happened
// twice; the earlier instant is used.
const NoteAmbiguous = "ambiguous_local_time"

// zoneError is an error with its own message and a sentinel cause.
type zoneError struct {
	msg string
	err error
}

func (e *zoneError) Error() string { return e.msg }
func (e *zoneError) Unwrap() error { return e.err }

const example = `"America/Chicago"`

// Load returns the time zone with an IANA name ("America/Chicago", "Europe/London") or "UTC".
// Surrounding spaces are ignored. An unknown name is an ErrUnknownZone error that suggests the
// right spelling when only the letter case is wrong, and the IANA form otherwise. "Local" (this
// machine's zone, which differs between machines) is refused.
func Load(name string) (*time.Location, error) {
	n := strings.TrimSpace(name)
	switch {
	case n == "":
		return nil, &zoneError{"empty time zone name; expected an IANA name such as " + example + ", or UTC", ErrUnknownZone}
	case n == "Local":
		return nil, &zoneError{`time zone "Local" (this machine's zone) is not accepted, since it differs between machines; give an IANA name such as ` + example, ErrUnknownZone}
	}
	loc, err := time.LoadLocation(n)
	if err == nil {
		return loc, nil
	}
	msg := "unknown time zone " + quoteName(n)
	if s := suggest(n); s != "" {
		msg += `; did you mean "` + s + `"?`
	} else {
		msg += "; expected an IANA name such as " + example + ", or UTC"
		if len(n) <= 5 && strings.ToUpper(n) == n && !strings.Contains(n, "/") {
			msg += " (abbreviations such as CST are ambiguous)"
		}
	}
	return nil, &zoneError{msg, ErrUnknownZone}
}

// maxNameLen bounds the zone names remembered and repeated in messages (IANA names are far shorter).
const maxNameLen = 64

// quoteName quotes a name for a message, cut to maxNameLen bytes.
func quoteName(n string) string {
	if len(n) > maxNameLen {
		return strconv.Quote(n[:maxNameLen]) + "..."
	}
	return strconv.Quote(n)
}

// suggest returns a loadable spelling of name that differs only in letter case, or "".
func suggest(name string) string {
	if len(name) > maxNameLen || strings.ContainsAny(name, " .\\") {
		return ""
	}
	upper := strings.ToUpper(name)
	// Title case per word: America/New_York, America/Port_Of_Spain, Etc/GMT+5.
	b := []byte(strings.ToLower(name))
	for i := range b {
		if i == 0 || b[i-1] == '/' || b[i-1] == '_' || b[i-1] == '-' {
			if 'a' <= b[i] && b[i] <= 'z' {
				b[i] -= 'a' - 'A'
			}
		}
	}
	title := string(b)
	for _, c := range []string{upper, title, strings.Replace(title, "Gmt", "GMT", 1), strings.Replace(title, "Utc", "UTC", 1)} {
		if c != name {
			if _, err := time.LoadLocation(c); err == nil {
				return c
			}
		}
	}
	return ""
}

// Mode says where the zone of a row comes from.
type Mode int

const (
	// None: no zone; only times with a UTC offset can be resolved.
	None Mode = iota
	// Fixed: one zone for every row (--tz NAME), Options.Name.
	Fixed
	// Column: each row names its zone (--tz-column COL).
	Column
	// Auto: the zone at each row's coordinates (--tz auto), from bundled time zone boundaries.
	Auto
)

func (m Mode) String() string {
	switch m {
	case None:
		return "none"
	case Fixed:
		return "fixed"
	case Column:
		return "column"
	case Auto:
		return "auto"
	}
	return "Mode(" + strconv.Itoa(int(m)) + ")"
}

// Options choose the zone source. The zero value is Mode None.
type Options struct {
	Mode Mode
	// Name is the zone for Mode Fixed (an IANA name or UTC).
	Name string
}

// OptionsFromFlag maps the value of --tz to Options: "" is None, "auto" (any case) is Auto, anything
// else is Fixed with that name. (--tz-column is Options{Mode: Column}.)
func OptionsFromFlag(tz string) Options {
	switch {
	case tz == "":
		return Options{}
	case strings.EqualFold(tz, "auto"):
		return Options{Mode: Auto}
	}
	return Options{Mode: Fixed, Name: tz}
}

// zoneInfo is a loaded zone with its wall-clock table.
type zoneInfo struct {
	name string
	loc  *time.Location
	tab  *table
	id   uint16 // Auto: the zone's number in Resolver.byID (0: none), so caches can hold it in a word
}

func newZoneInfo(name string, loc *time.Location) *zoneInfo {
	return &zoneInfo{name: name, loc: loc, tab: buildTable(loc)}
}

// nameEntry caches the outcome of loading a --tz-column value.
type nameEntry struct {
	zi  *zoneInfo
	err error
}

// maxBadNames bounds how many distinct unknown names are remembered (a column of garbage must not
// grow memory without bound); further unknown names are looked up again each time.
const maxBadNames = 1024

// Offsets of Mode None's fixed zones are cached per minute within ±24 h.
const maxOffsetMinutes = 24 * 60

// Resolver resolves stamps in one zone mode. It is safe for concurrent use by any number of
// goroutines (share one across workers): its caches are internally synchronised, read without locks
// and written only on a miss, and a successful Resolve does not allocate once the row's zone (and, for
// Auto, the row's coordinates or map cell) has been seen.
type Resolver struct {
	mode  Mode
	fixed *zoneInfo

	// Column and Auto zone names → *nameEntry: a copy-on-write map, read without locks.
	names   atomic.Pointer[map[string]*nameEntry]
	namesMu sync.Mutex
	bad     int

	auto *autoCache                  // Auto only
	byID atomic.Pointer[[]*zoneInfo] // Auto: zones by id (index 0 unused), copy-on-write

	offsets [2*maxOffsetMinutes + 1]atomic.Pointer[time.Location] // None: fixed zones by offset minute
}

// NewResolver validates the options: a Fixed zone name is loaded now, so an unknown name fails before
// any row is read. The --tz auto boundary data is not loaded until the first row needs it (it takes a
// few seconds and some 30 MB); call Prepare to load it up front.
func NewResolver(o Options) (*Resolver, error) {
	r := &Resolver{mode: o.Mode}
	m := map[string]*nameEntry{}
	r.names.Store(&m)
	switch o.Mode {
	case None, Column, Auto:
		if o.Name != "" {
			return nil, &zoneError{"a time zone name (" + strconv.Quote(o.Name) + ") is only used with a fixed zone (--tz NAME)", ErrOptions}
		}
		if o.Mode == Auto {
			r.auto = newAutoCache()
			ids := []*zoneInfo{nil}
			r.byID.Store(&ids)
		}
	case Fixed:
		loc, err := Load(o.Name)
		if err != nil {
			return nil, err
		}
		r.fixed = newZoneInfo(loc.String(), loc)
	default:
		return nil, &zoneError{"unknown time zone mode " + o.Mode.String(), ErrOptions}
	}
	return r, nil
}

// Mode returns the resolver's mode.
func (r *Resolver) Mode() Mode { return r.mode }

// Prepare loads what the mode needs before the first row: for Auto, the time zone boundary finder
// (built once per process and shared). It is optional; Resolve loads it on first use.
func (r *Resolver) Prepare() error {
	if r.mode == Auto {
		_, err := sharedFinder()
		return err
	}
	return nil
}

// Resolve turns a stamp into a UTC instant and the row's date zone.
//
// rowZone is the row's --tz-column value (ignored unless the mode is Column); lat and lon, in degrees,
// are used only by Auto.
//
// The instant of a stamp with an offset comes from the offset, in every mode. A stamp without one is
// read in the mode's zone: inside a spring-forward gap it is an ErrNonexistent error, inside a
// fall-back overlap it takes the earlier instant and note is NoteAmbiguous; in Mode None it is an
// ErrNoTimeZone error.
//
// dateZone is the zone that decides the row's local calendar date: the Fixed, Column or Auto zone
// when a mode is set (also for stamps with an offset); in Mode None, a fixed zone at the stamp's
// offset when that is not zero (cached: one *time.Location per offset), and nil for offset 0 (the
// caller then uses mean solar time).
//
// The stamp is expected to pass stamp.Stamp.Check (any stamp from a stamp.Parser does).
func (r *Resolver) Resolve(s stamp.Stamp, rowZone string, lat, lon float64) (instant time.Time, dateZone *time.Location, note string, err error) {
	var zi *zoneInfo
	switch r.mode {
	case None:
		if !s.HasOffset {
			return time.Time{}, nil, "", &zoneError{localText(s) + " has no UTC offset and no time zone was given: use --tz ZONE (e.g. --tz America/Chicago), --tz-column COL or --tz auto", ErrNoTimeZone}
		}
		inst := fromOffset(s)
		if s.Offset == 0 {
			return inst, nil, "", nil
		}
		return inst, r.offsetZone(s.Offset), "", nil
	case Fixed:
		zi = r.fixed
	case Column:
		if zi, err = r.column(rowZone); err != nil {
			return time.Time{}, nil, "", err
		}
	case Auto:
		if zi, err = r.at(lat, lon); err != nil {
			return time.Time{}, nil, "", err
		}
	default:
		return time.Time{}, nil, "", &zoneError{"unknown time zone mode " + r.mode.String(), ErrOptions}
	}
	if s.HasOffset {
		return fromOffset(s), zi.loc, "", nil
	}
	w := s.Wall()
	if tab := zi.tab; w < tab.hi { // the common case, inlined
		if sg := tab.segs[tab.find(w)]; sg.kind == kindUnique {
			return time.Unix(w-int64(sg.off), int64(s.Nanosecond)).UTC(), zi.loc, "", nil
		}
	}
	res := zi.tab.lookup(zi.loc, w)
	switch res.kind {
	case kindUnique:
		return time.Unix(w-int64(res.off), int64(s.Nanosecond)).UTC(), zi.loc, "", nil
	case kindOverlap:
		return time.Unix(w-int64(res.off), int64(s.Nanosecond)).UTC(), zi.loc, NoteAmbiguous, nil
	}
	return time.Time{}, nil, "", gapError(s, zi, res)
}

// Zone returns the zone the resolver would use for a row (nil in Mode None), for display.
func (r *Resolver) Zone(rowZone string, lat, lon float64) (*time.Location, error) {
	switch r.mode {
	case Fixed:
		return r.fixed.loc, nil
	case Column:
		zi, err := r.column(rowZone)
		if err != nil {
			return nil, err
		}
		return zi.loc, nil
	case Auto:
		zi, err := r.at(lat, lon)
		if err != nil {
			return nil, err
		}
		return zi.loc, nil
	}
	return nil, nil
}

// fromOffset is the instant of a stamp with an offset.
func fromOffset(s stamp.Stamp) time.Time {
	return time.Unix(s.Wall()-int64(s.Offset), int64(s.Nanosecond)).UTC()
}

// offsetZone returns the cached fixed zone for a non-zero offset, named like an RFC 3339 offset
// ("+05:30").
func (r *Resolver) offsetZone(off int) *time.Location {
	if off%60 != 0 || off <= -maxOffsetMinutes*60 || off >= maxOffsetMinutes*60 {
		return time.FixedZone(offsetName(off), off)
	}
	slot := &r.offsets[off/60+maxOffsetMinutes]
	if loc := slot.Load(); loc != nil {
		return loc
	}
	loc := time.FixedZone(offsetName(off), off)
	if slot.CompareAndSwap(nil, loc) {
		return loc
	}
	return slot.Load()
}

// offsetName formats ±hh:mm (±hh:mm:ss when the offset has seconds).
func offsetName(off int) string {
	sign := "+"
	if off < 0 {
		sign, off = "-", -off
	}
	two := func(v int) string { return string([]byte{byte('0' + v/10%10), byte('0' + v%10)}) }
	name := sign + two(off/3600) + ":" + two(off/60%60)
	if off%60 != 0 {
		name += ":" + two(off%60)
	}
	return name
}

// column returns the zone a --tz-column value names, loading it on first sight.
func (r *Resolver) column(name string) (*zoneInfo, error) {
	if e, ok := (*r.names.Load())[name]; ok {
		return e.zi, e.err
	}
	if strings.TrimSpace(name) == "" {
		return nil, &zoneError{"empty --tz-column value; expected an IANA time zone name such as " + example, ErrUnknownZone}
	}
	return r.load(name)
}

// load loads a zone name and remembers the outcome (unknown names up to maxBadNames).
func (r *Resolver) load(name string) (*zoneInfo, error) {
	r.namesMu.Lock()
	defer r.namesMu.Unlock()
	old := *r.names.Load()
	if e, ok := old[name]; ok {
		return e.zi, e.err
	}
	var e nameEntry
	if loc, err := Load(name); err != nil {
		e.err = err
		if r.bad >= maxBadNames || len(name) > maxNameLen {
			return nil, err
		}
		r.bad++
	} else {
		e.zi = newZoneInfo(loc.String(), loc)
		if r.mode == Auto { // number the zone, publishing it before any cache can refer to it
			if ids := *r.byID.Load(); len(ids) <= math.MaxUint16 {
				e.zi.id = uint16(len(ids))
				next := append(ids[:len(ids):len(ids)], e.zi)
				r.byID.Store(&next)
			}
		}
	}
	m := make(map[string]*nameEntry, len(old)+1)
	for k, v := range old {
		m[k] = v
	}
	m[strings.Clone(name)] = &e // the row's text may share memory with a whole input batch
	r.names.Store(&m)
	return e.zi, e.err
}

// localText formats a stamp's wall clock as "2024-03-10 02:30" (seconds and fraction when present).
func localText(s stamp.Stamp) string {
	s.HasOffset = false
	t := s.String() // 2024-03-10T02:30:00[.5]
	if s.Second == 0 && s.Nanosecond == 0 {
		t = t[:len(t)-3]
	}
	return strings.Replace(t, "T", " ", 1)
}

// gapError describes a local time in a spring-forward gap: "2024-03-10 02:30 does not exist in
// America/New_York (clocks jump from 02:00 to 03:00)".
func gapError(s stamp.Stamp, zi *zoneInfo, res result) error {
	day := s.Wall() - floorMod(s.Wall(), 86400)
	clock := func(w int64) string {
		t := time.Unix(w, 0).UTC()
		layout := "15:04"
		if w%60 != 0 {
			layout = "15:04:05"
		}
		if w-floorMod(w, 86400) != day {
			layout = "2006-01-02 " + layout
		}
		return t.Format(layout)
	}
	return &zoneError{localText(s) + " does not exist in " + zi.name + " (clocks jump from " + clock(res.from) +
		" to " + clock(res.to) + ")", ErrNonexistent}
}

func floorMod(a, b int64) int64 {
	m := a % b
	if m < 0 {
		m += b
	}
	return m
}

// validCoords reports whether lat, lon are degrees within range.
func validCoords(lat, lon float64) bool {
	return !math.IsNaN(lat) && !math.IsNaN(lon) && lat >= -90 && lat <= 90 && lon >= -180 && lon <= 180
}
