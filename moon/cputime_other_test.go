//go:build !linux

package moon

// threadCPU is not available here: it returns 0, and the benchmarks report no CPU-time rates.
func threadCPU() float64 { return 0 }
