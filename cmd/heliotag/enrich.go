package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"runtime"
	"runtime/pprof"
	"strconv"
	"strings"
	"time"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/job"
)

// maxBatchRows bounds --batch-rows: readers allocate a batch's buffers up
// front, so a mistyped size would otherwise fail on memory instead of here.
const maxBatchRows = 1 << 20

const enrichHelp = `Usage: heliotag enrich [flags] INPUT

Writes INPUT with the sun's position and natural-light columns added. Every
original column is kept as it was; rows keep their order. The output is written
to a temporary file next to the target and renamed only when the run succeeds.

Column groups (--add, comma-separated; default position,phase):
  position  sun_altitude_deg, sun_azimuth_deg
  phase     sun_phase, sun_light_condition
  events    sun_rise, sun_set, sun_noon, sun_civil_dawn/dusk, sun_nautical_dawn/dusk,
            sun_astronomical_dawn/dusk, sun_day_length_min, sun_noon_altitude_deg
  relative  sun_minutes_from_rise, sun_minutes_from_set, sun_time_h
  moon      moon_altitude_deg, moon_azimuth_deg, moon_illumination, moon_phase
  glare     sun_relative_azimuth_deg, sun_glare (needs --heading or --heading-from-geometry)
  all       every group the input can feed
  none      copy the rows unchanged (a passthrough: what reading and writing alone cost)

Times without an offset need a zone: --tz ZONE, --tz-column COL or --tz auto.

Camtrap DP packages (INPUT is a datapackage.json or the folder holding it):
the location comes from each row's deployment, observations are computed at
eventStart (--at start|middle|end) and media at their timestamp; --tables
chooses observations (default), media or both. -o names a new package
folder: the input files are copied unchanged and <table>-sun.csv is added
with its Table Schema. glare uses the deployment's cameraHeading.
sun_time_note says outside_deployment or timestamp_issues; a row whose
deployment is missing is a bad row.

Exit codes: 0 every row enriched; 1 finished, some rows skipped or kept with
errors; 2 fatal (usage, unreadable input, I/O error, first bad row under fail).

Examples (the demo data is invented; see testdata/demo/README.md):

  # Road safety: collision records with a local date and an HHMM time column
  heliotag enrich testdata/demo/marrowfield_collisions.csv \
      --date crash_date --time crash_time --tz America/Chicago \
      -o out/collisions_sun.csv

  # Wildlife: camera-trap detections with RFC 3339 timestamps (offsets included)
  heliotag enrich testdata/demo/hollin_ridge_detections.csv -o out/detections_sun.csv

  # GeoJSON (location from the geometry) and Parquet (lat/lon columns or GeoParquet)
  heliotag enrich sightings.geojson --add phase,moon -o sightings_sun.geojson
  heliotag enrich fixes.parquet --tz auto --compression zstd -o fixes_sun.parquet

  # Camera traps: a Camtrap DP package (a datapackage.json or its folder) into a
  # new package folder with observations-sun.csv and media-sun.csv added
  heliotag enrich testdata/demo/hollin_ridge_package --tables observations,media \
      --add phase,relative -o out/hollin_ridge_package_sun

  # Nightly job: skip bad rows into a rejects file, write a JSON report, 2 workers
  heliotag enrich big.csv --tz auto --on-bad-row skip --rejects bad.csv \
      --report run.json --workers 2 -q -o big_sun.csv

Flags:
`

type enrichFlags struct {
	opts       job.Options
	policy     string
	progress   string
	quiet      bool
	cpuprofile string
	memprofile string
}

