//go:build linux

package stamp

import (
	"runtime"
	"syscall"
	"testing"
)

// cpuClock measures the CPU time of the benchmark's own thread, which, unlike wall time, does not
// grow while the thread waits for a core on a busy machine. start locks the goroutine to its thread
// until report.
type cpuClock struct{ ns int64 }

func threadCPU() int64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(1 /* RUSAGE_THREAD */, &ru); err != nil {
		return 0
	}
	return ru.Utime.Nano() + ru.Stime.Nano()
}

func startCPU() cpuClock {
	runtime.LockOSThread()
	return cpuClock{threadCPU()}
}

// report adds the thread's CPU nanoseconds per op (and per row when rows > 1) as metrics.
func (c cpuClock) report(b *testing.B, rows int) {
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
