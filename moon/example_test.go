package moon_test

import (
	"fmt"
	"time"

	"github.com/heliotag/heliotag/moon"
)

// The Moon of Meeus, Astronomical Algorithms, Example 47.a: 1992 April 12, 0h TD.
func ExampleGeocentricAt() {
	g := moon.GeocentricAt(2448724.5, 0) // JD (UT) and ΔT in seconds
	fmt.Printf("λ %.6f°, β %.6f°, Δ %.1f km, π %.6f°\n", g.Longitude, g.Latitude, g.Distance, g.Parallax)
	fmt.Printf("illuminated fraction %.4f\n", g.Illumination)
	// Output:
	// λ 133.162655°, β -3.229126°, Δ 368409.7 km, π 0.991990°
	// illuminated fraction 0.6786
}

// The full moon of 2024 September 18 seen from New York in the evening of the 17th, local time.
func ExamplePosition() {
	at := time.Date(2024, time.September, 18, 2, 34, 0, 0, time.UTC)
	p, err := moon.Position(float64(at.Unix()), 40.7128, -74.0060, moon.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("altitude %.2f°, azimuth %.2f°\n", p.Altitude, p.Azimuth)
	fmt.Printf("%s, %.1f%% illuminated, %.0f km away\n", p.Phase, 100*p.Illumination, p.Distance)
	// Output:
	// altitude 35.67°, azimuth 135.39°
	// full, 100.0% illuminated, 357487 km away
}

func ExampleKernel_Positions() {
	k := moon.NewKernel(moon.Options{}) // one per worker goroutine, reused for every batch
	unix := []float64{
		float64(time.Date(2024, 9, 18, 2, 34, 0, 0, time.UTC).Unix()), // New York, the full moon above
		float64(time.Date(2024, 10, 2, 18, 0, 0, 0, time.UTC).Unix()), // Paris, at the new moon
		float64(time.Date(2024, 10, 2, 18, 0, 0, 0, time.UTC).Unix()), // a latitude out of range
	}
	lat := []float64{40.7128, 48.8566, 95}
	lon := []float64{-74.0060, 2.3522, 0}
	var out moon.Positions // reused across batches, it is resized only when too short
	k.Positions(unix, lat, lon, &out)
	for i := range unix {
		fmt.Printf("%.2f %.2f %.3f %s\n", out.Altitude[i], out.Azimuth[i], out.Illumination[i], out.Phase[i])
	}
	// Output:
	// 35.67 135.39 1.000 full
	// -7.60 271.48 0.000 new
	// NaN NaN NaN
}

func ExamplePhaseOf() {
	for _, e := range []float64{3, 40, 95, 150, 185, 200, 268, 300} {
		fmt.Printf("%g° %s\n", e, moon.PhaseOf(e))
	}
	// Output:
	// 3° new
	// 40° waxing_crescent
	// 95° first_quarter
	// 150° waxing_gibbous
	// 185° full
	// 200° waning_gibbous
	// 268° last_quarter
	// 300° waning_crescent
}
