package job

import (
	"context"
	"math"
	"path/filepath"
	"slices"
	"strings"

	"github.com/heliotag/heliotag/io/camtrap"
)

// PackageInspection describes a Camtrap DP package as enrich would read it.
type PackageInspection struct {
	Version    string // Camtrap DP version named by the profile
	Descriptor string // the datapackage.json
	Resources  []ResourceInspection
	// Deployments summarises the deployments table.
	Deployments DeploymentsInspection
	// SampleTable is the table whose first rows are in Inspection.Samples
	// (observations, at Options.At); SampleFields name the values of each
	// sample.
	SampleTable  string
	SampleFields []string
}

// ResourceInspection is one resource with its files.
type ResourceInspection struct {
	Name  string
	Files []camtrap.FileInfo
}

// DeploymentsInspection summarises the deployments table. The ranges cover
// the readable deployments (NaN when there are none).
type DeploymentsInspection struct {
	Count, Unreadable, Headings, TimestampIssues int
	MinLat, MaxLat, MinLon, MaxLon               float64
}

// inspectPackage reads a package's descriptor and deployments and parses the
// first n observations at o.At (eventStart by default), the way enrich would.
func inspectPackage(ctx context.Context, o Options, n int) (*Inspection, error) {
	pkg, err := camtrap.Open(o.Input)
	if err != nil {
		return nil, err
	}
	o.Output = packageOutput(pkg.Dir)
	if err := checkPackageFlags(o); err != nil {
		return nil, err
	}
	at, err := camtrap.ParseAt(o.At)
	if err != nil {
		return nil, err
	}
	ins := &Inspection{Format: CamtrapDP, ZoneSource: packageZoneSource(o.Select.TZ)}
	pi := &PackageInspection{Version: pkg.Version, Descriptor: pkg.Descriptor, SampleTable: camtrap.TableObservations}
	ins.Package = pi
	for _, r := range pkg.Resources() {
		pi.Resources = append(pi.Resources, ResourceInspection{Name: r.Name, Files: pkg.Files(r)})
	}
	copts := camtrap.Options{TZ: o.Select.TZ, At: at}
	deps, err := pkg.LoadDeployments(copts)
	if err != nil {
		return nil, err
	}
	d := &pi.Deployments
	d.MinLat, d.MaxLat, d.MinLon, d.MaxLon = math.NaN(), math.NaN(), math.NaN(), math.NaN()
	for _, dep := range deps.All() {
		d.Count++
		if !math.IsNaN(dep.Heading) {
			d.Headings++
		}
		if dep.TimestampIssues {
			d.TimestampIssues++
		}
		if dep.Err != nil {
			d.Unreadable++
			continue
		}
		if d.Count-d.Unreadable == 1 {
			d.MinLat, d.MaxLat, d.MinLon, d.MaxLon = dep.Lat, dep.Lat, dep.Lon, dep.Lon
		}
		d.MinLat, d.MaxLat = min(d.MinLat, dep.Lat), max(d.MaxLat, dep.Lat)
		d.MinLon, d.MaxLon = min(d.MinLon, dep.Lon), max(d.MaxLon, dep.Lon)
	}

	rd, err := pkg.NewReader(camtrap.TableObservations, deps, copts)
	if err != nil {
		return nil, err
	}
	defer rd.Close()
	ins.Columns = rd.Columns()
	pi.SampleFields = []string{camtrap.IDField(camtrap.TableObservations), "deploymentID"}
	switch at {
	case camtrap.AtStart:
		pi.SampleFields = append(pi.SampleFields, "eventStart")
	case camtrap.AtMiddle:
		pi.SampleFields = append(pi.SampleFields, "eventStart", "eventEnd")
	case camtrap.AtEnd:
		pi.SampleFields = append(pi.SampleFields, "eventEnd")
	}
	ins.Samples, err = readSamples(ctx, rd, n, func(vals []string) (v []string) {
		for _, f := range pi.SampleFields {
			if j := slices.Index(ins.Columns, f); j >= 0 && j < len(vals) {
				v = append(v, vals[j])
			}
		}
		return v
	}, "mean solar time (the time is in UTC)")
	if err != nil {
		return nil, err
	}
	args := []string{"heliotag", "enrich", shellQuote(o.Input)}
	if o.Select.TZ != "" {
		args = append(args, "--tz", shellQuote(o.Select.TZ))
	}
	if at != camtrap.AtStart {
		args = append(args, "--at", at.String())
	}
	ins.Command = strings.Join(append(args, "-o", shellQuote(o.Output)), " ")
	return ins, nil
}

// packageOutput names the output folder of a package: beside its folder,
// with "_sun" added to the folder's name.
func packageOutput(dir string) string {
	if abs, err := filepath.Abs(dir); err == nil && (dir == "." || dir == "") {
		return filepath.Join("..", filepath.Base(abs)+"_sun")
	}
	return filepath.Clean(dir) + "_sun"
}

func packageZoneSource(tz string) string {
	switch {
	case strings.EqualFold(tz, "auto"):
		return "looked up from each deployment's coordinates (--tz auto)"
	case tz != "":
		return tz + " for every row (--tz)"
	}
	return "none given: Camtrap DP times carry their UTC offset; times without one need --tz ZONE or --tz auto"
}
