package solar

import (
	"math"
	"math/rand/v2"
	"testing"
)

// chebyshevMonomial interpolates f at the n+1 Chebyshev nodes of [a, b] and returns the coefficients of the
// interpolating polynomial in powers of x: the procedure that produced the coefficient tables of fastmath.go.
func chebyshevMonomial(f func(float64) float64, a, b float64, n int) []float64 {
	m := n + 1
	cheb := make([]float64, m)
	for j := range cheb {
		for k := 0; k < m; k++ {
			th := math.Pi * (float64(k) + 0.5) / float64(m)
			cheb[j] += f((a+b)/2+(b-a)/2*math.Cos(th)) * math.Cos(float64(j)*th)
		}
		cheb[j] *= 2 / float64(m)
	}
	cheb[0] /= 2
	// Σ cheb[j]·T_j(s) in powers of s.
	pow := make([]float64, m)
	tPrev, tCur := make([]float64, m), make([]float64, m)
	tPrev[0] = 1
	pow[0] = cheb[0]
	if m > 1 {
		tCur[1] = 1
		pow[1] += cheb[1]
	}
	for j := 2; j < m; j++ {
		next := make([]float64, m)
		for i := 0; i < m-1; i++ {
			next[i+1] += 2 * tCur[i]
		}
		for i := range next {
			next[i] -= tPrev[i]
			pow[i] += cheb[j] * next[i]
		}
		tPrev, tCur = tCur, next
	}
	// Substitute s = αx + β.
	alpha, beta := 2/(b-a), -(a+b)/(b-a)
	out := make([]float64, m)
	for i, c := range pow {
		binom := 1.0
		for k := 0; k <= i; k++ {
			out[k] += c * binom * math.Pow(alpha, float64(k)) * math.Pow(beta, float64(i-k))
			binom = binom * float64(i-k) / float64(k+1)
		}
	}
	return out
}

// TestTrigCoefficients recomputes the polynomial coefficients of fastmath.go.
func TestTrigCoefficients(t *testing.T) {
	x2 := math.Pi * math.Pi / 16 // (π/4)²
	sinc := func(x float64) float64 { z := math.Sqrt(x); return math.Sin(z) / z }
	cosr := func(x float64) float64 { return math.Cos(math.Sqrt(x)) }
	atanc := func(w float64) float64 { s := math.Sqrt((w + 1) / 2); return math.Atan(s) / s }
	tables := []struct {
		name string
		got  []float64
		want []float64
	}{
		{"sin", []float64{sin0, sin2, sin4, sin6, sin8}, chebyshevMonomial(sinc, 0, x2, 4)},
		{"cos", []float64{cos0, cos2, cos4, cos6, cos8}, chebyshevMonomial(cosr, 0, x2, 4)},
		{"atan", atanCoef[:], chebyshevMonomial(atanc, -1, 1, 11)},
	}
	for _, tab := range tables {
		for i := range tab.want {
			if !within(tab.got[i], tab.want[i], 1e-12*max(1, math.Abs(tab.want[i]))) {
				t.Errorf("%s coefficient %d = %.17g, recomputed %.17g", tab.name, i, tab.got[i], tab.want[i])
			}
		}
	}
}

func TestSincosDegs(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	var x []float64
	for _, v := range []float64{0, 45, 90, 135, 180, 270, 360, -45, -90, -180, -270, 22.5, 1000, -1000, 720.5} {
		x = append(x, v, below(v), above(v))
	}
	for i := 0; i < 100000; i++ {
		x = append(x, rng.Float64()*2000-1000)
	}
	s, c := make([]float64, len(x)), make([]float64, len(x))
	sincosDegs(x, s, c)
	var worst float64
	for i, v := range x {
		ws, wc := math.Sincos(v * deg)
		worst = max(worst, math.Abs(s[i]-ws), math.Abs(c[i]-wc))
	}
	if worst > 1e-10 {
		t.Errorf("sincosDegs differs from math.Sincos by up to %.3g", worst)
	}
	// Exact at the quarter turns.
	q := []float64{0, 90, 180, 270, -90}
	sincosDegs(q, s, c)
	for i, want := range [][2]float64{{0, 1}, {1, 0}, {0, -1}, {-1, 0}, {-1, 0}} {
		if c[i] != 0 && want[1] == 0 || s[i] != 0 && want[0] == 0 {
			t.Errorf("sincosDegs(%v) = %v, %v; want exact zero", q[i], s[i], c[i])
		}
		if !within(s[i], want[0], 1e-10) || !within(c[i], want[1], 1e-10) {
			t.Errorf("sincosDegs(%v) = %v, %v; want %v", q[i], s[i], c[i], want)
		}
	}
}

func TestAtan2Degs(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	var y, x []float64
	edges := []float64{0, 1, -1, 1e-300, -1e-300, 3, -3}
	for _, a := range edges {
		for _, b := range edges {
			y, x = append(y, a), append(x, b)
		}
	}
	for i := 0; i < 100000; i++ {
		a := rng.Float64() * 2 * math.Pi
		r := math.Exp(rng.Float64()*20 - 10)
		y, x = append(y, r*math.Sin(a)), append(x, r*math.Cos(a))
	}
	out := make([]float64, len(y))
	atan2Degs(y, x, out)
	var worst float64
	for i := range y {
		want := math.Atan2(y[i], x[i]) * rad
		if y[i] == 0 && x[i] == 0 {
			want = 0
		}
		d := math.Abs(out[i] - want)
		if math.Abs(want) == 180 { // ±180 are the same direction
			d = math.Abs(math.Abs(out[i]) - 180)
		}
		worst = max(worst, d)
	}
	if worst > 3e-9 {
		t.Errorf("atan2Degs differs from math.Atan2 by up to %.3g°", worst)
	}
}
