package main

import (
	"bytes"
	"context"
	"flag"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

var update = flag.Bool("update", false, "rewrite the want/ sections of testdata/cli/*.txtar from the actual output")

// A CLI case is a text archive in testdata/cli:
//
//	args: enrich in.csv --tz UTC -o out.csv     (split on spaces; 'quoted words' allowed)
//	code: 0
//	stderr: a substring of stderr               (repeatable)
//	nofile: out.csv                             (this file must not exist afterwards; repeatable)
//	-- in.csv --
//	...input file...
//	-- want/out.csv --
//	...expected content of out.csv after the run (golden; -update rewrites)...
//	-- want/stdout --
//	...expected stdout...
//
// Input files ending in .gz are gzipped before the run. Expected files are
// compared field by field: numbers within 0.0015 (the fast path's stated
// accuracy plus rounding to 4 decimals), everything else exactly.
type cliCase struct {
	args    []string
	code    int
	stderr  []string
	nofile  []string
	files   map[string][]byte
	order   []string // file names in archive order
	comment []string
}

func parseCase(t *testing.T, data []byte) *cliCase {
	c := &cliCase{files: map[string][]byte{}}
	lines := strings.SplitAfter(string(data), "\n")
	cur := ""
	for _, line := range lines {
		trim := strings.TrimRight(line, "\r\n")
		if strings.HasPrefix(trim, "-- ") && strings.HasSuffix(trim, " --") && len(trim) > 6 {
			cur = trim[3 : len(trim)-3]
			c.files[cur] = []byte{}
			c.order = append(c.order, cur)
			continue
		}
		if cur != "" {
			c.files[cur] = append(c.files[cur], line...)
			continue
		}
		key, val, ok := strings.Cut(trim, ":")
		val = strings.TrimSpace(val)
		switch {
		case !ok:
			c.comment = append(c.comment, line)
		case key == "args":
			c.args = splitArgs(val)
		case key == "code":
			n, err := strconv.Atoi(val)
			require.NoError(t, err)
			c.code = n
		case key == "stderr":
			c.stderr = append(c.stderr, val)
		case key == "nofile":
			c.nofile = append(c.nofile, val)
		default:
			c.comment = append(c.comment, line)
		}
	}
	return c
}

func splitArgs(s string) []string {
	var out []string
	var cur strings.Builder
	inQ, has := false, false
	for _, r := range s {
		switch {
		case r == '\'':
			inQ, has = !inQ, true
		case r == ' ' && !inQ:
			if has {
				out = append(out, cur.String())
				cur.Reset()
				has = false
			}
		default:
			cur.WriteRune(r)
			has = true
		}
	}
	if has {
		out = append(out, cur.String())
	}
	return out
}

func TestCLI(t *testing.T) {
	paths, err := filepath.Glob("testdata/cli/*.txtar")
	require.NoError(t, err)
	require.NotEmpty(t, paths)
	for _, path := range paths {
		name := strings.TrimSuffix(filepath.Base(path), ".txtar")
		t.Run(name, func(t *testing.T) {
			data, err := os.ReadFile(path)
			require.NoError(t, err)
			c := parseCase(t, data)
			dir := t.TempDir()
			for _, f := range c.order {
				if strings.HasPrefix(f, "want/") {
					continue
				}
				content := c.files[f]
				if strings.HasSuffix(f, ".gz") {
					content = gzipBytes(t, content)
				}
				require.NoError(t, os.MkdirAll(filepath.Dir(filepath.Join(dir, f)), 0o755))
				require.NoError(t, os.WriteFile(filepath.Join(dir, f), content, 0o644))
			}
			t.Chdir(dir)
			var stdout, stderr bytes.Buffer
			code := run(context.Background(), c.args, strings.NewReader(string(c.files["stdin"])), &stdout, &stderr)
			assert.Equal(t, c.code, code, "exit code; stderr:\n%s", stderr.String())
			for _, s := range c.stderr {
				assert.Contains(t, stderr.String(), s)
			}
			for _, f := range c.nofile {
				assert.NoFileExists(t, f)
			}
			leftovers, _ := filepath.Glob(".heliotag-*")
			assert.Empty(t, leftovers, "temporary files left behind")
			got := map[string][]byte{}
			for _, f := range c.order {
				if !strings.HasPrefix(f, "want/") {
					continue
				}
				target := strings.TrimPrefix(f, "want/")
				if target == "stdout" {
					got[f] = stdout.Bytes()
				} else {
					b, err := os.ReadFile(target)
					if !assert.NoError(t, err, "expected output %s", target) {
						continue
					}
					got[f] = b
				}
				if !*update {
					compareOutput(t, target, c.files[f], got[f])
				}
			}
			if *update {
				rewriteCase(t, filepath.Join(pkgDir, path), data, got)
			}
		})
	}
}

// pkgDir is the package directory (tests start there; cases chdir away).
var pkgDir, _ = os.Getwd()

func rewriteCase(t *testing.T, path string, data []byte, got map[string][]byte) {
	var out bytes.Buffer
	lines := strings.SplitAfter(string(data), "\n")
	skip := false
	for _, line := range lines {
		trim := strings.TrimRight(line, "\r\n")
		if strings.HasPrefix(trim, "-- ") && strings.HasSuffix(trim, " --") && len(trim) > 6 {
			name := trim[3 : len(trim)-3]
			if g, ok := got[name]; ok {
				out.WriteString(line)
				out.Write(g)
				skip = true
				continue
			}
			skip = false
		}
		if !skip {
			out.WriteString(line)
		}
	}
	require.NoError(t, os.WriteFile(path, out.Bytes(), 0o644))
}

// compareOutput compares text output line by line and field by field, with
// numbers within 0.0015.
func compareOutput(t *testing.T, name string, want, got []byte) {
	t.Helper()
	if bytes.Equal(want, got) {
		return
	}
	wl := strings.Split(string(want), "\n")
	gl := strings.Split(string(got), "\n")
	if !assert.Equal(t, len(wl), len(gl), "%s: line count\nwant:\n%s\ngot:\n%s", name, want, got) {
		return
	}
	for i := range wl {
		if wl[i] == gl[i] {
			continue
		}
		wf, gf := splitLoose(wl[i]), splitLoose(gl[i])
		if !assert.Equal(t, len(wf), len(gf), "%s line %d: field count\nwant %q\ngot  %q", name, i+1, wl[i], gl[i]) {
			continue
		}
		for j := range wf {
			if wf[j] == gf[j] {
				continue
			}
			a, errA := strconv.ParseFloat(wf[j], 64)
			b, errB := strconv.ParseFloat(gf[j], 64)
			if errA == nil && errB == nil && math.Abs(a-b) <= 0.0015 {
				continue
			}
			assert.Fail(t, fmt.Sprintf("%s line %d field %d: want %q, got %q\nwant line %q\ngot line  %q", name, i+1, j+1, wf[j], gf[j], wl[i], gl[i]))
		}
	}
}

// splitLoose splits a line on commas, tabs, colons-with-space and JSON
// punctuation, enough to line up numbers for a tolerant comparison.
func splitLoose(s string) []string {
	return strings.FieldsFunc(s, func(r rune) bool {
		return r == ',' || r == '\t' || r == ' ' || r == '"' || r == '{' || r == '}' || r == '[' || r == ']'
	})
}

func TestCLICasesDeclareCodeAndArgs(t *testing.T) {
	// A guard on the harness itself: every case declares an exit code and args.
	paths, _ := filepath.Glob("testdata/cli/*.txtar")
	for _, p := range paths {
		data, err := os.ReadFile(p)
		require.NoError(t, err)
		c := parseCase(t, data)
		assert.NotEmpty(t, c.args, "%s: no args line", p)
		assert.Contains(t, string(data), "\ncode:", "%s: no code line", p)
	}
}
