package zone

import (
	"errors"
	"fmt"
	"math"
	"runtime"
	"strconv"
	"sync"
	"sync/atomic"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/maptile"
	"github.com/ringsaturn/tzf"
	tzfrellite "github.com/ringsaturn/tzf-rel-lite"
	pb "github.com/ringsaturn/tzf/gen/go/tzf/v1"
	"google.golang.org/protobuf/proto"
)

// --tz auto looks zones up in the time zone boundaries bundled with github.com/ringsaturn/tzf
// (tzf-rel-lite: simplified boundaries with ocean zones, ODbL). The lookup is the one tzf's
// DefaultFinder makes, rebuilt here from the same two parts so that it can be cached by map cell:
//
//  1. the preindex: map tiles (Web Mercator, zooms aggZoom..idxZoom) that lie wholly inside one zone;
//     a point inside such a tile gets that zone;
//  2. otherwise the point-in-polygon finder; and if that finds nothing, the same two steps at the
//     eight points 0.02° around (and the point itself again), first answer wins.
//
// Step 1 depends only on which tile of the finest zoom (idxZoom) holds the point, since the tile at
// every coarser zoom is that tile's ancestor. That makes two exact caches possible:
//
//   - a grid of 1/64° × 1/64° cells: a cell wholly inside one preindexed tile (checked once, with a
//     margin of 1e-9° around the cell, far wider than the rounding of the tile arithmetic) answers for
//     every point in it with two multiplications and no trigonometry;
//   - the finest tile: a tile inside a preindexed tile answers for every point in it.
//
// Points in no preindexed tile (near zone borders) are looked up one by one and cached by their exact
// coordinates.
//
// Open ocean resolves to the nautical zones Etc/GMT±N (note the POSIX sign: Etc/GMT+10 is UTC−10),
// 15° wide; the poles resolve to whatever the boundary data has there (Etc/GMT at the North Pole,
// Antarctica/McMurdo at the South Pole in tzf-rel-lite 2025b).

// finder is the immutable lookup structure, built once per process.
type finder struct {
	aggZoom, idxZoom int
	tiles            map[maptile.Tile]string
	poly             tzf.F
	version          string
}

// sharedFinder builds the finder on first use (about 3 s and 30 MB) and returns the same one to
// every caller afterwards.
var sharedFinder = sync.OnceValues(newFinder)

func newFinder() (f *finder, err error) {
	defer func() {
		if p := recover(); p != nil {
			f, err = nil, fmt.Errorf("zone: loading the bundled time zone boundaries: %v", p)
		}
	}()
	var pre pb.PreindexTimezones
	if err := proto.Unmarshal(tzfrellite.PreindexData, &pre); err != nil {
		return nil, fmt.Errorf("zone: reading the bundled time zone tiles: %w", err)
	}
	var comp pb.CompressedTimezones
	if err := proto.Unmarshal(tzfrellite.LiteCompressData, &comp); err != nil {
		return nil, fmt.Errorf("zone: reading the bundled time zone boundaries: %w", err)
	}
	poly, err := tzf.NewFinderFromCompressed(&comp, tzf.SetDropPBTZ)
	if err != nil {
		return nil, fmt.Errorf("zone: building the time zone finder: %w", err)
	}
	if pre.IdxZoom > maxIdxZoom {
		return nil, fmt.Errorf("zone: bundled time zone tiles go to zoom %d; at most %d is supported", pre.IdxZoom, maxIdxZoom)
	}
	if poly.DataVersion() != pre.Version {
		return nil, errors.New("zone: bundled time zone tiles (" + pre.Version + ") and boundaries (" + poly.DataVersion() + ") differ in version")
	}
	f = &finder{aggZoom: int(pre.AggZoom), idxZoom: int(pre.IdxZoom), tiles: make(map[maptile.Tile]string, len(pre.Keys)),
		poly: poly, version: pre.Version}
	for _, k := range pre.Keys {
		t := maptile.New(uint32(k.X), uint32(k.Y), maptile.Zoom(k.Z))
		if _, ok := f.tiles[t]; !ok { // tzf answers with a tile's first name
			f.tiles[t] = k.Name
		}
	}
	runtime.GC() // drop the decoded messages now rather than at a later, larger heap
	return f, nil
}

