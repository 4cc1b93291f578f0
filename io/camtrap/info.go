package camtrap

import (
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/heliotag/heliotag/io/parquet"
)

// FileInfo describes one file of a resource, for inspect.
type FileInfo struct {
	// Path is the file's path as the descriptor gives it.
	Path string
	// Format is "parquet", "csv" or "csv, gzipped" for the three tables
	// (gzip detected by content); for other resources the declared format,
	// else the file name's extension ("" when it has none); "remote" for a
	// URL, which is not read.
	Format string
	// Rows is the number of rows a Parquet file's footer declares, or -1:
	// other files would have to be read whole to count them.
	Rows int64
}

// Resources returns the package's resources in the descriptor's order.
func (p *Package) Resources() []*Resource { return p.order }

// Files describes the files of a resource without reading their rows.
func (p *Package) Files(r *Resource) []FileInfo {
	var out []FileInfo
	table := r.Name == TableDeployments || r.Name == TableMedia || r.Name == TableObservations
	for _, path := range r.Paths {
		fi := FileInfo{Path: path, Rows: -1}
		full := filepath.Join(p.Dir, filepath.FromSlash(path))
		switch {
		case strings.Contains(path, "://"):
			fi.Format = "remote"
		case r.IsParquet(path):
			fi.Format = "parquet"
			fi.Rows = parquetRows(full)
		case table:
			fi.Format = "csv"
			if gzipped(full) {
				fi.Format = "csv, gzipped"
			}
		default:
			fi.Format = strings.ToLower(r.Format)
			if fi.Format == "" {
				fi.Format = strings.TrimPrefix(strings.ToLower(filepath.Ext(path)), ".")
			}
		}
		out = append(out, fi)
	}
	return out
}

// parquetRows is the row count in a Parquet file's footer, or -1.
func parquetRows(path string) int64 {
	f, err := os.Open(path)
	if err != nil {
		return -1
	}
	defer f.Close()
	n, err := parquet.FooterRows(f)
	if err != nil {
		return -1
	}
	return n
}

// gzipped reports whether the file starts with the gzip magic bytes.
func gzipped(path string) bool {
	f, err := os.Open(path)
	if err != nil {
		return false
	}
	defer f.Close()
	var magic [2]byte
	_, err = io.ReadFull(f, magic[:])
	return err == nil && magic[0] == 0x1f && magic[1] == 0x8b
}
