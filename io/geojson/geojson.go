// Package geojson reads and writes GeoJSON for heliotag: FeatureCollections
// (RFC 7946) and GeoJSON text sequences (one Feature per record, RFC 8142).
//
// # Streaming
//
// A FeatureCollection is walked with a json.Decoder one feature at a time:
// the reader holds one feature's bytes at a time plus the batches in flight,
// never the whole document. The collection's members other than "features"
// (foreign members such as "name", "crs" or "bbox") are kept: those written
// before "features" go out in the header, those after it in the footer, in
// their input order.
//
// A text sequence is split into records: by record separators (0x1E) when
// the input starts with one (RFC 8142, which allows a record to span lines),
// else by line ends (newline-delimited GeoJSON, where a record separator at
// the start of a line is also accepted). Blank records are passed over.
//
// # What is kept
//
// Each feature is written back byte for byte, with the added sun columns
// inserted as members at the end of its "properties" object: property keys,
// their order and their values (numbers as written, escapes as written),
// the geometry (3D coordinates included), "id", "bbox" and foreign members
// are unchanged. Added numbers are JSON numbers, words and text are JSON
// strings, and empty values are null. Under the keep policy a bad row is
// written too: a Feature whose "properties" is null or missing gets an object
// holding the added columns (sun_error among them); an item that is not a
// Feature object, or whose "properties" is neither an object nor null, has
// nowhere to hold them and is written as read. With no added columns
// (--add none) every feature is copied as read.
//
// The collection is written as {"type": ..., foreign members, "features": [
// one feature per line ]} with the members before and after "features" in
// their input order; the values of those members are copied as read. A text
// sequence is written one feature per line, each after a record separator
// with WriterOptions.RS.
//
// # Location
//
// The location is the representative point of the feature's geometry (see
// package io/internal/geom): a Point as is, the first point of a MultiPoint,
// the point halfway along a LineString (the longest member of a
// MultiLineString), the area-weighted centroid of a Polygon or MultiPolygon,
// and the point of the first non-empty member of a GeometryCollection.
// Positions are longitude, latitude (RFC 7946 §3.1.1); a third ordinate
// (altitude) is kept in the output and not used. Geometries are decoded with
// orb's geojson.Geometry, except Points, whose two numbers are read directly
// (the same values, at a sixth of the cost); every position must have at
// least two numbers, since orb would read a missing one as 0.
//
// # Time
//
// The time is read from properties, as CSV reads it from columns (package
// io/internal/fields): by --time NAME (or --date and --time), or detected by
// name, in every form and zone mode CSV accepts. String properties are read
// as their text; a JSON number property is read as written (for --epoch).
// Property names are those of the first features (up to LookaheadFeatures
// of them, in order of first appearance): detection looks among them, and a
// name given with --time, --date or --tz-column must be one of them (else it
// is a usage error that lists them). A feature without the property is a bad
// row. A later feature that already has a property named like an added
// column stops the run (--prefix avoids it), as such a column in the first
// features does before reading on.
//
// A UTF-8 byte order mark at the start is read past (RFC 8259 §8.1) and not
// written; it is counted in byte offsets.
//
// # Bad input
//
// A feature with a null or missing geometry ("feature has no location"), an
// empty or invalid geometry, an item of "features" that is not a Feature,
// a missing, null or non-object "properties", out-of-range coordinates, or an
// unreadable time is a bad row under the --on-bad-row policy. Malformed JSON
// is fatal: the error (*SyntaxError) names the byte offset, line and column,
// and the feature's index. That holds for a malformed record of a sequence
// too, although RFC 7464 lets a reader skip it: heliotag could neither write
// it back nor enrich it, and a silently shorter output is worse.
//
// The rejects file (--on-bad-row skip) gets, for each rejected feature, the
// values of the properties named in Columns (strings as their text, null as
// empty, other values as JSON) and, in the last column ("feature"), the whole
// feature's JSON text as read, so that nothing of it is lost.
package geojson

import (
	"errors"
	"fmt"
	"strings"

	"github.com/heliotag/heliotag/enrich"
)

// MaxFeatureBytes bounds the size of one feature (and of one foreign member
// of a collection); a larger one is a fatal error.
const MaxFeatureBytes = 64 << 20

// LookaheadFeatures is the number of features read ahead, when the reader
// opens, to list the property names used for detecting the time property.
const LookaheadFeatures = 1000

// Sentinel errors. Per-feature causes are wrapped in *enrich.RowError; whole
// input problems are returned by NewReader or Next. Match with errors.Is.
var (
	// ErrNoLocation: the feature's geometry is null or missing.
	ErrNoLocation = errors.New("feature has no location")
	// ErrGeometry: the geometry is not a valid GeoJSON geometry, or is empty.
	ErrGeometry = errors.New("invalid geometry")
	// ErrNotFeature: an item of "features" (or a record of a sequence) is
	// not a GeoJSON Feature object.
	ErrNotFeature = errors.New("not a Feature")
	// ErrProperties: the feature's "properties" is missing, null or not an object.
	ErrProperties = errors.New("no properties object")
	// ErrSyntax: the input is not well-formed JSON (fatal; see SyntaxError).
	ErrSyntax = errors.New("malformed JSON")
	// ErrNotCollection: the top-level value is not a FeatureCollection (fatal).
	ErrNotCollection = errors.New("not a FeatureCollection")
	// ErrTooLarge: one feature or member is larger than MaxFeatureBytes (fatal).
	ErrTooLarge = errors.New("feature too large")
	// ErrPropertyExists: a feature already has a property named like an
	// added column (fatal; --prefix avoids it).
	ErrPropertyExists = errors.New("property already exists")
)

// SyntaxError is a fatal problem with the JSON text at a known place.
type SyntaxError struct {
	// Offset is the 0-based byte offset of the offending byte from the start
	// of the (decompressed) input; at the end of input it is the input size.
	Offset int64
	// Line and Column are 1-based; Column counts bytes.
	Line, Column int64
	// Feature is the 1-based index of the feature being read (in "features"
	// or in the sequence), or 0 when the problem is outside any feature.
	Feature int64
	// Err wraps ErrSyntax, ErrTooLarge or ErrNotCollection, and the cause.
	Err error
}

func (e *SyntaxError) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "byte offset %d (line %d, column %d)", e.Offset, e.Line, e.Column)
	if e.Feature > 0 {
		fmt.Fprintf(&b, ", in feature %d", e.Feature)
	}
	return b.String() + ": " + e.Err.Error()
}

func (e *SyntaxError) Unwrap() error { return e.Err }

// Options configures a Reader.
type Options struct {
	// Sequence reads a GeoJSON text sequence (one Feature per line or per
	// RS-prefixed record); false reads a FeatureCollection.
	Sequence bool
	// Select names the time properties (empty names are detected). The
	// location always comes from the geometry: Lat, Lon and Geometry must
	// be empty.
	Select enrich.Select
}

// WriterOptions configures a Writer.
type WriterOptions struct {
	// RS writes a text sequence as RFC 8142 records: each feature preceded
	// by a record separator (0x1E). It applies to sequences only.
	RS bool
}
