// Package outfile writes a file atomically: to a temporary file in the target
// directory, renamed over the target only when the whole output succeeded.
// A failed or interrupted run leaves no partial output under the target name;
// the temporary file, if a hard kill leaves it behind, is recognisable by its
// name: ".heliotag-<target name>-<random>.tmp" next to the target.
package outfile

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
)

// Sentinel errors.
var (
	ErrExists     = errors.New("output exists")
	ErrSameAsIn   = errors.New("output is the input")
	ErrNotRegular = errors.New("output is not a regular file")
)

// TempPattern is the os.CreateTemp pattern for a target's temporary file.
func TempPattern(target string) string {
	return ".heliotag-" + filepath.Base(target) + "-*.tmp"
}

// IsTemp reports whether name (a base name) is a temporary output of this package.
func IsTemp(name string) bool {
	return strings.HasPrefix(name, ".heliotag-") && strings.HasSuffix(name, ".tmp")
}

// File is an output being written.
type File struct {
	*os.File
	target string
	done   bool
}

// Check refuses a target that is one of the inputs, or that exists when
// force is false. It is called before any input is read.
func Check(target string, force bool, inputs ...string) error {
	ti, err := os.Stat(target)
	if errors.Is(err, os.ErrNotExist) {
		dir := filepath.Dir(target)
		if di, derr := os.Stat(dir); derr != nil || !di.IsDir() {
			return fmt.Errorf("output %s: directory %s does not exist", target, dir)
		}
		return nil
	}
	if err != nil {
		return fmt.Errorf("output %s: %w", target, err)
	}
	for _, in := range inputs {
		if ii, err := os.Stat(in); err == nil && os.SameFile(ii, ti) {
			return fmt.Errorf("%w: refusing to overwrite the input %s; choose another -o", ErrSameAsIn, in)
		}
	}
	if !ti.Mode().IsRegular() {
		return fmt.Errorf("%w: %s", ErrNotRegular, target)
	}
	if !force {
		return fmt.Errorf("%w: %s exists; add --force to replace it", ErrExists, target)
	}
	return nil
}

// Create opens a temporary file next to target.
func Create(target string) (*File, error) {
	f, err := os.CreateTemp(filepath.Dir(target), TempPattern(target))
	if err != nil {
		return nil, fmt.Errorf("creating output next to %s: %w", target, err)
	}
	return &File{File: f, target: target}, nil
}

// Commit syncs and closes the temporary file and renames it to the target.
func (f *File) Commit() error {
	if f.done {
		return errors.New("outfile: already committed or aborted")
	}
	f.done = true
	if err := f.File.Sync(); err != nil {
		f.cleanup()
		return fmt.Errorf("writing %s: %w", f.target, err)
	}
	if err := f.File.Close(); err != nil {
		_ = os.Remove(f.File.Name())
		return fmt.Errorf("writing %s: %w", f.target, err)
	}
	if err := os.Chmod(f.File.Name(), 0o644); err != nil {
		_ = os.Remove(f.File.Name())
		return fmt.Errorf("writing %s: %w", f.target, err)
	}
	if err := os.Rename(f.File.Name(), f.target); err != nil {
		_ = os.Remove(f.File.Name())
		return fmt.Errorf("writing %s: %w", f.target, err)
	}
	return nil
}

// Abort removes the temporary file. It is safe to call after Commit.
func (f *File) Abort() {
	if f.done {
		return
	}
	f.done = true
	f.cleanup()
}

func (f *File) cleanup() {
	_ = f.File.Close()
	_ = os.Remove(f.File.Name())
}
