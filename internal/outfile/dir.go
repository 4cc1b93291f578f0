package outfile

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
)

// Errors of directory outputs.
var (
	// ErrInsideInput: the output folder is the input folder, or lies inside
	// it, or holds it.
	ErrInsideInput = errors.New("output folder overlaps the input folder")
	// ErrNotDir: the output exists and is not a folder.
	ErrNotDir = errors.New("output is not a folder")
	// ErrForeignDir: --force would replace a folder that is neither empty
	// nor a data package (it has no datapackage.json).
	ErrForeignDir = errors.New("output folder is not a data package")
)

// Dir is an output folder being written: a temporary folder beside the
// target, renamed to the target only by Commit.
type Dir struct {
	tmp    string
	target string
	force  bool
	done   bool
}

// CheckDir refuses a target folder that is the input folder, lies inside it
// or contains it (a replaced target must never take the input with it), that
// exists when force is false, or that exists and is not a folder. With force
// it also refuses to replace a non-empty folder without a datapackage.json,
// so that a mistyped -o cannot wipe an unrelated folder. It is called before
// any input is read.
func CheckDir(target string, force bool, input string) error {
	t, err := absClean(target)
	if err != nil {
		return fmt.Errorf("output %s: %w", target, err)
	}
	in, err := absClean(input)
	if err != nil {
		return fmt.Errorf("input %s: %w", input, err)
	}
	if within(t, in) || within(in, t) {
		return fmt.Errorf("%w: refusing to write %s, which overlaps the input folder %s; choose an -o outside it", ErrInsideInput, target, input)
	}
	ti, err := os.Stat(target)
	if errors.Is(err, os.ErrNotExist) {
		dir := filepath.Dir(t)
		if di, derr := os.Stat(dir); derr != nil || !di.IsDir() {
			return fmt.Errorf("output %s: directory %s does not exist", target, filepath.Dir(target))
		}
		return nil
	}
	if err != nil {
		return fmt.Errorf("output %s: %w", target, err)
	}
	if ii, err := os.Stat(input); err == nil && os.SameFile(ii, ti) {
		return fmt.Errorf("%w: refusing to overwrite the input %s; choose another -o", ErrSameAsIn, input)
	}
	if !ti.IsDir() {
		return fmt.Errorf("%w: %s exists and is not a folder", ErrNotDir, target)
	}
	if !force {
		return fmt.Errorf("%w: %s exists; add --force to replace it", ErrExists, target)
	}
	entries, err := os.ReadDir(target)
	if err != nil {
		return fmt.Errorf("output %s: %w", target, err)
	}
	if len(entries) > 0 {
		if _, err := os.Stat(filepath.Join(target, "datapackage.json")); err != nil {
			return fmt.Errorf("%w: %s is not empty and has no datapackage.json; --force replaces only a package folder", ErrForeignDir, target)
		}
	}
	return nil
}

// absClean returns the absolute, symlink-resolved form of path (as far as it
// exists).
func absClean(path string) (string, error) {
	a, err := filepath.Abs(path)
	if err != nil {
		return "", err
	}
	// Resolve links on the longest existing prefix.
	rest := ""
	p := a
	for {
		if r, err := filepath.EvalSymlinks(p); err == nil {
			return filepath.Join(r, rest), nil
		}
		parent := filepath.Dir(p)
		if parent == p {
			return a, nil
		}
		rest = filepath.Join(filepath.Base(p), rest)
		p = parent
	}
}

// within reports whether path is dir or lies inside it (both absolute, clean).
func within(path, dir string) bool {
	if path == dir {
		return true
	}
	rel, err := filepath.Rel(dir, path)
	return err == nil && rel != ".." && !strings.HasPrefix(rel, ".."+string(filepath.Separator)) && !filepath.IsAbs(rel)
}

// CreateDir makes a temporary folder beside target:
// ".heliotag-<target name>-<random>.tmp", recognised by IsTemp. force says
// whether Commit may replace a target that exists by then.
func CreateDir(target string, force bool) (*Dir, error) {
	tmp, err := os.MkdirTemp(filepath.Dir(filepath.Clean(target)), TempPattern(filepath.Clean(target)))
	if err != nil {
		return nil, fmt.Errorf("creating output folder next to %s: %w", target, err)
	}
	return &Dir{tmp: tmp, target: filepath.Clean(target), force: force}, nil
}

// Path is the temporary folder to write into.
func (d *Dir) Path() string { return d.tmp }

// Commit makes the folder readable (0755), syncs it and renames it to the
// target. With force, an existing target is first moved aside to a
// temporary name and removed after the rename (if the rename fails, it is
// put back); without force, a target that has appeared since CheckDir is an
// ErrExists error and is left alone.
func (d *Dir) Commit() error {
	if d.done {
		return errors.New("outfile: already committed or aborted")
	}
	d.done = true
	fail := func(err error) error {
		_ = os.RemoveAll(d.tmp)
		return fmt.Errorf("writing %s: %w", d.target, err)
	}
	if err := os.Chmod(d.tmp, 0o755); err != nil {
		return fail(err)
	}
	if err := syncPath(d.tmp); err != nil {
		return fail(err)
	}
	var old string
	if _, err := os.Lstat(d.target); err == nil {
		if !d.force {
			return fail(fmt.Errorf("%w: %s appeared during the run; add --force to replace it", ErrExists, d.target))
		}
		old = strings.TrimSuffix(d.tmp, ".tmp") + "-replaced.tmp"
		if err := os.Rename(d.target, old); err != nil {
			return fail(err)
		}
	}
	if err := os.Rename(d.tmp, d.target); err != nil {
		if old != "" {
			_ = os.Rename(old, d.target)
		}
		return fail(err)
	}
	if old != "" {
		if err := os.RemoveAll(old); err != nil {
			return fmt.Errorf("removing the replaced %s (now %s): %w", d.target, old, err)
		}
	}
	_ = syncPath(filepath.Dir(d.target))
	return nil
}

// Abort removes the temporary folder and everything in it. It is safe to
// call after Commit.
func (d *Dir) Abort() {
	if d.done {
		return
	}
	d.done = true
	_ = os.RemoveAll(d.tmp)
}

// syncPath fsyncs a folder's entry list (best effort on systems that cannot).
func syncPath(path string) error {
	f, err := os.Open(path)
	if err != nil {
		return err
	}
	defer f.Close()
	if err := f.Sync(); err != nil && !errors.Is(err, os.ErrInvalid) {
		return err
	}
	return nil
}
