package solar

// Exports of the batch path's fast trigonometry for the sibling package moon, whose batch path does the same
// per-row work for the Moon. They are the functions the sun's Kernel uses, with their accuracy (see
// fastmath.go): sines and cosines within 1e-10 of package math, angles within 3e-9°.

// SincosDegs sets s[i], c[i] to the sine and cosine of x[i] degrees, for finite |x[i]| up to about 10⁶; s and
// c must be at least as long as x.
func SincosDegs(x, s, c []float64) { sincosDegs(x, s, c) }

// Atan2Degs sets out[i] to atan2(y[i], x[i]) in degrees, [-180, 180], and to 0 when both are 0, for finite
// inputs; x and out must be at least as long as y.
func Atan2Degs(y, x, out []float64) { atan2Degs(y, x, out) }
