package stamp

import (
	"github.com/heliotag/heliotag/internal/benchclock"
	"testing"
	"time"
)

var sinkStamp Stamp

// BenchmarkParse measures each form on one value; the rate metric is values per second.
func BenchmarkParse(b *testing.B) {
	auto, _ := NewParser(Options{})
	cases := []struct {
		name string
		p    *Parser
		in   string
	}{
		{"rfc3339", auto, "2024-06-21T18:30:00Z"},
		{"rfc3339_frac_offset", auto, "2024-06-21T18:30:00.123456+02:00"},
		{"iso_local", auto, "2024-03-10 02:30"},
		{"iso_basic", auto, "20240621T183000Z"},
		{"layout_dmY_IMp", mustParser(b, Options{Layout: "%d/%m/%Y %I:%M %p"}), "21/06/2024 07:30 PM"},
		{"layout_YmdHM", mustParser(b, Options{Layout: "%Y-%m-%d %H:%M"}), "2024-06-21 18:30"},
		{"layout_rfc1123", mustParser(b, Options{Layout: "%a, %d %b %Y %T %Z"}), "Fri, 21 Jun 2024 18:30:00 GMT"},
		{"epoch_s", mustParser(b, Options{Epoch: "s"}), "1718994600"},
		{"epoch_ms_decimal", mustParser(b, Options{Epoch: "ms"}), "1718994600123.5"},
	}
	for _, c := range cases {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			cpu := benchclock.Start()
			for b.Loop() {
				sinkStamp, _ = c.p.Parse(c.in)
			}
			cpu.Report(b, 1)
			b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "values/s")
		})
	}
}

// BenchmarkParseDateTime measures the two-column forms.
func BenchmarkParseDateTime(b *testing.B) {
	auto, _ := NewParser(Options{})
	cases := []struct {
		name        string
		p           *Parser
		date, clock string
	}{
		{"iso_HHMM", auto, "2024-06-21", "0730"},
		{"iso_HMM_PM", auto, "2024-06-21", "730PM"},
		{"iso_H:MM:SS", auto, "2024-06-21", "7:30:15"},
		{"layout_date_auto_clock", mustParser(b, Options{Layout: "%m/%d/%Y"}), "06/21/2024", "7:30 PM"},
		{"layout_split", mustParser(b, Options{Layout: "%d/%m/%Y %H%M"}), "21/06/2024", "730"},
	}
	for _, c := range cases {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			cpu := benchclock.Start()
			for b.Loop() {
				sinkStamp, _ = c.p.ParseDateTime(c.date, c.clock)
			}
			cpu.Report(b, 1)
			b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "values/s")
		})
	}
}

// BenchmarkBaseline runs the standard library's time.Parse on the same RFC 3339 text, for a ratio
// measured in the same run.
func BenchmarkBaseline(b *testing.B) {
	b.Run("time.Parse_rfc3339", func(b *testing.B) {
		b.ReportAllocs()
		var t time.Time
		cpu := benchclock.Start()
		for b.Loop() {
			t, _ = time.Parse(time.RFC3339, "2024-06-21T18:30:00Z")
		}
		cpu.Report(b, 1)
		sinkStamp.Year = t.Year()
		b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "values/s")
	})
	b.Run("time.Parse_local", func(b *testing.B) {
		b.ReportAllocs()
		var t time.Time
		cpu := benchclock.Start()
		for b.Loop() {
			t, _ = time.Parse("2006-01-02 15:04", "2024-03-10 02:30")
		}
		cpu.Report(b, 1)
		sinkStamp.Year = t.Year()
		b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "values/s")
	})
}

// BenchmarkParseError measures a failing parse (bad rows under --on-bad-row skip/keep).
func BenchmarkParseError(b *testing.B) {
	auto, _ := NewParser(Options{})
	b.ReportAllocs()
	for b.Loop() {
		_, err := auto.Parse("2024-13-01 10:00")
		if err == nil {
			b.Fatal("no error")
		}
	}
}
