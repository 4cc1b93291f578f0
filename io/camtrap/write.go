package camtrap

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/heliotag/heliotag/enrich"
)

// Added describes a table enriched into a new resource of the output package.
type Added struct {
	// Table is TableObservations or TableMedia.
	Table string
	// Plan is the run's column plan (the file's columns after the ID).
	Plan *enrich.Plan
	// At is the observations' instant (ignored for media).
	At At
	// Generator names the program and version, for the resource's description.
	Generator string
}

// CheckAdd refuses to add sun tables whose resource name or file name the
// package already uses.
func (p *Package) CheckAdd(tables []string) error {
	for _, t := range tables {
		name := SunName(t)
		for _, r := range p.order {
			if r.Name == name {
				return fmt.Errorf("%w: the package already has a resource named %q; enrich a package without it", ErrResource, name)
			}
			for _, path := range r.Paths {
				if strings.EqualFold(filepath.ToSlash(filepath.Clean(path)), name+".csv") {
					return fmt.Errorf("%w: resource %q already uses the file name %s.csv", ErrResource, r.Name, name)
				}
			}
		}
	}
	return nil
}

// WritePackage copies every local file of the package's resources into dir,
// byte for byte and at the same relative paths, and writes
// dir/datapackage.json: the input's descriptor with every property and
// resource in its order, plus one resource per added table. The sun tables
// themselves (SunName(table)+".csv") are written into dir by the caller.
// Remote resource paths are kept in the descriptor and not fetched.
func (p *Package) WritePackage(dir string, added []Added) error {
	copied := map[string]bool{}
	for _, r := range p.order {
		for _, path := range r.Paths {
			if strings.Contains(path, "://") {
				continue
			}
			if err := checkPath(path); err != nil {
				return fmt.Errorf("resource %q: %w", r.Name, err)
			}
			clean := filepath.Clean(filepath.FromSlash(path))
			if copied[clean] {
				continue
			}
			copied[clean] = true
			if err := copyFile(filepath.Join(p.Dir, clean), filepath.Join(dir, clean)); err != nil {
				return fmt.Errorf("copying resource %q: %w", r.Name, err)
			}
		}
	}
	b, err := p.OutputDescriptor(added)
	if err != nil {
		return err
	}
	return writeFile(filepath.Join(dir, DescriptorName), b)
}

// OutputDescriptor returns the output descriptor: the input's members in order,
// with the added resources appended to "resources", indented by two spaces.
func (p *Package) OutputDescriptor(added []Added) ([]byte, error) {
	var buf bytes.Buffer
	buf.WriteByte('{')
	for i, m := range p.members {
		if i > 0 {
			buf.WriteByte(',')
		}
		k, _ := json.Marshal(m.key)
		buf.Write(k)
		buf.WriteByte(':')
		if m.key != "resources" {
			buf.Write(m.value)
			continue
		}
		buf.WriteByte('[')
		for j, r := range p.resources {
			if j > 0 {
				buf.WriteByte(',')
			}
			buf.Write(r)
		}
		for j, a := range added {
			if j > 0 || len(p.resources) > 0 {
				buf.WriteByte(',')
			}
			r, err := marshal(sunResource(a))
			if err != nil {
				return nil, err
			}
			buf.Write(r)
		}
		buf.WriteByte(']')
	}
	buf.WriteByte('}')
	var out bytes.Buffer
	if err := json.Indent(&out, buf.Bytes(), "", "  "); err != nil {
		return nil, fmt.Errorf("writing %s: %w", DescriptorName, err)
	}
	out.WriteByte('\n')
	return out.Bytes(), nil
}

// marshal is json.Marshal without HTML escaping.
func marshal(v any) ([]byte, error) {
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(v); err != nil {
		return nil, err
	}
	return bytes.TrimSpace(b.Bytes()), nil
}

// The Table Schema of an added resource (Frictionless Data Table Schema,
// the form Camtrap DP's own tables use).
type resourceJSON struct {
	Name        string     `json:"name"`
	Path        string     `json:"path"`
	Profile     string     `json:"profile"`
	Title       string     `json:"title"`
	Description string     `json:"description"`
	Format      string     `json:"format"`
	Mediatype   string     `json:"mediatype"`
	Encoding    string     `json:"encoding"`
	Schema      schemaJSON `json:"schema"`
}

type schemaJSON struct {
	Fields        []fieldJSON      `json:"fields"`
	MissingValues []string         `json:"missingValues"`
	PrimaryKey    string           `json:"primaryKey"`
	ForeignKeys   []foreignKeyJSON `json:"foreignKeys"`
}

