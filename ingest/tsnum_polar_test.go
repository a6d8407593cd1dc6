package ingest

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// tsBigPi is Pi by Machin's formula, Pi = 16 atan(1/5) - 4 atan(1/239)
// (general knowledge), with atan(1/n) = sum of (-1)^k / ((2k+1) n^(2k+1)).
func tsBigPi() *big.Float {
	atanInv := func(n int64) *big.Float {
		sum := tsBig()
		x := tsBig().Quo(tsBig().SetInt64(1), tsBig().SetInt64(n))
		n2 := tsBig().SetInt64(n * n)
		for k := int64(0); k < 250; k++ {
			t := tsBig().Quo(x, tsBig().SetInt64(2*k+1))
			if k%2 == 0 {
				sum.Add(sum, t)
			} else {
				sum.Sub(sum, t)
			}
			x.Quo(x, n2)
		}
		return sum
	}
	return tsBig().Sub(tsBig().Mul(tsBig().SetInt64(16), atanInv(5)), tsBig().Mul(tsBig().SetInt64(4), atanInv(239)))
}

// tsBigSinCos is sine and cosine of x (|x| up to about 4) by their Taylor
// series (general knowledge).
func tsBigSinCos(x *big.Float) (*big.Float, *big.Float) {
	s, c := tsBig(), tsBig()
	term := tsBig().SetInt64(1)
	for k := int64(0); k < 90; k++ {
		switch k % 4 {
		case 0:
			c.Add(c, term)
		case 1:
			s.Add(s, term)
		case 2:
			c.Sub(c, term)
		default:
			s.Sub(s, term)
		}
		term.Mul(term, x)
		term.Quo(term, tsBig().SetInt64(k+1))
	}
	return s, c
}

// tsBigPolar is mag (cos + j sin) of deg degrees, exactly (to 300 bits):
// deg is first reduced to (-180, 180] by math.Remainder, which is exact.
func tsBigPolar(pi *big.Float, mag, deg float64) (re, im *big.Float) {
	x := tsBig().Mul(tsBig().SetFloat64(math.Remainder(deg, 360)), pi)
	x.Quo(x, tsBig().SetInt64(180))
	s, c := tsBigSinCos(x)
	m := tsBig().SetFloat64(mag)
	return c.Mul(c, m), s.Mul(s, m)
}

// TestTouchstoneSinTab checks the tables of tsPolarPairs: sine and cosine
// of j*Pi/512 and their rounding errors, for the quarter that the source
// writes out and for the whole circle made from it.
func TestTouchstoneSinTab(t *testing.T) {
	pi := tsBigPi()
	if s := pi.Text('f', 30); s != "3.141592653589793238462643383280" { // (general knowledge)
		t.Fatalf("Pi = %s", s)
	}
	// Below 2^-200 is zero (the multiples of Pi/2 give zeros, and ones
	// with a rest of zero), but for the last of the 300 bits that the
	// series computes with.
	f64 := func(v *big.Float) float64 {
		if v.MantExp(nil) < -200 {
			return 0
		}
		x, _ := v.Float64()
		return x
	}
	split := func(v *big.Float) [2]float64 {
		hi := f64(v)
		return [2]float64{hi, f64(tsBig().Sub(v, tsBig().SetFloat64(hi)))}
	}
	for j := range tsCircleTab {
		x := tsBig().Mul(pi, tsBig().SetInt64(int64(j)))
		s, c := tsBigSinCos(x.Quo(x, tsBig().SetInt64(512)))
		ss, cc := split(s), split(c)
		want := [4]float64{ss[0], ss[1], cc[0], cc[1]}
		if j < len(tsSinTab) && tsSinTab[j] != want {
			t.Errorf("tsSinTab[%d] = %x, want %x", j, tsSinTab[j], want)
		}
		if tsCircleTab[j] != want {
			t.Errorf("tsCircleTab[%d] = %x, want %x", j, tsCircleTab[j], want)
		}
	}
}

