package formats

import (
	"testing"

	"github.com/heliotag/heliotag/enrich"
)

// TestBatchRows: CSV and TSV default to small batches, the others to enrich's default (benchmarks/RESULTS.md,
// "Batch size", has the measurements behind the choice).
func TestBatchRows(t *testing.T) {
	for _, f := range supported {
		want := enrich.DefaultBatchRows
		if f == CSV || f == TSV {
			want = CSVBatchRows
		}
		if got := f.BatchRows(); got != want {
			t.Errorf("%s: %d rows per batch, want %d", f, got, want)
		}
	}
}
