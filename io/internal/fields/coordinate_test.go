package fields

import (
	"errors"
	"fmt"
	"strings"
	"testing"
)

// TestCoordinate checks the decimal-degree syntax: spaces (ASCII or Unicode) around the number are
// ignored, as strings.TrimSpace defines them, and anything else is an error that names the valid range.
func TestCoordinate(t *testing.T) {
	for _, c := range []struct {
		in   string
		want float64
	}{
		{"39.5", 39.5}, {" 39.5", 39.5}, {"39.5 ", 39.5}, {"\t-86.38473\r", -86.38473},
		{"39.5\u00a0", 39.5}, {"\u200339.5", 39.5}, {"+12", 12}, {"-0.0001", -0.0001},
	} {
		t.Run(fmt.Sprintf("%q", c.in), func(t *testing.T) {
			got, err := Coordinate(c.in, "latitude", 90)
			if err != nil || got != c.want {
				t.Errorf("Coordinate(%q) = %v, %v; want %v", c.in, got, err, c.want)
			}
		})
	}
	for _, c := range []struct {
		in   string
		want error
	}{
		{"", ErrEmpty}, {"  ", ErrEmpty}, {"\u00a0", ErrEmpty}, {"39,5", ErrNotFloat}, {"N39.5", ErrNotFloat},
		{"39.5°", ErrNotFloat}, {"NaN", ErrNotFloat}, {"Inf", ErrNotFloat},
	} {
		t.Run(fmt.Sprintf("%q", c.in), func(t *testing.T) {
			_, err := Coordinate(c.in, "latitude", 90)
			if !errors.Is(err, c.want) {
				t.Errorf("Coordinate(%q) error %v, want %v", c.in, err, c.want)
			}
			if err != nil && !strings.Contains(err.Error(), "[-90, 90]") {
				t.Errorf("Coordinate(%q) error %q does not name the valid range", c.in, err)
			}
		})
	}
}
