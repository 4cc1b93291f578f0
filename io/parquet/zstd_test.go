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
	for _, n := range []int{0, 1, 100, 4096, 1 << 20} {
		src := make([]byte, n)
		for i := range src {
			src[i] = byte(rng.IntN(16)) // compressible
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
