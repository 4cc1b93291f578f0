package solar

import (
	"math"
	"sync"
	"sync/atomic"
)

// The batch path evaluates the reference's geocentric quantities at grid instants ("nodes", every gridStep
// seconds of Unix time, aligned to the Unix epoch) and, for the cell between two nodes, fits quintic
// polynomials through the six surrounding nodes (Lagrange interpolation at u = −2…3 in units of the step).
// Per row it only evaluates the polynomials and does the topocentric part. Nodes and cells are kept in
// direct-mapped caches indexed by their number, so they are computed once per kernel however the rows are
// ordered, and are reused by later batches. The caches start small (a few years of instants) and grow, up to
// a limit, when the rows' instants spread wider than they hold.
//
// Interpolation error for a 2-day step h: the fastest terms of the sun's apparent place that matter are
// nutation (period 13.7 d, amplitude 0.00006°) and the Moon's pull on the Earth (period 29.5 d, 0.0018°). On
// the middle interval of six nodes a quintic errs by at most 0.0049·(ωh)⁶ times a term's amplitude: about
// 2e-7° and 5e-8°. TestKernelAccuracy measures the total against the reference path (under 1e-6°).
//
// Nodes cost one reference evaluation each (about 10 µs); kernels made by one [Grid] share them, so that
// workers handling the same rows' instants mostly evaluate each node once between them.
const (
	gridStep     = 2 * secondsPerDay // seconds between nodes
	minCellSlots = 1 << 10           // 1024 cells: 5.6 years of 2-day cells without collisions
	maxCellSlots = 1 << 15           // 32768 cells: 179 years
	nodesPerCell = 2                 // node slots per cell slot: nodes reach twice as far
	emptySlot    = math.MinInt64     // tag of a slot never filled
)

// node holds the geocentric quantities the batch path needs at one grid instant.
type node struct {
	tag            int64
	ra             float64 // α, apparent right ascension, degrees [0, 360)
	nutRA          float64 // Δψ·cos ε, the equation of the equinoxes, degrees
	sinDec, cosDec float64 // of δ, apparent declination
	sinXi          float64 // sine of the equatorial horizontal parallax
}

// cell holds, for the instants t = (k + u)·gridStep, u in [0, 1), quintic coefficients in u of the Greenwich
// hour angle of the sun (ν − α, degrees, not reduced), of sin δ and of cos δ, and the parallax.
type cell struct {
	tag    int64
	gha    [6]float64
	sinDec [6]float64
	cosDec [6]float64
	sinXi  float64
}

// Kernel is the batch path of the package: it computes altitude, azimuth and light phase for many rows at
// a time, within 0.0005° of [Position] (under 1e-6° in the tests, 1900–2100 and -2000…6000; the one
// exception is the week around 3000-01-01, where the ΔT model steps by 150 s and rows may differ by up to
// 0.002°). It caches geocentric quantities between calls, so one kernel should serve every batch a worker
// handles: a batch of instants within a year then costs no reference evaluation after the first. The caches
// grow to hold 179 years of instants (359 years of the underlying grid); rows spread so thinly that the grid
// does not pay (about one new grid cell per row) cost one reference evaluation each.
// A Kernel is not safe for concurrent use: give each goroutine its own.
type Kernel struct {
	ok            bool    // options valid
	refr          float64 // refraction scale × 1.02/60, degrees; 0 with Options.NoRefraction
	elev          float64 // observer elevation / equatorial radius
	options       Options // for ΔT at the nodes
	grid          *Grid   // nodes shared with the grid's other kernels
	cells         []cell  // len is a power of two
	nodes         []node  // len is nodesPerCell × len(cells)
	evictions     int     // cells and nodes replaced since the caches were last (re)built
	rows          int     // rows done so far in the current Positions call
	callEvictions int     // nodes replaced in the current Positions call
	exact         cell    // one instant's values, for rows too spread for the grid
	exactRows     int     // rows evaluated exactly since the kernel was made
	scratch       scratch
	days          dayCache // Days computed by Kernel.Day (see events.go)
}

