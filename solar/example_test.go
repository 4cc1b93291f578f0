package solar_test

import (
	"errors"
	"fmt"
	"time"

	"github.com/heliotag/heliotag/solar"
)

// The worked example of the NREL Solar Position Algorithm report (NREL/TP-560-34302, §A.5): Golden,
// Colorado, 2003-10-17 12:30:30 local standard time (UTC−7), with the report's ΔT, pressure, temperature and
// elevation.
func ExamplePosition() {
	at := time.Date(2003, time.October, 17, 12, 30, 30, 0, time.FixedZone("MST", -7*3600))
	temp, deltaT := 11.0, 67.0
	o := solar.Options{Pressure: 820, Temperature: &temp, Elevation: 1830.14, DeltaT: &deltaT}
	p, err := solar.Position(float64(at.Unix()), 39.742476, -105.1786, o)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("zenith angle %.5f°, azimuth %.5f°\n", 90-p.Altitude, p.Azimuth)
	fmt.Printf("equation of time %.2f min\n", p.EquationOfTime)
	ph := solar.PhaseOf(p.GeometricAltitude, p.HourAngle)
	fmt.Println(ph, ph.Condition())
	// Output:
	// zenith angle 50.11162°, azimuth 194.34024°
	// equation of time 14.64 min
	// day daylight
}

func ExampleKernel_Positions() {
	k := solar.NewKernel(solar.Options{}) // one per worker goroutine, reused for every batch
	unix := []float64{
		float64(time.Date(2024, 6, 21, 12, 0, 0, 0, time.UTC).Unix()),  // Greenwich, noon
		float64(time.Date(2024, 6, 21, 20, 45, 0, 0, time.UTC).Unix()), // Greenwich, after sunset
		float64(time.Date(2024, 6, 21, 12, 0, 0, 0, time.UTC).Unix()),  // a latitude out of range
	}
	lat := []float64{51.4769, 51.4769, 95}
	lon := []float64{0, 0, 0}
	var out solar.Positions // reused across batches, it is resized only when too short
	k.Positions(unix, lat, lon, &out)
	for i := range unix {
		fmt.Printf("%.2f %.2f %s\n", out.Altitude[i], out.Azimuth[i], out.Phase[i])
	}
	// Output:
	// 61.97 179.06 day
	// -3.55 315.86 evening_civil
	// NaN NaN
}

func ExamplePhaseOf() {
	// The sun's centre 3° below the horizon, 80° of hour angle before the meridian: morning civil twilight.
	p := solar.PhaseOf(-3, -80)
	fmt.Println(p, p.Condition())
	// Output: morning_civil dawn
}

func ExampleCheck() {
	err := solar.Check(0, 91.2, 0)
	fmt.Println(err)
	fmt.Println(errors.Is(err, solar.ErrLatitude))
	// Output:
	// latitude 91.2 out of range [-90, 90]
	// true
}

// Geocentric quantities for Meeus, Astronomical Algorithms, Example 25.b: 1992 October 13.0 TD.
func ExampleGeocentricAt() {
	g := solar.GeocentricAt(2448908.5, 0) // JD (UT) and ΔT in seconds
	fmt.Printf("R %.8f AU, α %.4f°, δ %.4f°\n", g.Distance, g.RightAscension, g.Declination)
	// Output: R 0.99760775 AU, α 198.3782°, δ -7.7839°
}
