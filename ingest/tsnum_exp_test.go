package ingest

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// The reference values of these tests are computed with math/big from
// series (general knowledge): ln 2 = 2 atanh(1/3), ln 10 = 3 ln 2 +
// 2 atanh(1/9) (as 10/8 = (1+1/9)/(1-1/9)), exp by its Taylor series
// after halving the argument and squaring back, 2^(1/64) by six square
// roots. 300 bits carry them far below a float64's rounding.

const tsBigPrec = 300

func tsBig() *big.Float { return new(big.Float).SetPrec(tsBigPrec) }

// tsBigAtanhInv is atanh(1/n) = sum over k of 1/((2k+1) n^(2k+1)).
func tsBigAtanhInv(n int64) *big.Float {
	sum := tsBig()
	x := tsBig().Quo(tsBig().SetInt64(1), tsBig().SetInt64(n))
	n2 := tsBig().SetInt64(n * n)
	for k := int64(0); k < 200; k++ {
		sum.Add(sum, tsBig().Quo(x, tsBig().SetInt64(2*k+1)))
		x.Quo(x, n2)
	}
	return sum
}

func tsBigLn2Ln10() (*big.Float, *big.Float) {
	ln2 := tsBig().Mul(tsBig().SetInt64(2), tsBigAtanhInv(3))
	ln10 := tsBig().Add(tsBig().Mul(tsBig().SetInt64(3), ln2), tsBig().Mul(tsBig().SetInt64(2), tsBigAtanhInv(9)))
	return ln2, ln10
}

// tsBigExp is exp(x) for |x| up to a few hundred.
func tsBigExp(x *big.Float) *big.Float {
	const halvings = 20
	y := tsBig().SetMantExp(x, -halvings)
	sum, term := tsBig().SetInt64(1), tsBig().SetInt64(1)
	for k := int64(1); k < 40; k++ {
		term.Mul(term, y)
		term.Quo(term, tsBig().SetInt64(k))
		sum.Add(sum, term)
	}
	for i := 0; i < halvings; i++ {
		sum.Mul(sum, sum)
	}
	return sum
}

// tsUlpErr is (got - want) in units of the last place of want rounded to
// a float64.
func tsUlpErr(got float64, want *big.Float) float64 {
	w, _ := want.Float64()
	ulp := math.Nextafter(math.Abs(w), math.Inf(1)) - math.Abs(w)
	d, _ := tsBig().Sub(tsBig().SetFloat64(got), want).Float64()
	return d / ulp
}

// TestTouchstoneExp10Constants checks the constants of tsExp10DB: the
// two parts of log2(10)/20 and the table of 2^(j/64) with its rounding
// errors.
func TestTouchstoneExp10Constants(t *testing.T) {
	ln2, ln10 := tsBigLn2Ln10()
	// ln 2 and ln 10 themselves, to 30 digits (general knowledge).
	if s := ln2.Text('f', 30); s != "0.693147180559945309417232121458" {
		t.Fatalf("ln 2 = %s", s)
	}
	if s := ln10.Text('f', 30); s != "2.302585092994045684017991454684" {
		t.Fatalf("ln 10 = %s", s)
	}
	k := tsBig().Quo(ln10, ln2)
	k.Quo(k, tsBig().SetInt64(20))
	hi, _ := k.Float64()
	lo, _ := tsBig().Sub(k, tsBig().SetFloat64(hi)).Float64()
	if hi != 0x1.542a5a12e1c5bp-03 || lo != -0x1.33e2bb36cd142p-57 {
		t.Errorf("log2(10)/20 = %x + %x", hi, lo)
	}
	r := tsBig().SetInt64(2)
	for i := 0; i < 6; i++ {
		r.Sqrt(r)
	}
	p := tsBig().SetInt64(1)
	for j := range tsExp2Tab {
		hi, _ := p.Float64()
		lo, _ := tsBig().Sub(p, tsBig().SetFloat64(hi)).Float64()
		if tsExp2Tab[j] != [2]float64{hi, lo} {
			t.Errorf("tsExp2Tab[%d] = %x, want {%x, %x}", j, tsExp2Tab[j], hi, lo)
		}
		p.Mul(p, r)
	}
}

