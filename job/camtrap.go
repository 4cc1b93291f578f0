package job

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/internal/outfile"
	"github.com/heliotag/heliotag/io/camtrap"
	"github.com/heliotag/heliotag/io/formats"
)

// CamtrapDP is the Format reported for a Camtrap DP package run.
const CamtrapDP formats.Format = "camtrap-dp"

// TableResult is one enriched table of a Camtrap DP package run.
type TableResult struct {
	Table   string // "observations" or "media"
	Output  string // the sun table written in the output folder
	Rejects string // the rejects file, if any
	Summary enrich.Summary
}

// IsPackage reports whether an enrich input is a Camtrap DP package: a
// datapackage.json, or a folder holding one.
func IsPackage(input string) bool { return input != "-" && camtrap.IsPackage(input) }

// checkNotFolder refuses a folder that holds no datapackage.json (it is
// neither a file nor a package).
func checkNotFolder(input string) error {
	if st, err := os.Stat(input); err == nil && st.IsDir() {
		return fmt.Errorf("%w: %s is a folder without a %s; give a file, or the folder of a Camtrap DP package", enrich.ErrUsage, input, camtrap.DescriptorName)
	}
	return nil
}

// enrichPackage enriches a Camtrap DP package into a new package folder
// (o.Output): the input files copied unchanged, one "<table>-sun.csv" per
// table of o.Tables, and the datapackage.json with those tables added to its
// resources. The folder is written beside the target under a temporary name
// and renamed only when complete. res.Summary totals the tables.
func enrichPackage(ctx context.Context, o Options) (res Result, err error) {
	res.Format = CamtrapDP
	if err := checkPackageFlags(o); err != nil {
		return res, err
	}
	if o.BatchRows <= 0 { // tables are read as CSV text
		o.BatchRows = formats.CSVBatchRows
	}
	if err := o.Solar.Validate(); err != nil {
		return res, fmt.Errorf("%w: %w", enrich.ErrUsage, err)
	}
	if err := o.Glare.Validate(); err != nil {
		return res, err
	}
	at, err := camtrap.ParseAt(o.At)
	if err != nil {
		return res, err
	}
	tables, err := camtrap.ParseTables(o.Tables)
	if err != nil {
		return res, err
	}
	if _, err := enrich.NewPlan(enrich.PlanOptions{Add: o.Add, Heading: true}); err != nil {
		return res, err // the groups, checked before the input is opened
	}
	pkg, err := camtrap.Open(o.Input)
	if err != nil {
		return res, err
	}
	if err := pkg.CheckAdd(tables); err != nil {
		return res, err
	}

	// Check every output before reading any row.
	if err := outfile.CheckDir(o.Output, o.Force, pkg.Dir); err != nil {
		return res, fmt.Errorf("%w: %w", enrich.ErrUsage, err)
	}
	rejects := map[string]string{}
	if o.Policy == enrich.PolicySkip {
		for _, t := range tables {
			rejects[t] = packageRejects(o.Output, o.Rejects, t, len(tables))
		}
	} else if o.Rejects != "" {
		return res, fmt.Errorf("%w: --rejects goes with --on-bad-row skip", enrich.ErrUsage)
	}
	var files []string
	for _, t := range tables {
		if rejects[t] != "" {
			files = append(files, rejects[t])
		}
	}
	if o.Report != "" {
		files = append(files, o.Report)
	}
	for _, f := range files {
		for _, dir := range []string{o.Output, pkg.Dir} {
			if inside(f, dir) {
				return res, fmt.Errorf("%w: %s is inside %s; write rejects and reports outside the input and output packages", enrich.ErrUsage, f, dir)
			}
		}
		if err := outfile.Check(f, o.Force, pkg.Descriptor); err != nil {
			return res, fmt.Errorf("%w: %w", enrich.ErrUsage, err)
		}
	}

	copts := camtrap.Options{TZ: o.Select.TZ, At: at}
	deps, err := pkg.LoadDeployments(copts)
	if err != nil {
		return res, err
	}
	plans := map[string]*enrich.Plan{}
	for _, t := range tables {
		if plans[t], err = packagePlan(o, t, deps); err != nil {
			return res, err
		}
	}

	dir, err := outfile.CreateDir(o.Output, o.Force)
	if err != nil {
		return res, err
	}
	var rejFiles []*outfile.File
	defer func() {
		if err != nil {
			dir.Abort()
			for _, f := range rejFiles {
				f.Abort()
			}
		}
	}()
	var added []camtrap.Added
	// Progress runs over every table: rows so far, and bytes of all the
	// tables' files (unknown, 0, when one is gzipped).
	prog := progress{}
	for _, t := range tables {
		n := pkg.Size(t)
		if n == 0 {
			prog.total = 0
			break
		}
		prog.total += n
	}
	for _, t := range tables {
		tr := TableResult{Table: t, Output: filepath.Join(o.Output, camtrap.SunName(t)+".csv")}
		var rf *outfile.File
		if rejects[t] != "" {
			if rf, err = outfile.Create(rejects[t]); err != nil {
				return res, err
			}
			rejFiles = append(rejFiles, rf)
			tr.Rejects = rejects[t]
		}
		if tr.Summary, err = enrichTable(ctx, o, pkg, deps, copts, t, plans[t], dir.Path(), rf, prog); err != nil {
			res.Tables = append(res.Tables, tr)
			return res, fmt.Errorf("%s: %w", t, err)
		}
		prog.rows += tr.Summary.Read
		prog.done += pkg.Size(t)
		res.Tables = append(res.Tables, tr)
		added = append(added, camtrap.Added{Table: t, Plan: plans[t], At: at, Generator: "heliotag " + Version})
	}
	if err = pkg.WritePackage(dir.Path(), added); err != nil {
		return res, err
	}
	for _, f := range rejFiles {
		if err = f.Commit(); err != nil {
			return res, err
		}
	}
	if err = dir.Commit(); err != nil {
		return res, err
	}
	res.Output = o.Output
	res.Summary = totalSummary(res.Tables)
	if len(rejects) > 0 {
		res.Rejects = rejects[tables[0]]
	}
	if o.Report != "" {
		if err = writePackageReport(o, at, res); err != nil {
			return res, err
		}
	}
	return res, nil
}

