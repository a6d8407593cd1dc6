package reduce

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/interp"

	"gtpack.example/gtpack/ingest"
)

// RangeLoss is the range loss of a run on the grid of its reference
// measurement (method.md section 3).
type RangeLoss struct {
	// FrequencyHz is the grid: the points of the first reference
	// measurement (pre, or post when there is no pre) that lie inside the
	// reference table and inside the other measurement's span.
	FrequencyHz []float64
	// RangeLossDB is mean(RL_pre, RL_post), or the one measurement there is.
	RangeLossDB []float64
	PreDB       []float64
	PostDB      []float64
	// DriftDB is |RL_pre - RL_post|; nil with one measurement.
	DriftDB []float64
	// ReferenceGainDBi is the reference antenna's gain as used: realized
	// gain, corrected for its measured mismatch when the table states gain
	// (mean over the measurements when both were corrected).
	ReferenceGainDBi []float64
	// ReferenceExpandedUDB is the certificate's expanded uncertainty,
	// interpolated; ReferenceCoverageK its coverage factor.
	ReferenceExpandedUDB []float64
	ReferenceCoverageK   float64
	// ReferenceMatch is |Gamma| of the reference antenna (the larger of pre
	// and post), nil when no measurement file has it.
	ReferenceMatch []float64
	// Files are the measurements used, pre first.
	Files []string
	// Interpolated says what was put on the grid, and from what.
	Interpolated []string
}

// RealizedGainDBi is the realized gain of an antenna of gain gainDBi with
// port reflection coefficient magnitude gamma: G + 10*log10(1 - |Gamma|^2)
// (method.md section 3). It is NaN for |Gamma| >= 1.
func RealizedGainDBi(gainDBi, gamma float64) float64 {
	m := 1 - gamma*gamma
	if !(m > 0) {
		return math.NaN()
	}
	return gainDBi + 10*math.Log10(m)
}

// RangeLossDB is G_ref - S21_ref,dB (method.md section 3).
func RangeLossDB(referenceGainDBi, s21DB float64) float64 {
	return referenceGainDBi - s21DB
}