// TestTouchstoneExp10DB checks tsExp10DB, the magnitude of a dB value,
// against 10^(dB/20) computed with math/big (within one ulp, and how far
// math.Exp and math.Pow are for comparison), against math.Pow(10, dB/20)
// of the Go standard library over millions of values (within what the
// rounding of dB/20 alone explains), and at the edges: exact powers of
// ten, overflow, underflow, and what is not finite.
func TestTouchstoneExp10DB(t *testing.T) {
	_, ln10 := tsBigLn2Ln10()
	ln10over20 := tsBig().Quo(ln10, tsBig().SetInt64(20))
	rng := rand.New(rand.NewPCG(21, 22))
	dbs := []float64{0, math.Copysign(0, -1), 20, -20, 40, -40, 100, -100, 200, -300, 6, -3, 1e-300, -1e-300,
		0.00001, 99.99999, -299.99999, 1, -1}
	for k := 0; k < 20000; k++ {
		switch k % 4 {
		case 0:
			dbs = append(dbs, -300+400*rng.Float64())
		case 1:
			dbs = append(dbs, math.Round((-300+400*rng.Float64())*1e4)/1e4) // as files write them
		case 2:
			dbs = append(dbs, -60+60*rng.Float64())
		default:
			dbs = append(dbs, (rng.Float64()-0.5)*math.Pow(2, float64(rng.IntN(60)-50)))
		}
	}
	worst, worstExp, worstPow := 0.0, 0.0, 0.0
	for _, db := range dbs {
		want := tsBigExp(tsBig().Mul(tsBig().SetFloat64(db), ln10over20))
		e := tsUlpErr(tsExp10DB(db), want)
		worst = max(worst, math.Abs(e))
		if math.Abs(e) > 1 {
			t.Errorf("tsExp10DB(%v) = %v: %.3g ulp from 10^(dB/20)", db, tsExp10DB(db), e)
		}
		worstExp = max(worstExp, math.Abs(tsUlpErr(math.Exp(db*(math.Ln10/20)), want)))
		worstPow = max(worstPow, math.Abs(tsUlpErr(math.Pow(10, db/20), want)))
	}
	t.Logf("%d values, worst error from 10^(dB/20) in ulp: tsExp10DB %.3g, math.Exp(dB*ln10/20) %.3g, math.Pow(10, dB/20) %.3g",
		len(dbs), worst, worstExp, worstPow)

	// math.Pow(10, dB/20) over -300..+100 dB: dB/20 is rounded (half an
	// ulp, relative), which moves 10^(dB/20) by up to |dB/20| ln(10)
	// 2^-53 relative; math.Pow adds its own ulp or so.
	worstRel := 0.0
	for k := 0; k < 3_000_000; k++ {
		db := -300 + 400*rng.Float64()
		got, want := tsExp10DB(db), math.Pow(10, db/20)
		rel := math.Abs(got-want) / want
		if bound := 0x1p-52 * (2 + math.Abs(db/20)*math.Ln10); rel > bound {
			t.Fatalf("tsExp10DB(%v) = %v, math.Pow(10, %v) = %v: relative difference %.3g above %.3g", db, got, db/20, want, rel, bound)
		}
		worstRel = max(worstRel, rel)
	}
	t.Logf("3e6 values in -300..+100 dB: worst relative difference from math.Pow(10, dB/20) %.3g (2^-52 = %.3g)", worstRel, 0x1p-52)

	// Edges. Exact powers of ten (general knowledge), overflow and
	// underflow beyond the range of a float64 (largest about 308.25
	// decades, smallest subnormal 4.9e-324), what is not finite.
	edges := []struct{ db, want float64 }{
		{0, 1}, {math.Copysign(0, -1), 1}, {20, 10}, {-20, 0.1}, {40, 100}, {60, 1000}, {-40, 0.01},
		{200, 1e10}, {-200, 1e-10}, {400, 1e20}, {6000, 1e300}, {6200, math.Inf(1)}, {1e300, math.Inf(1)},
		{-6500, 1e-325 * 0}, {-1e300, 0}, {math.Inf(1), math.Inf(1)}, {math.Inf(-1), 0},
	}
	for _, c := range edges {
		if got := tsExp10DB(c.db); got != c.want && math.Abs(got-c.want) > 1e-15*c.want {
			t.Errorf("tsExp10DB(%v) = %v, want %v", c.db, got, c.want)
		}
	}
	if got := tsExp10DB(math.NaN()); !math.IsNaN(got) {
		t.Errorf("tsExp10DB(NaN) = %v, want NaN", got)
	}
	for _, c := range []struct{ db, want float64 }{{20, 10}, {-20, 0.1}, {40, 100}, {60, 1000}, {200, 1e10}} {
		if got := tsExp10DB(c.db); got != c.want {
			t.Logf("tsExp10DB(%v) = %v, not exactly %v", c.db, got, c.want)
		}
	}
}

func BenchmarkTouchstoneExp10DB(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	dbs := make([]float64, 4096)
	for i := range dbs {
		dbs[i] = -100 + 110*rng.Float64()
	}
	out := make([]float64, len(dbs))
	b.Run("tsExp10DB", func(b *testing.B) {
		for b.Loop() {
			for i, d := range dbs {
				out[i] = tsExp10DB(d)
			}
		}
		b.SetBytes(int64(len(dbs)))
	})
	b.Run("math.Exp", func(b *testing.B) {
		for b.Loop() {
			for i, d := range dbs {
				out[i] = math.Exp(d * (math.Ln10 / 20))
			}
		}
		b.SetBytes(int64(len(dbs)))
	})
}