func newEnrichFlags(fs *flag.FlagSet, ef *enrichFlags) {
	o := &ef.opts
	fs.StringVar(&o.Output, "o", "", "output `FILE` (\"-\" or none: stdout for text formats)")
	fs.StringVar(&o.Output, "output", "", "same as -o")
	fs.BoolVar(&o.Force, "force", false, "replace an existing output file")
	fs.StringVar(&o.From, "from", "", "input `FORMAT`: csv|tsv|geojson|geojsonseq|parquet (default: from the extension)")
	fs.StringVar(&o.To, "to", "", "output `FORMAT` (must be the input's in this version)")
	fs.BoolVar(&o.RS, "rs", false, "GeoJSON text sequence output: start each record with an RFC 8142 record separator (0x1E)")
	fs.StringVar(&o.Compression, "compression", "", "Parquet output `CODEC`: uncompressed|snappy|gzip|brotli|zstd|lz4 (default: the input's)")
	addSelectFlags(fs, &o.Select, &o.Delimiter)
	fs.StringVar(&o.Add, "add", enrich.DefaultGroups, "column `GROUPS`, comma-separated, or all")
	fs.StringVar(&o.Prefix, "prefix", "", "`STR` put in front of every added column name")
	fs.Float64Var(&o.Solar.Pressure, "pressure", 1010, "air pressure in `hPa` for refraction")
	fs.Func("temperature", "air temperature in `°C` for refraction (default 10)", func(s string) error {
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			return fmt.Errorf("%q is not a number of degrees Celsius", s)
		}
		o.Solar.Temperature = &v
		return nil
	})
	fs.BoolVar(&o.Solar.NoRefraction, "no-refraction", false, "report geometric altitude (no atmospheric refraction)")
	fs.Float64Var(&o.Solar.Elevation, "elevation", 0, "observer elevation in `metres` above sea level, for every row (parallax)")
	fs.Func("delta-t", "`SECONDS` of TT − UT to use instead of the built-in ΔT model", func(s string) error {
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			return fmt.Errorf("%q is not a number of seconds", s)
		}
		o.Solar.DeltaT = &v
		return nil
	})
	fs.Float64Var(&o.Glare.MaxAltitude, "glare-max-altitude", enrich.DefaultGlareMaxAltitude, "glare: the sun counts as low up to this altitude in `degrees`")
	fs.Float64Var(&o.Glare.MaxOffset, "glare-max-offset", enrich.DefaultGlareMaxOffset, "glare: and as near the heading within this many `degrees`")
	fs.StringVar(&o.At, "at", "", "Camtrap DP: the instant of an observation: `start|middle|end` of its event (default start)")
	fs.StringVar(&o.Tables, "tables", "", "Camtrap DP: `TABLES` to enrich, comma-separated: observations, media (default observations)")
	fs.StringVar(&ef.policy, "on-bad-row", "fail", "`POLICY` for bad rows: fail|skip|keep")
	fs.StringVar(&o.Rejects, "rejects", "", "`FILE` for rows left out by --on-bad-row skip (default: beside the output)")
	fs.StringVar(&o.Report, "report", "", "write the run's figures to `FILE`.json")
	fs.IntVar(&o.Workers, "workers", runtime.NumCPU(), "`N` worker goroutines")
	fs.IntVar(&o.BatchRows, "batch-rows", 0, "`N` rows per batch, 1 to 1048576 (default 1024 for CSV, TSV and Camtrap DP tables, 8192 for GeoJSON and Parquet, less for wide Parquet tables)")
	fs.StringVar(&ef.progress, "progress", "auto", "progress bar on stderr: auto|never|always")
	fs.BoolVar(&ef.quiet, "q", false, "quiet: no progress bar and no summary line")
	fs.StringVar(&ef.cpuprofile, "cpuprofile", "", "write a CPU profile to `FILE`")
	fs.StringVar(&ef.memprofile, "memprofile", "", "write an allocation profile to `FILE`")
}

// addSelectFlags declares the flags that choose and read the location and
// time columns; enrich and inspect share them.
func addSelectFlags(fs *flag.FlagSet, s *enrich.Select, delim *string) {
	fs.StringVar(&s.Lat, "lat", "", "latitude `COL` (decimal degrees; default: detected by name)")
	fs.StringVar(&s.Lon, "lon", "", "longitude `COL` (decimal degrees; default: detected by name)")
	fs.StringVar(&s.Geometry, "geometry", "", "geometry `COL`: WKT in CSV/TSV (POINT (lon lat); other types use a representative point), WKB in Parquet")
	fs.StringVar(&s.Time, "time", "", "timestamp `COL`, or with --date the time-of-day column")
	fs.StringVar(&s.Date, "date", "", "date `COL`, combined with --time")
	fs.StringVar(&s.TimeFormat, "time-format", "", "strftime `LAYOUT` of the time column, e.g. \"%d/%m/%Y %H:%M\"")
	fs.StringVar(&s.Epoch, "epoch", "", "times are Unix time in `UNIT`: s|ms|us|ns")
	fs.StringVar(&s.TZ, "tz", "", "`ZONE` of offset-less times: an IANA name (America/Chicago), UTC, or auto")
	fs.StringVar(&s.TZColumn, "tz-column", "", "`COL` of IANA zone names, one per row")
	fs.StringVar(&s.Heading, "heading", "", "`COL` of directions of travel or view: degrees from true north, or N, NE, ..., NB, SB, EB, WB (glare group)")
	fs.BoolVar(&s.HeadingFromGeometry, "heading-from-geometry", false, "take the heading from a line geometry, in the direction drawn (glare group)")
	fs.StringVar(delim, "delimiter", "", "field `CHAR` for CSV/TSV: , ; | or tab (default: from the extension)")
}

