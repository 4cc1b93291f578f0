//go:build linux

// Package benchclock measures the CPU time of a benchmark's own thread,
// which, unlike wall time, does not grow while the thread waits for a core on
// a busy machine. Benchmarks report it beside their wall-clock rates.
package benchclock

import (
	"runtime"
	"syscall"
	"testing"
)

// Clock holds the thread's CPU time at Start.
type Clock struct{ ns int64 }

func threadCPU() int64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(1 /* RUSAGE_THREAD */, &ru); err != nil {
		return 0
	}
	return ru.Utime.Nano() + ru.Stime.Nano()
}

// Start locks the goroutine to its thread (until Report) and reads the
// thread's CPU time.
func Start() Clock {
	runtime.LockOSThread()
	return Clock{threadCPU()}
}

// Report adds the thread's CPU nanoseconds per op (and per row when rows > 1)
// as metrics, and unlocks the thread.
func (c Clock) Report(b *testing.B, rows int) {
	used := threadCPU() - c.ns
	runtime.UnlockOSThread()
	if c.ns == 0 || used <= 0 {
		return
	}
	b.ReportMetric(float64(used)/float64(b.N), "cpu-ns/op")
	if rows > 1 {
		b.ReportMetric(float64(used)/float64(b.N*rows), "cpu-ns/row")
	}
}
