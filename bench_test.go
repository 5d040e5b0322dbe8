package almanac_test

import (
	"bytes"
	"fmt"
	"testing"

	"github.com/almanac-go/almanac"
)

var benchSizes = []int{100, 1000, 10000}

func BenchmarkBenchmarkFit(b *testing.B) {
	models := []struct {
		name string
		m    almanac.Model
	}{{"Naive", almanac.Naive{}}, {"SeasonalNaive", almanac.SeasonalNaive{}}, {"Drift", almanac.Drift{}}, {"Mean", almanac.Mean{}}}
	for _, m := range models {
		for _, n := range benchSizes {
			y := demoSeries(n)
			b.Run(fmt.Sprintf("%s/n=%d", m.name, n), func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					f, err := m.m.Fit(ctx, y)
					if err != nil {
						b.Fatal(err)
					}
					if _, err := f.Forecast(12, 80, 95); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}

func BenchmarkBoxCoxLLF(b *testing.B) {
	for _, n := range benchSizes {
		y := demoSeries(n).Values
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := almanac.BoxCoxLLF(y, 0.3); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func BenchmarkLambda(b *testing.B) {
	for _, n := range benchSizes {
		y := demoSeries(n).Values
		b.Run(fmt.Sprintf("ML/n=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := almanac.LambdaML(y, 0, 0); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(fmt.Sprintf("Guerrero/n=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := almanac.LambdaGuerrero(y, 4, 0, 0); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func BenchmarkBatchFit(b *testing.B) {
	ys := batchSeries(1000)
	m := almanac.BoxCox{Model: almanac.Drift{}}
	for _, w := range []int{1, 2} {
		b.Run(fmt.Sprintf("series=1000/workers=%d", w), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := almanac.BatchFit(ctx, m, ys, almanac.BatchOptions{Workers: w}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func BenchmarkReadCSV(b *testing.B) {
	for _, n := range []int{10, 100} {
		ys := batchSeries(n)
		var buf bytes.Buffer
		if err := almanac.WriteSeriesCSV(&buf, ys, almanac.CSVOptions{}); err != nil {
			b.Fatal(err)
		}
		data := buf.Bytes()
		b.Run(fmt.Sprintf("series=%d/rows=%d", n, bytes.Count(data, []byte("\n"))-1), func(b *testing.B) {
			b.ReportAllocs()
			b.SetBytes(int64(len(data)))
			for b.Loop() {
				if _, err := almanac.ReadCSV(bytes.NewReader(data), almanac.CSVOptions{}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
