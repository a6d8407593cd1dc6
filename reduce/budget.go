package reduce

import (
	"fmt"
	"math"
	"strings"
)

// Divisor returns the number that turns a stated value into a standard
// uncertainty (JCGM 100:2008, GUM 4.3): normal, stated as an expanded
// uncertainty U at coverage factor k: k; rectangular of half-width a:
// sqrt(3); U-shaped (arcsine) of half-width a: sqrt(2); triangular of
// half-width a: sqrt(6). An unknown distribution or a normal term without
// a positive k is an error.
func Divisor(distribution string, coverageK float64) (float64, error) {
	switch strings.ToLower(distribution) {
	case distributionNormal:
		if !(coverageK > 0) || math.IsInf(coverageK, 0) {
			return 0, fmt.Errorf("a normal term needs a positive coverage_k, got %g", coverageK)
		}
		return coverageK, nil
	case distributionRect:
		return math.Sqrt(3), nil
	case distributionUShaped:
		return math.Sqrt2, nil
	case distributionTriangular:
		return math.Sqrt(6), nil
	}
	return 0, fmt.Errorf("distribution %q is not one of normal, rectangular, u-shaped, triangular", distribution)
}

// NewBudgetTerm builds a budget row from its stated values per frequency
// point (expanded U or half-width) and its divisor.
func NewBudgetTerm(name string, source TermSource, distribution string, divisor float64, valuesDB []float64) BudgetTerm {
	t := BudgetTerm{
		Name:         name,
		Source:       source,
		Distribution: distribution,
		Divisor:      divisor,
		ValueDB:      valuesDB,
		StandardDB:   make([]float64, len(valuesDB)),
	}
	inv := 1 / divisor
	for i, v := range valuesDB {
		t.StandardDB[i] = math.Abs(v) * inv
	}
	return t
}

// CombineBudget adds the terms in quadrature per frequency point (all
// sensitivities 1, terms uncorrelated: JCGM 100:2008 eq. 10) over n points
// and expands the result with coverage factor k.
func CombineBudget(terms []BudgetTerm, n int, k float64) Budget {
	b := Budget{
		Terms:      terms,
		CombinedDB: make([]float64, n),
		ExpandedDB: make([]float64, n),
		CoverageK:  k,
	}
	if b.Terms == nil {
		b.Terms = []BudgetTerm{}
	}
	// Terms outer, points inner: each term's row is read in order.
	for _, t := range terms {
		m := min(n, len(t.StandardDB))
		for i, u := range t.StandardDB[:m] {
			b.CombinedDB[i] += u * u
		}
	}
	for i, s := range b.CombinedDB {
		b.CombinedDB[i] = math.Sqrt(s)
		b.ExpandedDB[i] = k * b.CombinedDB[i]
	}
	return b
}

// MismatchLimitsDB are the limits of the mismatch error between two ports
// with reflection coefficient magnitudes gammaA and gammaB:
// 20*log10(1 - |Ga||Gb|) and 20*log10(1 + |Ga||Gb|) (method.md section 6).
// The product is taken below 1 (|Gamma| <= 1 for passive ports); at 1 or
// above the low limit is -Inf.
func MismatchLimitsDB(gammaA, gammaB float64) (lowDB, highDB float64) {
	p := math.Abs(gammaA) * math.Abs(gammaB)
	return 20 * math.Log10(1-p), 20 * math.Log10(1+p)
}

// MismatchHalfWidthDB is the half-width of the U-shaped mismatch term: the
// larger magnitude of the two limits (the low one, for any product > 0).
func MismatchHalfWidthDB(gammaA, gammaB float64) float64 {
	// |20log10(1-p)| >= 20log10(1+p) for 0 <= p < 1, so the low limit
	// is the larger: one logarithm instead of two.
	p := math.Abs(gammaA) * math.Abs(gammaB)
	return math.Abs(20 * math.Log10(1-p))
}

// constantDB returns n copies of v.
func constantDB(v float64, n int) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = v
	}
	return out
}

// buildBudgets fills the gain and G/T budgets of b (method.md section 6).
// refU is the certificate's expanded uncertainty on b's grid; refMismatch
// the half-width of the reference antenna's mismatch term and autMatch the
// |Gamma| of the AUT (nil when unknown); scatterDB the point-to-point scatter of the noise trace
// the G/T was computed from.
func buildBudgets(ctx *beamContext, b *Beam, refU, refMismatch, autMatch []float64, scatterFile string, scatterDB float64) {
	n := len(b.FrequencyHz)
	var common []BudgetTerm
	if refU != nil {
		name := "Reference antenna gain"
		if ctx.certificate != "" {
			name += " (certificate " + ctx.certificate + ")"
		}
		common = append(common, NewBudgetTerm(name, SourceData, distributionNormal, ctx.referenceK, refU))
	}
	if b.RangeDriftDB != nil {
		half := make([]float64, n)
		for i, d := range b.RangeDriftDB {
			half[i] = d / 2
		}
		common = append(common, NewBudgetTerm("Range drift (pre/post), half-width drift/2", SourceData,
			distributionRect, math.Sqrt(3), half))
	}
	mismatch := func(name string, gamma []float64) BudgetTerm {
		a := make([]float64, n)
		for i, g := range gamma {
			a[i] = MismatchHalfWidthDB(g, ctx.receiverMatch)
		}
		return NewBudgetTerm(name, SourceData, distributionUShaped, math.Sqrt2, a)
	}
	if refMismatch != nil {
		common = append(common, NewBudgetTerm("Mismatch of the reference antenna at the receiver port", SourceData,
			distributionUShaped, math.Sqrt2, refMismatch))
	}
	station := func(terms []stationTerm) []BudgetTerm {
		var out []BudgetTerm
		for _, t := range terms {
			out = append(out, ctx.constantTerm(t.name, SourceStation, t.distribution, t.divisor, t.valueDB, n))
		}
		return out
	}
	if b.GainDBi != nil {
		terms := append([]BudgetTerm(nil), common...)
		if autMatch != nil && ctx.haveStation {
			terms = append(terms, mismatch("Mismatch of the AUT at the receiver port", autMatch))
		}
		terms = append(terms, station(ctx.stationGain)...)
		b.GainBudget = CombineBudget(terms, n, ExpandedCoverageK)
		b.GainExpandedUncertaintyDB = b.GainBudget.ExpandedDB
	}
	if b.GTdBPerK != nil {
		terms := append([]BudgetTerm(nil), common...)
		terms = append(terms, ctx.constantTerm("Noise trace scatter ("+scatterFile+")", SourceData,
			distributionNormal, 1, scatterDB, n))
		if ctx.ambientOK && !b.Projection.Usable() {
			terms = append(terms, ctx.constantTerm(fmt.Sprintf(
				"Ambient temperature %.2f K against 290 K, half-width |10 log10(T_amb/290)|", ctx.ambientK),
				SourceData, distributionRect, math.Sqrt(3), AmbientHalfWidthDB(ctx.ambientK), n))
		}
		terms = append(terms, station(ctx.stationGT)...)
		b.GTBudget = CombineBudget(terms, n, ExpandedCoverageK)
		b.GTExpandedUncertaintyDB = b.GTBudget.ExpandedDB
	}
}
