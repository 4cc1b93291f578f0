package enrich

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/heliotag/heliotag/solar"
)

func TestRelativeAzimuth(t *testing.T) {
	cases := []struct{ az, heading, want float64 }{
		{90, 90, 0},
		{100, 90, 10},
		{80, 90, -10},
		{10, 350, 20},  // across north
		{350, 10, -20}, // across north the other way
		{270, 90, 180}, // exactly behind: +180, never −180
		{90, 270, 180}, // likewise
		{0, 180.5, 179.5},
		{0, 179.5, -179.5},
		{359.9, 0, -0.1},
	}
	for _, c := range cases {
		assert.InDelta(t, c.want, RelativeAzimuth(c.az, c.heading), 1e-9, "az %v heading %v", c.az, c.heading)
	}
}

func TestGlareOf(t *testing.T) {
	def := GlareOptions{}
	cases := []struct {
		name  string
		phase solar.Phase
		alt   float64
		rel   float64
		o     GlareOptions
		want  Glare
	}{
		{"low sun dead ahead", solar.Daytime, 10, 0, def, GlareAhead},
		{"at the altitude limit", solar.Daytime, 25, 5, def, GlareAhead},
		{"just above the altitude limit", solar.Daytime, 25.01, 5, def, GlareNone},
		{"at the offset limit, left", solar.Daytime, 10, -25, def, GlareAhead},
		{"just outside the offset", solar.Daytime, 10, 25.01, def, GlareNone},
		{"side", solar.Daytime, 10, 90, def, GlareNone},
		{"behind at the limit", solar.Daytime, 10, 155, def, GlareBehind},
		{"just short of behind", solar.Daytime, 10, 154.99, def, GlareNone},
		{"straight behind", solar.Daytime, 5, 180, def, GlareBehind},
		{"sun down", solar.EveningCivil, -1, 0, def, GlareNone},
		{"night", solar.Night, -30, 0, def, GlareNone},
		{"wider thresholds", solar.Daytime, 30, 40, GlareOptions{MaxAltitude: 35, MaxOffset: 45}, GlareAhead},
		{"narrower thresholds", solar.Daytime, 10, 15, GlareOptions{MaxAltitude: 15, MaxOffset: 10}, GlareNone},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			assert.Equal(t, c.want, GlareOf(c.phase, c.alt, c.rel, c.o))
		})
	}
}

func TestGlareOptionsValidate(t *testing.T) {
	require.NoError(t, GlareOptions{}.Validate())
	require.NoError(t, GlareOptions{MaxAltitude: 90, MaxOffset: 89}.Validate())
	assert.ErrorIs(t, GlareOptions{MaxAltitude: -5}.Validate(), ErrUsage)
	assert.ErrorIs(t, GlareOptions{MaxOffset: 90}.Validate(), ErrUsage)
}

func TestPlanGlareNeedsHeading(t *testing.T) {
	_, err := NewPlan(PlanOptions{Add: "glare"})
	require.ErrorIs(t, err, ErrUsage)
	assert.Contains(t, err.Error(), "--heading")
	p, err := NewPlan(PlanOptions{Add: "glare", Heading: true})
	require.NoError(t, err)
	assert.Equal(t, []string{"sun_relative_azimuth_deg", "sun_glare"}, p.Names())
	p, err = NewPlan(PlanOptions{Add: "all"})
	require.NoError(t, err)
	assert.False(t, p.Has(GroupGlare), "all without a heading leaves glare out")
	p, err = NewPlan(PlanOptions{Add: "all", Heading: true})
	require.NoError(t, err)
	assert.True(t, p.Has(GroupGlare))
}
