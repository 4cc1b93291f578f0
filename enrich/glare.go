package enrich

import (
	"fmt"
	"math"

	"github.com/heliotag/heliotag/solar"
)

// Default glare thresholds. Road-safety studies of sun glare count a sun low
// in the sky (up to about 25° of altitude) and within about 25° of the
// driver's heading as the glare geometry; both are flags (--glare-max-altitude,
// --glare-max-offset) because studies and windscreens differ.
const (
	DefaultGlareMaxAltitude = 25.0
	DefaultGlareMaxOffset   = 25.0
)

// Glare says where a low sun stands relative to a heading.
type Glare uint8

// Glare values (sun_glare).
const (
	GlareUnknown Glare = iota
	// GlareNone: the sun is down, high, or off to the side.
	GlareNone
	// GlareAhead: the sun is up, low, and near the heading (in the eyes).
	GlareAhead
	// GlareBehind: the sun is up, low, and near the opposite bearing
	// (it lights the scene ahead and shines into oncoming eyes and mirrors).
	GlareBehind
)

func (g Glare) String() string {
	switch g {
	case GlareNone:
		return "none"
	case GlareAhead:
		return "ahead"
	case GlareBehind:
		return "behind"
	}
	return ""
}

// GlareOptions holds the glare thresholds in degrees; zero means the default.
type GlareOptions struct {
	MaxAltitude float64 // the sun counts as low up to this apparent altitude
	MaxOffset   float64 // and as near the heading within this many degrees
}

func (g GlareOptions) withDefaults() GlareOptions {
	if g.MaxAltitude == 0 {
		g.MaxAltitude = DefaultGlareMaxAltitude
	}
	if g.MaxOffset == 0 {
		g.MaxOffset = DefaultGlareMaxOffset
	}
	return g
}

// Validate checks the thresholds' ranges.
func (g GlareOptions) Validate() error {
	g = g.withDefaults()
	if !(g.MaxAltitude > 0 && g.MaxAltitude <= 90) {
		return fmt.Errorf("%w: --glare-max-altitude %v out of range (0, 90]", ErrUsage, g.MaxAltitude)
	}
	if !(g.MaxOffset > 0 && g.MaxOffset < 90) {
		return fmt.Errorf("%w: --glare-max-offset %v out of range (0, 90)", ErrUsage, g.MaxOffset)
	}
	return nil
}

// RelativeAzimuth is the sun's azimuth minus the heading, in (−180, 180]:
// negative when the sun stands to the left of the heading.
func RelativeAzimuth(sunAzimuth, heading float64) float64 {
	d := math.Mod(sunAzimuth-heading, 360)
	switch {
	case d <= -180:
		d += 360
	case d > 180:
		d -= 360
	}
	return d
}

// GlareOf classifies the sun for a heading. The sun is "up" when its phase is
// day (centre above −0.833°, so the upper limb is above the horizon) and
// "low" when its apparent altitude is at most MaxAltitude; it is ahead when
// |relative azimuth| ≤ MaxOffset and behind when |relative azimuth| ≥
// 180 − MaxOffset.
func GlareOf(phase solar.Phase, altitude, relAz float64, g GlareOptions) Glare {
	g = g.withDefaults()
	if phase != solar.Daytime || altitude > g.MaxAltitude {
		return GlareNone
	}
	switch a := math.Abs(relAz); {
	case a <= g.MaxOffset:
		return GlareAhead
	case a >= 180-g.MaxOffset:
		return GlareBehind
	}
	return GlareNone
}