type fieldJSON struct {
	Name        string           `json:"name"`
	Type        string           `json:"type"`
	Format      string           `json:"format,omitempty"`
	Description string           `json:"description"`
	Unit        string           `json:"unit,omitempty"`
	Constraints *constraintsJSON `json:"constraints,omitempty"`
}

type constraintsJSON struct {
	Required bool `json:"required,omitempty"`
	Unique   bool `json:"unique,omitempty"`
}

type foreignKeyJSON struct {
	Fields    string        `json:"fields"`
	Reference referenceJSON `json:"reference"`
}

type referenceJSON struct {
	Resource string `json:"resource"`
	Fields   string `json:"fields"`
}

// units spells out the plan's unit codes.
var units = map[string]string{"deg": "degrees", "min": "minutes", "h": "hours", "1": "fraction (dimensionless, 0 to 1)"}

// DatetimeFormat is the Table Schema format of the added datetime fields:
// ISO 8601 with the UTC offset, as Camtrap DP writes its own times.
const DatetimeFormat = "%Y-%m-%dT%H:%M:%S%z"

func sunResource(a Added) resourceJSON {
	id := IDField(a.Table)
	what := "observation at its eventStart"
	switch {
	case a.Table == TableMedia:
		what = "media item at its timestamp"
	case a.At == AtMiddle:
		what = "observation halfway between its eventStart and eventEnd"
	case a.At == AtEnd:
		what = "observation at its eventEnd"
	}
	r := resourceJSON{
		Name: SunName(a.Table), Path: SunName(a.Table) + ".csv", Profile: "tabular-data-resource",
		Title: "Sun position and natural light of the " + a.Table,
		Description: fmt.Sprintf("Derived data, one row per %s, at the latitude and longitude of its deployment; computed by %s. "+
			"Natural light from the sun's position only: no cloud, terrain, vegetation or artificial light. "+
			"A row left out had a problem (see the run's rejects file).", what, a.Generator),
		Format: "csv", Mediatype: "text/csv", Encoding: "UTF-8",
	}
	r.Schema = schemaJSON{
		MissingValues: []string{""},
		PrimaryKey:    id,
		ForeignKeys:   []foreignKeyJSON{{Fields: id, Reference: referenceJSON{Resource: a.Table, Fields: id}}},
		Fields: []fieldJSON{{
			Name: id, Type: "string",
			Description: fmt.Sprintf("The %s of the %s table this row belongs to.", id, a.Table),
			Constraints: &constraintsJSON{Required: true, Unique: true},
		}},
	}
	for _, c := range a.Plan.Columns {
		f := fieldJSON{Name: c.Name, Description: sentence(c.Description)}
		switch c.Kind {
		case enrich.KindFloat:
			f.Type = "number"
		case enrich.KindInstant:
			f.Type, f.Format = "datetime", DatetimeFormat
			f.Description += " Written with the UTC offset of the row's local date (Z when the row's time is in UTC: the date is then that of local mean solar time)."
		default:
			f.Type = "string"
		}
		switch c.Field {
		case enrich.FieldTimeNote:
			f.Description = "Empty, or short notes on the row's time, joined with ';': " + NoteOutsideDeployment +
				" (before deploymentStart or after deploymentEnd), " + NoteTimestampIssues +
				" (the deployment has timestampIssues = true), ambiguous_local_time (an offset-less time read with --tz fell in a fall-back overlap; the earlier instant is used). Computed anyway."
		case enrich.FieldError:
			f.Description = "Empty, or why the row could not be computed (its sun fields are then empty)."
		}
		if u, ok := units[c.Unit]; ok {
			f.Unit = u
			f.Description += " Unit: " + u + "."
		}
		r.Schema.Fields = append(r.Schema.Fields, f)
	}
	return r
}

// sentence capitalises s and ends it with a full stop.
func sentence(s string) string {
	if s == "" {
		return s
	}
	s = strings.ToUpper(s[:1]) + s[1:]
	if !strings.HasSuffix(s, ".") {
		s += "."
	}
	return s
}

// copyFile copies src to dst (creating dst's folder), byte for byte, and syncs it.
func copyFile(src, dst string) error {
	in, err := os.Open(src)
	if err != nil {
		return err
	}
	defer in.Close()
	if err := os.MkdirAll(filepath.Dir(dst), 0o755); err != nil {
		return err
	}
	out, err := os.OpenFile(dst, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
	if err != nil {
		return err
	}
	if _, err := io.Copy(out, in); err != nil {
		out.Close()
		return err
	}
	if err := out.Sync(); err != nil {
		out.Close()
		return err
	}
	return out.Close()
}

// writeFile writes b to a new file at path and syncs it.
func writeFile(path string, b []byte) error {
	f, err := os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
	if err != nil {
		return err
	}
	if _, err := f.Write(b); err != nil {
		f.Close()
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := f.Sync(); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}