// TestTouchstonePolarPairs measures the MA/DB conversion against the
// exact values (math/big, above) and against math.Sincos of the Go
// standard library, and checks its edge cases: multiples of 90 degrees
// exact, angles of many turns, what is not finite, DB magnitudes, dB
// beyond a float64.
func TestTouchstonePolarPairs(t *testing.T) {
	pi := tsBigPi()
	rng := rand.New(rand.NewPCG(31, 32))
	angle := func(k int) float64 {
		switch k % 4 {
		case 0:
			return (rng.Float64() - 0.5) * 720
		case 1:
			return math.Round((rng.Float64()-0.5)*3600e4) / 1e5 // as files write them
		case 2:
			return float64(rng.IntN(16)-8) * 45 * (1 + (rng.Float64()-0.5)*1e-12) // near multiples of 45
		default:
			return (rng.Float64() - 0.5) * math.Pow(10, float64(rng.IntN(11)))
		}
	}
	one := func(mag, deg float64) complex128 {
		m := make([]complex128, 1)
		tsPolarPairs(m, []float64{mag, deg}, false)
		return m[0]
	}

	// Against the exact values: each component within one ulp, or within
	// 2^-53 of the magnitude where the component is that small.
	worstUlp, worstUlp8, worstAbs, sincosUlp := 0.0, 0.0, 0.0, 0.0
	for k := 0; k < 20000; k++ {
		mag, deg := 0.05+rng.Float64(), angle(k)
		got := one(mag, deg)
		wr, wi := tsBigPolar(pi, mag, deg)
		s, c := math.Sincos(math.Remainder(deg, 360) * (math.Pi / 180))
		for i, w := range []*big.Float{wr, wi} {
			g := [2]float64{real(got), imag(got)}[i]
			ref := [2]float64{mag * c, mag * s}[i]
			wf, _ := w.Float64()
			abs, _ := tsBig().Sub(tsBig().SetFloat64(g), w).Float64()
			abs = math.Abs(abs) / mag
			worstAbs = max(worstAbs, abs)
			if math.Abs(wf) >= 0x1p-20*mag {
				e := math.Abs(tsUlpErr(g, w))
				worstUlp = max(worstUlp, e)
				if math.Abs(wf) >= mag/8 {
					worstUlp8 = max(worstUlp8, e)
				}
				sincosUlp = max(sincosUlp, math.Abs(tsUlpErr(ref, w)))
				if e > 1 && abs > 0x1p-53 {
					t.Errorf("%v at %v degrees: component %d = %v, %.3g ulp from the exact %v", mag, deg, i, g, e, wf)
				}
			} else if abs > 0x1p-53 {
				t.Errorf("%v at %v degrees: component %d = %v, exact %v: error %.3g of the magnitude", mag, deg, i, g, wf, abs)
			}
		}
	}
	t.Logf("20000 angles: worst error %.3g ulp (components above 1/8 of the magnitude), %.3g ulp (above 2^-20), %.3g of the magnitude; math.Sincos of the reduced angle: %.3g ulp (above 2^-20)",
		worstUlp8, worstUlp, worstAbs, sincosUlp)

	// Against math.Sincos over millions of angles: the rounding of the
	// angle to radians (up to Pi 2^-53 radian), math.Sincos's own error
	// and this one's allow about 5 2^-53 of the magnitude.
	worst := 0.0
	m := make([]complex128, 4)
	vals := make([]float64, 8)
	for k := 0; k < 3_000_000; k += 4 {
		for p := 0; p < 4; p++ {
			vals[2*p], vals[2*p+1] = 0.05+rng.Float64(), angle(k+p)
		}
		tsPolarPairs(m, vals, false)
		for p := 0; p < 4; p++ {
			mag, deg := vals[2*p], vals[2*p+1]
			s, c := math.Sincos(math.Remainder(deg, 360) * (math.Pi / 180))
			d := max(math.Abs(real(m[p])-mag*c), math.Abs(imag(m[p])-mag*s)) / mag
			if d > 0x1p-50 {
				t.Fatalf("%v at %v degrees: %v, math.Sincos gives %v", mag, deg, m[p], complex(mag*c, mag*s))
			}
			worst = max(worst, d)
		}
	}
	t.Logf("3e6 angles: worst difference from math.Sincos %.3g of the magnitude (2^-52 = %.3g)", worst, 0x1p-52)

	// Exact values at multiples of 90 degrees, with +0 for the zeros, and
	// angles of many turns (1e10 degrees is 27777777 turns and 280
	// degrees; 1e15 is 2777777777777 turns and 280 degrees).
	exact := []struct {
		mag, deg float64
		want     complex128
	}{
		{1, 0, 1}, {1, math.Copysign(0, -1), 1}, {2, 90, 2i}, {2, -90, -2i}, {0.5, 180, -0.5}, {0.5, -180, -0.5},
		{3, 270, -3i}, {3, -270, 3i}, {1, 360, 1}, {1, 720, 1}, {1, -3600, 1}, {1, 90 + 360*1e6, 1i}, {0, 123, 0},
	}
	for _, c := range exact {
		got := one(c.mag, c.deg)
		if got != c.want || real(got) == 0 && math.Signbit(real(got)) || imag(got) == 0 && math.Signbit(imag(got)) {
			t.Errorf("%v at %v degrees: %v, want %v", c.mag, c.deg, got, c.want)
		}
	}
	for _, deg := range []float64{1e10, -1e10, 1e15, -1e15, 12345.678, math.MaxFloat64} {
		got := one(1, deg)
		wr, wi := tsBigPolar(pi, 1, deg)
		if e1, e2 := tsUlpErr(real(got), wr), tsUlpErr(imag(got), wi); math.Abs(e1) > 1 || math.Abs(e2) > 1 {
			t.Errorf("%v degrees: %v, %.3g and %.3g ulp from the exact value", deg, got, e1, e2)
		}
	}
	// 1e300 degrees: math.Remainder(1e300, 360) is exact (a float64 that
	// large is a multiple of 360 times a power of two plus its rest).
	wr, wi := tsBigPolar(pi, 1, 1e300)
	if got := one(1, 1e300); math.Abs(tsUlpErr(real(got), wr)) > 1 || math.Abs(tsUlpErr(imag(got), wi)) > 1 {
		t.Errorf("1e300 degrees: %v, exact %v %v", got, wr, wi)
	}
	// Nothing not finite gives a number.
	for _, deg := range []float64{math.NaN(), math.Inf(1), math.Inf(-1)} {
		if got := one(1, deg); !math.IsNaN(real(got)) || !math.IsNaN(imag(got)) {
			t.Errorf("%v degrees: %v, want NaN", deg, got)
		}
	}

	// DB: the magnitude is tsExp10DB's, then as MA.
	db := make([]float64, 0, 2000)
	ma := make([]float64, 0, 2000)
	for k := 0; k < 1000; k++ {
		d, a := -300+400*rng.Float64(), angle(k)
		db = append(db, d, a)
		ma = append(ma, tsExp10DB(d), a)
	}
	mdb, mma := make([]complex128, 1000), make([]complex128, 1000)
	if !tsPolarPairs(mdb, db, true) || !tsPolarPairs(mma, ma, false) {
		t.Fatal("pairs refused")
	}
	for p := range mdb {
		if mdb[p] != mma[p] {
			t.Fatalf("DB pair %v %v: %v, as MA %v", db[2*p], db[2*p+1], mdb[p], mma[p])
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
// pairs of 2-port records, and the same with math.Exp and math.Sincos
// called for each pair.
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
						s, c := math.Sincos(v[2*p+1] * (math.Pi / 180))
						m[p] = complex(mag*c, mag*s)
					}
				}
			}
		})
	}
}