// tileOf returns the finest-zoom tile holding a point.
func (f *finder) tileOf(lon, lat float64) maptile.Tile {
	return maptile.At(orb.Point{lon, lat}, maptile.Zoom(f.idxZoom))
}

// preindexed returns the zone of the preindexed tile holding the finest tile t, or "".
func (f *finder) preindexed(t maptile.Tile) string {
	for z := f.aggZoom; z <= f.idxZoom; z++ {
		shift := uint32(f.idxZoom - z)
		if name, ok := f.tiles[maptile.Tile{X: t.X >> shift, Y: t.Y >> shift, Z: maptile.Zoom(z)}]; ok {
			return name
		}
	}
	return ""
}

// outside finishes a lookup for a point whose finest tile is not preindexed: the polygon finder, then
// the points around.
func (f *finder) outside(lon, lat float64) string {
	if name := f.poly.GetTimezoneName(lon, lat); name != "" {
		return name
	}
	for _, dx := range []float64{-0.02, 0, 0.02} {
		for _, dy := range []float64{-0.02, 0, 0.02} {
			if name := f.name(lon+dx, lat+dy); name != "" {
				return name
			}
		}
	}
	return ""
}

// name is the uncached lookup of one point (steps 1 and 2 above, without the neighbours).
func (f *finder) name(lon, lat float64) string {
	if name := f.preindexed(f.tileOf(lon, lat)); name != "" {
		return name
	}
	return f.poly.GetTimezoneName(lon, lat)
}

// Cache sizes (slots of a direct-mapped cache; a new entry replaces whatever held its slot).
const (
	exactSlots = 1 << 12
	gridSlots  = 1 << 12
	tileSlots  = 1 << 12
)

// gridPerDegree is the number of grid cells per degree of latitude or longitude; gridMargin widens
// a cell on every side when checking that it lies inside one tile.
const (
	gridPerDegree = 64
	gridMargin    = 1e-9
)

type exactEntry struct {
	lat, lon float64
	zi       *zoneInfo
	err      error
}

// Grid and tile entries are packed in one word, so that filling them allocates nothing: a set top
// bit, the cell or tile, and the zone's id in the low 16 bits (0: the cell or tile is not inside one
// preindexed tile, so its points are looked up one by one).
const idMask = 1<<16 - 1

// gridKey packs a grid cell (latitude and longitude cells offset to be non-negative: 15 bits each).
func gridKey(ilat, ilon int32) uint64 {
	return 1<<63 | uint64(ilat+90*gridPerDegree)<<31 | uint64(ilon+180*gridPerDegree)<<16
}

// tileKey packs a finest-zoom tile (X and Y below 2^21, see maxIdxZoom).
func tileKey(t maptile.Tile) uint64 { return 1<<63 | uint64(t.X)<<37 | uint64(t.Y)<<16 }

// maxIdxZoom is the finest preindex zoom tileKey can hold (X reaches 2^zoom at longitude 180).
const maxIdxZoom = 20

// autoCache holds a Resolver's Auto caches; slots are replaced atomically, so readers never lock.
type autoCache struct {
	exact [exactSlots]atomic.Pointer[exactEntry]
	grid  [gridSlots]atomic.Uint64
	tiles [tileSlots]atomic.Uint64
}

func newAutoCache() *autoCache { return &autoCache{} }

func mix(a, b uint64) uint64 {
	h := a*0x9E3779B97F4A7C15 ^ (b+0x632BE59BD9B4E019)*0xC2B2AE3D27D4EB4F
	return h ^ h>>29 ^ h>>47
}

// probe looks key up in a two-way cache: it returns the entry (0 when absent) and the slot a new
// entry for key should go to (slot h, or its neighbour h^1 when h holds another key).
func probe(slots []atomic.Uint64, key uint64) (uint64, *atomic.Uint64) {
	h := mix(key, 0) & uint64(len(slots)-1)
	v := slots[h].Load()
	if v&^idMask == key {
		return v, nil
	}
	if v2 := slots[h^1].Load(); v2&^idMask == key {
		return v2, nil
	}
	if v == 0 {
		return 0, &slots[h]
	}
	return 0, &slots[h^1]
}

