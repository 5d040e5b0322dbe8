package almanac_test

import (
	"bytes"
	"encoding/json"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/almanac-go/almanac"
)

// TestStoredValuesMatchEncodingJSON checks StoredValues against the
// standard library's encoding/json, the outside reference for the JSON
// form of a float64: for finite values the bytes written are those of
// json.Marshal of the same []float64, and decoding gives the bits
// json.Unmarshal into []*float64 gives.
func TestStoredValuesMatchEncodingJSON(t *testing.T) {
	src := rand.New(rand.NewPCG(7, 11))
	vals := []float64{0, math.Copysign(0, -1), 1, -1, 0.1, 1e-6, 9.99999e-7, 1e-7, 1.5e-9, 1e20, 1e21, 123456789e15,
		math.MaxFloat64, -math.MaxFloat64, math.SmallestNonzeroFloat64, 2.2250738585072014e-308, 1e-100, 5e-324, 1.0000000000000002}
	for range 5000 {
		bits := src.Uint64()
		x := math.Float64frombits(bits)
		if math.IsNaN(x) || math.IsInf(x, 0) {
			continue
		}
		vals = append(vals, x, src.NormFloat64()*math.Pow(10, float64(src.IntN(40)-20)))
	}
	want, err := json.Marshal(vals)
	if err != nil {
		t.Fatal(err)
	}
	got, err := json.Marshal(almanac.StoredValues(vals))
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, want) {
		t.Fatalf("StoredValues wrote\n%.300s\nencoding/json wrote\n%.300s", got, want)
	}
	var back almanac.StoredValues
	if err := json.Unmarshal(got, &back); err != nil {
		t.Fatal(err)
	}
	if len(back) != len(vals) {
		t.Fatalf("decoded %d values, want %d", len(back), len(vals))
	}
	for i := range vals {
		if math.Float64bits(back[i]) != math.Float64bits(vals[i]) {
			t.Fatalf("value %d: decoded %v, want %v", i, back[i], vals[i])
		}
	}
}

func TestStoredValuesDecode(t *testing.T) {
	tests := []struct {
		in   string
		want []float64 // NaN for null
		bad  bool
	}{
		{in: `[]`, want: []float64{}},
		{in: ` [ 1 , null,-2.5e3 ] `, want: []float64{1, math.NaN(), -2500}},
		{in: `[null]`, want: []float64{math.NaN()}},
		{in: `[1e400]`, bad: true},
		{in: `[-1e400]`, bad: true},
		{in: `[1,"2"]`, bad: true},
		{in: `[1,"a,b"]`, bad: true},
		{in: `[1,[2,3]]`, bad: true},
		{in: `[{"a":1,"b":2}]`, bad: true},
		{in: `[true]`, bad: true},
		{in: `[1,]`, bad: true},
		{in: `[,1]`, bad: true},
		{in: `[01]`, bad: true},
		{in: `[1 2]`, bad: true},
		{in: `[NaN]`, bad: true},
		{in: `[Infinity]`, bad: true},
		{in: `{"a":1}`, bad: true},
		{in: `1`, bad: true},
		{in: `"[1]"`, bad: true},
		{in: `[1`, bad: true},
	}
	for _, tt := range tests {
		t.Run(tt.in, func(t *testing.T) {
			var got almanac.StoredValues
			err := json.Unmarshal([]byte(tt.in), &got)
			// The reference: encoding/json decoding into []*float64.
			var ref []*float64
			refErr := json.Unmarshal([]byte(tt.in), &ref)
			if tt.bad {
				if err == nil {
					t.Fatalf("decoded %v, want an error", got)
				}
				if refErr == nil {
					t.Fatalf("encoding/json accepts %s: the case is wrong", tt.in)
				}
				return
			}
			if err != nil || refErr != nil {
				t.Fatalf("error %v (encoding/json: %v)", err, refErr)
			}
			if len(got) != len(tt.want) || len(ref) != len(tt.want) {
				t.Fatalf("decoded %v, want %v", got, tt.want)
			}
			for i, w := range tt.want {
				if math.IsNaN(w) != math.IsNaN(got[i]) || !math.IsNaN(w) && w != got[i] || (ref[i] == nil) != math.IsNaN(w) {
					t.Fatalf("value %d: %v, want %v", i, got[i], w)
				}
			}
		})
	}
}

func BenchmarkStoredValues(b *testing.B) {
	src := rand.New(rand.NewPCG(1, 2))
	vals := make(almanac.StoredValues, 10000)
	for i := range vals {
		vals[i] = src.NormFloat64() * 1000
	}
	doc, _ := json.Marshal(vals)
	b.Run("encode", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			if _, err := vals.MarshalJSON(); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("decode", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			var v almanac.StoredValues
			if err := v.UnmarshalJSON(doc); err != nil {
				b.Fatal(err)
			}
		}
	})
}