// ComputeRangeLoss derives the range loss from the reference antenna's
// calibration and the reference measurements pre and post (either may be
// nil). Measurement frequencies outside the calibration table are refused
// (a problem naming them and the table's span), never extrapolated. The
// flags report grid trimming. It returns nil when nothing is left.
func ComputeRangeLoss(ref *ingest.Reference, pre, post *ingest.Transmission) (*RangeLoss, []*ingest.Problem, []Flag) {
	var probs []*ingest.Problem
	var flags []Flag
	if ref == nil {
		return nil, nil, nil
	}
	tf, tg, tu, p := referenceTable(ref)
	if p != nil {
		return nil, []*ingest.Problem{p}, nil
	}
	var ms []*ingest.Transmission
	for _, m := range []*ingest.Transmission{pre, post} {
		if m == nil {
			continue
		}
		if err := checkTrace(m.FrequencyHz, m.ParameterDB); err != nil {
			probs = append(probs, ingest.Problemf(m.File, 0, "reference measurement not used: %v", err))
			continue
		}
		ms = append(ms, m)
	}
	if len(ms) == 0 {
		return nil, probs, nil
	}
	tLo, tHi := tf[0], tf[len(tf)-1]
	tableName := ref.File
	if ref.TableFile != "" {
		tableName = ref.TableFile
	}
	for _, m := range ms {
		var out []float64
		for _, f := range m.FrequencyHz {
			if !inSpan(f, tLo, tHi) {
				out = append(out, f)
			}
		}
		if len(out) > 0 {
			probs = append(probs, ingest.Problemf(m.File, 0,
				"%s of %d measured frequencies lie outside the calibration table of reference %s "+
					"(%s, %s to %s): the range loss is refused there (never extrapolated)",
				describeFrequencies(out), len(m.FrequencyHz), ref.ID, tableName, formatGHz(tLo), formatGHz(tHi)))
		}
	}
	lo, hi := tLo, tHi
	for _, m := range ms {
		lo = math.Max(lo, m.FrequencyHz[0])
		hi = math.Min(hi, m.FrequencyHz[len(m.FrequencyHz)-1])
	}
	base := ms[0]
	var grid, dropped []float64
	for _, f := range base.FrequencyHz {
		switch {
		case inSpan(f, lo, hi):
			grid = append(grid, f)
		case inSpan(f, tLo, tHi):
			dropped = append(dropped, f)
		}
	}
	if len(dropped) > 0 {
		flags = append(flags, Flag{Kind: "grid", Message: fmt.Sprintf(
			"%s of %s lie outside the span of %s (%s to %s): no range loss there",
			describeFrequencies(dropped), base.File, ms[len(ms)-1].File, formatGHz(lo), formatGHz(hi))})
	}
	if len(grid) == 0 {
		probs = append(probs, ingest.Problemf(base.File, 0,
			"no frequency of the reference measurement lies inside the calibration table of reference %s (%s to %s): no range loss",
			ref.ID, formatGHz(tLo), formatGHz(tHi)))
		return nil, probs, flags
	}

	rl := &RangeLoss{FrequencyHz: grid, ReferenceCoverageK: ref.CoverageK}
	rl.Interpolated = append(rl.Interpolated, fmt.Sprintf(
		"reference gain and its uncertainty from the %d-point calibration table of %s", len(tf), tableName))
	gRef := resampleDB(tf, tg, grid)
	rl.ReferenceExpandedUDB = resampleDB(tf, tu, grid)

	correct := false
	switch ref.GainKind {
	case "gain":
		correct = true
	case "realized", "":
	default:
		probs = append(probs, ingest.Problemf(ref.File, 0,
			"gain_kind %q is neither realized nor gain: the table is taken as realized gain", ref.GainKind))
	}
	n := len(grid)
	gUsed := make([]float64, n)
	var rls [][]float64
	for _, m := range ms {
		s21 := m.ParameterDB
		var match []float64
		if len(m.AntennaMatch) == len(m.FrequencyHz) && allFinite(m.AntennaMatch) {
			match = m.AntennaMatch
		}
		if !sameGrid(m.FrequencyHz, grid) {
			s21 = resampleDB(m.FrequencyHz, s21, grid)
			if match != nil {
				match = resampleDB(m.FrequencyHz, match, grid)
			}
			rl.Interpolated = append(rl.Interpolated, fmt.Sprintf(
				"reference measurement %s from its %d points onto the %d-point range-loss grid", m.File, len(m.FrequencyHz), n))
		}
		if match != nil {
			if rl.ReferenceMatch == nil {
				rl.ReferenceMatch = append([]float64(nil), match...)
			} else {
				for i := range match {
					rl.ReferenceMatch[i] = math.Max(rl.ReferenceMatch[i], match[i])
				}
			}
		}
		g := append([]float64(nil), gRef...)
		if correct {
			if match == nil {
				probs = append(probs, ingest.Problemf(m.File, 0,
					"reference %s states gain, not realized gain, but this file has no reflection coefficient "+
						"of the reference antenna: its mismatch loss is not applied", ref.ID))
			} else {
				var bad []float64
				for i := range g {
					if r := RealizedGainDBi(g[i], match[i]); !math.IsNaN(r) {
						g[i] = r
					} else {
						bad = append(bad, grid[i])
					}
				}
				if len(bad) > 0 {
					probs = append(probs, ingest.Problemf(m.File, 0,
						"|Gamma| of the reference antenna is 1 or more at %s: mismatch loss not applied there",
						describeFrequencies(bad)))
				}
			}
		}
		r := make([]float64, n)
		for i := range r {
			r[i] = RangeLossDB(g[i], s21[i])
			gUsed[i] += g[i] / float64(len(ms))
		}
		rls = append(rls, r)
		rl.Files = append(rl.Files, m.File)
	}
	rl.ReferenceGainDBi = gUsed
	rl.PreDB = rls[0]
	rl.RangeLossDB = rls[0]
	if len(rls) == 2 {
		rl.PostDB = rls[1]
		rl.RangeLossDB = make([]float64, n)
		rl.DriftDB = make([]float64, n)
		for i := range rl.RangeLossDB {
			rl.RangeLossDB[i] = (rls[0][i] + rls[1][i]) / 2
			rl.DriftDB[i] = math.Abs(rls[0][i] - rls[1][i])
		}
	}
	return rl, probs, flags
}

