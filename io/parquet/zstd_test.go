package parquet

import (
	"bytes"
	"math/rand/v2"
	"testing"

	"github.com/apache/arrow-go/v18/parquet/compress"
)

// TestSteadyZstdSameBytes: the registered codec compresses to exactly the
// bytes of arrow-go's own zstd codec, and they decode back.
func TestSteadyZstdSameBytes(t *testing.T) {
	c, err := compress.GetCodec(compress.Codecs.Zstd)
	if err != nil {
		t.Fatal(err)
	}
	z, ok := c.(*steadyZstd)
	if !ok {
		t.Fatalf("the zstd codec is %T, want *steadyZstd", c)
	}
	rng := rand.New(rand.NewPCG(5, 6))
	// Sizes on both sides of one block (128 KiB), of the small encoder's
	// window and of the default window (8 MiB).
	for _, n := range []int{0, 1, 100, 1024, 1025, 4096, 128 << 10, 128<<10 + 1, 1 << 20,
		smallWindow - 1, smallWindow, smallWindow + 1, 3 << 20, 9 << 20} {
		// Compressible bytes, with a stretch of random bytes repeated
		// from far back (up to the whole size), to make long matches.
		src := make([]byte, n)
		for i := range src {
			src[i] = byte(rng.IntN(16))
		}
		if n >= 1<<20 {
			far := src[:64<<10]
			for i := range far {
				far[i] = byte(rng.Uint32())
			}
			copy(src[n-len(far):], far)
		}
		got := z.EncodeLevel(nil, src, compress.DefaultCompressionLevel)
		want := z.Codec.EncodeLevel(nil, src, compress.DefaultCompressionLevel)
		if !bytes.Equal(got, want) {
			t.Errorf("%d bytes: %d compressed bytes differ from arrow-go's %d", n, len(got), len(want))
		}
		if back := z.Decode(nil, got); !bytes.Equal(back, src) {
			t.Errorf("%d bytes: the round trip differs", n)
		}
	}
}
