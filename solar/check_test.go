package solar

import (
	"errors"
	"math"
	"testing"
)

func TestCheckErrors(t *testing.T) {
	ok := unixOf(2024, 6, 21, 12, 0, 0, 0)
	tests := []struct {
		name           string
		unix, lat, lon float64
		want           error
		msg            string
	}{
		{"latitude above 90", ok, 91.2, 0, ErrLatitude, "latitude 91.2 out of range [-90, 90]"},
		{"latitude below -90", ok, -90.5, 0, ErrLatitude, "latitude -90.5 out of range [-90, 90]"},
		{"longitude above 180", ok, 0, 180.01, ErrLongitude, "longitude 180.01 out of range [-180, 180]"},
		{"longitude below -180", ok, 0, -200, ErrLongitude, "longitude -200 out of range [-180, 180]"},
		{"NaN latitude", ok, math.NaN(), 0, ErrNotFinite, "latitude NaN is not a finite number"},
		{"infinite longitude", ok, 0, math.Inf(1), ErrNotFinite, "longitude +Inf is not a finite number"},
		{"NaN instant", math.NaN(), 0, 0, ErrNotFinite, "instant NaN is not a finite number of seconds"},
		{"infinite instant", math.Inf(-1), 0, 0, ErrNotFinite, "instant -Inf is not a finite number of seconds"},
		{"year 6001", MaxUnix, 0, 0, ErrTimeRange,
			"instant 6001-01-01T00:00:00Z out of range [-2000-01-01T00:00:00Z, 6001-01-01T00:00:00Z) (valid years are -2000 to 6000)"},
		{"year -2001", MinUnix - 0.5, 0, 0, ErrTimeRange,
			"instant -2001-12-31T23:59:59.5Z out of range [-2000-01-01T00:00:00Z, 6001-01-01T00:00:00Z) (valid years are -2000 to 6000)"},
		{"far future", 1e30, 0, 0, ErrTimeRange,
			"instant 1e+30 s since 1970-01-01T00:00:00Z out of range [-2000-01-01T00:00:00Z, 6001-01-01T00:00:00Z) (valid years are -2000 to 6000)"},
		{"instant checked first", math.NaN(), 100, 200, ErrNotFinite, "instant NaN is not a finite number of seconds"},
		{"latitude before longitude", ok, 100, 200, ErrLatitude, "latitude 100 out of range [-90, 90]"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			err := Check(tc.unix, tc.lat, tc.lon)
			if !errors.Is(err, tc.want) {
				t.Fatalf("Check = %v, want an error wrapping %v", err, tc.want)
			}
			if err.Error() != tc.msg {
				t.Errorf("message %q, want %q", err.Error(), tc.msg)
			}
			if _, perr := Position(tc.unix, tc.lat, tc.lon, Options{}); !errors.Is(perr, tc.want) {
				t.Errorf("Position error = %v, want one wrapping %v", perr, tc.want)
			}
		})
	}
}

func TestCheckValid(t *testing.T) {
	for _, tc := range []struct{ unix, lat, lon float64 }{
		{MinUnix, -90, -180},
		{below(MaxUnix), 90, 180},
		{0, 0, 0},
	} {
		if err := Check(tc.unix, tc.lat, tc.lon); err != nil {
			t.Errorf("Check(%v, %v, %v) = %v, want nil", tc.unix, tc.lat, tc.lon, err)
		}
		if _, err := Position(tc.unix, tc.lat, tc.lon, Options{}); err != nil {
			t.Errorf("Position(%v, %v, %v): %v", tc.unix, tc.lat, tc.lon, err)
		}
	}
}

func TestOptionsValidate(t *testing.T) {
	tests := []struct {
		name string
		o    Options
		msg  string // "" for valid
	}{
		{"zero value", Options{}, ""},
		{"all set", Options{Pressure: 820, Temperature: ptr(-40), Elevation: 8848, NoRefraction: true, DeltaT: ptr(-3)}, ""},
		{"negative pressure", Options{Pressure: -1}, "pressure -1 hPa invalid: want a finite value >= 0 (0 means 1010)"},
		{"NaN pressure", Options{Pressure: math.NaN()}, "pressure NaN hPa invalid: want a finite value >= 0 (0 means 1010)"},
		{"absolute zero", Options{Temperature: ptr(-273)}, "temperature -273 °C invalid: want a finite value above -273"},
		{"infinite temperature", Options{Temperature: ptr(math.Inf(1))}, "temperature +Inf °C invalid: want a finite value above -273"},
		{"elevation too high", Options{Elevation: 2e5}, "elevation 200000 m out of range [-12000, 100000]"},
		{"NaN elevation", Options{Elevation: math.NaN()}, "elevation NaN m out of range [-12000, 100000]"},
		{"NaN ΔT", Options{DeltaT: ptr(math.NaN())}, "ΔT NaN s is not a finite number"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			err := tc.o.Validate()
			if tc.msg == "" {
				if err != nil {
					t.Fatalf("Validate = %v, want nil", err)
				}
				return
			}
			if !errors.Is(err, ErrOption) {
				t.Fatalf("Validate = %v, want an error wrapping ErrOption", err)
			}
			if err.Error() != tc.msg {
				t.Errorf("message %q, want %q", err.Error(), tc.msg)
			}
			if _, perr := Position(0, 0, 0, tc.o); !errors.Is(perr, ErrOption) {
				t.Errorf("Position error = %v, want one wrapping ErrOption", perr)
			}
			var out Positions
			NewKernel(tc.o).Positions([]float64{0}, []float64{0}, []float64{0}, &out)
			if !math.IsNaN(out.Altitude[0]) || !math.IsNaN(out.Azimuth[0]) || out.Phase[0] != PhaseUnknown {
				t.Errorf("kernel with invalid options gave %v %v %v, want NaN NaN unknown", out.Altitude[0], out.Azimuth[0], out.Phase[0])
			}
		})
	}
}