func runEnrich(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("enrich", flag.ContinueOnError)
	fs.SetOutput(stderr)
	var ef enrichFlags
	newEnrichFlags(fs, &ef)
	fs.Usage = func() {
		fmt.Fprint(fs.Output(), enrichHelp)
		fs.PrintDefaults()
	}
	pos, err := parseInterspersed(fs, args)
	if err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return 0
		}
		return 2 // the flag package has printed the problem and the usage
	}
	o := ef.opts
	if o.Input, err = oneInput(pos); err != nil {
		return flagError(stderr, "enrich", err)
	}
	if o.Policy, err = enrich.ParsePolicy(ef.policy); err != nil {
		return flagError(stderr, "enrich", err)
	}
	if o.Solar.Pressure == 1010 {
		o.Solar.Pressure = 0 // the default
	}
	batchGiven := false // 0 means the format's default, but is no batch size to give
	fs.Visit(func(f *flag.Flag) { batchGiven = batchGiven || f.Name == "batch-rows" })
	if o.Workers < 1 || o.BatchRows < 0 || batchGiven && o.BatchRows < 1 {
		return flagError(stderr, "enrich", errors.New("--workers and --batch-rows must be at least 1"))
	}
	if o.BatchRows > maxBatchRows {
		return flagError(stderr, "enrich", fmt.Errorf("--batch-rows %d is too large: at most %d rows per batch (a batch is held in memory several times over)", o.BatchRows, maxBatchRows))
	}
	showBar := false
	switch ef.progress {
	case "auto":
		showBar = !ef.quiet && isTerminal(stderr)
	case "always":
		showBar = true
	case "never":
	default:
		return flagError(stderr, "enrich", fmt.Errorf("--progress %q; valid: auto, never, always", ef.progress))
	}
	if ef.cpuprofile != "" {
		f, err := os.Create(ef.cpuprofile)
		if err != nil {
			fmt.Fprintf(stderr, "heliotag enrich: %v\n", err)
			return 2
		}
		defer f.Close()
		if err := pprof.StartCPUProfile(f); err != nil {
			fmt.Fprintf(stderr, "heliotag enrich: %v\n", err)
			return 2
		}
		defer pprof.StopCPUProfile()
	}
	var bar *progressbar.ProgressBar
	if showBar {
		start := time.Now()
		o.OnProgress = func(rows, done, total int64) {
			if bar == nil {
				max := total
				if max <= 0 {
					max = -1
				}
				bar = progressbar.NewOptions64(max,
					progressbar.OptionSetWriter(stderr),
					progressbar.OptionShowBytes(true),
					progressbar.OptionThrottle(200*time.Millisecond),
					progressbar.OptionClearOnFinish(),
					progressbar.OptionSetWidth(30))
			}
			rate := float64(rows) / time.Since(start).Seconds()
			bar.Describe(fmt.Sprintf("%d rows (%.0f rows/s)", rows, rate))
			_ = bar.Set64(done)
		}
	}
	res, err := job.Enrich(ctx, o, stdin, stdout)
	if bar != nil {
		_ = bar.Finish()
	}
	if ef.memprofile != "" {
		if f, ferr := os.Create(ef.memprofile); ferr == nil {
			_ = pprof.Lookup("allocs").WriteTo(f, 0)
			f.Close()
		}
	}
	if err != nil {
		if errors.Is(err, context.Canceled) {
			fmt.Fprintln(stderr, "heliotag enrich: interrupted; no output written")
		} else {
			fmt.Fprintf(stderr, "heliotag enrich: %v\n", err)
		}
		return 2
	}
	if !ef.quiet {
		fmt.Fprintln(stderr, summaryLine(res))
	}
	return res.ExitCode(nil)
}

func summaryLine(res job.Result) string {
	if res.Tables != nil {
		var lines []string
		for _, t := range res.Tables {
			lines = append(lines, tableLine("heliotag: "+t.Table+": ", t.Summary, t.Rejects, t.Output))
		}
		return strings.Join(lines, "\n")
	}
	return tableLine("heliotag: ", res.Summary, res.Rejects, res.Output)
}

// tableLine is the summary of one output: rows read, written, rejected.
func tableLine(line string, s enrich.Summary, rejects, output string) string {
	line += fmt.Sprintf("%d rows read, %d written", s.Read, s.Written)
	if s.Kept > 0 {
		line += fmt.Sprintf(" (%d with sun_error)", s.Kept)
	}
	line += fmt.Sprintf(", %d rejected", s.Rejected)
	if rejects != "" && s.Rejected > 0 {
		line += " (see " + rejects + ")"
	}
	sec := s.Elapsed.Seconds()
	if sec > 0 {
		line += fmt.Sprintf(" in %.2f s (%.0f rows/s)", sec, float64(s.Read)/sec)
	}
	if output != "-" {
		line += " -> " + output
	}
	return line
}

func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	return ok && term.IsTerminal(int(f.Fd()))
}

func runVersion(stdout io.Writer) int {
	fmt.Fprintf(stdout, "heliotag %s (%s)\n", job.Version, runtime.Version())
	return 0
}
