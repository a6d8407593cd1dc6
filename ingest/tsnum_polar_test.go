package ingest

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestTouchstonePolarPairs checks the record loop tsPolarPairs against
// tsPolar (itself checked against math.Sincos of the Go standard library
// by TestTouchstonePolar) and tsExp10DB, bit for bit, on MA and DB pairs,
// and that it refuses a magnitude in dB beyond a float64.
func TestTouchstonePolarPairs(t *testing.T) {
	rng := rand.New(rand.NewPCG(31, 32))
	degs := []float64{0, math.Copysign(0, -1), 90, -90, 180, -180, 270, 360, 1e10, 1e300, -1e300, 45, -135}
	for len(degs) < 200000 {
		degs = append(degs, (rng.Float64()-0.5)*720, math.Round((rng.Float64()-0.5)*7200)/20)
	}
	vals := make([]float64, 0, 2*len(degs))
	for i, d := range degs {
		vals = append(vals, []float64{0.5, -0.25, 0, 1e300, rng.Float64()}[i%5], d)
	}
	same := func(a, b complex128) bool {
		return math.Float64bits(real(a)) == math.Float64bits(real(b)) && math.Float64bits(imag(a)) == math.Float64bits(imag(b))
	}
	m := make([]complex128, len(degs))
	if !tsPolarPairs(m, vals, false) {
		t.Fatal("MA pairs refused")
	}
	for p := range m {
		if want := tsPolar(vals[2*p], vals[2*p+1]); !same(m[p], want) {
			t.Fatalf("MA pair %v %v: %v, tsPolar gives %v", vals[2*p], vals[2*p+1], m[p], want)
		}
	}
	for i := 0; i < len(vals); i += 2 {
		vals[i] = -300 + 400*rng.Float64()
	}
	if !tsPolarPairs(m, vals, true) {
		t.Fatal("DB pairs refused")
	}
	for p := range m {
		if want := tsPolar(tsExp10DB(vals[2*p]), vals[2*p+1]); !same(m[p], want) {
			t.Fatalf("DB pair %v %v: %v, tsPolar(tsExp10DB) gives %v", vals[2*p], vals[2*p+1], m[p], want)
		}
	}
	// 10^(6200/20) is above the largest float64, about 1.8e308 (general
	// knowledge); 6100 dB is 1e305.
	if tsPolarPairs(m[:2], []float64{6100, 0, 6200, 0}, true) {
		t.Error("6200 dB accepted")
	}
	if !tsPolarPairs(m[:1], []float64{6100, 0}, true) || math.Abs(real(m[0])-1e305) > 1e305*1e-15 {
		t.Errorf("6100 dB at 0 degrees: %v, want 1e305", m[0])
	}
}

// BenchmarkTouchstonePolarPairs times the MA and DB conversion of the
// pairs of 2-port records.
func BenchmarkTouchstonePolarPairs(b *testing.B) {
	rng := rand.New(rand.NewPCG(3, 4))
	vals := make([]float64, 8*4096)
	for i := 0; i < len(vals); i += 2 {
		vals[i], vals[i+1] = -60+60*rng.Float64(), 360*rng.Float64()-180
	}
	m := make([]complex128, 4)
	for _, db := range []bool{false, true} {
		b.Run(map[bool]string{false: "MA", true: "DB"}[db], func(b *testing.B) {
			for b.Loop() {
				for r := 0; r < len(vals); r += 8 {
					tsPolarPairs(m, vals[r:r+8], db)
				}
			}
		})
		b.Run(map[bool]string{false: "MA-calls", true: "DB-calls"}[db], func(b *testing.B) {
			for b.Loop() {
				for r := 0; r < len(vals); r += 8 {
					v := vals[r : r+8]
					for p := range m {
						mag := v[2*p]
						if db {
							mag = math.Exp(mag * (math.Ln10 / 20))
						}
						m[p] = tsPolar(mag, v[2*p+1])
					}
				}
			}
		})
	}
}
