package main

import (
	"fmt"
	"io"
	"strconv"
	"strings"

	"github.com/heliotag/heliotag/job"
)

// printPackage writes inspect's description of a Camtrap DP package.
func printPackage(w io.Writer, ins *job.Inspection) {
	p := ins.Package
	fmt.Fprintf(w, "format:    Camtrap DP %s package (%s)\n", p.Version, p.Descriptor)
	fmt.Fprintln(w, "resources:")
	width := 0
	for _, r := range p.Resources {
		width = max(width, len(r.Name))
	}
	for _, r := range p.Resources {
		var files []string
		for _, f := range r.Files {
			rows := "rows not counted"
			if f.Rows >= 0 {
				rows = strconv.FormatInt(f.Rows, 10) + " rows"
			}
			format := f.Format
			if format == "" {
				format = "format not given"
			}
			files = append(files, fmt.Sprintf("%s (%s, %s)", f.Path, format, rows))
		}
		if len(files) == 0 {
			files = []string{"no file (inline data)"}
		}
		fmt.Fprintf(w, "  %-*s  %s\n", width, r.Name, strings.Join(files, "; "))
	}
	d := p.Deployments
	fmt.Fprintf(w, "deployments: %d", d.Count)
	if d.Count > d.Unreadable {
		fmt.Fprintf(w, "; latitude %s to %s, longitude %s to %s", num(d.MinLat), num(d.MaxLat), num(d.MinLon), num(d.MaxLon))
	}
	fmt.Fprintf(w, "; %d with cameraHeading, %d with timestampIssues", d.Headings, d.TimestampIssues)
	if d.Unreadable > 0 {
		fmt.Fprintf(w, "; %d unreadable (their rows would be bad rows)", d.Unreadable)
	}
	fmt.Fprintln(w)
	fmt.Fprintf(w, "time zone: %s\n", ins.ZoneSource)
	fmt.Fprintf(w, "sample %s (%s):\n", p.SampleTable, strings.Join(p.SampleFields, ", "))
	printSamples(w, ins)
}

func num(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }
