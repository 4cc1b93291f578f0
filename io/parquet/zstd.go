package parquet

import (
	"sync"

	"github.com/apache/arrow-go/v18/parquet/compress"
	"github.com/klauspost/compress/zstd"
)

// arrow-go compresses each zstd page with an encoder taken from a sync.Pool.
// The garbage collector empties that pool, so every collection cycle costs
// new encoders, each clearing an 8 MiB history buffer: measured here, a fifth
// of an enrich run's CPU time. This package therefore registers (once, when
// it is loaded) a zstd codec that compresses pages at the default level with
// long-lived encoders, whose EncodeAll is safe for concurrent use, built
// with the same options as arrow-go's so the bytes written are the same.
// Other levels, decoding and streams go to arrow-go's own codec.
//
// An encoder keeps, per goroutine that uses it at once (GOMAXPROCS of them),
// a history buffer of twice its window: 16 MiB at the default level's 8 MiB
// window. Pages are far smaller (the writer cuts data pages at 256 KiB,
// dictionary pages at about 1 MiB), so pages up to smallWindow go to an
// encoder with that window, made with the library's low-memory buffers
// (history of the window plus one 128 KiB block each). For such a page the
// bytes are the same as with the 8 MiB window: a frame holding a page no
// larger than its window is a single segment (no window size is written),
// and no match can reach back further than the page's start, as each page
// is a frame of its own. Larger pages go to the default-window encoder,
// made on first use with the library's low-memory buffers (history of the
// window plus one block; again the same bytes). TestSteadyZstdSameBytes
// checks sizes on both sides of the boundary.

// smallWindow is the window of the encoder for pages up to this size.
const smallWindow = 2 << 20

func init() {
	base, err := compress.GetCodec(compress.Codecs.Zstd)
	if err != nil {
		return // no zstd in this build of arrow-go: nothing to speed up
	}
	compress.RegisterCodec(compress.Codecs.Zstd, &steadyZstd{Codec: base})
}

// steadyZstd is arrow-go's zstd codec with long-lived default-level
// encoders.
type steadyZstd struct {
	compress.Codec
	smallOnce, largeOnce sync.Once
	small, large         *zstd.Encoder
}

// encoder returns the long-lived encoder for a page of n bytes, nil if it
// could not be made.
func (z *steadyZstd) encoder(n int) *zstd.Encoder {
	// arrow-go's pooled encoders: zero frames, all-literal entropy coding, the default level.
	if n <= smallWindow {
		z.smallOnce.Do(func() {
			z.small, _ = zstd.NewWriter(nil, zstd.WithZeroFrames(true), zstd.WithEncoderLevel(zstd.SpeedDefault),
				zstd.WithAllLitEntropyCompression(true), zstd.WithWindowSize(smallWindow), zstd.WithLowerEncoderMem(true))
		})
		return z.small
	}
	z.largeOnce.Do(func() {
		z.large, _ = zstd.NewWriter(nil, zstd.WithZeroFrames(true), zstd.WithEncoderLevel(zstd.SpeedDefault),
			zstd.WithAllLitEntropyCompression(true), zstd.WithLowerEncoderMem(true))
	})
	return z.large
}

// EncodeLevel compresses src at level; the default level uses the
// long-lived encoders.
func (z *steadyZstd) EncodeLevel(dst, src []byte, level int) []byte {
	if level != compress.DefaultCompressionLevel {
		return z.Codec.EncodeLevel(dst, src, level)
	}
	if enc := z.encoder(len(src)); enc != nil {
		return enc.EncodeAll(src, dst[:0])
	}
	return z.Codec.EncodeLevel(dst, src, level)
}
