package moon

import "math"

// The Moon's geocentric position by Meeus, Astronomical Algorithms, 2nd ed. (1998), chapter 47: the
// truncation of the ELP-2000/82 lunar theory that the book publishes (Tables 47.A and 47.B with the additive
// terms for Venus, Jupiter and the flattening of the Earth), good to about 10″ in longitude and 4″ in latitude.

// lrTerm is a row of Table 47.A: multipliers of the arguments D, M, M′, F and the coefficients of the sine
// series Σl (longitude, 0.000001°) and of the cosine series Σr (distance, 0.001 km).
type lrTerm struct {
	d, m, mp, f int8
	l, r        float64
}

// bTerm is a row of Table 47.B: multipliers of D, M, M′, F and the coefficient of the sine series Σb
// (latitude, 0.000001°).
type bTerm struct {
	d, m, mp, f int8
	b           float64
}

// tableLR is Meeus Table 47.A, periodic terms for the longitude (Σl) and distance (Σr) of the Moon.
var tableLR = [60]lrTerm{
	{0, 0, 1, 0, 6288774, -20905355},
	{2, 0, -1, 0, 1274027, -3699111},
	{2, 0, 0, 0, 658314, -2955968},
	{0, 0, 2, 0, 213618, -569925},
	{0, 1, 0, 0, -185116, 48888},
	{0, 0, 0, 2, -114332, -3149},
	{2, 0, -2, 0, 58793, 246158},
	{2, -1, -1, 0, 57066, -152138},
	{2, 0, 1, 0, 53322, -170733},
	{2, -1, 0, 0, 45758, -204586},
	{0, 1, -1, 0, -40923, -129620},
	{1, 0, 0, 0, -34720, 108743},
	{0, 1, 1, 0, -30383, 104755},
	{2, 0, 0, -2, 15327, 10321},
	{0, 0, 1, 2, -12528, 0},
	{0, 0, 1, -2, 10980, 79661},
	{4, 0, -1, 0, 10675, -34782},
	{0, 0, 3, 0, 10034, -23210},
	{4, 0, -2, 0, 8548, -21636},
	{2, 1, -1, 0, -7888, 24208},
	{2, 1, 0, 0, -6766, 30824},
	{1, 0, -1, 0, -5163, -8379},
	{1, 1, 0, 0, 4987, -16675},
	{2, -1, 1, 0, 4036, -12831},
	{2, 0, 2, 0, 3994, -10445},
	{4, 0, 0, 0, 3861, -11650},
	{2, 0, -3, 0, 3665, 14403},
	{0, 1, -2, 0, -2689, -7003},
	{2, 0, -1, 2, -2602, 0},
	{2, -1, -2, 0, 2390, 10056},
	{1, 0, 1, 0, -2348, 6322},
	{2, -2, 0, 0, 2236, -9884},
	{0, 1, 2, 0, -2120, 5751},
	{0, 2, 0, 0, -2069, 0},
	{2, -2, -1, 0, 2048, -4950},
	{2, 0, 1, -2, -1773, 4130},
	{2, 0, 0, 2, -1595, 0},
	{4, -1, -1, 0, 1215, -3958},
	{0, 0, 2, 2, -1110, 0},
	{3, 0, -1, 0, -892, 3258},
	{2, 1, 1, 0, -810, 2616},
	{4, -1, -2, 0, 759, -1897},
	{0, 2, -1, 0, -713, -2117},
	{2, 2, -1, 0, -700, 2354},
	{2, 1, -2, 0, 691, 0},
	{2, -1, 0, -2, 596, 0},
	{4, 0, 1, 0, 549, -1423},
	{0, 0, 4, 0, 537, -1117},
	{4, -1, 0, 0, 520, -1571},
	{1, 0, -2, 0, -487, -1739},
	{2, 1, 0, -2, -399, 0},
	{0, 0, 2, -2, -381, -4421},
	{1, 1, 1, 0, 351, 0},
	{3, 0, -2, 0, -340, 0},
	{4, 0, -3, 0, 330, 0},
	{2, -1, 2, 0, 327, 0},
	{0, 2, 1, 0, -323, 1165},
	{1, 1, -1, 0, 299, 0},
	{2, 0, 3, 0, 294, 0},
	{2, 0, -1, -2, 0, 8752},
}

