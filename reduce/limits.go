package reduce

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/interp"

	"gtpack.example/gtpack/ingest"
)

// verdictRank orders verdicts from best to worst.
func verdictRank(v Verdict) int {
	switch v {
	case VerdictPass:
		return 0
	case VerdictConditionalPass:
		return 1
	case VerdictConditionalFail:
		return 2
	case VerdictFail:
		return 3
	}
	return 4 // incomplete, or anything unknown
}

// WorseVerdict returns the worse of two verdicts (pass < conditional-pass
// < conditional-fail < fail < incomplete).
func WorseVerdict(a, b Verdict) Verdict {
	if verdictRank(b) > verdictRank(a) {
		return b
	}
	return a
}

// Judge judges a measured value against a lower limit (ILAC-G8:09/2019,
// ISO 14253-1): marginDB = x - L, expandedU = U. With rule "simple" it is
// pass when x >= L, else fail. Any other rule is guarded acceptance with
// guard band w = U: pass when x - U >= L, fail when x + U < L, otherwise
// conditional-pass (x >= L) or conditional-fail (x < L).
func Judge(rule string, marginDB, expandedU float64) Verdict {
	if rule == ruleSimple {
		if marginDB >= 0 {
			return VerdictPass
		}
		return VerdictFail
	}
	u := math.Abs(expandedU)
	switch {
	case marginDB-u >= 0:
		return VerdictPass
	case marginDB+u < 0:
		return VerdictFail
	case marginDB >= 0:
		return VerdictConditionalPass
	}
	return VerdictConditionalFail
}

// ScanLawDB is the scan-law term 10*n*log10(cos theta) of a limit
// (method.md section 8). It is NaN for |theta| >= 90 deg.
func ScanLawDB(exponentN, thetaDeg float64) float64 {
	if !(math.Abs(thetaDeg) < 90) {
		return math.NaN()
	}
	return 10 * exponentN * math.Log10(math.Cos(thetaDeg*math.Pi/180))
}

// SelectsBeam reports whether a limit's selector chooses a beam: by id when
// ids are given, otherwise by scan angle (bounds inclusive, nil open).
func SelectsBeam(s ingest.BeamSelector, id string, thetaDeg float64) bool {
	if len(s.IDs) > 0 {
		for _, x := range s.IDs {
			if x == id {
				return true
			}
		}
		return false
	}
	if s.MinThetaDeg != nil && thetaDeg < *s.MinThetaDeg {
		return false
	}
	if s.MaxThetaDeg != nil && thetaDeg > *s.MaxThetaDeg {
		return false
	}
	return true
}

// limitCurve checks a limit's points and returns its interpolator over
// frequency. The points must be strictly increasing and cover the band.
func limitCurve(l *ingest.Limit) (func(float64) float64, error) {
	if !(l.BandHz[1] >= l.BandHz[0]) || !allFinite(l.BandHz[:]) {
		return nil, fmt.Errorf("band %s to %s is not a frequency range", formatGHz(l.BandHz[0]), formatGHz(l.BandHz[1]))
	}
	if len(l.Points) == 0 {
		return nil, fmt.Errorf("no limit points")
	}
	xs := make([]float64, len(l.Points))
	ys := make([]float64, len(l.Points))
	for i, p := range l.Points {
		xs[i], ys[i] = p.FrequencyHz, p.Value
	}
	if err := checkTrace(xs, ys); err != nil {
		return nil, fmt.Errorf("limit points: %v", err)
	}
	if !inSpan(l.BandHz[0], xs[0], xs[len(xs)-1]) || !inSpan(l.BandHz[1], xs[0], xs[len(xs)-1]) {
		return nil, fmt.Errorf("limit points span %s to %s but the band is %s to %s: the points must cover the band",
			formatGHz(xs[0]), formatGHz(xs[len(xs)-1]), formatGHz(l.BandHz[0]), formatGHz(l.BandHz[1]))
	}
	if len(xs) == 1 {
		v := ys[0]
		return func(float64) float64 { return v }, nil
	}
	var pl interp.PiecewiseLinear
	_ = pl.Fit(xs, ys)
	return pl.Predict, nil
}