// NewKernel returns a kernel for the given options (see [Options]; validate them first with
// [Options.Validate]: with invalid options every row gets NaN and PhaseUnknown). Its caches take 260 kB at
// first and grow up to about 8 MB when the rows' instants span more than a few years. Kernels for several
// goroutines are better made by one [Grid].
func NewKernel(o Options) *Kernel {
	return newKernel(copyOptions(o), nil)
}

// copyOptions returns o with its own copies of the values it points to: the caller may change them later.
func copyOptions(o Options) Options {
	if o.DeltaT != nil {
		o.DeltaT = ptrTo(*o.DeltaT)
	}
	if o.Temperature != nil {
		o.Temperature = ptrTo(*o.Temperature)
	}
	return o
}

// newKernel returns a kernel for options o (already copied) sharing grid g's nodes; g may be nil.
func newKernel(o Options, g *Grid) *Kernel {
	k := &Kernel{
		ok:      o.Validate() == nil,
		refr:    o.refractionScale() * 1.02 / 60,
		elev:    o.Elevation / earthRadius,
		options: o,
		grid:    g,
	}
	if o.NoRefraction {
		k.refr = 0
	}
	k.allocate(minCellSlots)
	return k
}

// Grid holds the geocentric quantities at the batch path's grid instants for the kernels it makes, so that
// they mostly compute each instant once between them (two kernels needing the same instant at the same
// moment may both compute it): several workers handling rows of the same years then share the cost of
// building their caches. A Grid is safe for concurrent use; each of its kernels is not. It holds at most
// 65,536 instants (about 8 MB), 359 years of the grid; beyond that each kernel computes what the grid does
// not hold. Make one with [NewGrid]; the zero Grid has the zero Options.
type Grid struct {
	options Options
	mu      sync.RWMutex
	nodes   map[int64]node
	full    atomic.Bool // len(nodes) == maxGridNodes: nothing more is stored
}

// maxGridNodes bounds a Grid: as many nodes as the largest kernel caches hold.
const maxGridNodes = nodesPerCell * maxCellSlots

// NewGrid returns an empty grid for the given options (the kernels' options; see [NewKernel]).
func NewGrid(o Options) *Grid {
	return &Grid{options: copyOptions(o)}
}

// NewKernel returns a kernel with the grid's options, sharing the grid's nodes (see [NewKernel]).
func (g *Grid) NewKernel() *Kernel {
	return newKernel(g.options, g)
}

// lookup returns node nk if the grid holds it; a nil grid holds nothing.
func (g *Grid) lookup(nk int64) (node, bool) {
	if g == nil {
		return node{}, false
	}
	g.mu.RLock()
	nd, ok := g.nodes[nk]
	g.mu.RUnlock()
	return nd, ok
}

// store adds a computed node, unless the grid is nil or full.
func (g *Grid) store(nd node) {
	if g == nil || g.full.Load() {
		return
	}
	g.mu.Lock()
	if g.nodes == nil {
		g.nodes = make(map[int64]node)
	}
	if len(g.nodes) < maxGridNodes {
		g.nodes[nd.tag] = nd
	}
	g.full.Store(len(g.nodes) >= maxGridNodes)
	g.mu.Unlock()
}

// allocate replaces the caches with empty ones of n cell slots.
func (k *Kernel) allocate(n int) {
	k.cells = make([]cell, n)
	k.nodes = make([]node, nodesPerCell*n)
	for i := range k.cells {
		k.cells[i].tag = emptySlot
	}
	for i := range k.nodes {
		k.nodes[i].tag = emptySlot
	}
	k.evictions = 0
}

// grow quadruples the caches, up to maxCellSlots, once the rows have evicted as many entries as the caches
// hold: their instants spread wider than the caches reach.
func (k *Kernel) grow() {
	if k.evictions >= len(k.cells) && len(k.cells) < maxCellSlots {
		k.allocate(min(4*len(k.cells), maxCellSlots))
	}
}

func ptrTo(v float64) *float64 { return &v }

// Positions holds the batch path's results, one element per row.
type Positions struct {
	Altitude []float64 // as Pos.Altitude: topocentric, refracted unless Options.NoRefraction, degrees
	Azimuth  []float64 // as Pos.Azimuth: clockwise from true north, [0, 360), degrees
	Phase    []Phase   // PhaseOf(geometric altitude, hour angle)
}