// tableB is Meeus Table 47.B, periodic terms for the latitude (Σb) of the Moon.
var tableB = [60]bTerm{
	{0, 0, 0, 1, 5128122},
	{0, 0, 1, 1, 280602},
	{0, 0, 1, -1, 277693},
	{2, 0, 0, -1, 173237},
	{2, 0, -1, 1, 55413},
	{2, 0, -1, -1, 46271},
	{2, 0, 0, 1, 32573},
	{0, 0, 2, 1, 17198},
	{2, 0, 1, -1, 9266},
	{0, 0, 2, -1, 8822},
	{2, -1, 0, -1, 8216},
	{2, 0, -2, -1, 4324},
	{2, 0, 1, 1, 4200},
	{2, 1, 0, -1, -3359},
	{2, -1, -1, 1, 2463},
	{2, -1, 0, 1, 2211},
	{2, -1, -1, -1, 2065},
	{0, 1, -1, -1, -1870},
	{4, 0, -1, -1, 1828},
	{0, 1, 0, 1, -1794},
	{0, 0, 0, 3, -1749},
	{0, 1, -1, 1, -1565},
	{1, 0, 0, 1, -1491},
	{0, 1, 1, 1, -1475},
	{0, 1, 1, -1, -1410},
	{0, 1, 0, -1, -1344},
	{1, 0, 0, -1, -1335},
	{0, 0, 3, 1, 1107},
	{4, 0, 0, -1, 1021},
	{4, 0, -1, 1, 833},
	{0, 0, 1, -3, 777},
	{4, 0, -2, 1, 671},
	{2, 0, 0, -3, 607},
	{2, 0, 2, -1, 596},
	{2, -1, 1, -1, 491},
	{2, 0, -2, 1, -451},
	{0, 0, 3, -1, 439},
	{2, 0, 2, 1, 422},
	{2, 0, -3, -1, 421},
	{2, 1, -1, 1, -366},
	{2, 1, 0, 1, -351},
	{4, 0, 0, 1, 331},
	{2, -1, 1, 1, 315},
	{2, -2, 0, -1, 302},
	{0, 0, 1, 3, -283},
	{2, 1, 1, -1, -229},
	{1, 1, 0, -1, 223},
	{1, 1, 0, 1, 223},
	{0, 1, -2, -1, -220},
	{2, 1, -1, -1, -220},
	{1, 0, 1, 1, -185},
	{2, -1, -2, -1, 181},
	{0, 1, 2, 1, -177},
	{4, 0, -2, -1, 176},
	{4, -1, -1, -1, 166},
	{1, 0, 1, -1, -164},
	{4, 0, 1, -1, 132},
	{1, 0, -1, -1, -119},
	{4, -1, 0, -1, 115},
	{2, -2, 0, 1, 107},
}

// meanDistance is the constant of the distance series, km (Meeus chapter 47: Δ = 385000.56 + Σr/1000).
const meanDistance = 385000.56

// elp returns the Moon's geocentric ecliptic longitude λ and latitude β in degrees, referred to the mean
// equinox of date (no nutation; λ in [0, 360)), and its distance Δ in km (between the centres of the Earth
// and the Moon), for the Julian ephemeris century t from J2000.0: Meeus chapter 47, eq. 47.1–47.6, Tables
// 47.A and 47.B and the additive terms.
func elp(t float64) (lambda, beta, dist float64) {
	t2 := t * t
	t3 := t2 * t
	t4 := t3 * t
	// Fundamental arguments (47.1–47.5), degrees.
	lp := 218.3164477 + 481267.88123421*t - 0.0015786*t2 + t3/538841 - t4/65194000 // L′, mean longitude
	d := 297.8501921 + 445267.1114034*t - 0.0018819*t2 + t3/545868 - t4/113065000  // D, mean elongation
	m := 357.5291092 + 35999.0502909*t - 0.0001536*t2 + t3/24490000                // M, Sun's mean anomaly
	mp := 134.9633964 + 477198.8675055*t + 0.0087414*t2 + t3/69699 - t4/14712000   // M′, Moon's mean anomaly
	f := 93.2720950 + 483202.0175233*t - 0.0036539*t2 - t3/3526000 + t4/863310000  // F, argument of latitude
	a1 := 119.75 + 131.849*t                                                       // Venus
	a2 := 53.09 + 479264.290*t                                                     // Jupiter
	a3 := 313.45 + 481266.484*t                                                    // flattening of the Earth
	// Eccentricity of the Earth's orbit (47.6): terms with M are multiplied by E, with 2M by E².
	e := 1 - 0.002516*t - 0.0000074*t2
	eFactor := [3]float64{1, e, e * e}

	lp, d, m, mp, f = reduce(lp), reduce(d), reduce(m), reduce(mp), reduce(f)
	a1, a2, a3 = reduce(a1), reduce(a2), reduce(a3)

	var sl, sr, sb float64
	for i := range tableLR {
		r := &tableLR[i]
		arg := float64(r.d)*d + float64(r.m)*m + float64(r.mp)*mp + float64(r.f)*f
		s, c := math.Sincos(arg)
		ef := eFactor[abs8(r.m)]
		sl += r.l * ef * s
		sr += r.r * ef * c
	}
	for i := range tableB {
		r := &tableB[i]
		arg := float64(r.d)*d + float64(r.m)*m + float64(r.mp)*mp + float64(r.f)*f
		sb += r.b * eFactor[abs8(r.m)] * math.Sin(arg)
	}
	// Additive terms (Venus, Jupiter and the flattening of the Earth).
	sl += 3958*math.Sin(a1) + 1962*math.Sin(lp-f) + 318*math.Sin(a2)
	sb += -2235*math.Sin(lp) + 382*math.Sin(a3) + 175*math.Sin(a1-f) + 175*math.Sin(a1+f) +
		127*math.Sin(lp-mp) - 115*math.Sin(lp+mp)

	lambda = wrap360(lp*rad + sl/1e6)
	beta = sb / 1e6
	dist = meanDistance + sr/1000
	return lambda, beta, dist
}

// reduce converts an angle from degrees to radians in [0, 2π), reducing it first in degrees so that no
// precision is lost on the large multiples of 360° the mean arguments reach.
func reduce(a float64) float64 {
	return wrap360(a) * deg
}

func abs8(v int8) int8 {
	if v < 0 {
		return -v
	}
	return v
}