// EvaluateLimits judges every limit of spec on the beams it selects, in
// spec order and beam order, under the spec's decision rule (method.md
// section 7). For statistic "min" every grid point inside the band is
// judged and the result reports the point that decides the verdict: the
// worst verdict, and among points with that verdict the smallest margin
// (under simple acceptance that is the smallest margin). For "mean" the
// band mean of the value is judged against the band mean of the limit
// (both over the beam's grid points in the band), with U the band mean of
// the expanded uncertainty, and the result is placed at the band centre.
// A beam whose grid does not cover the band is judged on the points it has;
// its verdict is then fail if one of those points fails (statistic min),
// incomplete otherwise, and
// a problem says so. A limit that selects no beam, a beam no limit selects
// and a beam without the quantity are problems.
func EvaluateLimits(spec *ingest.Spec, beams []Beam) ([]LimitResult, []*ingest.Problem) {
	results := []LimitResult{}
	var probs []*ingest.Problem
	if spec == nil {
		return results, nil
	}
	problem := func(line int, format string, args ...any) {
		probs = append(probs, ingest.Problemf(spec.File, line, format, args...))
	}
	rule := spec.DecisionRule
	if rule != ruleSimple && rule != ruleGuarded {
		problem(0, "decision_rule %q is not simple or guarded: guarded acceptance is applied", rule)
		rule = ruleGuarded
	}
	if len(spec.Limits) == 0 {
		problem(0, "spec %s has no limits: nothing can be judged", spec.Product)
	}
	covered := make([]bool, len(beams))
	for li := range spec.Limits {
		l := &spec.Limits[li]
		var selected []int
		for bi := range beams {
			if SelectsBeam(l.Beams, beams[bi].ID, beams[bi].ThetaDeg) {
				selected = append(selected, bi)
				covered[bi] = true
			}
		}
		if len(selected) == 0 {
			problem(l.Line, "limit %q selects no beam of this run", l.Name)
			continue
		}
		curve, err := limitCurve(l)
		if err != nil {
			problem(l.Line, "limit %q not judged: %v", l.Name, err)
			continue
		}
		if q := Quantity(l.Quantity); q != QuantityGT && q != QuantityGain {
			problem(l.Line, "limit %q: quantity %q is not gt or gain: not judged", l.Name, l.Quantity)
			continue
		}
		if l.Statistic != "min" && l.Statistic != "mean" {
			problem(l.Line, "limit %q: statistic %q is not min or mean: not judged", l.Name, l.Statistic)
			continue
		}
		cache := &limitCache{curve: curve}
		for _, bi := range selected {
			r, p := judgeBeam(l, cache, rule, &beams[bi])
			if p != "" {
				problem(l.Line, "%s", p)
			}
			if r != nil {
				results = append(results, *r)
			}
		}
	}
	if len(spec.Limits) > 0 {
		for bi, c := range covered {
			if !c {
				problem(0, "spec %s has no limit for beam %s", spec.Product, beams[bi].ID)
			}
		}
	}
	return results, probs
}

