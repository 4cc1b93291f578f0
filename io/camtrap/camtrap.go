// Package camtrap reads Camtrap DP packages (the TDWG camera-trap data
// exchange standard, versions 1.0 to 1.0.2) and writes the sun columns of
// their observations and media as new tables of a copied package.
//
// A package is a datapackage.json whose profile is a Camtrap DP profile URL,
// with three tables named in its resources: deployments (where and when each
// camera stood), media (each image or video with its timestamp) and
// observations (what was seen, between eventStart and eventEnd). Coordinates
// live only in deployments; observations and media are joined to them by
// deploymentID.
//
// The deployments table is read whole into memory (one entry per camera
// placement). TableObservations and media are streamed: a Reader is an
// enrich.Source over one of them, whose chunks find each row's deployment,
// read its time and check it against the deployment, and a Writer is the
// enrich.Sink that writes "<table>-sun.csv": the row's ID and the sun
// columns. WritePackage copies the input files unchanged into the output
// folder and writes its datapackage.json: every original property and
// resource in their order, and one new resource per enriched table with its
// Table Schema.
//
// Resources may be CSV files or gzipped CSV files (detected by content), or
// Parquet files (a path ending in ".parquet", or a resource whose format or
// mediatype names Parquet), and a resource's path may be a list of files of
// one format: CSV files each with its own header line, which must be the
// same in every file; Parquet files that each have the fields read. A
// Parquet file is read through io/parquet's TextReader, in batches of
// ParquetBatchRows rows, only the fields the join reads, and each value
// becomes the text a CSV file would hold, so both forms are read by the same
// code: strings as they are, timestamps with a time zone as RFC 3339
// instants (fraction of a second kept) at the offset of the column's zone
// ("Z" for UTC; the zone's name comes from the Arrow schema an Arrow writer
// stores in the file, which is checked first: a file whose stored schema is
// damaged is refused), timestamps without one as local date-times without an
// offset (which need a zone, as such text does), dates and times of day in
// ISO form, numbers in Go's shortest 'g' form, booleans as true or false,
// nulls as empty. Parquet files are copied into the output unchanged, like
// CSV files; a rejects file of a Parquet table holds the fields read.
package camtrap

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"
)

// Sentinel errors. Match them with errors.Is.
var (
	// ErrNotPackage: the input is not a Camtrap DP package (no
	// datapackage.json, not JSON, or a profile that is not Camtrap DP's).
	ErrNotPackage = errors.New("not a Camtrap DP package")
	// ErrResource: a resource is missing, or its path or fields cannot be used.
	ErrResource = errors.New("unusable resource")
	// ErrUnsupported: a resource in a form this version does not read
	// (remote files, gzipped Parquet, CSV and Parquet files in one resource).
	ErrUnsupported = errors.New("not supported yet")
	// ErrNoDeployment: an observation or media row names a deployment that
	// is not in the deployments table (or names none).
	ErrNoDeployment = errors.New("deployment not found")
	// ErrDeployment: the row's deployment has a value that cannot be read
	// (coordinates, start or end, heading).
	ErrDeployment = errors.New("unreadable deployment")
	// ErrEventOrder: eventEnd before eventStart (with --at middle or end).
	ErrEventOrder = errors.New("eventEnd before eventStart")
	// ErrFieldCount: a row with another number of fields than its header.
	ErrFieldCount = errors.New("wrong number of fields")
	// ErrEmptyID: a row with an empty observationID or mediaID.
	ErrEmptyID = errors.New("empty ID")
)

// Notes written in sun_time_note (computed anyway). Several are joined with ";".
const (
	// NoteOutsideDeployment: the time lies before the deployment's
	// deploymentStart or after its deploymentEnd.
	NoteOutsideDeployment = "outside_deployment"
	// NoteTimestampIssues: the deployment says timestampIssues = true (its
	// camera clock may be wrong).
	NoteTimestampIssues = "timestamp_issues"
)

// DescriptorName is the file name of a package's descriptor.
const DescriptorName = "datapackage.json"

// ProfilePrefix and the versions: a Camtrap DP profile URL is
// ProfilePrefix + version + "/camtrap-dp-profile.json".
const ProfilePrefix = "https://raw.githubusercontent.com/tdwg/camtrap-dp/"

