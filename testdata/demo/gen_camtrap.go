//go:build ignore

// gen_camtrap writes the invented Camtrap DP package of testdata/demo:
// hollin_ridge_package, a camera-trap survey of the invented Hollin Ridge
// (the same invented area as hollin_ridge_detections.csv). Every place,
// camera, identifier and record in it is invented. Run from the repository
// root:
//
//	go run testdata/demo/gen_camtrap.go
//
// The output is deterministic (fixed seeds). The field names and the
// descriptor follow the open Camtrap DP standard, version 1.0.1.
package main

import (
	"encoding/csv"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"time"
)

const dir = "testdata/demo/hollin_ridge_package"

const version = "1.0.1"

func main() {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		panic(err)
	}
	if err := generate(); err != nil {
		panic(err)
	}
}

type deployment struct {
	id, location   string
	lat, lon       float64
	start, end     time.Time
	heading        int
	timestampIssue bool
	habitat        string
}

func generate() error {
	rng := rand.New(rand.NewPCG(2024, 54))
	loc, err := time.LoadLocation("Europe/London")
	if err != nil {
		return err
	}
	habitats := []string{"woodland edge", "conifer plantation", "upland heath", "stream corridor", "hay meadow"}
	// Twelve placements: four camera sites, each used in three seasons.
	var deps []deployment
	starts := []time.Time{
		time.Date(2024, 1, 15, 11, 0, 0, 0, loc),
		time.Date(2024, 5, 20, 10, 30, 0, 0, loc),
		time.Date(2024, 9, 10, 14, 0, 0, 0, loc),
	}
	for s := 0; s < 4; s++ {
		lat := 54.46 + rng.Float64()*0.1
		lon := -2.97 + rng.Float64()*0.15
		habitat := habitats[rng.IntN(len(habitats))]
		for k, st := range starts {
			st = st.AddDate(0, 0, rng.IntN(3)).Add(time.Duration(rng.IntN(240)) * time.Minute)
			deps = append(deps, deployment{
				id:       fmt.Sprintf("HRP-D%02d", s*3+k+1),
				location: fmt.Sprintf("HRP-L%d", s+1),
				lat:      lat, lon: lon,
				start:   st,
				end:     st.AddDate(0, 0, 35+rng.IntN(20)),
				heading: rng.IntN(360),
				// One camera's clock was found wrong at collection.
				timestampIssue: s == 2 && k == 1,
				habitat:        habitat,
			})
		}
	}
	if err := writeCSV("deployments.csv", deploymentsHeader, func(w *csv.Writer) {
		for _, d := range deps {
			w.Write([]string{
				d.id, d.location, "Invented site " + d.location[len(d.location)-1:],
				fmt.Sprintf("%.5f", d.lat), fmt.Sprintf("%.5f", d.lon), "25",
				stamp(d.start), stamp(d.end),
				"Invented Field Team", "HRP-CAM" + d.location[len(d.location)-1:], "Invented Trailcam 1", "0",
				"0.5", "", "0", fmt.Sprint(d.heading), "", fmt.Sprint(d.timestampIssue), "false", "", d.habitat, "", "", "",
			})
		}
	}); err != nil {
		return err
	}

	// Species with a typical activity centre (local hour) and spread.
	species := []struct {
		name   string
		centre float64
		spread float64
	}{
		{"Vulpes vulpes", 1.0, 3.5},
		{"Meles meles", 0.5, 2.5},
		{"Capreolus capreolus", 6.0, 4.0},
		{"Sciurus vulgaris", 11.0, 3.0},
		{"Martes martes", 23.0, 3.0},
		{"Erinaceus europaeus", 0.0, 2.0},
	}
	type media struct {
		id, dep string
		t       time.Time
		method  string
	}
	type obs struct {
		id, dep, media, event string
		start, end            time.Time
		level, kind, name     string
		count                 int
	}
	var ms []media
	var os_ []obs
	for e := 0; e < 600; e++ {
		d := deps[rng.IntN(len(deps))]
		days := int(d.end.Sub(d.start).Hours()/24) - 1
		day := d.start.AddDate(0, 0, 1+rng.IntN(days))
		y, m, dd := day.Date()
		midnight := time.Date(y, m, dd, 0, 0, 0, 0, loc)
		kind, name := "animal", ""
		var h float64
		switch r := rng.Float64(); {
		case r < 0.1: // a blank trigger (wind, sun on grass) at any hour
			kind = "blank"
			h = rng.Float64() * 24
		default:
			sp := species[rng.IntN(len(species))]
			name = sp.name
			h = math.Mod(sp.centre+rng.NormFloat64()*sp.spread+48, 24)
		}
		t0 := midnight.Add(time.Duration(h * float64(time.Hour))).Truncate(time.Second)
		if e%97 == 0 {
			t0 = d.end.Add(time.Duration(1+rng.IntN(20)) * time.Hour) // after the camera was collected
		}
		event := fmt.Sprintf("HRP-E%04d", e+1)
		n := 3
		var first, last time.Time
		var firstMedia string
		for k := 0; k < n; k++ {
			t := t0.Add(time.Duration(k*2) * time.Second)
			id := fmt.Sprintf("HRP-M%05d", len(ms)+1)
			ms = append(ms, media{id: id, dep: d.id, t: t, method: "activityDetection"})
			if k == 0 {
				first, firstMedia = t, id
			}
			last = t
		}
		count := 1 + rng.IntN(2)
		if kind == "blank" {
			count = 0
		}
		os_ = append(os_, obs{
			id: fmt.Sprintf("HRP-O%05d", len(os_)+1), dep: d.id, event: event,
			start: first, end: last, level: "event", kind: kind, name: name, count: count,
		})
		// Every tenth event was also classified image by image.
		if e%10 == 0 && kind == "animal" {
			os_ = append(os_, obs{
				id: fmt.Sprintf("HRP-O%05d", len(os_)+1), dep: d.id, media: firstMedia, event: event,
				start: first, end: first, level: "media", kind: kind, name: name, count: count,
			})
		}
	}
	if err := writeCSV("media.csv", mediaHeader, func(w *csv.Writer) {
		for _, m := range ms {
			w.Write([]string{m.id, m.dep, m.method, stamp(m.t), "media/" + m.dep + "/" + m.id + ".jpg", "false", m.id + ".jpg", "image/jpeg", "", "false", ""})
		}
	}); err != nil {
		return err
	}
	if err := writeCSV("observations.csv", observationsHeader, func(w *csv.Writer) {
		for _, o := range os_ {
			count := ""
			if o.count > 0 {
				count = fmt.Sprint(o.count)
			}
			w.Write([]string{
				o.id, o.dep, o.media, o.event, stamp(o.start), stamp(o.end), o.level, o.kind, "", o.name, count,
				"", "", "", "", "", "", "", "", "", "", "", "human", "Invented Classifier", "2025-02-01T10:00:00Z", "1", "", "",
			})
		}
	}); err != nil {
		return err
	}
	first, last := deps[0].start, deps[0].end
	for _, d := range deps {
		if d.start.Before(first) {
			first = d.start
		}
		if d.end.After(last) {
			last = d.end
		}
	}
	desc := strings.NewReplacer("TEMPORAL_START", first.Format("2006-01-02"), "TEMPORAL_END", last.Format("2006-01-02")).Replace(descriptor)
	return os.WriteFile(filepath.Join(dir, "datapackage.json"), []byte(desc), 0o644)
}

