//go:build race

package moon

// raceEnabled is true under the race detector, which slows the reference computations about tenfold: the
// long sweeps then run a fifth of their rows.
const raceEnabled = true
