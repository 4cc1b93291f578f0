package moon

import (
	"math"

	"github.com/heliotag/heliotag/solar"
)

// The batch path evaluates the reference's geocentric quantities ([GeocentricAt]) at grid instants ("nodes",
// every gridStep seconds of Unix time, aligned to the Unix epoch: node n is at n·gridStep). A cell spans
// cellNodes steps; for it the batch path fits polynomials of degree cellNodes + 2 through the cellNodes + 3
// nodes from one step before the cell to one step after it (Lagrange interpolation), in v, the time from the
// cell's middle in steps. Per row it only evaluates the polynomials and does the topocentric part. Nodes and
// cells are kept in direct-mapped caches indexed by their number; a node's values depend only on its instant
// and the options, and a cell's only on its nodes, so every row's result depends only on its own instant,
// place and the options: never on the other rows of its batch, their order, or what the kernel computed
// before.
//
// Interpolation error for a 1-hour step h: inside the cell, the degree-6 polynomial through the 7 nodes errs
// by at most max|Π(v − vⱼ)|/7! · (ωh)⁷ ≈ 0.0022·(ωh)⁷ times the amplitude of a term of angular frequency ω.
// The Moon's largest terms (6.3° with a period of 27.6 days, 2.5° of equator-ecliptic conversion at 13.7
// days) give under 1e-15°; its right ascension's steady motion is reproduced exactly. TestKernelAccuracy
// measures the total against the reference path.
const (
	gridStep     = 3600.0               // seconds between nodes
	cellNodes    = 4                    // steps per cell
	nCoef        = cellNodes + 3        // nodes per cell, and coefficients per polynomial
	minCellSlots = 1 << 10              // 1024 cells: 171 days without collisions
	maxCellSlots = 1 << 16              // 65536 cells: 30 years
	nodesPerCell = 2                    // node slots per cell slot (half the span of the cells)
	cellSpan     = cellNodes * gridStep // seconds per cell
	emptySlot    = math.MinInt64        // tag of a slot never filled
)

// node holds the geocentric quantities the batch path needs at one grid instant.
type node struct {
	tag            int64
	gha            float64 // Greenwich hour angle of the Moon, ν − α, degrees [0, 360)
	sinDec, cosDec float64 // of δ, apparent declination
	sinPi          float64 // sine of the equatorial horizontal parallax
	illum          float64 // illuminated fraction
	elong          float64 // elongation in longitude, degrees [0, 360)
}

// cell holds, for the instants t = (k·cellNodes + cellNodes/2 + v)·gridStep, v in [−cellNodes/2,
// cellNodes/2), the coefficients of polynomials in v of the Greenwich hour angle (degrees, not reduced),
// sin δ, cos δ, sin π, the illuminated fraction and the elongation in longitude (degrees, not reduced).
type cell struct {
	tag    int64
	gha    [nCoef]float64
	sinDec [nCoef]float64
	cosDec [nCoef]float64
	sinPi  [nCoef]float64
	illum  [nCoef]float64
	elong  [nCoef]float64
}

// Kernel is the batch path of the package: it computes the Moon's altitude, azimuth, illuminated fraction and
// phase for many rows at a time, the same quantities as [Position] to within 0.001° (altitude under 1e-6°
// in the tests, 1900–2100; the one exception is the few hours around 3000-01-01, where the ΔT model steps by
// 150 s and altitudes may differ by up to about 0.01°). A row's result depends only on its own instant, place
// and the kernel's options, not on how rows are batched. It caches geocentric quantities between calls, so
// one kernel should serve every batch a worker handles: a batch of instants within a year then costs no
// reference evaluation after the first (a year of hourly nodes costs about 8800). Its caches take about
// 0.5 MB at first and grow by doubling, when the rows' instants spread wider, up to about 30 MB to hold 30
// years of instants (15 MB for rows over 10 years: a worker of an enrich run holds one kernel). Rows spread
// more thinly than one per 4 hours, or over more than 30 years, cost up to seven reference evaluations each.
// A Kernel is not safe for concurrent use: give each goroutine its own.
type Kernel struct {
	ok        bool    // options valid
	refr      float64 // refraction scale × 1.02/60, degrees; 0 with Options.NoRefraction
	elev      float64 // observer elevation / equatorial radius
	options   Options // for ΔT at the nodes
	cells     []cell  // len is a power of two
	nodes     []node  // len is nodesPerCell × len(cells)
	evictions int     // cells and nodes replaced since the caches were last (re)built
	scratch   scratch
}