// stamp writes a time as Camtrap DP does: ISO 8601 with the UTC offset of
// the camera's clock (Europe/London: Z in winter, +01:00 in summer).
func stamp(t time.Time) string { return t.Format(time.RFC3339) }

func writeCSV(name string, header []string, rows func(*csv.Writer)) error {
	f, err := os.Create(filepath.Join(dir, name))
	if err != nil {
		return err
	}
	w := csv.NewWriter(f)
	w.Write(header)
	rows(w)
	w.Flush()
	if err := w.Error(); err != nil {
		return err
	}
	return f.Close()
}

var deploymentsHeader = []string{"deploymentID", "locationID", "locationName", "latitude", "longitude", "coordinateUncertainty",
	"deploymentStart", "deploymentEnd", "setupBy", "cameraID", "cameraModel", "cameraDelay", "cameraHeight", "cameraDepth",
	"cameraTilt", "cameraHeading", "detectionDistance", "timestampIssues", "baitUse", "featureType", "habitat",
	"deploymentGroups", "deploymentTags", "deploymentComments"}

var mediaHeader = []string{"mediaID", "deploymentID", "captureMethod", "timestamp", "filePath", "filePublic", "fileName",
	"fileMediatype", "exifData", "favorite", "mediaComments"}

var observationsHeader = []string{"observationID", "deploymentID", "mediaID", "eventID", "eventStart", "eventEnd",
	"observationLevel", "observationType", "cameraSetupType", "scientificName", "count", "lifeStage", "sex", "behavior",
	"individualID", "individualPositionRadius", "individualPositionAngle", "individualSpeed", "bboxX", "bboxY",
	"bboxWidth", "bboxHeight", "classificationMethod", "classifiedBy", "classificationTimestamp",
	"classificationProbability", "observationTags", "observationComments"}

