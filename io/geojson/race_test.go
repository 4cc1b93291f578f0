//go:build race

package geojson

// raceEnabled: tests that only repeat slow work owned by other packages
// (the --tz auto boundary index) leave it out under the race detector.
const raceEnabled = true
