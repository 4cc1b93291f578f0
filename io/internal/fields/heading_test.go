package fields

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestParseHeading(t *testing.T) {
	// Compass points and the "bound" words of crash records (common practice).
	good := map[string]float64{
		"0": 0, "90": 90, "359.9": 359.9, " 45 ": 45,
		"N": 0, "ne": 45, "E": 90, "SE": 135, "S": 180, "SW": 225, "W": 270, "NW": 315,
		"NB": 0, "eb": 90, "SB": 180, "WB": 270, "Northbound": 0, "west": 270,
	}
	for in, want := range good {
		got, err := ParseHeading(in)
		require.NoError(t, err, in)
		assert.Equal(t, want, got, in)
	}
	bad := map[string]error{"": ErrEmpty, "360": ErrHeading, "-1": ErrHeading, "NNE": ErrHeading, "up": ErrHeading, "NaN": ErrHeading}
	for in, want := range bad {
		_, err := ParseHeading(in)
		assert.ErrorIs(t, err, want, in)
		if err != nil {
			assert.Contains(t, err.Error(), "[0, 360)", in)
		}
	}
}
