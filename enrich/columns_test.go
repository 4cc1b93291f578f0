package enrich

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestNewPlan(t *testing.T) {
	cases := []struct {
		name string
		o    PlanOptions
		want []string
	}{
		{"default", PlanOptions{}, []string{"sun_altitude_deg", "sun_azimuth_deg", "sun_phase", "sun_light_condition"}},
		{"position only", PlanOptions{Add: "position"}, []string{"sun_altitude_deg", "sun_azimuth_deg"}},
		{"order follows the contract, not the flag", PlanOptions{Add: "phase, position"}, []string{"sun_altitude_deg", "sun_azimuth_deg", "sun_phase", "sun_light_condition"}},
		{"all", PlanOptions{Add: "all"}, []string{"sun_altitude_deg", "sun_azimuth_deg", "sun_phase", "sun_light_condition",
			"sun_rise", "sun_set", "sun_noon", "sun_civil_dawn", "sun_civil_dusk", "sun_nautical_dawn", "sun_nautical_dusk",
			"sun_astronomical_dawn", "sun_astronomical_dusk", "sun_day_length_min", "sun_noon_altitude_deg",
			"sun_minutes_from_rise", "sun_minutes_from_set", "sun_time_h",
			"moon_altitude_deg", "moon_azimuth_deg", "moon_illumination", "moon_phase"}},
		{"relative", PlanOptions{Add: "relative"}, []string{"sun_minutes_from_rise", "sun_minutes_from_set", "sun_time_h"}},
		{"prefix", PlanOptions{Add: "phase", Prefix: "x_"}, []string{"x_sun_phase", "x_sun_light_condition"}},
		{"note and error", PlanOptions{Add: "phase", TimeNote: true, ErrorColumn: true}, []string{"sun_phase", "sun_light_condition", "sun_time_note", "sun_error"}},
		{"none is a passthrough", PlanOptions{Add: "none", TimeNote: true, ErrorColumn: true}, []string{}},
		{"prefix avoids a clash", PlanOptions{Add: "phase", Prefix: "h_", Input: []string{"sun_phase"}}, []string{"h_sun_phase", "h_sun_light_condition"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p, err := NewPlan(c.o)
			require.NoError(t, err)
			assert.Equal(t, c.want, p.Names())
		})
	}
}

func TestNewPlanErrors(t *testing.T) {
	cases := []struct {
		name string
		o    PlanOptions
		msg  string
	}{
		{"unknown group", PlanOptions{Add: "sunshine"}, `unknown column group "sunshine"`},
		{"empty list", PlanOptions{Add: ","}, "names no column group"},
		{"clash", PlanOptions{Input: []string{"id", "sun_phase"}}, `already has a column "sun_phase"; choose a prefix`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := NewPlan(c.o)
			require.ErrorIs(t, err, ErrUsage)
			assert.Contains(t, err.Error(), c.msg)
		})
	}
}
