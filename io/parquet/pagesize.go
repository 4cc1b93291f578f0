package parquet

import (
	pq "github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/compress"
	"github.com/apache/arrow-go/v18/parquet/file"
)

// maxExpansion is the most one compressed byte of codec c can become when
// decoded, and false for a codec without a useful limit (Brotli, LZO). The
// limits are from memory of the formats, doubled for margin: a Snappy copy
// of 64 bytes takes 3 bytes (about 21x); Deflate's limit is about 1032x; an
// LZ4 match grows by 255 bytes per length byte; a Zstandard RLE block is 4
// bytes for 128 KiB (32768x).
func maxExpansion(c compress.Compression) (int64, bool) {
	switch c {
	case compress.Codecs.Uncompressed:
		return 1, true
	case compress.Codecs.Snappy:
		return 64, true
	case compress.Codecs.Gzip:
		return 2 << 10, true
	case compress.Codecs.Lz4, compress.Codecs.Lz4Raw:
		return 512, true
	case compress.Codecs.Zstd:
		return 64 << 10, true
	}
	return 0, false
}

// boundPageSizes lowers the page-size limits of props, which the Parquet
// library checks against each page header before it allocates the page's
// buffers, to what the opened file can hold: a page's compressed body lies
// inside the file, and decodes to at most the largest expansion of the
// file's codecs. A damaged header of a small file that declares a page of
// hundreds of MiB is then refused ("page size ... exceeds configured
// limit") instead of being allocated (arrow-go v18.8.0 sizes the buffers
// from the header: file/page_reader.go, serializedPageReader.Next and
// decompress). The library's defaults still apply to large files. props
// must be the file's reader properties; the page readers take the limits
// from them when they are made, on the first read of rows.
func boundPageSizes(pf *file.Reader, props *pq.ReaderProperties) {
	size := pf.MetaData().GetSourceFileSize()
	if size <= 0 {
		return
	}
	props.MaxCompressedPageSize = min(pq.DefaultMaxCompressedPageSize, size)
	ratio := int64(1)
	md := pf.MetaData()
	for i := range md.NumRowGroups() {
		rg := md.RowGroup(i)
		for j := range rg.NumColumns() {
			c, err := rg.ColumnChunk(j)
			if err != nil {
				continue // reading the column reports it
			}
			r, ok := maxExpansion(c.Compression())
			if !ok {
				return // a codec without a bound: the library's default
			}
			ratio = max(ratio, r)
		}
	}
	if size < pq.DefaultMaxUncompressedPageSize/ratio {
		props.MaxUncompressedPageSize = size * ratio
	}
}