const descriptor = `{
  "resources": [
    {
      "name": "deployments",
      "path": "deployments.csv",
      "profile": "tabular-data-resource",
      "format": "csv",
      "mediatype": "text/csv",
      "encoding": "UTF-8",
      "schema": "https://raw.githubusercontent.com/tdwg/camtrap-dp/` + version + `/deployments-table-schema.json"
    },
    {
      "name": "media",
      "path": "media.csv",
      "profile": "tabular-data-resource",
      "format": "csv",
      "mediatype": "text/csv",
      "encoding": "UTF-8",
      "schema": "https://raw.githubusercontent.com/tdwg/camtrap-dp/` + version + `/media-table-schema.json"
    },
    {
      "name": "observations",
      "path": "observations.csv",
      "profile": "tabular-data-resource",
      "format": "csv",
      "mediatype": "text/csv",
      "encoding": "UTF-8",
      "schema": "https://raw.githubusercontent.com/tdwg/camtrap-dp/` + version + `/observations-table-schema.json"
    }
  ],
  "profile": "https://raw.githubusercontent.com/tdwg/camtrap-dp/` + version + `/camtrap-dp-profile.json",
  "name": "hollin-ridge-invented-survey",
  "id": "00000000-0000-4000-8000-000000000054",
  "created": "2025-02-01T10:00:00Z",
  "title": "Hollin Ridge camera-trap survey 2024 (invented demo data)",
  "contributors": [
    {"title": "Invented Field Team", "role": "contact", "organization": "Invented Hollin Ridge Trust"}
  ],
  "description": "Invented for heliotag's demonstrations: the Hollin Ridge area, its camera sites, identifiers and records do not exist.",
  "version": "1.0",
  "keywords": ["invented", "demo", "camera trap"],
  "licenses": [
    {"name": "CC0-1.0", "scope": "data"}
  ],
  "project": {
    "id": "hollin-ridge-invented",
    "title": "Hollin Ridge invented survey",
    "samplingDesign": "systematicRandom",
    "captureMethod": ["activityDetection"],
    "individualAnimals": false,
    "observationLevel": ["media", "event"]
  },
  "coordinatePrecision": 0.00001,
  "spatial": {
    "type": "Polygon",
    "coordinates": [[[-2.98, 54.45], [-2.81, 54.45], [-2.81, 54.57], [-2.98, 54.57], [-2.98, 54.45]]]
  },
  "temporal": {"start": "TEMPORAL_START", "end": "TEMPORAL_END"},
  "taxonomic": [
    {"scientificName": "Vulpes vulpes", "taxonRank": "species", "vernacularNames": {"eng": "red fox"}},
    {"scientificName": "Meles meles", "taxonRank": "species", "vernacularNames": {"eng": "European badger"}},
    {"scientificName": "Capreolus capreolus", "taxonRank": "species", "vernacularNames": {"eng": "roe deer"}},
    {"scientificName": "Sciurus vulgaris", "taxonRank": "species", "vernacularNames": {"eng": "red squirrel"}},
    {"scientificName": "Martes martes", "taxonRank": "species", "vernacularNames": {"eng": "pine marten"}},
    {"scientificName": "Erinaceus europaeus", "taxonRank": "species", "vernacularNames": {"eng": "European hedgehog"}}
  ]
}
`