// cellZone returns the name of the preindexed tile holding the whole grid cell (ilat, ilon), or "".
func (f *finder) cellZone(ilat, ilon int32) string {
	lat0, lon0 := float64(ilat)/gridPerDegree-gridMargin, float64(ilon)/gridPerDegree-gridMargin
	lat1, lon1 := float64(ilat+1)/gridPerDegree+gridMargin, float64(ilon+1)/gridPerDegree+gridMargin
	a, b := f.tileOf(lon0, lat0), f.tileOf(lon1, lat1) // opposite corners: every point lies between
	for z := f.aggZoom; z <= f.idxZoom; z++ {
		shift := uint32(f.idxZoom - z)
		ta := maptile.Tile{X: a.X >> shift, Y: a.Y >> shift, Z: maptile.Zoom(z)}
		if ta.X != b.X>>shift || ta.Y != b.Y>>shift {
			return "" // the cell spans tiles at this zoom, and at every finer one
		}
		if name, ok := f.tiles[ta]; ok {
			return name
		}
	}
	return ""
}

// at returns the zone at lat, lon for Mode Auto.
func (r *Resolver) at(lat, lon float64) (*zoneInfo, error) {
	if !validCoords(lat, lon) {
		return nil, &zoneError{"no time zone for coordinates lat " + strconv.FormatFloat(lat, 'g', -1, 64) + ", lon " +
			strconv.FormatFloat(lon, 'g', -1, 64) + ": expected latitude in [-90, 90] and longitude in [-180, 180]", ErrNoZoneFound}
	}
	c := r.auto
	ilat, ilon := int32(math.Floor(lat*gridPerDegree)), int32(math.Floor(lon*gridPerDegree))
	gv, gslot := probe(c.grid[:], gridKey(ilat, ilon))
	if id := gv & idMask; id != 0 {
		return (*r.byID.Load())[id], nil
	}
	ex := &c.exact[mix(math.Float64bits(lat), math.Float64bits(lon))&(exactSlots-1)]
	if e := ex.Load(); e != nil && e.lat == lat && e.lon == lon {
		return e.zi, e.err
	}
	f, err := sharedFinder()
	if err != nil {
		return nil, err
	}
	if gslot != nil { // a cell not seen yet
		var zi *zoneInfo
		if name := f.cellZone(ilat, ilon); name != "" {
			if zi, err = r.named(name); err != nil {
				return nil, err
			}
		}
		if zi != nil {
			gslot.Store(gridKey(ilat, ilon) | uint64(zi.id))
			return zi, nil
		}
		gslot.Store(gridKey(ilat, ilon))
	}
	t := f.tileOf(lon, lat)
	tv, tslot := probe(c.tiles[:], tileKey(t))
	if id := tv & idMask; id != 0 {
		return (*r.byID.Load())[id], nil
	}
	if tslot != nil { // a tile not seen yet
		var zi *zoneInfo
		if name := f.preindexed(t); name != "" {
			if zi, err = r.named(name); err != nil {
				return nil, err
			}
		}
		if zi != nil {
			tslot.Store(tileKey(t) | uint64(zi.id))
			return zi, nil
		}
		tslot.Store(tileKey(t))
	}
	e := &exactEntry{lat: lat, lon: lon}
	if name := f.outside(lon, lat); name == "" {
		e.err = &zoneError{"no time zone found at lat " + strconv.FormatFloat(lat, 'g', -1, 64) + ", lon " +
			strconv.FormatFloat(lon, 'g', -1, 64) + " in the bundled boundaries (" + f.version + ")", ErrNoZoneFound}
	} else {
		e.zi, e.err = r.named(name)
	}
	ex.Store(e)
	return e.zi, e.err
}

// named returns the zone for a name from the boundary data, through the name cache.
func (r *Resolver) named(name string) (*zoneInfo, error) {
	if e, ok := (*r.names.Load())[name]; ok {
		return e.zi, e.err
	}
	return r.load(name)
}
