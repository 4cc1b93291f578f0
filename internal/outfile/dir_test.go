package outfile

import (
	"errors"
	"os"
	"path/filepath"
	"testing"
)

func writeFile(t *testing.T, path, content string) {
	t.Helper()
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
}

func TestCheckDir(t *testing.T) {
	root := t.TempDir()
	in := filepath.Join(root, "in")
	writeFile(t, filepath.Join(in, "datapackage.json"), "{}")
	writeFile(t, filepath.Join(root, "pkg", "datapackage.json"), "{}")
	writeFile(t, filepath.Join(root, "other", "notes.txt"), "keep me")
	writeFile(t, filepath.Join(root, "file"), "x")
	if err := os.Mkdir(filepath.Join(root, "empty"), 0o755); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name   string
		target string
		force  bool
		want   error // nil: accepted
	}{
		{"new folder", filepath.Join(root, "out"), false, nil},
		{"the input folder", in, true, ErrInsideInput},
		{"inside the input folder", filepath.Join(in, "out"), true, ErrInsideInput},
		{"holding the input folder", root, true, ErrInsideInput},
		{"exists without force", filepath.Join(root, "pkg"), false, ErrExists},
		{"package with force", filepath.Join(root, "pkg"), true, nil},
		{"empty folder with force", filepath.Join(root, "empty"), true, nil},
		{"foreign folder with force", filepath.Join(root, "other"), true, ErrForeignDir},
		{"a file", filepath.Join(root, "file"), true, ErrNotDir},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := CheckDir(c.target, c.force, in)
			if c.want == nil {
				if err != nil {
					t.Fatalf("CheckDir: %v", err)
				}
				return
			}
			if !errors.Is(err, c.want) {
				t.Fatalf("CheckDir = %v, want %v", err, c.want)
			}
		})
	}
	if err := CheckDir(filepath.Join(root, "missing", "out"), false, in); err == nil {
		t.Error("CheckDir accepted a target in a missing folder")
	}
}

func TestDirCommitAndAbort(t *testing.T) {
	root := t.TempDir()
	target := filepath.Join(root, "out")

	d, err := CreateDir(target, false)
	if err != nil {
		t.Fatal(err)
	}
	if !IsTemp(filepath.Base(d.Path())) {
		t.Errorf("temporary folder %s is not recognisable", d.Path())
	}
	writeFile(t, filepath.Join(d.Path(), "a.csv"), "new")
	if _, err := os.Stat(target); !errors.Is(err, os.ErrNotExist) {
		t.Fatalf("target exists before Commit: %v", err)
	}
	if err := d.Commit(); err != nil {
		t.Fatal(err)
	}
	if b, err := os.ReadFile(filepath.Join(target, "a.csv")); err != nil || string(b) != "new" {
		t.Fatalf("after Commit: %q, %v", b, err)
	}

	// Without force, a target that appeared meanwhile is left alone.
	d, err = CreateDir(target, false)
	if err != nil {
		t.Fatal(err)
	}
	writeFile(t, filepath.Join(d.Path(), "b.csv"), "newer")
	if err := d.Commit(); !errors.Is(err, ErrExists) {
		t.Fatalf("Commit over an existing target without force: %v", err)
	}
	if b, err := os.ReadFile(filepath.Join(target, "a.csv")); err != nil || string(b) != "new" {
		t.Fatalf("the existing target changed: %q, %v", b, err)
	}

	// Replacing: the old content goes, nothing temporary is left.
	d, err = CreateDir(target, true)
	if err != nil {
		t.Fatal(err)
	}
	writeFile(t, filepath.Join(d.Path(), "b.csv"), "newer")
	if err := d.Commit(); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(target, "a.csv")); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("replaced folder kept an old file: %v", err)
	}

	// Abort: no trace.
	d, err = CreateDir(filepath.Join(root, "never"), false)
	if err != nil {
		t.Fatal(err)
	}
	writeFile(t, filepath.Join(d.Path(), "c.csv"), "partial")
	d.Abort()
	entries, _ := os.ReadDir(root)
	for _, e := range entries {
		if IsTemp(e.Name()) || e.Name() == "never" {
			t.Errorf("left behind: %s", e.Name())
		}
	}
	if len(entries) != 1 {
		t.Errorf("root holds %d entries, want 1 (out)", len(entries))
	}
}
