//go:build linux

package solar

import (
	"syscall"
	"unsafe"
)

// threadCPU returns the CPU time consumed by the calling OS thread, in seconds (CLOCK_THREAD_CPUTIME_ID).
// Benchmarks lock their goroutine to its thread around it, so that it counts their work only: on a machine
// shared with other jobs, wall-clock rates fall with the load, CPU-time rates much less.
func threadCPU() float64 {
	var ts syscall.Timespec
	const clockThreadCPUTimeID = 3
	if _, _, e := syscall.Syscall(syscall.SYS_CLOCK_GETTIME, clockThreadCPUTimeID, uintptr(unsafe.Pointer(&ts)), 0); e != 0 {
		return 0
	}
	return float64(ts.Nano()) / 1e9
}
