// Package freelist keeps a bounded number of reusable objects.
//
// Unlike sync.Pool, a List is not emptied by the garbage collector: once a
// streaming run has made the objects its batches in flight need, it makes no
// more, so the heap (and the resident memory) stays flat however long the
// input is. Objects beyond the bound are left to the collector.
package freelist

// List is a bounded free list, safe for concurrent use.
type List[T any] struct {
	free chan T
	make func() T
}

// New returns a list that keeps at most size objects and makes new ones
// with mk when it is empty.
func New[T any](size int, mk func() T) *List[T] {
	return &List[T]{free: make(chan T, max(size, 1)), make: mk}
}

// Get returns a kept object, or a new one.
func (l *List[T]) Get() T {
	select {
	case v := <-l.free:
		return v
	default:
		return l.make()
	}
}

// Put keeps v for a later Get, or drops it when the list is full.
func (l *List[T]) Put(v T) {
	select {
	case l.free <- v:
	default:
	}
}
