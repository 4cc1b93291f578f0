package camtrap

import (
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"time"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/internal/fields"
	"github.com/heliotag/heliotag/io/internal/stamp"
	"github.com/heliotag/heliotag/io/internal/zone"
)

// Deployment is one camera placement, as the rows joined to it need it.
type Deployment struct {
	ID string
	// Lat and Lon are WGS84 degrees, north and east positive.
	Lat, Lon float64
	// CoordinateUncertainty is in metres, NaN when not given. It is read
	// for completeness: the sun's position changes by less than 0.01° per
	// kilometre, so it does not enter the computation.
	CoordinateUncertainty float64
	// Start and End bound the deployment (zero when not given).
	Start, End time.Time
	// Heading is cameraHeading, degrees clockwise from true north; NaN when not given.
	Heading float64
	// TimestampIssues is the deployment's timestampIssues flag.
	TimestampIssues bool
	// Err is the problem with the deployment's values, or nil; rows joined
	// to it are bad rows with this reason.
	Err error
}

// Deployments is the deployments table, keyed by deploymentID. It is
// read-only once loaded and safe for concurrent use.
type Deployments struct {
	byID  map[string]*Deployment
	order []*Deployment // in the table's order
	// headings counts deployments with a cameraHeading.
	headings int
}

// Len is the number of deployments.
func (d *Deployments) Len() int { return len(d.byID) }

// All returns the deployments in the table's order.
func (d *Deployments) All() []*Deployment { return d.order }

// Get returns the deployment with that ID, or nil.
func (d *Deployments) Get(id string) *Deployment { return d.byID[id] }

// Headings reports how many deployments have a cameraHeading.
func (d *Deployments) Headings() int { return d.headings }

// LoadDeployments reads the whole deployments table. Timestamps are read as
// the rows' (see Options.TZ): a deploymentStart without an offset needs a
// zone. Bad values of one deployment are kept in its Err, so that only the
// rows joined to it are affected; a deploymentID given twice, or missing
// fields, are errors.
func (p *Package) LoadDeployments(o Options) (*Deployments, error) {
	r, err := p.Resource(TableDeployments)
	if err != nil {
		return nil, err
	}
	t, err := openTable(p, r, o.allocator())
	if err != nil {
		return nil, err
	}
	defer t.Close()
	idx, err := t.need("deploymentID", "latitude", "longitude")
	if err != nil {
		return nil, err
	}
	idx = t.project(append(idx, t.column("deploymentStart"), t.column("deploymentEnd"),
		t.column("cameraHeading"), t.column("timestampIssues"), t.column("coordinateUncertainty")))
	idCol, latCol, lonCol := idx[0], idx[1], idx[2]
	startCol, endCol := idx[3], idx[4]
	headCol, issuesCol, uncCol := idx[5], idx[6], idx[7]
	rz, err := o.resolver()
	if err != nil {
		return nil, err
	}
	parser, _ := stamp.NewParser(stamp.Options{})
	ds := &Deployments{byID: map[string]*Deployment{}}
	row := 0
	for {
		rec, line, err := t.read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		row++
		if len(rec) != len(t.header) {
			return nil, fmt.Errorf("%w: resource %q: %s has %d fields, the header has %d", ErrResource, TableDeployments, t.where(line), len(rec), len(t.header))
		}
		id := rec[idCol]
		if id == "" {
			return nil, fmt.Errorf("%w: resource %q: %s: deploymentID is empty", ErrResource, TableDeployments, t.where(line))
		}
		if _, dup := ds.byID[id]; dup {
			return nil, fmt.Errorf("%w: resource %q: %s: deploymentID %q appears twice", ErrResource, TableDeployments, t.where(line), id)
		}
		d := &Deployment{ID: id, Heading: math.NaN(), CoordinateUncertainty: math.NaN()}
		ds.byID[id] = d
		ds.order = append(ds.order, d)
		bad := func(field string, err error) {
			if d.Err == nil {
				d.Err = fmt.Errorf("%w %q (deployments row %d), %s: %w", ErrDeployment, id, row, field, err)
			}
		}
		if d.Lat, err = fields.Coordinate(rec[latCol], "latitude", 90); err != nil {
			bad("latitude", err)
		} else if d.Lat < -90 || d.Lat > 90 {
			bad("latitude", fmt.Errorf("latitude %v out of range [-90, 90]", d.Lat))
		}
		if d.Lon, err = fields.Coordinate(rec[lonCol], "longitude", 180); err != nil {
			bad("longitude", err)
		} else if d.Lon < -180 || d.Lon > 180 {
			bad("longitude", fmt.Errorf("longitude %v out of range [-180, 180]", d.Lon))
		}
		for _, b := range []struct {
			col   int
			field string
			dst   *time.Time
		}{{startCol, "deploymentStart", &d.Start}, {endCol, "deploymentEnd", &d.End}} {
			if b.col < 0 || strings.TrimSpace(rec[b.col]) == "" {
				continue
			}
			st, err := parser.Parse(rec[b.col])
			if err != nil {
				bad(b.field, err)
				continue
			}
			if *b.dst, _, _, err = rz.Resolve(st, "", d.Lat, d.Lon); err != nil {
				if errors.Is(err, zone.ErrNoTimeZone) {
					return nil, fmt.Errorf("%w: resource %q: %s, %s %q has no UTC offset (Camtrap DP times carry one); give --tz ZONE or --tz auto to read such times: %w",
						enrich.ErrUsage, TableDeployments, t.where(line), b.field, rec[b.col], err)
				}
				bad(b.field, err)
			}
		}
		if headCol >= 0 && strings.TrimSpace(rec[headCol]) != "" {
			v := strings.TrimSpace(rec[headCol])
			if v == "360" { // Camtrap DP allows 0 to 360: 360 is north
				v = "0"
			}
			if h, err := fields.ParseHeading(v); err != nil {
				bad("cameraHeading", err)
			} else {
				d.Heading = h
				ds.headings++
			}
		}
		if issuesCol >= 0 {
			switch strings.TrimSpace(rec[issuesCol]) {
			case "true", "True", "TRUE", "1":
				d.TimestampIssues = true
			case "false", "False", "FALSE", "0", "":
			default:
				bad("timestampIssues", fmt.Errorf("%q is not true or false", rec[issuesCol]))
			}
		}
		if uncCol >= 0 && strings.TrimSpace(rec[uncCol]) != "" {
			if v, err := strconv.ParseFloat(strings.TrimSpace(rec[uncCol]), 64); err == nil {
				d.CoordinateUncertainty = v
			} else {
				bad("coordinateUncertainty", fmt.Errorf("%q is not a number of metres", rec[uncCol]))
			}
		}
	}
	return ds, nil
}

// resolver is the zone resolver of Options.TZ.
func (o Options) resolver() (*zone.Resolver, error) {
	rz, err := zone.NewResolver(zone.OptionsFromFlag(o.TZ))
	if err != nil {
		return nil, fmt.Errorf("%w: --tz: %w", enrich.ErrUsage, err)
	}
	return rz, nil
}