// resize sets the three slices to length n, reusing their arrays when they are large enough.
func (p *Positions) resize(n int) {
	if cap(p.Altitude) < n {
		p.Altitude = make([]float64, n)
	}
	if cap(p.Azimuth) < n {
		p.Azimuth = make([]float64, n)
	}
	if cap(p.Phase) < n {
		p.Phase = make([]Phase, n)
	}
	p.Altitude, p.Azimuth, p.Phase = p.Altitude[:n], p.Azimuth[:n], p.Phase[:n]
}

// Positions computes the sun for rows i in [0, len(unix)): instant unix[i] (Unix seconds, UTC), latitude
// lat[i] and longitude lon[i] (degrees, east positive), the same quantities as [Position] with the kernel's
// options. lat and lon must be at least as long as unix (Positions panics otherwise). It sets out's three
// slices to length len(unix), reusing their arrays when their capacity suffices, so a caller that reuses out
// makes no allocation. A row that fails [Check] gets NaN altitude and azimuth and PhaseUnknown; check rows
// first to report why.
func (k *Kernel) Positions(unix, lat, lon []float64, out *Positions) {
	n := len(unix)
	if len(lat) < n || len(lon) < n {
		panic("solar: Kernel.Positions: lat and lon must be at least as long as unix")
	}
	out.resize(n)
	alt, az, ph := out.Altitude[:n], out.Azimuth[:n], out.Phase[:n]
	lat, lon = lat[:n], lon[:n]
	if !k.ok {
		for i := range alt {
			alt[i], az[i], ph[i] = math.NaN(), math.NaN(), PhaseUnknown
		}
		return
	}
	refr, s := k.refr, &k.scratch
	k.rows, k.callEvictions = 0, 0
	for lo := 0; lo < n; lo += chunkRows {
		hi := min(lo+chunkRows, n)
		k.chunk(unix[lo:hi], lat[lo:hi], lon[lo:hi], alt[lo:hi], az[lo:hi], ph[lo:hi], refr, s)
		k.rows += hi - lo
		k.grow()
	}
}

// chunkRows is the number of rows computed together, pass by pass, so that each pass is a short loop whose
// iterations the processor overlaps, over scratch arrays that stay in the first-level cache.
const chunkRows = 256

// scratch holds per-row intermediate values of one chunk.
type scratch struct {
	h, sd, cd, xi, sh, ch, sp, cp, up, hz, north, east, e0 [chunkRows]float64
}

