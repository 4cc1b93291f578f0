package pipeline

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math/rand/v2"
	"sync/atomic"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"go.uber.org/goleak"
)

func TestMain(m *testing.M) { goleak.VerifyTestMain(m) }

// counter returns a next function that yields 0..n-1 then io.EOF.
func counter(n int) func(context.Context) (int, error) {
	i := 0
	return func(context.Context) (int, error) {
		if i >= n {
			return 0, io.EOF
		}
		i++
		return i - 1, nil
	}
}

func TestRunKeepsReadOrder(t *testing.T) {
	for _, workers := range []int{1, 2, 3, 8} {
		for _, inflight := range []int{0, 1, 5} {
			t.Run(fmt.Sprintf("workers=%d/inflight=%d", workers, inflight), func(t *testing.T) {
				rng := rand.New(rand.NewPCG(uint64(workers), uint64(inflight)))
				delays := make([]time.Duration, 200)
				for i := range delays {
					delays[i] = time.Duration(rng.IntN(300)) * time.Microsecond
				}
				var got []int
				err := Run(context.Background(), Options{Workers: workers, InFlight: inflight},
					counter(len(delays)),
					func(_ context.Context, seq, b int) (int, error) {
						if seq != b {
							return 0, fmt.Errorf("seq %d for batch %d", seq, b)
						}
						time.Sleep(delays[b])
						return b * 10, nil
					},
					func(_ context.Context, r int) error {
						got = append(got, r)
						return nil
					})
				require.NoError(t, err)
				require.Len(t, got, len(delays))
				for i, r := range got {
					assert.Equal(t, i*10, r)
				}
			})
		}
	}
}

func TestRunBoundsBatchesInFlight(t *testing.T) {
	const inflight = 3
	var read, written atomic.Int64
	var maxGap atomic.Int64
	next := counter(100)
	err := Run(context.Background(), Options{Workers: 2, InFlight: inflight},
		func(ctx context.Context) (int, error) {
			b, err := next(ctx)
			if err == nil {
				gap := read.Add(1) - written.Load()
				for {
					m := maxGap.Load()
					if gap <= m || maxGap.CompareAndSwap(m, gap) {
						break
					}
				}
			}
			return b, err
		},
		func(_ context.Context, _ int, b int) (int, error) { return b, nil },
		func(_ context.Context, _ int) error {
			time.Sleep(50 * time.Microsecond) // a slow writer
			written.Add(1)
			return nil
		})
	require.NoError(t, err)
	// queue capacity + one batch handed to the worker channel + the one being read.
	assert.LessOrEqual(t, maxGap.Load(), int64(inflight+2+1))
}

func TestRunStopsAtFirstError(t *testing.T) {
	boom := errors.New("boom")
	cases := []struct {
		name  string
		next  func(context.Context) (int, error)
		work  func(context.Context, int, int) (int, error)
		write func(context.Context, int) error
	}{
		{
			name: "reader",
			next: func() func(context.Context) (int, error) {
				n := counter(1000)
				return func(ctx context.Context) (int, error) {
					b, err := n(ctx)
					if b == 17 {
						return 0, boom
					}
					return b, err
				}
			}(),
		},
		{
			name: "worker",
			work: func(_ context.Context, _ int, b int) (int, error) {
				if b == 17 {
					return 0, boom
				}
				return b, nil
			},
		},
		{
			name: "writer",
			write: func(_ context.Context, r int) error {
				if r == 17 {
					return boom
				}
				return nil
			},
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if c.next == nil {
				c.next = counter(1000)
			}
			if c.work == nil {
				c.work = func(_ context.Context, _ int, b int) (int, error) { return b, nil }
			}
			var wrote []int
			write := func(ctx context.Context, r int) error {
				if c.write != nil {
					if err := c.write(ctx, r); err != nil {
						return err
					}
				}
				wrote = append(wrote, r)
				return nil
			}
			err := Run(context.Background(), Options{Workers: 2}, c.next, c.work, write)
			require.ErrorIs(t, err, boom)
			// Nothing at or after the failing batch is written, and what was written is a prefix.
			assert.LessOrEqual(t, len(wrote), 17)
			for i, r := range wrote {
				assert.Equal(t, i, r)
			}
		})
	}
}

func TestRunHonoursCancellation(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	var wrote atomic.Int64
	err := Run(ctx, Options{Workers: 2},
		func(context.Context) (int, error) { return 1, nil }, // endless input
		func(_ context.Context, _ int, b int) (int, error) { return b, nil },
		func(context.Context, int) error {
			if wrote.Add(1) == 50 {
				cancel()
			}
			return nil
		})
	require.ErrorIs(t, err, context.Canceled)
}

func TestRunEmptyInput(t *testing.T) {
	called := false
	err := Run(context.Background(), Options{},
		counter(0),
		func(context.Context, int, int) (int, error) { called = true; return 0, nil },
		func(context.Context, int) error { called = true; return nil })
	require.NoError(t, err)
	assert.False(t, called)
}
