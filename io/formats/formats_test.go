package formats

import (
	"testing"

	"github.com/heliotag/heliotag/enrich"
)

// TestBatchRows: the text formats default to small batches, Parquet to enrich's default (benchmarks/RESULTS.md,
// "Batch size", has the measurements behind the choice).
func TestBatchRows(t *testing.T) {
	for _, f := range supported {
		want := TextBatchRows
		if f == Parquet {
			want = enrich.DefaultBatchRows
		}
		if got := f.BatchRows(); got != want {
			t.Errorf("%s: %d rows per batch, want %d", f, got, want)
		}
	}
}