// chunk computes up to chunkRows rows.
func (k *Kernel) chunk(unix, lat, lon, alt, az []float64, ph []Phase, refr float64, s *scratch) {
	n := len(unix)
	lat, lon, alt, az, ph = lat[:n], lon[:n], alt[:n], az[:n], ph[:n]
	h, sd, cd, xi := s.h[:n], s.sd[:n], s.cd[:n], s.xi[:n]
	// Pass 1: interpolate the geocentric quantities to each row's instant.
	invalid := 0
	cells := k.cells
	mask := int64(len(cells) - 1)
	for i, t := range unix {
		if !valid(t, lat[i], lon[i]) {
			h[i], sd[i], cd[i], xi[i] = 0, 0, 1, 0 // overwritten with NaN in the last pass
			invalid++
			continue
		}
		f := t * (1 / gridStep)
		fk := math.Floor(f)
		u := f - fk
		ck := int64(fk)
		c := &cells[ck&mask]
		if c.tag != ck {
			if k.thrashing() && !k.cached(ck) && !k.cached(ck+1) {
				// The rows spread wider than the largest caches hold, so the grid does not pay (up to six
				// evaluations per cell, soon evicted): evaluate this row's instant exactly instead, as
				// constant "polynomials".
				c, u = &k.exact, 0
				k.evaluate(c, t)
				k.exactRows++
			} else {
				k.fill(c, ck)
			}
		}
		// Greenwich hour angle + longitude = local hour angle; declination.
		h[i] = c.gha[0] + u*(c.gha[1]+u*(c.gha[2]+u*(c.gha[3]+u*(c.gha[4]+u*c.gha[5])))) + lon[i]
		sd[i] = c.sinDec[0] + u*(c.sinDec[1]+u*(c.sinDec[2]+u*(c.sinDec[3]+u*(c.sinDec[4]+u*c.sinDec[5]))))
		cd[i] = c.cosDec[0] + u*(c.cosDec[1]+u*(c.cosDec[2]+u*(c.cosDec[3]+u*(c.cosDec[4]+u*c.cosDec[5]))))
		xi[i] = c.sinXi
	}
	// Pass 2: sines and cosines of hour angle and latitude.
	sh, ch, sp, cp := s.sh[:n], s.ch[:n], s.sp[:n], s.cp[:n]
	sincosDegs(h, sh, ch)
	sincosDegs(lat, sp, cp)

	// Pass 3: the sun's direction in the observer's (up, north, east) frame, minus the observer's offset from
	// the Earth's centre in units of the sun's distance (parallax). For the ellipsoid of axis ratio b/a the
	// offset is (√(1 − e²sin²φ) + elevation/a, −e² sinφ cosφ/√(1 − e²sin²φ), 0) equatorial radii; the square
	// root is expanded to second order in e² (error below 1e-10°). Then altitude and azimuth.
	elev := k.elev
	up, hz, north, east := s.up[:n], s.hz[:n], s.north[:n], s.east[:n]
	for i := range up {
		sp, cp, sd, cd, ch, xi := sp[i], cp[i], sd[i], cd[i], ch[i], xi[i]
		s2 := sp * sp
		q := 1 - s2*(eSq/2+s2*(eSq*eSq/8))
		u := sp*sd + cp*cd*ch - xi*(q+elev)
		no := cp*sd - sp*cd*ch + xi*eSq*sp*cp*(2-q)
		ea := -cd * sh[i]
		up[i], north[i], east[i] = u, no, ea
		hz[i] = math.Sqrt(no*no + ea*ea)
	}
	e0 := s.e0[:n]
	atan2Degs(up, hz, e0)
	atan2Degs(east, north, az)

	// Pass 4: azimuth into [0, 360); refraction (as Refraction, branch-free: evaluated at max(e0, cutoff),
	// then zeroed below the cutoff) and phase.
	arg := s.h[:n] // reused
	for i, e := range e0 {
		a := az[i]
		a += 360 * signBit(a)
		if a >= 360 {
			a -= 360
		}
		az[i] = a
		r := max(e, RefractionCutoff)
		arg[i] = r + 10.3/(r+5.11)
	}
	rs, rc := s.sd[:n], s.cd[:n] // reused
	sincosDegs(arg, rs, rc)
	for i, e := range e0 {
		alt[i] = e + refr*rc[i]/rs[i]*(1-signBit(e-RefractionCutoff))
		level := 1 - signBitInt(SunriseAltitude-e) + signBitInt(e-CivilTwilightAltitude) +
			signBitInt(e-NauticalTwilightAltitude) + signBitInt(e-AstronomicalTwilightAltitude)
		ph[i] = phaseByLevel[level][1-signBitInt(sh[i])]
	}
	// Rows that fail Check.
	for i := 0; invalid > 0; i++ {
		if !valid(unix[i], lat[i], lon[i]) {
			alt[i], az[i], ph[i] = math.NaN(), math.NaN(), PhaseUnknown
			invalid--
		}
	}
}

// eSq is the squared eccentricity 1 − (b/a)² of the Earth ellipsoid of NREL/TP-560-34302 Eq. 38–39.
const eSq = 1 - earthAxisRatio*earthAxisRatio