// progress is what the tables before the current one have done: rows and
// bytes, and the bytes of every table (0 when unknown).
type progress struct{ rows, done, total int64 }

// enrichTable runs one table through enrich.Run into dir/<table>-sun.csv.
func enrichTable(ctx context.Context, o Options, pkg *camtrap.Package, deps *camtrap.Deployments, copts camtrap.Options,
	table string, plan *enrich.Plan, dir string, rejects *outfile.File, before progress) (sum enrich.Summary, err error) {
	rd, err := pkg.NewReader(table, deps, copts)
	if err != nil {
		return sum, err
	}
	defer rd.Close()
	f, err := os.OpenFile(filepath.Join(dir, camtrap.SunName(table)+".csv"), os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
	if err != nil {
		return sum, err
	}
	defer func() {
		if cerr := f.Close(); err == nil && cerr != nil {
			err = fmt.Errorf("writing %s: %w", f.Name(), cerr)
		}
	}()
	sink, err := camtrap.NewWriter(f, rd, plan)
	if err != nil {
		return sum, err
	}
	eo := enrich.Options{
		Plan: plan, Policy: o.Policy,
		Workers: o.Workers, BatchRows: o.BatchRows, Solar: o.Solar, Glare: o.Glare,
	}
	if rejects != nil {
		eo.Rejects = rejects
	}
	if o.OnProgress != nil {
		eo.OnProgress = func(rows int64) {
			done, _ := rd.Position()
			o.OnProgress(before.rows+rows, before.done+done, before.total)
		}
	}
	sum, err = enrich.Run(ctx, rd, sink, eo)
	if cerr := sink.Close(); err == nil {
		err = cerr
	}
	if err == nil && ctx.Err() != nil {
		err = context.Cause(ctx)
	}
	if err == nil {
		if serr := f.Sync(); serr != nil {
			err = fmt.Errorf("writing %s: %w", f.Name(), serr)
		}
	}
	return sum, err
}

// checkPackageFlags refuses the options that choose or read columns: a
// package names its own fields.
func checkPackageFlags(o Options) error {
	if o.Output == "" || o.Output == "-" {
		return fmt.Errorf("%w: a Camtrap DP package is enriched into a new package folder: give -o DIR", enrich.ErrUsage)
	}
	s := o.Select
	for _, f := range []struct {
		set  bool
		flag string
	}{
		{s.Lat != "", "--lat"}, {s.Lon != "", "--lon"}, {s.Geometry != "", "--geometry"},
		{s.Time != "", "--time"}, {s.Date != "", "--date"}, {s.TimeFormat != "", "--time-format"},
		{s.Epoch != "", "--epoch"}, {s.TZColumn != "", "--tz-column"},
		{s.Heading != "", "--heading"}, {s.HeadingFromGeometry, "--heading-from-geometry"},
		{o.From != "", "--from"}, {o.To != "", "--to"}, {o.Delimiter != "", "--delimiter"},
		{o.RS, "--rs"}, {o.Compression != "", "--compression"},
	} {
		if f.set {
			return fmt.Errorf("%w: %s does not apply to a Camtrap DP package, which names its own fields (deployments.latitude and longitude, observations.eventStart/eventEnd, media.timestamp, deployments.cameraHeading); use --at and --tables", enrich.ErrUsage, f.flag)
		}
	}
	return nil
}

// packagePlan is the column plan of one table: its ID field comes first, the
// time note is always there (outside_deployment, timestamp_issues), and the
// heading is the deployments' cameraHeading. "--add all" includes glare when
// every deployment has a cameraHeading; --add glare needs at least one (rows
// of deployments without one are then bad rows).
func packagePlan(o Options, table string, deps *camtrap.Deployments) (*enrich.Plan, error) {
	all := strings.EqualFold(strings.TrimSpace(o.Add), "all")
	heading := deps.Headings() > 0
	if all {
		heading = deps.Len() > 0 && deps.Headings() == deps.Len()
	}
	if !all && !heading {
		for _, g := range strings.Split(o.Add, ",") {
			if strings.EqualFold(strings.TrimSpace(g), string(enrich.GroupGlare)) {
				return nil, fmt.Errorf("%w: the glare group needs the camera's direction: no deployment has a cameraHeading", enrich.ErrUsage)
			}
		}
	}
	return enrich.NewPlan(enrich.PlanOptions{
		Add: o.Add, Prefix: o.Prefix, Input: []string{camtrap.IDField(table)},
		TimeNote: true, Heading: heading, ErrorColumn: o.Policy == enrich.PolicyKeep,
	})
}

// packageRejects is the rejects file of a table under the skip policy:
// beside the output folder, "<DIR>.<table>.rejects.csv"; or --rejects FILE,
// with ".<table>" put before its extension when several tables are enriched.
func packageRejects(output, given, table string, tables int) string {
	if given == "" {
		return filepath.Clean(output) + "." + table + ".rejects.csv"
	}
	if tables == 1 {
		return given
	}
	ext := filepath.Ext(given)
	return strings.TrimSuffix(given, ext) + "." + table + ext
}

// inside reports whether path lies inside dir (both made absolute).
func inside(path, dir string) bool {
	p, err1 := filepath.Abs(path)
	d, err2 := filepath.Abs(dir)
	if err1 != nil || err2 != nil {
		return false
	}
	rel, err := filepath.Rel(d, p)
	return err == nil && rel != ".." && !strings.HasPrefix(rel, ".."+string(filepath.Separator))
}

func totalSummary(ts []TableResult) enrich.Summary {
	sum := enrich.Summary{Reasons: map[string]int64{}, Phases: map[string]int64{}, Conditions: map[string]int64{}}
	for _, t := range ts {
		s := t.Summary
		sum.Read += s.Read
		sum.Written += s.Written
		sum.Rejected += s.Rejected
		sum.Kept += s.Kept
		sum.Elapsed += s.Elapsed
		for k, v := range s.Reasons {
			sum.Reasons[t.Table+": "+k] += v
		}
		for k, v := range s.Phases {
			sum.Phases[k] += v
		}
		for k, v := range s.Conditions {
			sum.Conditions[k] += v
		}
	}
	return sum
}

// PackageReport is the JSON document written by --report for a package run.
type PackageReport struct {
	Version string          `json:"version"`
	Input   string          `json:"input"`
	Output  string          `json:"output"`
	Format  string          `json:"format"`
	At      string          `json:"at"`
	Tables  []TableReport   `json:"tables"`
	Options ReportOptions   `json:"options"`
	Total   PackageRowTotal `json:"total"`
}

// TableReport holds one table's figures. RowsRead = RowsOut + Rejected.
type TableReport struct {
	Table      string           `json:"table"`
	Output     string           `json:"output"`
	Rejects    string           `json:"rejects,omitempty"`
	RowsRead   int64            `json:"rows_read"`
	RowsOut    int64            `json:"rows_written"`
	Rejected   int64            `json:"rows_rejected"`
	Kept       int64            `json:"rows_kept_with_error"`
	Reasons    map[string]int64 `json:"bad_rows_by_reason"`
	Phases     map[string]int64 `json:"rows_by_sun_phase"`
	Conditions map[string]int64 `json:"rows_by_light_condition"`
	Seconds    float64          `json:"seconds"`
	RowsPerSec float64          `json:"rows_per_second"`
}

// PackageRowTotal sums the tables.
type PackageRowTotal struct {
	RowsRead int64   `json:"rows_read"`
	RowsOut  int64   `json:"rows_written"`
	Rejected int64   `json:"rows_rejected"`
	Kept     int64   `json:"rows_kept_with_error"`
	Seconds  float64 `json:"seconds"`
}

func writePackageReport(o Options, at fmt.Stringer, res Result) error {
	rep := PackageReport{
		Version: Version, Input: o.Input, Output: res.Output, Format: string(res.Format), At: at.String(),
		Total: PackageRowTotal{RowsRead: res.Summary.Read, RowsOut: res.Summary.Written,
			Rejected: res.Summary.Rejected, Kept: res.Summary.Kept, Seconds: res.Summary.Elapsed.Seconds()},
	}
	for _, t := range res.Tables {
		s := t.Summary
		tr := TableReport{
			Table: t.Table, Output: t.Output, Rejects: t.Rejects,
			RowsRead: s.Read, RowsOut: s.Written, Rejected: s.Rejected, Kept: s.Kept,
			Reasons: s.Reasons, Phases: s.Phases, Conditions: s.Conditions, Seconds: s.Elapsed.Seconds(),
		}
		if sec := s.Elapsed.Seconds(); sec > 0 {
			tr.RowsPerSec = float64(s.Read) / sec
		}
		rep.Tables = append(rep.Tables, tr)
	}
	rep.Options = reportOptions(o, res.Rejects)
	return writeJSON(o.Report, rep)
}