// judgeBeam judges one beam against one limit. It returns the result (nil
// when nothing could be judged) and a problem message ("" for none).
func judgeBeam(l *ingest.Limit, cache *limitCache, rule string, b *Beam) (*LimitResult, string) {
	curve := cache.curve
	x, u := b.GTdBPerK, b.GTExpandedUncertaintyDB
	what := "G/T"
	if Quantity(l.Quantity) == QuantityGain {
		x, u, what = b.GainDBi, b.GainExpandedUncertaintyDB, "gain"
	}
	if len(x) == 0 || len(x) != len(b.FrequencyHz) {
		return nil, fmt.Sprintf("limit %q cannot judge beam %s: the beam has no %s", l.Name, b.ID, what)
	}
	law := 0.0
	if l.ScanExponent != nil {
		law = ScanLawDB(*l.ScanExponent, b.ThetaDeg)
		if math.IsNaN(law) {
			return nil, fmt.Sprintf("limit %q cannot judge beam %s: the scan law needs theta below 90 deg, the beam has %g deg",
				l.Name, b.ID, b.ThetaDeg)
		}
	}
	uAt := func(i int) float64 {
		if i < len(u) {
			return u[i]
		}
		return 0
	}
	lo, hi := l.BandHz[0], l.BandHz[1]
	idx := make([]int, 0, len(b.FrequencyHz))
	bandTol := gridTolerance * math.Max(math.Abs(lo), math.Abs(hi)) // as inSpan
	for i, f := range b.FrequencyHz {
		if f >= lo-bandTol && f <= hi+bandTol {
			idx = append(idx, i)
		}
	}
	if len(idx) == 0 {
		return nil, fmt.Sprintf("limit %q cannot judge beam %s: no frequency of the beam lies in the band %s to %s",
			l.Name, b.ID, formatGHz(lo), formatGHz(hi))
	}
	r := &LimitResult{Name: l.Name, Quantity: Quantity(l.Quantity), Beam: b.ID, Statistic: l.Statistic,
		LimitCurve: limitVertices(l, curve, law)}
	limAt := cache.on(b.FrequencyHz)
	if l.Statistic == "mean" {
		var sx, sl, su float64
		for _, i := range idx {
			sx += x[i]
			sl += limAt[i] + law
			su += uAt(i)
		}
		m := float64(len(idx))
		r.ValueDB, r.LimitDB, r.ExpandedUncertaintyDB = sx/m, sl/m, su/m
		r.WorstMarginDB = r.ValueDB - r.LimitDB
		r.AtFrequencyHz = (lo + hi) / 2
		r.Verdict = Judge(rule, r.WorstMarginDB, r.ExpandedUncertaintyDB)
	} else {
		first := true
		for _, i := range idx {
			lim := limAt[i] + law
			m := x[i] - lim
			v := Judge(rule, m, uAt(i))
			if first || verdictRank(v) > verdictRank(r.Verdict) ||
				(verdictRank(v) == verdictRank(r.Verdict) && m < r.WorstMarginDB) {
				first = false
				r.Verdict, r.WorstMarginDB = v, m
				r.AtFrequencyHz, r.ValueDB, r.LimitDB, r.ExpandedUncertaintyDB = b.FrequencyHz[i], x[i], lim, uAt(i)
			}
		}
	}
	curveDB := make([]float64, len(idx))
	for k, i := range idx {
		curveDB[k] = limAt[i] + law
	}
	b.LimitCurves = append(b.LimitCurves, LimitCurve{Name: l.Name, Quantity: Quantity(l.Quantity), Start: idx[0], LimitDB: curveDB})
	f := b.FrequencyHz
	tol := gridTolerance * hi
	if f[0] > lo+tol || f[len(f)-1] < hi-tol {
		msg := fmt.Sprintf("limit %q: beam %s covers %s to %s, not the whole band %s to %s; judged on the %d points it has",
			l.Name, b.ID, formatGHz(f[0]), formatGHz(f[len(f)-1]), formatGHz(lo), formatGHz(hi), len(idx))
		if r.Verdict != VerdictFail || l.Statistic == "mean" {
			// Only a failing point is certain; a band mean over part of the
			// band is not the band mean.
			r.Verdict = VerdictIncomplete
		}
		return r, msg
	}
	return r, ""
}

// limitVertices is the limit line over the band: the band edges and the
// limit points between them, scan law applied.
func limitVertices(l *ingest.Limit, curve func(float64) float64, law float64) []LimitVertex {
	lo, hi := l.BandHz[0], l.BandHz[1]
	v := []LimitVertex{{FrequencyHz: lo, ValueDB: curve(lo) + law}}
	for _, p := range l.Points {
		if p.FrequencyHz > lo && p.FrequencyHz < hi {
			v = append(v, LimitVertex{FrequencyHz: p.FrequencyHz, ValueDB: curve(p.FrequencyHz) + law})
		}
	}
	if hi > lo {
		v = append(v, LimitVertex{FrequencyHz: hi, ValueDB: curve(hi) + law})
	}
	return v
}

// limitCache holds a limit's values on the last beam grid it was asked
// for: the beams of a unit usually share one grid.
type limitCache struct {
	curve func(float64) float64
	grid  []float64
	vals  []float64
}

func (c *limitCache) on(grid []float64) []float64 {
	if c.vals != nil && sameGrid(c.grid, grid) {
		return c.vals
	}
	c.grid, c.vals = grid, make([]float64, len(grid))
	for i, f := range grid {
		c.vals[i] = c.curve(f)
	}
	return c.vals
}