// referenceTable checks a calibration table and returns its columns.
func referenceTable(ref *ingest.Reference) (f, g, u []float64, p *ingest.Problem) {
	name := ref.File
	if ref.TableFile != "" {
		name = ref.TableFile
	}
	if len(ref.Table) < 2 {
		return nil, nil, nil, ingest.Problemf(name, 0,
			"reference %s: the calibration table needs at least 2 rows to interpolate, it has %d", ref.ID, len(ref.Table))
	}
	for i, r := range ref.Table {
		if !allFinite([]float64{r.FrequencyHz, r.GainDBi, r.ExpandedUncertaintyDB}) {
			return nil, nil, nil, ingest.Problemf(name, r.Line, "reference %s: a table value is not a finite number", ref.ID)
		}
		if i > 0 && !(r.FrequencyHz > ref.Table[i-1].FrequencyHz) {
			return nil, nil, nil, ingest.Problemf(name, r.Line,
				"reference %s: frequency %s is not above the previous %s", ref.ID,
				formatGHz(r.FrequencyHz), formatGHz(ref.Table[i-1].FrequencyHz))
		}
		f = append(f, r.FrequencyHz)
		g = append(g, r.GainDBi)
		u = append(u, r.ExpandedUncertaintyDB)
	}
	return f, g, u, nil
}

// checkTrace reports why (xs, ys) cannot be interpolated: lengths that
// differ, no point, frequencies not strictly increasing, values not finite.
func checkTrace(xs, ys []float64) error {
	if len(xs) == 0 {
		return fmt.Errorf("no data point")
	}
	if len(xs) != len(ys) {
		return fmt.Errorf("%d frequencies but %d values", len(xs), len(ys))
	}
	for i := range xs {
		if !finite(xs[i]) || !finite(ys[i]) {
			return fmt.Errorf("value at point %d is not a finite number", i+1)
		}
		if i > 0 && !(xs[i] > xs[i-1]) {
			return fmt.Errorf("frequency %s is not above the previous %s", formatGHz(xs[i]), formatGHz(xs[i-1]))
		}
	}
	return nil
}

func allFinite(x []float64) bool {
	for _, v := range x {
		if !finite(v) {
			return false
		}
	}
	return true
}

// finite is false for NaN and +-Inf (for which v - v is NaN).
func finite(v float64) bool { return v-v == 0 }

// gridTolerance is the relative tolerance within which two frequencies are
// the same point: frequencies converted from GHz text differ in the last
// bits, and a point at the edge of a span must not be lost to that.
const gridTolerance = 1e-9

func inSpan(f, lo, hi float64) bool {
	tol := gridTolerance * math.Max(math.Abs(lo), math.Abs(hi))
	return f >= lo-tol && f <= hi+tol
}

func sameGrid(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	if len(a) == 0 || &a[0] == &b[0] {
		return true
	}
	for i := range a {
		if a[i] != b[i] && math.Abs(a[i]-b[i]) > gridTolerance*math.Max(math.Abs(a[i]), math.Abs(b[i])) {
			return false
		}
	}
	return true
}

// resampleDB interpolates (xs, ys) onto grid, linear in frequency on the
// dB values (gonum's piecewise-linear interpolator). xs must be strictly
// increasing (checkTrace) and grid inside its span (inSpan): points within
// the grid tolerance beyond an end take the end value.
func resampleDB(xs, ys, grid []float64) []float64 {
	out := make([]float64, len(grid))
	if len(xs) == 1 {
		for i := range out {
			out[i] = ys[0]
		}
		return out
	}
	if sameGrid(xs, grid) {
		// Traces of one run usually share a grid: nothing to interpolate.
		copy(out, ys)
		return out
	}
	var pl interp.PiecewiseLinear
	_ = pl.Fit(xs, ys) // never fails on checked input; panics are caught by ReduceUnit
	for i, f := range grid {
		out[i] = pl.Predict(f)
	}
	return out
}

func formatGHz(f float64) string { return fmt.Sprintf("%.6g GHz", f/1e9) }

// describeFrequencies names a list of frequencies briefly: "10.5 GHz",
// or "frequencies 9.5 GHz to 9.9 GHz (5 points)".
func describeFrequencies(fs []float64) string {
	switch len(fs) {
	case 0:
		return "no frequency"
	case 1:
		return "frequency " + formatGHz(fs[0])
	}
	return fmt.Sprintf("frequencies %s to %s (%d points)", formatGHz(fs[0]), formatGHz(fs[len(fs)-1]), len(fs))
}