// NewKernel returns a kernel for the given options (see [Options]; validate them first with
// [solar.Options.Validate]: with invalid options every row gets NaN and PhaseUnknown).
func NewKernel(o Options) *Kernel {
	k := &Kernel{ok: o.Validate() == nil, options: o}
	if o.DeltaT != nil { // keep our own copy: the caller may change *o.DeltaT later
		k.options.DeltaT = ptrTo(*o.DeltaT)
	}
	if o.Temperature != nil {
		k.options.Temperature = ptrTo(*o.Temperature)
	}
	if k.ok {
		// solar.Refraction(h) is scale·1.02/(60·tan(h + 10.3/(h + 5.11))): recover scale·1.02/60 from its
		// value at 45°, so that the batch path uses exactly the reference's pressure and temperature scaling
		// (0 with NoRefraction).
		const h = 45.0
		k.refr = solar.Refraction(h, k.options) * math.Tan((h+10.3/(h+5.11))*deg)
		k.elev = o.Elevation / (EarthRadius * 1000)
	}
	k.allocate(minCellSlots)
	return k
}

func ptrTo(v float64) *float64 { return &v }

// allocate replaces the caches with ones of n cell slots, moving over the entries of the old ones.
func (k *Kernel) allocate(n int) {
	oldCells, oldNodes := k.cells, k.nodes
	k.cells = make([]cell, n)
	k.nodes = make([]node, nodesPerCell*n)
	for i := range k.cells {
		k.cells[i].tag = emptySlot
	}
	for i := range k.nodes {
		k.nodes[i].tag = emptySlot
	}
	cellMask, nodeMask := int64(len(k.cells)-1), int64(len(k.nodes)-1)
	for i := range oldCells {
		if c := &oldCells[i]; c.tag != emptySlot {
			k.cells[c.tag&cellMask] = *c
		}
	}
	for i := range oldNodes {
		if nd := &oldNodes[i]; nd.tag != emptySlot {
			k.nodes[nd.tag&nodeMask] = *nd
		}
	}
	k.evictions = 0
}

// grow doubles the caches, up to maxCellSlots, once the rows have evicted as many entries as the caches
// hold: their instants spread wider than the caches reach. Doubling (not more) keeps them within twice the
// span the rows need.
func (k *Kernel) grow() {
	if k.evictions >= len(k.cells) && len(k.cells) < maxCellSlots {
		k.allocate(min(2*len(k.cells), maxCellSlots))
	}
}

// Positions holds the batch path's results, one element per row.
type Positions struct {
	Altitude     []float64 // as Pos.Altitude: topocentric, refracted unless Options.NoRefraction, degrees
	Azimuth      []float64 // as Pos.Azimuth: clockwise from true north, [0, 360), degrees
	Illumination []float64 // as Pos.Illumination: illuminated fraction, [0, 1]
	Phase        []Phase   // as Pos.Phase
}

// resize sets the slices to length n, reusing their arrays when they are large enough.
func (p *Positions) resize(n int) {
	if cap(p.Altitude) < n {
		p.Altitude = make([]float64, n)
	}
	if cap(p.Azimuth) < n {
		p.Azimuth = make([]float64, n)
	}
	if cap(p.Illumination) < n {
		p.Illumination = make([]float64, n)
	}
	if cap(p.Phase) < n {
		p.Phase = make([]Phase, n)
	}
	p.Altitude, p.Azimuth, p.Illumination, p.Phase = p.Altitude[:n], p.Azimuth[:n], p.Illumination[:n], p.Phase[:n]
}

// Positions computes the Moon for rows i in [0, len(unix)): instant unix[i] (Unix seconds, UTC), latitude
// lat[i] and longitude lon[i] (degrees, east positive), the same quantities as [Position] with the kernel's
// options. lat and lon must be at least as long as unix (Positions panics otherwise). It sets out's slices to
// length len(unix), reusing their arrays when their capacity suffices, so a caller that reuses out makes no
// allocation. A row that fails [solar.Check] gets NaN altitude, azimuth and illumination and PhaseUnknown;
// check rows first to report why.
func (k *Kernel) Positions(unix, lat, lon []float64, out *Positions) {
	n := len(unix)
	if len(lat) < n || len(lon) < n {
		panic("moon: Kernel.Positions: lat and lon must be at least as long as unix")
	}
	out.resize(n)
	alt, az, il, ph := out.Altitude[:n], out.Azimuth[:n], out.Illumination[:n], out.Phase[:n]
	lat, lon = lat[:n], lon[:n]
	if !k.ok {
		for i := range alt {
			alt[i], az[i], il[i], ph[i] = math.NaN(), math.NaN(), math.NaN(), PhaseUnknown
		}
		return
	}
	for lo := 0; lo < n; lo += chunkRows {
		hi := min(lo+chunkRows, n)
		k.chunk(unix[lo:hi], lat[lo:hi], lon[lo:hi], alt[lo:hi], az[lo:hi], il[lo:hi], ph[lo:hi])
		k.grow()
	}
}

