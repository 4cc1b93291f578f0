package zone

import (
	"testing"
	"time"
)

func BenchmarkBuildTable(b *testing.B) {
	for _, name := range []string{"America/New_York", "Asia/Kolkata", "Australia/Lord_Howe"} {
		loc, _ := time.LoadLocation(name)
		b.Run(name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				buildTable(loc)
			}
		})
	}
}

func BenchmarkSearch(b *testing.B) {
	loc, _ := time.LoadLocation("America/New_York")
	for _, w := range []int64{1718994600, 7000000000} {
		b.Run(time.Unix(w, 0).UTC().Format("2006"), func(b *testing.B) {
			for b.Loop() {
				search(loc, w)
			}
		})
	}
}