// fill computes cell ck from its six nodes.
func (k *Kernel) fill(c *cell, ck int64) {
	var nd [6]*node
	for j := range nd {
		nd[j] = k.node(ck - 2 + int64(j))
	}
	// Greenwich hour angle ν − α = ν0 + Δψ·cosε − α. The mean sidereal time is exact and nearly linear in
	// time; the rest is smooth and is interpolated relative to the cell's start node.
	q := nd[2].nutRA - nd[2].ra
	var dq, sd, cd [6]float64
	for j, n := range nd {
		dq[j] = wrap180(n.nutRA - n.ra - q)
		sd[j], cd[j] = n.sinDec, n.cosDec
	}
	unix := float64(ck) * gridStep
	jd := JulianDay(unix)
	jc := (jd - j2000JD) / 36525
	// d/dday of ν0 (NREL/TP-560-34302 Eq. 28), per cell.
	rate := 360.98564736629 + (2*0.000387933*jc-3*jc*jc/38710000)/36525
	c.gha = lagrange(dq)
	c.gha[0] = wrap360(meanSiderealTime(jd, jc) + q)
	c.gha[1] += rate * (gridStep / secondsPerDay)
	c.sinDec = lagrange(sd)
	c.cosDec = lagrange(cd)
	c.sinXi = (nd[2].sinXi + nd[3].sinXi) / 2
	if c.tag != emptySlot {
		k.evictions++
	}
	c.tag = ck
}

// lagrangeMatrix turns the values f at u = −2, −1, 0, 1, 2, 3 into the coefficients c of the quintic
// Σ c[i]·uⁱ through them: the inverse of the Vandermonde matrix of those nodes (exact fractions).
var lagrangeMatrix = [6][6]float64{
	{0, 0, 1, 0, 0, 0},
	{1.0 / 20, -1.0 / 2, -1.0 / 3, 1, -1.0 / 4, 1.0 / 30},
	{-1.0 / 24, 2.0 / 3, -5.0 / 4, 2.0 / 3, -1.0 / 24, 0},
	{-1.0 / 24, -1.0 / 24, 5.0 / 12, -7.0 / 12, 7.0 / 24, -1.0 / 24},
	{1.0 / 24, -1.0 / 6, 1.0 / 4, -1.0 / 6, 1.0 / 24, 0},
	{-1.0 / 120, 1.0 / 24, -1.0 / 12, 1.0 / 12, -1.0 / 24, 1.0 / 120},
}

// lagrange returns the coefficients of the quintic through the values f at u = −2…3.
func lagrange(f [6]float64) (c [6]float64) {
	for i, row := range lagrangeMatrix {
		for j, m := range row {
			c[i] += m * f[j]
		}
	}
	return c
}

// thrashing reports whether the caches are as large as they get and the current call keeps replacing nodes:
// more than one for every eight rows so far, after a margin.
func (k *Kernel) thrashing() bool {
	return len(k.cells) == maxCellSlots && k.callEvictions > 64+k.rows/8
}

// cached reports whether node nk is in the cache.
func (k *Kernel) cached(nk int64) bool {
	return k.nodes[nk&int64(len(k.nodes)-1)].tag == nk
}

// evaluate sets c to the exact values at instant unix, as constant polynomials.
func (k *Kernel) evaluate(c *cell, unix float64) {
	g := GeocentricAt(JulianDay(unix), k.options.DeltaTAt(unix))
	*c = cell{tag: emptySlot, sinXi: math.Sin(parallaxArcsec / (3600 * g.Distance) * deg)}
	c.gha[0] = g.SiderealTime - g.RightAscension
	c.sinDec[0], c.cosDec[0] = math.Sincos(g.Declination * deg)
}

// node returns node number nk (instant nk·gridStep), computing it if it is not cached.
func (k *Kernel) node(nk int64) *node {
	nd := &k.nodes[nk&int64(len(k.nodes)-1)]
	if nd.tag == nk {
		return nd
	}
	if nd.tag != emptySlot {
		k.evictions++
		k.callEvictions++
	}
	if shared, ok := k.grid.lookup(nk); ok {
		*nd = shared
		return nd
	}
	unix := float64(nk) * gridStep
	g := GeocentricAt(JulianDay(unix), k.options.DeltaTAt(unix))
	nd.ra = g.RightAscension
	nd.nutRA = g.NutationLongitude * math.Cos(g.Obliquity*deg)
	nd.sinDec, nd.cosDec = math.Sincos(g.Declination * deg)
	nd.sinXi = math.Sin(parallaxArcsec / (3600 * g.Distance) * deg)
	nd.tag = nk
	k.grid.store(*nd)
	return nd
}
