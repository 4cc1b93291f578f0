package csv

import (
	"bytes"
	"context"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestSplitRecord(t *testing.T) {
	// RFC 4180 §2 rules: fields may be quoted; quotes inside are doubled;
	// quoted fields may hold delimiters and line breaks.
	cases := []struct {
		name string
		rec  string
		want []string
	}{
		{"plain", "a,b,c", []string{"a", "b", "c"}},
		{"empty fields", ",,", []string{"", "", ""}},
		{"trailing empty", "a,", []string{"a", ""}},
		{"single empty", "", []string{""}},
		{"quoted", `"a",b`, []string{"a", "b"}},
		{"quoted delimiter", `"a,b",c`, []string{"a,b", "c"}},
		{"doubled quote", `"say ""hi""",x`, []string{`say "hi"`, "x"}},
		{"newline inside", "\"line1\nline2\",x", []string{"line1\nline2", "x"}},
		{"crlf inside", "\"a\r\nb\"", []string{"a\r\nb"}},
		{"quoted last empty", `a,""`, []string{"a", ""}},
		{"quoted then trailing empty", `"a",`, []string{"a", ""}},
		{"spaces kept", " a , b ", []string{" a ", " b "}},
		{"utf8", "Zürich,東京", []string{"Zürich", "東京"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, err := splitRecord(nil, []byte(c.rec), ',')
			require.NoError(t, err)
			assert.Equal(t, c.want, got)
		})
	}
}

func TestSplitRecordTab(t *testing.T) {
	got, err := splitRecord(nil, []byte("a\t\"b\tc\"\td"), '\t')
	require.NoError(t, err)
	assert.Equal(t, []string{"a", "b\tc", "d"}, got)
}

func TestSplitRecordErrors(t *testing.T) {
	cases := []struct {
		name string
		rec  string
	}{
		{"bare quote", `a,b"c,d`},
		{"text after closing quote", `"a"b,c`},
		{"unclosed", `"abc`},
		{"space before quote", `a, "b"`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := splitRecord(nil, []byte(c.rec), ',')
			require.ErrorIs(t, err, ErrQuote)
			assert.Contains(t, err.Error(), "field")
		})
	}
}

func TestAppendFieldQuotesOnlyWhenNeeded(t *testing.T) {
	cases := map[string]string{
		"plain":       "plain",
		"":            "",
		"a,b":         `"a,b"`,
		`say "hi"`:    `"say ""hi"""`,
		"two\nlines":  "\"two\nlines\"",
		" lead space": `" lead space"`,
	}
	for in, want := range cases {
		assert.Equal(t, want, string(appendField(nil, in, ',')), "field %q", in)
	}
}

// FuzzSplitRecord: splitting never panics, and a record rebuilt from the
// fields with appendField splits back into the same fields.
func FuzzSplitRecord(f *testing.F) {
	for _, s := range []string{"a,b,c", `"a,b",c`, `"x""y"`, "\"a\nb\",", `a"b`, ",,", ""} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, rec []byte) {
		fields, err := splitRecord(nil, rec, ',')
		if err != nil {
			return
		}
		var b []byte
		for i, s := range fields {
			if i > 0 {
				b = append(b, ',')
			}
			b = appendField(b, s, ',')
		}
		again, err := splitRecord(nil, b, ',')
		require.NoError(t, err, "rebuilt %q from %q", b, rec)
		require.Equal(t, fields, again)
	})
}

func TestSplitCount(t *testing.T) {
	got, n := splitCount(nil, []byte("a,b,c,d"), ',', 4, 2)
	assert.Equal(t, 4, n)
	assert.Equal(t, []string{"a", "b", "", ""}, got, "only the needed fields are split")
	got, n = splitCount(got, []byte("x,,z,w"), ',', 4, 4)
	assert.Equal(t, 4, n)
	assert.Equal(t, []string{"x", "", "z", "w"}, got)
	got, n = splitCount(got, []byte("p,q,r,s"), ',', 4, 1)
	assert.Equal(t, 4, n)
	assert.Equal(t, []string{"p", "", "", ""}, got, "no stale values from the previous row")
	// Delimiters in every position of a word, and a byte one above the
	// delimiter after it ("-" after ","), which a carrying zero-byte test
	// would take for a delimiter.
	got, n = splitCount(got, []byte("c0,2016-08-05,0652,39.01600,-86.38473,fatal,4"), ',', 7, 5)
	assert.Equal(t, 7, n)
	assert.Equal(t, []string{"c0", "2016-08-05", "0652", "39.01600", "-86.38473", "", ""}, got)
	_, n = splitCount(got, []byte("1,2,3"), ',', 4, 4)
	assert.Equal(t, 3, n, "a short record is counted")
	_, n = splitCount(got, []byte("1,2,3,4,5,6,7,8,9,10"), ',', 4, 4)
	assert.Equal(t, 10, n, "a long record is counted")
	got, n = splitCount(got, []byte("a\tb\t-c"), '\t', 3, 3)
	assert.Equal(t, 3, n)
	assert.Equal(t, []string{"a", "b", "-c"}, got)
}

// FuzzSplitCount: on a record without quotes, splitCount counts the fields
// as splitRecord does and gives the first need fields exactly, the others
// empty.
func FuzzSplitCount(f *testing.F) {
	for _, s := range []string{"a,b,c", ",,", "", "1,2,3,4,5,6,7", "x,", ",y", "c0,2016-08-05,0652,39.01600,-86.38473,fatal,4", ",-,-,-,-,-,-,-,-,-"} {
		f.Add([]byte(s), uint8(2))
	}
	f.Fuzz(func(t *testing.T, rec []byte, need uint8) {
		if bytes.IndexByte(rec, '"') >= 0 {
			return
		}
		want, err := splitRecord(nil, rec, ',')
		require.NoError(t, err)
		n := len(want)
		k := int(need) % (n + 2)
		got, count := splitCount([]string{"stale", "stale"}, rec, ',', n, k)
		require.Equal(t, n, count, "fields of %q", rec)
		require.Len(t, got, n)
		for j := range n {
			if j < k {
				require.Equal(t, want[j], got[j], "field %d of %q", j, rec)
			} else {
				require.Equal(t, "", got[j], "field %d of %q", j, rec)
			}
		}
		_, count = splitCount(nil, rec, ',', n+1, k)
		require.Equal(t, n, count, "fields of %q, when another count is expected", rec)
	})
}

// TestReleaseReuses: a released chunk's buffers serve the next chunk, and
// the records read through it are unchanged.
func TestReleaseReuses(t *testing.T) {
	in := "lat,lon,time\n1,2,2024-01-01T00:00:00Z\n3,4,2024-01-01T00:00:00Z\n5,6,2024-01-01T00:00:00Z\n"
	rd, err := NewReader(strings.NewReader(in), int64(len(in)), Options{})
	require.NoError(t, err)
	first, err := rd.Next(context.Background(), 2)
	require.NoError(t, err)
	c := first.(*chunk)
	assert.Equal(t, []string{"1", "2", "2024-01-01T00:00:00Z"}, c.Values(0))
	buf := &c.buf[:1][0]
	c.Release()
	second, err := rd.Next(context.Background(), 2)
	require.NoError(t, err)
	c2 := second.(*chunk)
	assert.Same(t, buf, &c2.buf[:1][0], "the released chunk's buffer is reused")
	assert.Equal(t, []string{"5", "6", "2024-01-01T00:00:00Z"}, c2.Values(0))
	assert.Equal(t, 1, c2.Len())
}
