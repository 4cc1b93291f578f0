package num

import (
	"math"
	"math/rand/v2"
	"strconv"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// same checks ParseDecimal against strconv.ParseFloat, the reference: the
// same bits (so -0 stays -0) and an error exactly when strconv gives one.
func same(t *testing.T, s string) {
	t.Helper()
	want, werr := strconv.ParseFloat(s, 64)
	got, gerr := ParseDecimal(s)
	if werr != nil {
		require.Error(t, gerr, "%q", s)
		return
	}
	require.NoError(t, gerr, "%q", s)
	require.Equal(t, math.Float64bits(want), math.Float64bits(got), "%q: got %v want %v", s, got, want)
}

func TestParseDecimal(t *testing.T) {
	for _, s := range []string{
		"0", "-0", "+0", "0.0", "-0.000", "1", "-1", "41.878113", "-87.629799", "180", "-180.000000",
		"90.0000000001", ".5", "5.", "-.5", "007.25", "0.1", "0.3", "123456789012345", "1234567890123456",
		"0.000000000000000000001", "0.0000000000000000000001", "0.00000000000000000000001",
		"9007199254740993", "1e5", "1E-3", "0x1p-2", "inf", "NaN", "", "-", "+", ".", "1.2.3", "1,5",
		" 1", "1 ", "1_000", "--1", "+-1", "١", "4 2",
	} {
		same(t, s)
	}
	v, err := ParseDecimal("-87.629799")
	require.NoError(t, err)
	assert.Equal(t, -87.629799, v)
}

// TestParseDecimalRandom: a million random coordinates in the forms data
// files hold, at every precision from 0 to 15 decimals.
func TestParseDecimalRandom(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for range 1_000_000 {
		v := (rng.Float64()*2 - 1) * math.Pow(10, float64(rng.IntN(4)))
		same(t, strconv.FormatFloat(v, 'f', rng.IntN(16), 64))
	}
}

func FuzzParseDecimal(f *testing.F) {
	for _, s := range []string{"41.878113", "-87.6", "0", ".5", "1e5", "123456789012345.6", "-0.0000001"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) { same(t, s) })
}

func BenchmarkParseDecimal(b *testing.B) {
	b.ReportAllocs()
	in := []string{"41.878113", "-87.629799", "42.3600825", "-71.0588801", "0.5", "-122.419416"}
	var sum float64
	for i := 0; b.Loop(); i++ {
		v, _ := ParseDecimal(in[i%len(in)])
		sum += v
	}
	b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "values/s")
	_ = sum
}

func BenchmarkParseFloatBaseline(b *testing.B) {
	b.ReportAllocs()
	in := []string{"41.878113", "-87.629799", "42.3600825", "-71.0588801", "0.5", "-122.419416"}
	var sum float64
	for i := 0; b.Loop(); i++ {
		v, _ := strconv.ParseFloat(in[i%len(in)], 64)
		sum += v
	}
	b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "values/s")
	_ = sum
}
