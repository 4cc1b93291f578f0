//go:build !race

package moon

const raceEnabled = false
