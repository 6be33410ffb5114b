package sessions

import (
	"fmt"
	"testing"
)

// Targets: save and open of a session with 10 data sets of 10,000 points
// each under 50 ms; listing 1,000 sessions under 100 ms. Each benchmark
// runs on instrument-like data (6 significant digits) and on the worst
// case (full float64 precision, every value 17 digits).

var dataCases = []struct {
	name   string
	digits int
}{{"6digits", 6}, {"fullprecision", 0}}

func BenchmarkEncode10x10k(b *testing.B) {
	for _, c := range dataCases {
		b.Run(c.name, func(b *testing.B) {
			doc := bigDocument(10, 10000, c.digits)
			b.ReportAllocs()
			var n int
			for b.Loop() {
				data, err := Encode(doc)
				if err != nil {
					b.Fatal(err)
				}
				n = len(data)
			}
			b.ReportMetric(float64(n)/1e6, "MB")
		})
	}
}

func BenchmarkDecode10x10k(b *testing.B) {
	for _, c := range dataCases {
		b.Run(c.name, func(b *testing.B) {
			data, err := Encode(bigDocument(10, 10000, c.digits))
			if err != nil {
				b.Fatal(err)
			}
			b.ReportAllocs()
			b.SetBytes(int64(len(data)))
			var sink *Document
			for b.Loop() {
				if sink, err = Decode(data); err != nil {
					b.Fatal(err)
				}
			}
			_ = sink
		})
	}
}

// BenchmarkSave10x10k: validate, encode, write, flush, link and flush the
// directory, on the real file system.
func BenchmarkSave10x10k(b *testing.B) {
	for _, c := range dataCases {
		b.Run(c.name, func(b *testing.B) {
			s := newTestStore(b)
			doc := bigDocument(10, 10000, c.digits)
			if _, err := s.Save("big", doc, 0); err != nil {
				b.Fatal(err)
			}
			b.ReportAllocs()
			for b.Loop() {
				if _, err := s.SaveNext("big", doc, 1); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkOpen10x10k: read, decode and validate the newest revision.
func BenchmarkOpen10x10k(b *testing.B) {
	for _, c := range dataCases {
		b.Run(c.name, func(b *testing.B) {
			s := newTestStore(b)
			if _, err := s.Save("big", bigDocument(10, 10000, c.digits), 0); err != nil {
				b.Fatal(err)
			}
			b.ReportAllocs()
			var sink *Document
			for b.Loop() {
				doc, _, err := s.Open("big", 0)
				if err != nil {
					b.Fatal(err)
				}
				sink = doc
			}
			_ = sink
		})
	}
}

// BenchmarkList1000 lists 1,000 sessions, each a realistic document with
// one data set of 10,000 points (so reading whole files would show).
func BenchmarkList1000(b *testing.B) {
	s := newTestStore(b)
	data, err := Encode(bigDocument(1, 10000, 6))
	if err != nil {
		b.Fatal(err)
	}
	for i := range 1000 {
		if _, err := s.Import(data, "x.json", fmt.Sprintf("session-%04d", i)); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportAllocs()
	for b.Loop() {
		list, probs, err := s.List()
		if err != nil || len(probs) != 0 || len(list) != 1000 {
			b.Fatalf("%d listed, %v %v", len(list), probs, err)
		}
	}
}
