//go:build !race

package stamp

const raceEnabled = false
