package csv

import (
	"bytes"
	"context"
	"errors"
	"io"
	"testing"

	"github.com/stretchr/testify/require"

	"github.com/heliotag/heliotag/enrich"
)

// readAll reads every chunk of src, extracting and encoding each with plan,
// and returns the rows' values, the encoded output (header included) and
// the first error.
func readAll(t *testing.T, data []byte, plan *enrich.Plan) (rows [][]string, misaligned []bool, out []byte, err error) {
	rd, err := NewReader(bytes.NewReader(data), int64(len(data)), Options{})
	if err != nil {
		return nil, nil, nil, err
	}
	var buf bytes.Buffer
	w, err := NewWriter(&buf, rd, plan)
	if err != nil {
		return nil, nil, nil, err
	}
	for {
		c, err := rd.Next(context.Background(), 7)
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, nil, nil, err
		}
		var in enrich.Inputs
		in.Reset(c.Len())
		c.Extract(&in)
		res := &enrich.Results{Plan: plan, Status: make([]enrich.Status, c.Len()), Err: make([]error, c.Len())}
		for i := range c.Len() {
			rows = append(rows, c.Values(i))
			misaligned = append(misaligned, errors.Is(in.Err[i], ErrFieldCount))
			// No sun columns are computed here: every row is kept, with its
			// error if it has one (a wrong field count is realigned).
			res.Status[i], res.Err[i] = enrich.RowKept, in.Err[i]
		}
		require.NoError(t, c.Encode(res))
		require.NoError(t, w.Write(context.Background(), c))
	}
	require.NoError(t, w.Close())
	return rows, misaligned, buf.Bytes(), nil
}

// FuzzReaderRoundTrip: on any input the reader returns rows or an error,
// never a panic or a hang; a passthrough output (--add none) read back gives
// the same rows' values (rows whose field count was wrong come back
// realigned to the header, as documented), and writing it again gives the
// same bytes.
func FuzzReaderRoundTrip(f *testing.F) {
	for _, s := range []string{
		"lat,lon,timestamp\n1,2,2024-01-01T00:00:00Z\n",
		"\ufefflat,lon,timestamp\r\n1,2,2024-01-01T00:00:00Z\r\n",
		"id,lat,lon,timestamp,note\n1,2,3,2024-01-01T00:00:00Z,\"a,b\"\"c\nd\"\n\n2,3,4,x,y\n",
		"lat,lon,timestamp\n\"1,2,x\n",
		"lat,lon,timestamp\n1,2\n1,2,3,4\n",
		"lat;lon;timestamp\n1;2;3\n",
		"",
		"lat,lon,timestamp",
		"lat,lon,timestamp\n\xff\xfe,2,3\n",
	} {
		f.Add([]byte(s))
	}
	none, err := enrich.NewPlan(enrich.PlanOptions{Add: "none"})
	require.NoError(f, err)
	f.Fuzz(func(t *testing.T, data []byte) {
		rows, misaligned, out, err := readAll(t, data, none)
		if err != nil {
			return
		}
		again, _, out2, err := readAll(t, out, none)
		require.NoError(t, err, "reading back %q (from %q)", out, data)
		require.Len(t, again, len(rows))
		for i := range rows {
			if !misaligned[i] {
				require.Equal(t, rows[i], again[i], "row %d of %q", i+1, data)
			}
		}
		require.Equal(t, out, out2, "a passthrough of a passthrough is the same bytes")
	})
}
