package render

import (
	"math"
	"math/rand/v2"
	"strconv"
	"testing"
)

// decimalReference is the definition appendDecimal follows, written with
// strconv (the Go standard library's shortest round-trip formatting is the
// reference).
func decimalReference(v float64, decimals int) string {
	p := math.Pow(10, float64(decimals))
	r := math.Round(v*p) / p
	if r == 0 {
		r = 0
	}
	return strconv.FormatFloat(r, 'f', -1, 64)
}

func TestAppendDecimal(t *testing.T) {
	// Hand-worked cases (general knowledge of decimal rounding).
	for _, c := range []struct {
		v        float64
		decimals int
		want     string
	}{
		{0, 3, "0"},
		{math.Copysign(0, -1), 6, "0"},
		{-0.0004, 3, "0"}, // rounds to -0
		{1.5, 0, "2"},
		{-2.5, 0, "-3"}, // math.Round rounds half away from zero
		{12.3456785, 6, "12.345679"},
		{-12.3456, 3, "-12.346"},
		{0.1 + 0.2, 6, "0.3"},
		{100, 4, "100"},
		{-0.00125, 4, "-0.0013"}, // the half goes away from zero
		{123456789.1234564, 6, "123456789.123456"},
		{99999999.5, 0, "100000000"},               // a ninth digit by rounding
		{123456789012345, 0, "123456789012345"},    // 15 digits, the most written without strconv
		{-98765432.1234567, 6, "-98765432.123457"}, // 14 digits and the sign
		{2e15, 3, "2000000000000000"},              // past 1e15 units of the last decimal: strconv
		{1.23456789, 8, "1.23456789"},              // more than 6 decimals: strconv
	} {
		if got := string(appendDecimal(nil, c.v, c.decimals)); got != c.want {
			t.Errorf("appendDecimal(%v, %d) = %q, want %q", c.v, c.decimals, got, c.want)
		}
		if want := decimalReference(c.v, c.decimals); string(appendDecimal(nil, c.v, c.decimals)) != want {
			t.Errorf("appendDecimal(%v, %d) differs from strconv's %q", c.v, c.decimals, want)
		}
	}
	// Random values over the magnitudes the outputs hold, against strconv.
	rng := rand.New(rand.NewPCG(1, 2))
	for i := 0; i < 200000; i++ {
		d := rng.IntN(7)
		v := (rng.Float64()*2 - 1) * math.Pow(10, float64(rng.IntN(23)-7))
		if got, want := string(appendDecimal(nil, v, d)), decimalReference(v, d); got != want {
			t.Fatalf("appendDecimal(%v, %d) = %q, strconv gives %q", v, d, got, want)
		}
	}
}

func TestAppendUint(t *testing.T) {
	for _, x := range []uint64{0, 9, 10, 99, 100, 101, 999, 1000, 123456789, 11725000000, math.MaxUint32, math.MaxUint64} {
		if got, want := string(appendUint(nil, x)), strconv.FormatUint(x, 10); got != want {
			t.Errorf("appendUint(%d) = %q, want %q", x, got, want)
		}
	}
}

// BenchmarkAppendJSONFloat formats values of the magnitudes of a unit's
// results (dB, dB/K, kelvin) as result.json and the workbook write them.
func BenchmarkAppendJSONFloat(b *testing.B) {
	rng := rand.New(rand.NewPCG(3, 4))
	vals := make([]float64, 4096)
	for i := range vals {
		vals[i] = (rng.Float64()*2 - 1) * math.Pow(10, float64(rng.IntN(4)-1))
	}
	buf := make([]byte, 0, 64<<10)
	for b.Loop() {
		buf = buf[:0]
		for _, v := range vals {
			buf = appendJSONFloat(buf, v)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*len(vals)), "ns/value")
}
