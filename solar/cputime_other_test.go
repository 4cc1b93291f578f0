//go:build !linux

package solar

import "math"

// threadCPU is not available here: CPU-time rates come out NaN.
func threadCPU() float64 { return math.NaN() }
