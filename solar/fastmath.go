package solar

import "math"

// Fast trigonometry for the batch path, over slices so that the processor overlaps the rows' independent
// polynomial chains. The loops trade the special-case handling of package math (infinities, NaN payloads,
// huge arguments) for straight-line code without data-dependent branches; the callers pass finite arguments
// of moderate size. TestSincosDegs and TestAtan2Degs check them against package math: sines and cosines within
// 1e-10, angles within 3e-9°.

// Coefficients of sin(z)/z and cos(z) as polynomials in z², for |z| ≤ π/4: Chebyshev interpolation at 5 nodes
// in z² (recomputed and compared by TestTrigCoefficients). Maximum error 3.4e-12 for sin, 4.8e-11 for cos.
const (
	sin0 = 0.99999999999567279
	sin2 = -0.16666666631590063
	sin4 = 0.008333328782387607
	sin6 = -0.00019839202195656543
	sin8 = 2.7173455579772983e-06
	cos0 = 0.999999999952489
	cos2 = -0.49999999614856711
	cos4 = 0.041666616692477676
	cos6 = -0.0013886617998523447
	cos8 = 2.4379831178301382e-05
)

// quadSign[k] is the sign of the sine in quadrant k (and, shifted by one, of the cosine).
var quadSign = [4]float64{1, 1, -1, -1}

// sincosDegs sets s[i], c[i] to the sine and cosine of x[i] degrees, for |x[i]| up to about 10⁶; s and c
// must be at least as long as x. Each angle is reduced to [-45°, 45°] around the nearest multiple of 90°
// (exactly, so 90° gives a cosine of exactly 0), and the quadrant picks and signs the results by table
// look-up instead of branches.
func sincosDegs(x, s, c []float64) {
	s, c = s[:len(x)], c[:len(x)]
	for i, v := range x {
		q := math.Floor(v*(1.0/90) + 0.5)
		z := (v - 90*q) * deg
		z2 := z * z
		sp := z * (sin0 + z2*(sin2+z2*(sin4+z2*(sin6+z2*sin8))))
		cp := cos0 + z2*(cos2+z2*(cos4+z2*(cos6+z2*cos8)))
		// Quadrant k: (sin, cos) = (sp, cp), (cp, −sp), (−sp, −cp), (−cp, sp).
		k := int64(q) & 3
		pair := [2]float64{sp, cp}
		s[i] = pair[k&1] * quadSign[k]
		c[i] = pair[(k+1)&1] * quadSign[(k+1)&3]
	}
}

// Coefficients of atan(t)/t as a polynomial in w = 2t² − 1, for t in [0, 1]: Chebyshev interpolation at 12
// nodes, rewritten in powers of w (recomputed and compared by TestTrigCoefficients). Maximum error of the
// resulting atan 3.7e-11 rad.
var atanCoef = [12]float64{
	0.87041975131836535,
	-0.1018765423351233,
	0.02085185471152386,
	-0.0050308647462004768,
	0.0013155453482207591,
	-0.00036096950510019116,
	0.00010244731819053499,
	-2.9702950572030318e-05,
	8.4245412352856874e-06,
	-2.5148245489011365e-06,
	1.0584072308953789e-06,
	-3.2392298976446909e-07,
}

// signBit returns 1 if the sign bit of v is set (v negative or −0), else 0.
func signBit(v float64) float64 {
	return float64(math.Float64bits(v) >> 63)
}

// signBitInt returns 1 if the sign bit of v is set, else 0.
func signBitInt(v float64) int {
	return int(math.Float64bits(v) >> 63)
}

// atan2Degs sets out[i] to atan2(y[i], x[i]) in degrees, [-180, 180], and to 0 when both are 0; x and out
// must be at least as long as y. The quadrant is folded away with sign bits rather than branches.
func atan2Degs(y, x, out []float64) {
	x, out = x[:len(y)], out[:len(y)]
	c := &atanCoef
	for i, yv := range y {
		xv := x[i]
		ax, ay := math.Abs(xv), math.Abs(yv)
		swap := signBit(ax - ay) // 1 when |y| > |x|
		hi := ax + swap*(ay-ax)
		lo := ay + swap*(ax-ay)
		t := lo / hi
		if hi == 0 {
			t = 0
		}
		// atan(t) for t in [0, 1], by Estrin's scheme in w = 2t² − 1.
		w := 2*t*t - 1
		w2 := w * w
		w4 := w2 * w2
		w8 := w4 * w4
		p := (c[0] + c[1]*w + (c[2]+c[3]*w)*w2) + (c[4]+c[5]*w+(c[6]+c[7]*w)*w2)*w4 +
			(c[8]+c[9]*w+(c[10]+c[11]*w)*w2)*w8
		a := t * p * rad
		a = swap*90 + (1-2*swap)*a // first quadrant
		nx := signBit(xv)
		a = nx*180 + (1-2*nx)*a // second quadrant when x < 0
		out[i] = math.Copysign(a, yv)
	}
}
