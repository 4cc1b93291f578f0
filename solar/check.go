package solar

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"time"
)

// Causes of the errors returned by [Check], [Position] and [Options.Validate]; match them with errors.Is.
var (
	// ErrLatitude: a latitude outside [-90, 90].
	ErrLatitude = errors.New("latitude out of range")
	// ErrLongitude: a longitude outside [-180, 180].
	ErrLongitude = errors.New("longitude out of range")
	// ErrNotFinite: an input that is NaN or infinite.
	ErrNotFinite = errors.New("value not finite")
	// ErrTimeRange: an instant outside the valid years -2000 to 6000 ([MinUnix], [MaxUnix]).
	ErrTimeRange = errors.New("instant out of range")
	// ErrOption: an [Options] field outside its valid range.
	ErrOption = errors.New("invalid option")
)

// inputError is an error whose message says what was wrong and what is valid, and which unwraps to one of the
// sentinels above.
type inputError struct {
	msg   string
	cause error
}

func (e *inputError) Error() string { return e.msg }
func (e *inputError) Unwrap() error { return e.cause }

// fmtNum formats a number the shortest way that reads back exactly (91.2, -1e+30, NaN, +Inf).
func fmtNum(v float64) string {
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// Check reports the first problem with an instant (Unix seconds, UTC) and a place (degrees), checking in
// argument order, or nil when [Position] and [Kernel.Positions] can compute the sun for them. The error wraps
// [ErrNotFinite], [ErrTimeRange], [ErrLatitude] or [ErrLongitude] and its message says what is valid, e.g.
// "latitude 91.2 out of range [-90, 90]".
func Check(unix float64, lat, lon float64) error {
	switch {
	case math.IsNaN(unix) || math.IsInf(unix, 0):
		return &inputError{"instant " + fmtNum(unix) + " is not a finite number of seconds", ErrNotFinite}
	case !(unix >= MinUnix && unix < MaxUnix):
		return &inputError{fmt.Sprintf("instant %s out of range [-2000-01-01T00:00:00Z, 6001-01-01T00:00:00Z) "+
			"(valid years are -2000 to 6000)", fmtInstant(unix)), ErrTimeRange}
	case math.IsNaN(lat) || math.IsInf(lat, 0):
		return &inputError{"latitude " + fmtNum(lat) + " is not a finite number", ErrNotFinite}
	case !(lat >= -90 && lat <= 90):
		return &inputError{"latitude " + fmtNum(lat) + " out of range [-90, 90]", ErrLatitude}
	case math.IsNaN(lon) || math.IsInf(lon, 0):
		return &inputError{"longitude " + fmtNum(lon) + " is not a finite number", ErrNotFinite}
	case !(lon >= -180 && lon <= 180):
		return &inputError{"longitude " + fmtNum(lon) + " out of range [-180, 180]", ErrLongitude}
	}
	return nil
}

// valid is Check(unix, lat, lon) == nil without building an error.
func valid(unix, lat, lon float64) bool {
	return unix >= MinUnix && unix < MaxUnix && lat >= -90 && lat <= 90 && lon >= -180 && lon <= 180
}

// fmtInstant formats an instant as RFC 3339 in UTC when the time package can represent it, else as seconds.
func fmtInstant(unix float64) string {
	if math.Abs(unix) < 1e15 {
		sec := math.Floor(unix)
		return time.Unix(int64(sec), int64((unix-sec)*1e9)).UTC().Format(time.RFC3339Nano)
	}
	return fmtNum(unix) + " s since 1970-01-01T00:00:00Z"
}

// Limits of the observer elevation accepted by [Options.Validate], metres above sea level: from below the
// deepest ocean floor to above the highest aircraft.
const (
	minElevation = -12000
	maxElevation = 100000
)

// Validate reports the first field of o outside its valid range, as an error wrapping [ErrOption] whose
// message says what is valid, or nil. [Position] validates its options; a [Kernel] built from invalid options
// computes nothing (every row gets NaN and [PhaseUnknown]), so validate them once before building kernels.
func (o Options) Validate() error {
	switch p := o.Pressure; {
	case math.IsNaN(p) || math.IsInf(p, 0) || p < 0:
		return &inputError{"pressure " + fmtNum(p) + " hPa invalid: want a finite value >= 0 (0 means 1010)", ErrOption}
	}
	if o.Temperature != nil {
		if t := *o.Temperature; math.IsNaN(t) || math.IsInf(t, 0) || t <= -273 {
			return &inputError{"temperature " + fmtNum(t) + " °C invalid: want a finite value above -273", ErrOption}
		}
	}
	if e := o.Elevation; !(e >= minElevation && e <= maxElevation) {
		return &inputError{"elevation " + fmtNum(e) + " m out of range [-12000, 100000]", ErrOption}
	}
	if o.DeltaT != nil {
		if d := *o.DeltaT; math.IsNaN(d) || math.IsInf(d, 0) {
			return &inputError{"ΔT " + fmtNum(d) + " s is not a finite number", ErrOption}
		}
	}
	return nil
}
