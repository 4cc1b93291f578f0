package parquet

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"go.uber.org/goleak"

	"github.com/heliotag/heliotag/enrich"
)

// failingWriter fails once more than limit bytes have been written to it.
type failingWriter struct {
	limit, n int
}

var errFull = errors.New("no space left on device")

func (w *failingWriter) Write(p []byte) (int, error) {
	if w.n+len(p) > w.limit {
		return 0, errFull
	}
	w.n += len(p)
	return len(p), nil
}

// TestFailedRunsReleaseMemory: a write error, a cancelled context and a bad
// row under fail all stop the run with batches in flight; closing the
// reader releases every one (the checked allocator would report a leak),
// and no goroutine outlives the run; with the columns encoded on one
// goroutine and on several.
func TestFailedRunsReleaseMemory(t *testing.T) {
	defer goleak.VerifyNone(t)
	in := generated(t, 20_000, 5)
	cases := []struct {
		name   string
		out    func() io.Writer
		ctx    func() (context.Context, context.CancelFunc)
		policy enrich.Policy
		want   error
	}{
		{"write error", func() io.Writer { return &failingWriter{limit: 10_000} }, nil, enrich.PolicySkip, errFull},
		{"cancelled", func() io.Writer { return io.Discard }, func() (context.Context, context.CancelFunc) {
			ctx, cancel := context.WithCancel(context.Background())
			cancel()
			return ctx, cancel
		}, enrich.PolicySkip, context.Canceled},
		{"bad row under fail", func() io.Writer { return io.Discard }, nil, enrich.PolicyFail, enrich.ErrBadRow},
	}
	for _, tc := range cases {
		for _, workers := range []int{1, 2} {
			t.Run(fmt.Sprintf("%s/writer workers %d", tc.name, workers), func(t *testing.T) {
				mem := checkedMem(t)
				rd, err := NewReader(bytes.NewReader(in), Options{Allocator: mem})
				if err != nil {
					t.Fatal(err)
				}
				plan, err := enrich.NewPlan(enrich.PlanOptions{Input: rd.Columns()})
				if err != nil {
					t.Fatal(err)
				}
				w, err := NewWriter(tc.out(), rd, plan, WriterOptions{RowGroupRows: 4096, Workers: workers})
				if err != nil {
					t.Fatal(err)
				}
				ctx := context.Background()
				if tc.ctx != nil {
					var cancel context.CancelFunc
					ctx, cancel = tc.ctx()
					defer cancel()
				}
				_, err = enrich.Run(ctx, rd, w, enrich.Options{Plan: plan, Policy: tc.policy, Workers: 2, BatchRows: 512})
				if cerr := w.Close(); err == nil {
					err = cerr
				}
				rd.Close()
				if err == nil {
					t.Fatal("the run did not fail")
				}
				var re *enrich.RowError
				if !errors.Is(err, tc.want) && !(tc.want == enrich.ErrBadRow && errors.As(err, &re)) {
					t.Errorf("error %v, want %v", err, tc.want)
				}
			})
		}
	}
}

// TestTruncatedFile: a Parquet file cut short (the bad-input catalogue's
// testdata/bad/truncated.parquet, made from a valid file by dropping its
// last 1000 bytes) is an ErrFile error that gives the size and says what is
// wrong, before any row is read.
func TestTruncatedFile(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("testdata", "bad", "truncated.parquet"))
	if err != nil {
		t.Fatal(err)
	}
	_, err = NewReader(bytes.NewReader(b), Options{Allocator: checkedMem(t)})
	if !errors.Is(err, ErrFile) {
		t.Fatalf("error %v, want ErrFile", err)
	}
	if msg := err.Error(); !strings.Contains(msg, "bytes") || !strings.Contains(msg, "complete Parquet file") {
		t.Errorf("message %q should give the size and ask whether the file is complete", msg)
	}
	for _, cut := range []int{0, 3, 8, 12, len(b) / 2} {
		if _, err := NewReader(bytes.NewReader(b[:cut]), Options{}); !errors.Is(err, ErrFile) {
			t.Errorf("first %d bytes: error %v, want ErrFile", cut, err)
		}
	}
}

// TestNotParquet: text is not read as Parquet.
func TestNotParquet(t *testing.T) {
	_, err := NewReader(strings.NewReader("lat,lon,timestamp\n1,2,2024-06-21T00:00:00Z\n"), Options{})
	if !errors.Is(err, ErrFile) {
		t.Fatalf("error %v, want ErrFile", err)
	}
}

// TestPositionDuringRun: progress is read from the writing goroutine while
// the reader advances (run under -race), and ends at the file's size.
func TestPositionDuringRun(t *testing.T) {
	in := generated(t, 5000, 6)
	mem := checkedMem(t)
	rd, err := NewReader(bytes.NewReader(in), Options{Allocator: mem})
	if err != nil {
		t.Fatal(err)
	}
	defer rd.Close()
	plan, err := enrich.NewPlan(enrich.PlanOptions{Input: rd.Columns()})
	if err != nil {
		t.Fatal(err)
	}
	w, err := NewWriter(io.Discard, rd, plan, WriterOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var last int64
	_, err = enrich.Run(context.Background(), rd, w, enrich.Options{Plan: plan, Policy: enrich.PolicySkip, Workers: 2, BatchRows: 500,
		OnProgress: func(int64) { last, _ = rd.Position() }})
	if cerr := w.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		t.Fatal(err)
	}
	if done, total := rd.Position(); done != total || total != int64(len(in)) || last > total {
		t.Errorf("position %d of %d (last seen %d); want the whole %d bytes", done, total, last, len(in))
	}
}
