// Package pipeline runs ordered concurrent streaming: one reader emits
// sequence-numbered batches, a bounded pool of workers computes them, and the
// results return, in read order, to one writer.
//
// The package knows nothing of file formats or of the sun: callers pass three
// functions. Memory is bounded by the number of batches in flight
// (Options.InFlight), not by the size of the input. The first error from any of
// the three functions, or the cancellation of ctx, stops the run; Run returns
// only after every goroutine it started has finished.
package pipeline

import (
	"context"
	"errors"
	"io"
	"runtime"
	"sync"
)

// Options configures Run. The zero value means the defaults.
type Options struct {
	// Workers is the number of goroutines that run the work function.
	// 0 means runtime.NumCPU().
	Workers int
	// InFlight bounds the batches that have been read but not yet written.
	// 0 means 2*Workers + 2.
	InFlight int
}

func (o Options) withDefaults() Options {
	if o.Workers <= 0 {
		o.Workers = runtime.NumCPU()
	}
	if o.InFlight <= 0 {
		o.InFlight = 2*o.Workers + 2
	}
	if o.InFlight < o.Workers {
		o.InFlight = o.Workers
	}
	return o
}

// slot carries one batch's result from its worker to the writer.
type slot[R any] struct {
	ch chan result[R] // buffered, capacity 1
}

type result[R any] struct {
	r   R
	err error
}

type job[B, R any] struct {
	seq  int
	b    B
	slot slot[R]
}

// Run calls next until it returns io.EOF, hands each batch with its 0-based
// sequence number to work on one of o.Workers goroutines, and passes the
// results to write one at a time, in the order next produced them. write runs
// on the calling goroutine.
//
// next and write are never called concurrently with themselves; work is called
// concurrently with itself and with next and write. A batch passed to work is
// owned by that call; a result passed to write is owned by that call.
//
// Run returns the first error returned by next, work or write, or ctx's cause
// if ctx is cancelled first; nil when every batch was written.
func Run[B, R any](
	ctx context.Context,
	o Options,
	next func(ctx context.Context) (B, error),
	work func(ctx context.Context, seq int, b B) (R, error),
	write func(ctx context.Context, r R) error,
) error {
	o = o.withDefaults()
	ctx, cancel := context.WithCancelCause(ctx)
	defer cancel(nil)

	jobs := make(chan job[B, R])
	queue := make(chan slot[R], o.InFlight)
	var wg sync.WaitGroup

	// Reader: reads batches, queues their slots in read order, hands them to workers.
	wg.Add(1)
	go func() {
		defer wg.Done()
		defer close(jobs)
		defer close(queue)
		for seq := 0; ; seq++ {
			b, err := next(ctx)
			if errors.Is(err, io.EOF) {
				return
			}
			if err != nil {
				cancel(err)
				return
			}
			s := slot[R]{ch: make(chan result[R], 1)}
			select {
			case queue <- s:
			case <-ctx.Done():
				return
			}
			select {
			case jobs <- job[B, R]{seq: seq, b: b, slot: s}:
			case <-ctx.Done():
				return
			}
		}
	}()

	// Workers.
	for w := 0; w < o.Workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for j := range jobs {
				if ctx.Err() != nil {
					j.slot.ch <- result[R]{err: context.Cause(ctx)}
					continue
				}
				r, err := work(ctx, j.seq, j.b)
				if err != nil {
					cancel(err)
				}
				j.slot.ch <- result[R]{r: r, err: err}
			}
		}()
	}

	// Writer: the calling goroutine drains slots in read order.
	var werr error
	for s := range queue {
		if werr != nil {
			continue
		}
		select {
		case res := <-s.ch:
			if res.err != nil {
				werr = res.err
				cancel(werr)
				continue
			}
			if err := write(ctx, res.r); err != nil {
				werr = err
				cancel(werr)
			}
		case <-ctx.Done():
			werr = context.Cause(ctx)
		}
	}
	wg.Wait()
	if werr != nil {
		return firstCause(ctx, werr)
	}
	if err := context.Cause(ctx); err != nil {
		return err
	}
	return nil
}

// firstCause prefers the error that cancelled the run over the cancellation
// it caused elsewhere.
func firstCause(ctx context.Context, err error) error {
	if cause := context.Cause(ctx); cause != nil && !errors.Is(cause, context.Canceled) {
		return cause
	}
	return err
}
