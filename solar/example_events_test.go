package solar_test

import (
	"fmt"
	"math"
	"time"

	"github.com/heliotag/heliotag/solar"
)

// The sun's events in San Francisco (N37°46′, W122°26′) on 2012-06-21, a local date in Pacific Standard
// Time; the USNO table gives sunrise 04:48 and sunset 19:35.
func ExampleEvents() {
	pst := time.FixedZone("PST", -8*3600)
	midnight := time.Date(2012, time.June, 21, 0, 0, 0, 0, pst)
	start := float64(midnight.Unix())
	end := float64(midnight.AddDate(0, 0, 1).Unix()) // the next local midnight
	d, err := solar.Events(start, end, 37+46.0/60, -(122 + 26.0/60), solar.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	clock := func(unix float64) string {
		if math.IsNaN(unix) {
			return "none"
		}
		return time.Unix(int64(math.Round(unix)), 0).In(pst).Format("15:04:05")
	}
	fmt.Println("astronomical dawn", clock(d.AstronomicalDawn))
	fmt.Println("civil dawn       ", clock(d.CivilDawn))
	fmt.Println("sunrise          ", clock(d.Rise))
	fmt.Println("noon             ", clock(d.Noon))
	fmt.Println("sunset           ", clock(d.Set))
	fmt.Println("civil dusk       ", clock(d.CivilDusk))
	fmt.Println("astronomical dusk", clock(d.AstronomicalDusk))
	fmt.Printf("day length %.1f min, noon altitude %.2f°\n", d.DayLength, d.NoonAltitude)
	// Output:
	// astronomical dawn 02:53:06
	// civil dawn        04:16:54
	// sunrise           04:48:14
	// noon              12:11:41
	// sunset            19:35:07
	// civil dusk        20:06:27
	// astronomical dusk 21:30:14
	// day length 886.9 min, noon altitude 75.67°
}

// A kernel computes the events of rows that repeat a few places and dates, as camera-trap detections do,
// from its cache after the first row of each place and date. Here a detection's time relative to sunset
// and its sun time, at a camera near the equator (1.5° S, 36.2° E) whose rows carry UTC+3 times.
func ExampleKernel_Day() {
	eat := time.FixedZone("EAT", 3*3600)
	k := solar.NewKernel(solar.Options{}) // one per worker goroutine, reused for every row
	lat, lon := -1.5, 36.2
	day := func(date time.Time) solar.Day { // the events of the local date of date
		midnight := time.Date(date.Year(), date.Month(), date.Day(), 0, 0, 0, 0, eat)
		return k.Day(float64(midnight.Unix()), float64(midnight.AddDate(0, 0, 1).Unix()), lat, lon)
	}
	for _, seen := range []time.Time{
		time.Date(2024, 3, 5, 19, 10, 0, 0, eat),
		time.Date(2024, 3, 5, 23, 40, 0, 0, eat),
		time.Date(2024, 3, 6, 5, 55, 0, 0, eat),
	} {
		t := float64(seen.Unix())
		d := day(seen)
		prevSet := day(seen.AddDate(0, 0, -1)).Set
		nextRise := day(seen.AddDate(0, 0, 1)).Rise
		fmt.Printf("%s: %+.1f min from sunset, sun time %.2f h\n", seen.Format("01-02 15:04"),
			(t-d.Set)/60, solar.SunTime(t, prevSet, d.Rise, d.Set, nextRise))
	}
	// Output:
	// 03-05 19:10: +19.6 min from sunset, sun time 18.33 h
	// 03-05 23:40: +289.6 min from sunset, sun time 22.88 h
	// 03-06 05:55: -775.2 min from sunset, sun time 5.20 h
}

// Sun time stretches the day and the night separately. With the previous sunset at 21:00, sunrise at 05:00,
// sunset at 21:00 (a 16-hour day) and the next sunrise at 04:58: 13:00 is halfway through the day (12 h);
// 01:00 after the sunset is a little past halfway through the night (0.03 h), and 01:00 before the
// sunrise exactly halfway (0 h).
func ExampleSunTime() {
	h := 3600.0
	prevSet, rise, set, nextRise := -3*h, 5*h, 21*h, (24+4+58.0/60)*h
	fmt.Printf("%.2f %.2f %.2f\n", solar.SunTime(13*h, prevSet, rise, set, nextRise),
		solar.SunTime(25*h, prevSet, rise, set, nextRise), solar.SunTime(1*h, prevSet, rise, set, nextRise))
	// Output: 12.00 0.03 0.00
}