// chunkRows is the number of rows computed together, pass by pass, so that each pass is a short loop whose
// iterations the processor overlaps, over scratch arrays that stay in the first-level cache.
const chunkRows = 256

// scratch holds per-row intermediate values of one chunk.
type scratch struct {
	h, sd, cd, sp, sh, ch, sl, cl, up, hz, north, east, e0 [chunkRows]float64
}

// valid is solar.Check(unix, lat, lon) == nil without building an error.
func valid(unix, lat, lon float64) bool {
	return unix >= solar.MinUnix && unix < solar.MaxUnix && lat >= -90 && lat <= 90 && lon >= -180 && lon <= 180
}

// chunk computes up to chunkRows rows.
func (k *Kernel) chunk(unix, lat, lon, alt, az, il []float64, ph []Phase) {
	n := len(unix)
	s := &k.scratch
	lat, lon, alt, az, il, ph = lat[:n], lon[:n], alt[:n], az[:n], il[:n], ph[:n]
	h, sd, cd, sp := s.h[:n], s.sd[:n], s.cd[:n], s.sp[:n]

	// Pass 1: interpolate the geocentric quantities to each row's instant; illumination and phase are done.
	invalid := 0
	cells := k.cells
	mask := int64(len(cells) - 1)
	for i, t := range unix {
		if !valid(t, lat[i], lon[i]) {
			h[i], sd[i], cd[i], sp[i] = 0, 0, 1, 0 // overwritten with NaN in the last pass
			invalid++
			continue
		}
		f := t * (1 / cellSpan)
		fk := math.Floor(f)
		v := (f-fk)*cellNodes - cellNodes/2
		ck := int64(fk)
		c := &cells[ck&mask]
		if c.tag != ck {
			k.fill(c, ck)
		}
		h[i] = horner(&c.gha, v) + lon[i]
		sd[i] = horner(&c.sinDec, v)
		cd[i] = horner(&c.cosDec, v)
		sp[i] = horner(&c.sinPi, v)
		il[i] = min(max(horner(&c.illum, v), 0), 1)
		e := horner(&c.elong, v)
		ph[i] = phaseOf(e - 360*math.Floor(e*(1.0/360)))
	}

	// Pass 2: sines and cosines of hour angle and latitude.
	sh, ch, sl, cl := s.sh[:n], s.ch[:n], s.sl[:n], s.cl[:n]
	solar.SincosDegs(h, sh, ch)
	solar.SincosDegs(lat, sl, cl)

	// Pass 3: the Moon's direction in the observer's (up, north, east) frame, minus the observer's offset
	// from the Earth's centre in units of the Moon's distance (sin π equatorial radii per distance: this is
	// the rigorous parallax of Meeus eq. 40.2–40.3 done as a vector difference). For the ellipsoid of axis
	// ratio b/a the offset is (√(1 − e²sin²φ) + elevation/a, −e² sinφ cosφ/√(1 − e²sin²φ), 0) equatorial
	// radii; the square root is expanded to second order in e² (error below 1e-9°). Then altitude and
	// azimuth.
	elev := k.elev
	up, hz, north, east := s.up[:n], s.hz[:n], s.north[:n], s.east[:n]
	for i := range up {
		sl, cl, sd, cd, ch, sp := sl[i], cl[i], sd[i], cd[i], ch[i], sp[i]
		s2 := sl * sl
		q := 1 - s2*(eSq/2+s2*(eSq*eSq/8))
		u := sl*sd + cl*cd*ch - sp*(q+elev)
		no := cl*sd - sl*cd*ch + sp*eSq*sl*cl*(2-q)
		ea := -cd * sh[i]
		up[i], north[i], east[i] = u, no, ea
		hz[i] = math.Sqrt(no*no + ea*ea)
	}
	e0 := s.e0[:n]
	solar.Atan2Degs(up, hz, e0)
	solar.Atan2Degs(east, north, az)

	// Pass 4: azimuth into [0, 360); refraction as solar.Refraction, branch-free: evaluated at
	// max(e0, cutoff), then zeroed below the cutoff.
	arg := s.h[:n] // reused
	for i, e := range e0 {
		a := az[i]
		a += 360 * signBit(a)
		if a >= 360 {
			a -= 360
		}
		az[i] = a
		r := max(e, solar.RefractionCutoff)
		arg[i] = r + 10.3/(r+5.11)
	}
	rs, rc := s.sd[:n], s.cd[:n] // reused
	solar.SincosDegs(arg, rs, rc)
	refr := k.refr
	for i, e := range e0 {
		alt[i] = e + refr*rc[i]/rs[i]*(1-signBit(e-solar.RefractionCutoff))
	}

	// Rows that fail Check.
	for i := 0; invalid > 0; i++ {
		if !valid(unix[i], lat[i], lon[i]) {
			alt[i], az[i], il[i], ph[i] = math.NaN(), math.NaN(), math.NaN(), PhaseUnknown
			invalid--
		}
	}
}

