package main

import (
	"bufio"
	"io"
	"strconv"
	"time"
)

// csvWriter writes rows as CSV with a header line.
type csvWriter struct {
	w     *bufio.Writer
	shape string
	wide  bool
	b     []byte
}

func newCSVWriter(w io.Writer, shape string, wide bool) (*csvWriter, error) {
	c := &csvWriter{w: bufio.NewWriterSize(w, 1<<20), shape: shape, wide: wide}
	b := c.b[:0]
	if shape == "crash" {
		b = append(b, "id,crash_date,crash_time,lat,lon,severity,vehicles"...)
	} else {
		b = append(b, "id,site,lat,lon,timestamp,species,count"...)
	}
	if wide {
		for j := range wideColumns {
			b = append(append(b, ','), wideName(j)...)
		}
	}
	b = append(b, '\n')
	_, err := c.w.Write(b)
	c.b = b
	return c, err
}

func (c *csvWriter) write(r *row) error {
	b := c.b[:0]
	if c.shape == "crash" {
		b = strconv.AppendInt(append(b, 'c'), int64(r.id), 10)
		b = append(b, ',')
		b = r.t.AppendFormat(b, "2006-01-02,1504")
		b = append(b, ',')
		b = strconv.AppendFloat(b, r.lat, 'f', coordDecimals, 64)
		b = append(b, ',')
		b = strconv.AppendFloat(b, r.lon, 'f', coordDecimals, 64)
		b = append(append(b, ','), r.label...)
		b = strconv.AppendInt(append(b, ','), int64(r.count), 10)
	} else {
		b = strconv.AppendInt(append(b, 'd'), int64(r.id), 10)
		b = appendSite(append(b, ','), r.site)
		b = append(b, ',')
		b = strconv.AppendFloat(b, r.lat, 'f', coordDecimals, 64)
		b = append(b, ',')
		b = strconv.AppendFloat(b, r.lon, 'f', coordDecimals, 64)
		b = append(b, ',')
		b = r.t.AppendFormat(b, time.RFC3339)
		b = append(append(b, ','), r.label...)
		b = strconv.AppendInt(append(b, ','), int64(r.count), 10)
	}
	if c.wide {
		for j := range wideColumns {
			b = appendWideText(append(b, ','), j, r.wide[j], false)
		}
	}
	b = append(b, '\n')
	c.b = b
	_, err := c.w.Write(b)
	return err
}

func (c *csvWriter) close() error { return c.w.Flush() }

// appendSite appends the camera site's name, S00 to S39.
func appendSite(b []byte, site int) []byte {
	return append(b, 'S', byte('0'+site/10), byte('0'+site%10))
}

// appendWideText appends wide field j as text; quoted puts the text and
// date kinds in JSON quotes.
func appendWideText(b []byte, j int, v wideValue, quoted bool) []byte {
	switch kindOf(j) {
	case wideText:
		if quoted {
			return append(append(append(b, '"'), v.text...), '"')
		}
		return append(b, v.text...)
	case wideInt:
		return strconv.AppendInt(b, v.i, 10)
	case wideFloat:
		return strconv.AppendFloat(b, v.f, 'f', wideDecimals, 64)
	case wideBool:
		return strconv.AppendBool(b, v.i == 1)
	default: // wideDate
		if quoted {
			b = append(b, '"')
		}
		b = dateOf(v.i).AppendFormat(b, "2006-01-02")
		if quoted {
			b = append(b, '"')
		}
		return b
	}
}

// geojsonWriter writes rows as Point features: a FeatureCollection, or a
// text sequence of one Feature per line.
type geojsonWriter struct {
	w     *bufio.Writer
	shape string
	wide  bool
	seq   bool
	n     int
	b     []byte
}

func newGeoJSONWriter(w io.Writer, shape string, wide, seq bool) (*geojsonWriter, error) {
	g := &geojsonWriter{w: bufio.NewWriterSize(w, 1<<20), shape: shape, wide: wide, seq: seq}
	if seq {
		return g, nil
	}
	_, err := g.w.WriteString(`{"type":"FeatureCollection","name":"heliotag benchmark ` + shape + `","features":[` + "\n")
	return g, err
}

func (g *geojsonWriter) write(r *row) error {
	b := g.b[:0]
	if !g.seq && g.n > 0 {
		b = append(b, ",\n"...)
	}
	g.n++
	b = append(b, `{"type":"Feature","id":`...)
	b = strconv.AppendInt(b, int64(r.id), 10)
	b = append(b, `,"geometry":{"type":"Point","coordinates":[`...)
	b = strconv.AppendFloat(b, r.lon, 'f', coordDecimals, 64)
	b = append(b, ',')
	b = strconv.AppendFloat(b, r.lat, 'f', coordDecimals, 64)
	b = append(b, `]},"properties":{`...)
	if g.shape == "crash" {
		b = strconv.AppendInt(append(b, `"id":"c`...), int64(r.id), 10)
		b = r.t.AppendFormat(append(b, `","crash_date":"`...), "2006-01-02")
		b = r.t.AppendFormat(append(b, `","crash_time":"`...), "1504")
		b = append(append(b, `","severity":"`...), r.label...)
		b = strconv.AppendInt(append(b, `","vehicles":`...), int64(r.count), 10)
	} else {
		b = strconv.AppendInt(append(b, `"id":"d`...), int64(r.id), 10)
		b = appendSite(append(b, `","site":"`...), r.site)
		b = r.t.AppendFormat(append(b, `","timestamp":"`...), time.RFC3339)
		b = append(append(b, `","species":"`...), r.label...)
		b = strconv.AppendInt(append(b, `","count":`...), int64(r.count), 10)
	}
	if g.wide {
		for j := range wideColumns {
			b = append(append(append(b, `,"`...), wideName(j)...), `":`...)
			b = appendWideText(b, j, r.wide[j], true)
		}
	}
	b = append(b, "}}"...)
	if g.seq {
		b = append(b, '\n')
	}
	g.b = b
	_, err := g.w.Write(b)
	return err
}

func (g *geojsonWriter) close() error {
	if !g.seq {
		if _, err := g.w.WriteString("\n]}\n"); err != nil {
			return err
		}
	}
	return g.w.Flush()
}
