package main

import (
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/heliotag/heliotag/internal/outfile"
)

// TestKilledRunLeavesNoOutput starts the real binary on a large input and
// stops it mid-run: after SIGKILL the target does not exist (or keeps its old
// content with --force) and the temporary file is recognisable by its name;
// after SIGINT or SIGTERM the temporary file is removed too.
func TestKilledRunLeavesNoOutput(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the binary and writes a large input")
	}
	dir := t.TempDir()
	bin := filepath.Join(dir, "heliotag")
	build := exec.Command("go", "build", "-o", bin, ".")
	build.Stderr = os.Stderr
	require.NoError(t, build.Run())

	in := filepath.Join(dir, "in.csv")
	var b strings.Builder
	b.WriteString("id,lat,lon,timestamp\n")
	for i := range 300000 {
		fmt.Fprintf(&b, "%d,%.4f,%.4f,2024-%02d-%02dT%02d:%02d:00Z\n", i, float64(i%170)-85, float64(i%360)-180, 1+i%12, 1+i%28, i%24, i%60)
	}
	require.NoError(t, os.WriteFile(in, []byte(b.String()), 0o644))

	cases := []struct {
		name   string
		sig    syscall.Signal
		force  bool // the target exists beforehand and --force is given
		leaves bool // the temporary file is left behind (SIGKILL cannot be caught)
	}{
		{"SIGKILL", syscall.SIGKILL, false, true},
		{"SIGKILL with --force", syscall.SIGKILL, true, true},
		{"SIGINT", syscall.SIGINT, false, false},
		{"SIGTERM", syscall.SIGTERM, true, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			outDir := t.TempDir()
			target := filepath.Join(outDir, "out.csv")
			args := []string{"enrich", in, "-o", target, "--workers", "1", "--add", "all", "--batch-rows", "256", "-q"}
			if c.force {
				require.NoError(t, os.WriteFile(target, []byte("old content\n"), 0o644))
				args = append(args, "--force")
			}
			cmd := exec.Command(bin, args...)
			require.NoError(t, cmd.Start())
			// Wait until the temporary output exists and has grown.
			deadline := time.Now().Add(30 * time.Second)
			for {
				tmps, _ := filepath.Glob(filepath.Join(outDir, ".heliotag-*"))
				if len(tmps) == 1 {
					if st, err := os.Stat(tmps[0]); err == nil && st.Size() > 1<<16 {
						break
					}
				}
				if time.Now().After(deadline) {
					_ = cmd.Process.Kill()
					t.Fatal("the run never wrote its temporary output")
				}
				time.Sleep(5 * time.Millisecond)
			}
			require.NoError(t, cmd.Process.Signal(c.sig))
			err := cmd.Wait()
			require.Error(t, err, "the run was stopped, it must not succeed")
			if c.sig != syscall.SIGKILL {
				assert.Equal(t, 2, cmd.ProcessState.ExitCode(), "an interrupted run exits 2")
			}
			if c.force {
				got, err := os.ReadFile(target)
				require.NoError(t, err)
				assert.Equal(t, "old content\n", string(got), "the old output is kept")
			} else {
				assert.NoFileExists(t, target)
			}
			entries, err := os.ReadDir(outDir)
			require.NoError(t, err)
			var tmps []string
			for _, e := range entries {
				if e.Name() != "out.csv" {
					tmps = append(tmps, e.Name())
				}
			}
			if c.leaves {
				require.Len(t, tmps, 1, "SIGKILL leaves exactly the temporary file")
				assert.True(t, outfile.IsTemp(tmps[0]), "recognisable temporary name: %s", tmps[0])
				assert.True(t, strings.HasPrefix(tmps[0], ".heliotag-out.csv-"), tmps[0])
			} else {
				assert.Empty(t, tmps, "the temporary file is removed")
			}
		})
	}
}