// Versions are the Camtrap DP versions whose profile is recognised.
var Versions = []string{"1.0", "1.0.1", "1.0.2"}

// Table names of the standard.
const (
	TableDeployments  = "deployments"
	TableMedia        = "media"
	TableObservations = "observations"
)

// Package is an opened Camtrap DP package descriptor.
type Package struct {
	// Dir is the folder holding the descriptor; resource paths are relative to it.
	Dir string
	// Descriptor is the path of datapackage.json.
	Descriptor string
	// Version is the Camtrap DP version named by the profile ("1.0", ...).
	Version string

	members   []member          // the descriptor's top-level properties, in order
	resources []json.RawMessage // its resources, as written
	byName    map[string]*Resource
	order     []*Resource
}

// member is one top-level property of the descriptor, kept as written.
type member struct {
	key   string
	value json.RawMessage
}

// Resource is one resource of the package.
type Resource struct {
	Name string
	// Paths are the resource's files, relative to the package folder, in order.
	Paths []string
	// Format and Mediatype as the descriptor gives them ("" when absent).
	Format, Mediatype string
	// Delimiter is the CSV dialect's delimiter (',' unless the resource's
	// "dialect" names another single character).
	Delimiter rune
}

// IsPackage reports whether path names a datapackage.json or a folder that
// holds one. It does not read it (Open checks the profile).
func IsPackage(path string) bool {
	st, err := os.Stat(path)
	if err != nil {
		return false
	}
	if st.IsDir() {
		_, err := os.Stat(filepath.Join(path, DescriptorName))
		return err == nil
	}
	return filepath.Base(path) == DescriptorName
}

// Open reads the descriptor at path (a datapackage.json, or the folder that
// holds one) and checks that it is a Camtrap DP package with the three
// tables, and that every resource's local file exists (they are all copied
// into the output).
func Open(path string) (*Package, error) {
	desc := path
	if st, err := os.Stat(path); err == nil && st.IsDir() {
		desc = filepath.Join(path, DescriptorName)
	}
	data, err := os.ReadFile(desc)
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrNotPackage, err)
	}
	p := &Package{Dir: filepath.Dir(desc), Descriptor: desc, byName: map[string]*Resource{}}
	if p.members, err = decodeObject(data); err != nil {
		return nil, fmt.Errorf("%w: %s: %w", ErrNotPackage, desc, err)
	}
	var profile string
	if raw, ok := p.member("profile"); ok {
		_ = json.Unmarshal(raw, &profile)
	}
	for _, v := range Versions {
		if profile == ProfilePrefix+v+"/camtrap-dp-profile.json" {
			p.Version = v
		}
	}
	if p.Version == "" {
		if profile == "" {
			profile = "none"
		}
		return nil, fmt.Errorf("%w: %s: profile %q; expected %s<version>/camtrap-dp-profile.json with version %s",
			ErrNotPackage, desc, profile, ProfilePrefix, strings.Join(Versions, ", "))
	}
	raw, ok := p.member("resources")
	if !ok || json.Unmarshal(raw, &p.resources) != nil {
		return nil, fmt.Errorf("%w: %s: no resources list", ErrNotPackage, desc)
	}
	for i, r := range p.resources {
		var v struct {
			Name      string          `json:"name"`
			Path      json.RawMessage `json:"path"`
			Format    string          `json:"format"`
			Mediatype string          `json:"mediatype"`
			Dialect   struct {
				Delimiter string `json:"delimiter"`
			} `json:"dialect"`
		}
		if err := json.Unmarshal(r, &v); err != nil {
			return nil, fmt.Errorf("%w: %s: resource %d: %w", ErrResource, desc, i+1, err)
		}
		res := &Resource{Name: v.Name, Format: v.Format, Mediatype: v.Mediatype, Delimiter: ','}
		if d := []rune(v.Dialect.Delimiter); len(d) == 1 && d[0] != '"' && d[0] != '\n' && d[0] != '\r' {
			res.Delimiter = d[0]
		}
		var one string
		if err := json.Unmarshal(v.Path, &one); err == nil {
			res.Paths = []string{one}
		} else if err := json.Unmarshal(v.Path, &res.Paths); err != nil {
			res.Paths = nil // inline data or no path: kept in the descriptor, not read
		}
		p.order = append(p.order, res)
		if v.Name != "" {
			p.byName[v.Name] = res
		}
	}
	for _, name := range []string{TableDeployments, TableMedia, TableObservations} {
		if _, err := p.Resource(name); err != nil {
			return nil, err
		}
	}
	// Every local file is copied into the output: check them all now.
	for _, r := range p.order {
		for _, path := range r.Paths {
			if strings.Contains(path, "://") {
				continue
			}
			if err := checkPath(path); err != nil {
				return nil, fmt.Errorf("resource %q: %w", r.Name, err)
			}
			st, err := os.Stat(filepath.Join(p.Dir, filepath.FromSlash(path)))
			if err != nil {
				return nil, fmt.Errorf("%w: resource %q: %w", ErrResource, r.Name, err)
			}
			if !st.Mode().IsRegular() {
				return nil, fmt.Errorf("%w: resource %q: %s is not a file", ErrResource, r.Name, path)
			}
		}
	}
	return p, nil
}

