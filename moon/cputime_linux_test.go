//go:build linux

package moon

import "syscall"

// threadCPU returns the CPU time, seconds, that the calling OS thread has used (user and system); callers
// lock their goroutine to its thread. On a machine shared with other work it measures the time the code ran,
// not the time it waited for a core.
func threadCPU() float64 {
	var ru syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_THREAD, &ru) != nil {
		return 0
	}
	return float64(ru.Utime.Nano()+ru.Stime.Nano()) / 1e9
}
