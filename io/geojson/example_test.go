package geojson_test

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"strings"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/geojson"
)

// A FeatureCollection with one Point feature, read, enriched and written.
func ExampleNewReader() {
	in := `{"type":"FeatureCollection","name":"sightings","features":[
{"type":"Feature","id":7,"geometry":{"type":"Point","coordinates":[-105.1786,39.742476,1830]},
 "properties":{"species":"Aquila chrysaetos","seen":"2003-10-17T12:30:30-07:00","count":1.0}}]}`

	rd, err := geojson.NewReader(strings.NewReader(in), 0, geojson.Options{Select: enrich.Select{Time: "seen"}})
	if err != nil {
		panic(err)
	}
	fmt.Println("columns:", rd.Columns())
	for _, c := range rd.Choices() {
		fmt.Printf("%s: %s (%s)\n", c.Role, c.Column, c.How)
	}

	plan, err := enrich.NewPlan(enrich.PlanOptions{Input: rd.Columns()})
	if err != nil {
		panic(err)
	}
	var out bytes.Buffer
	w, err := geojson.NewWriter(&out, rd, plan, geojson.WriterOptions{})
	if err != nil {
		panic(err)
	}
	if _, err := enrich.Run(context.Background(), rd, w, enrich.Options{Plan: plan}); err != nil {
		panic(err)
	}
	if err := w.Close(); err != nil {
		panic(err)
	}

	var fc struct {
		Name     string
		Features []struct {
			Properties map[string]any
		}
	}
	if err := json.Unmarshal(out.Bytes(), &fc); err != nil {
		panic(err)
	}
	p := fc.Features[0].Properties
	fmt.Println("name:", fc.Name)
	fmt.Printf("altitude %.1f°, azimuth %.1f°, %s, %s\n", p["sun_altitude_deg"], p["sun_azimuth_deg"], p["sun_phase"], p["sun_light_condition"])
	fmt.Println(strings.Contains(out.String(), `"count":1.0,"sun_altitude_deg":`))
	// Output:
	// columns: [species seen count feature]
	// timestamp: seen (--time)
	// location: geometry (each feature's geometry (representative point))
	// name: sightings
	// altitude 39.9°, azimuth 194.3°, day, daylight
	// true
}
