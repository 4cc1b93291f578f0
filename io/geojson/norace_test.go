//go:build !race

package geojson

const raceEnabled = false
