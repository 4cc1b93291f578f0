//go:build race

package stamp

const raceEnabled = true