func (p *Package) member(key string) (json.RawMessage, bool) {
	for _, m := range p.members {
		if m.key == key {
			return m.value, true
		}
	}
	return nil, false
}

// Size returns the total size in bytes of a table's files, or 0 when it is
// unknown (a file is missing or gzipped: its decoded size is not known).
func (p *Package) Size(name string) int64 {
	r, ok := p.byName[name]
	if !ok {
		return 0
	}
	var n int64
	for _, path := range r.Paths {
		f, err := os.Open(filepath.Join(p.Dir, filepath.FromSlash(path)))
		if err != nil {
			return 0
		}
		var magic [2]byte
		_, _ = io.ReadFull(f, magic[:])
		st, err := f.Stat()
		f.Close()
		if err != nil || (magic[0] == 0x1f && magic[1] == 0x8b) {
			return 0
		}
		n += st.Size()
	}
	return n
}

// Resource returns the resource named name, checked to be readable: local
// relative paths, all CSV (gzipped or not) or all Parquet.
func (p *Package) Resource(name string) (*Resource, error) {
	r, ok := p.byName[name]
	if !ok {
		return nil, fmt.Errorf("%w: %s has no resource named %q (a Camtrap DP package has deployments, media and observations)", ErrResource, p.Descriptor, name)
	}
	if len(r.Paths) == 0 {
		return nil, fmt.Errorf("%w: resource %q has no path", ErrResource, name)
	}
	for _, path := range r.Paths {
		if err := checkPath(path); err != nil {
			return nil, fmt.Errorf("resource %q: %w", name, err)
		}
	}
	if err := r.checkFormats(); err != nil {
		return nil, err
	}
	return r, nil
}

// checkPath refuses the paths a data package may not use for local files
// (absolute, or climbing out of the package with ".."), and remote ones.
func checkPath(path string) error {
	switch {
	case strings.Contains(path, "://"):
		return fmt.Errorf("%w: remote path %q; download the package first", ErrUnsupported, path)
	case path == "" || filepath.IsAbs(path) || strings.HasPrefix(path, "/"):
		return fmt.Errorf("%w: path %q must be relative to the package folder", ErrResource, path)
	case slices.Contains(strings.Split(filepath.ToSlash(path), "/"), ".."):
		return fmt.Errorf("%w: path %q leaves the package folder", ErrResource, path)
	}
	return nil
}

// decodeObject reads a JSON object's members in order, each value as written.
func decodeObject(data []byte) ([]member, error) {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	tok, err := dec.Token()
	if err != nil {
		return nil, err
	}
	if d, ok := tok.(json.Delim); !ok || d != '{' {
		return nil, errors.New("the descriptor is not a JSON object")
	}
	var out []member
	for dec.More() {
		tok, err := dec.Token()
		if err != nil {
			return nil, err
		}
		key, _ := tok.(string)
		var v json.RawMessage
		if err := dec.Decode(&v); err != nil {
			return nil, err
		}
		out = append(out, member{key, v})
	}
	if _, err := dec.Token(); err != nil {
		return nil, err
	}
	if _, err := dec.Token(); err != io.EOF {
		return nil, errors.New("text after the descriptor's closing brace")
	}
	return out, nil
}
