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
// one long-lived encoder, whose EncodeAll is safe for concurrent use, built
// with the same options as arrow-go's so the bytes written are the same.
// Other levels, decoding and streams go to arrow-go's own codec.

func init() {
	base, err := compress.GetCodec(compress.Codecs.Zstd)
	if err != nil {
		return // no zstd in this build of arrow-go: nothing to speed up
	}
	compress.RegisterCodec(compress.Codecs.Zstd, &steadyZstd{Codec: base})
}

// steadyZstd is arrow-go's zstd codec with a long-lived default-level
// encoder.
type steadyZstd struct {
	compress.Codec
	once sync.Once
	enc  *zstd.Encoder
}

func (z *steadyZstd) encoder() *zstd.Encoder {
	z.once.Do(func() {
		// arrow-go's pooled encoders: zero frames, all-literal entropy coding, the default level.
		z.enc, _ = zstd.NewWriter(nil, zstd.WithZeroFrames(true), zstd.WithEncoderLevel(zstd.SpeedDefault),
			zstd.WithAllLitEntropyCompression(true))
	})
	return z.enc
}

// EncodeLevel compresses src at level; the default level uses the
// long-lived encoder.
func (z *steadyZstd) EncodeLevel(dst, src []byte, level int) []byte {
	if level != compress.DefaultCompressionLevel {
		return z.Codec.EncodeLevel(dst, src, level)
	}
	if enc := z.encoder(); enc != nil {
		return enc.EncodeAll(src, dst[:0])
	}
	return z.Codec.EncodeLevel(dst, src, level)
}