// signBit returns 1 if the sign bit of v is set (v negative or −0), else 0.
func signBit(v float64) float64 {
	return float64(math.Float64bits(v) >> 63)
}

// horner evaluates the polynomial with coefficients c (constant first) at v.
func horner(c *[nCoef]float64, v float64) float64 {
	return c[0] + v*(c[1]+v*(c[2]+v*(c[3]+v*(c[4]+v*(c[5]+v*c[6])))))
}

// fill computes cell ck from its nodes ck·cellNodes − 1 … (ck + 1)·cellNodes + 1.
func (k *Kernel) fill(c *cell, ck int64) {
	var nd [nCoef]node
	first := ck*cellNodes - 1
	for j := range nd {
		nd[j] = *k.node(first + int64(j))
	}
	// The hour angle and the elongation are unwrapped relative to the node at the cell's middle (they change
	// by about 14.5° and 0.5° an hour).
	mid := nd[nCoef/2]
	var gha, sinDec, cosDec, sinPi, illum, elong [nCoef]float64
	for j, n := range nd {
		gha[j] = mid.gha + wrap180(n.gha-mid.gha)
		elong[j] = mid.elong + wrap180(n.elong-mid.elong)
		sinDec[j], cosDec[j], sinPi[j], illum[j] = n.sinDec, n.cosDec, n.sinPi, n.illum
	}
	c.gha, c.sinDec, c.cosDec = fit(&gha), fit(&sinDec), fit(&cosDec)
	c.sinPi, c.illum, c.elong = fit(&sinPi), fit(&illum), fit(&elong)
	if c.tag != emptySlot {
		k.evictions++
	}
	c.tag = ck
}

// lagrangeMatrix turns the values f at v = −nCoef/2 … nCoef/2 (the cell's nodes, in steps from its middle)
// into the coefficients c of the polynomial Σ c[i]·vⁱ through them: the inverse of the Vandermonde matrix of
// those nodes. Each column holds the coefficients of a Lagrange basis polynomial, expanded from its factors
// (small integers) and divided by its integer denominator, so the entries are the exact fractions rounded
// once.
var lagrangeMatrix = func() (m [nCoef][nCoef]float64) {
	for j := range nCoef {
		vj := float64(j - nCoef/2)
		p := [nCoef]float64{1} // Π_{i≠j} (v − vᵢ), constant term first
		den := 1.0
		deg := 0
		for i := range nCoef {
			if i == j {
				continue
			}
			vi := float64(i - nCoef/2)
			for d := deg + 1; d > 0; d-- { // p ← p·(v − vi)
				p[d] = p[d-1] - vi*p[d]
			}
			p[0] *= -vi
			deg++
			den *= vj - vi
		}
		for d := range nCoef {
			m[d][j] = p[d] / den
		}
	}
	return m
}()

// fit returns the coefficients of the polynomial through the values f at the cell's nodes.
func fit(f *[nCoef]float64) (c [nCoef]float64) {
	for i := range lagrangeMatrix {
		row := &lagrangeMatrix[i]
		for j, m := range row {
			c[i] += m * f[j]
		}
	}
	return c
}

// node returns node number nk (instant nk·gridStep), computing it if it is not cached.
func (k *Kernel) node(nk int64) *node {
	nd := &k.nodes[nk&int64(len(k.nodes)-1)]
	if nd.tag == nk {
		return nd
	}
	if nd.tag != emptySlot {
		k.evictions++
	}
	unix := float64(nk) * gridStep
	g := GeocentricAt(solar.JulianDay(unix), k.options.DeltaTAt(unix))
	nd.gha = wrap360(g.Sun.SiderealTime - g.RightAscension)
	nd.sinDec, nd.cosDec = math.Sincos(g.Declination * deg)
	nd.sinPi = EarthRadius / g.Distance
	nd.illum = g.Illumination
	nd.elong = g.Elongation
	nd.tag = nk
	return nd
}
