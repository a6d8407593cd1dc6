package reduce

import (
	"math"
	"sort"
	"time"

	"gonum.org/v1/gonum/stat"
)

// Fleet statistics constants.
const (
	// chartFactor is 3/d2 with d2 = 1.128 for moving ranges of two: the
	// Shewhart individuals chart (general knowledge).
	chartFactor = 2.66
	// modifiedZScale and modifiedZLimit are from Iglewicz and Hoaglin (1993):
	// z = 0.6745*(x - median)/MAD, an outlier above 3.5.
	modifiedZScale = 0.6745
	modifiedZLimit = 3.5
	// madToSigma scales a MAD to a normal standard deviation.
	madToSigma = 1.4826
	// bandHalfWidthSigmas is the golden band's half-width in robust sigmas.
	bandHalfWidthSigmas = 3
	// minBandUnits is how many units a golden band needs.
	minBandUnits = 5
)

// ComputeFleet computes the statistics per product over the acceptance runs,
// one UnitSummary per unit (method.md section 10). The result does not
// depend on the order of units.
//
// Per limit name: each unit's worst margin is its smallest WorstMarginDB
// over the beams the limit applies to, and its verdict for the limit the
// worst of those beams' verdicts. A unit is judged on the limit when at
// least one of those results has a verdict of pass, conditional-pass,
// conditional-fail or fail (an incomplete result or a margin that is not
// finite does not count). Yield = (pass + conditional-pass) / judged: a
// conditional pass is a pass under the decision rule (ILAC-G8), so it
// counts towards yield. Mean and standard deviation (sample, n-1) of the
// worst margins; Cpk = mean/(3*sigma) against LSL 0 on margins (ISO
// 22514-2), 0 with fewer than two units or no spread. The individuals
// control chart is in test order (Started, then serial): centre = mean,
// limits = mean +/- 2.66 * mean moving range. Outliers have |modified z| >
// 3.5 (Iglewicz and Hoaglin 1993); none when the MAD is 0.
//
// Golden band: the units of the product with a boresight trace, in serial
// order; the grid is the first one's; every other trace is interpolated
// (piecewise linear) at the grid frequencies inside its own span. At each
// frequency covered by at least 5 units the band is the median and
// low/high = median -/+ 3*1.4826*MAD (1.4826*MAD estimates a normal sigma,
// so the band is a robust +-3 sigma); frequencies with fewer units are left
// out, and there is no band when none remains. Watch: units whose verdict
// is pass or conditional-pass and whose boresight G/T is below low or above
// high at some band frequency, with those frequencies.
func ComputeFleet(units []UnitSummary) *Fleet {
	f := &Fleet{Schema: FleetSchema, Units: []UnitSummary{}, Products: []ProductFleet{}}
	bySerial := append([]UnitSummary(nil), units...)
	sort.SliceStable(bySerial, func(a, b int) bool {
		if bySerial[a].Serial != bySerial[b].Serial {
			return bySerial[a].Serial < bySerial[b].Serial
		}
		return fleetTestBefore(&bySerial[a], &bySerial[b])
	})
	products := map[string][]*UnitSummary{}
	var names []string
	for i := range bySerial {
		u := &bySerial[i]
		if _, ok := products[u.Product]; !ok {
			names = append(names, u.Product)
		}
		products[u.Product] = append(products[u.Product], u)
	}
	sort.Strings(names)
	for _, name := range names {
		f.Products = append(f.Products, fleetProduct(name, products[name]))
	}
	for _, u := range bySerial {
		c := u
		c.Boresight = nil
		c.Limits = append([]LimitResult(nil), u.Limits...)
		f.Units = append(f.Units, c)
	}
	return f
}

// fleetProduct computes one product's statistics; us is in serial order.
func fleetProduct(name string, us []*UnitSummary) ProductFleet {
	p := ProductFleet{Product: name, Units: len(us), VerdictCounts: map[string]int{},
		Limits: []LimitStats{}, Watch: []WatchEntry{}}
	for _, u := range us {
		p.VerdictCounts[u.Verdict]++
	}
	inTestOrder := append([]*UnitSummary(nil), us...)
	sort.SliceStable(inTestOrder, func(a, b int) bool {
		if fleetTestBefore(inTestOrder[a], inTestOrder[b]) {
			return true
		}
		if fleetTestBefore(inTestOrder[b], inTestOrder[a]) {
			return false
		}
		return inTestOrder[a].Serial < inTestOrder[b].Serial
	})
	var limitNames []string
	seen := map[string]bool{}
	for _, u := range inTestOrder {
		for _, l := range u.Limits {
			if !seen[l.Name] {
				seen[l.Name] = true
				limitNames = append(limitNames, l.Name)
			}
		}
	}
	for _, ln := range limitNames {
		p.Limits = append(p.Limits, fleetLimit(ln, inTestOrder))
	}
	p.Band, p.Watch = fleetBand(us)
	return p
}

// fleetVerdictRank ranks a judged verdict, best first; ok is false for
// incomplete or unknown verdicts.
func fleetVerdictRank(v string) (rank int, ok bool) {
	switch v {
	case VerdictPass:
		return 0, true
	case VerdictConditionalPass:
		return 1, true
	case VerdictConditionalFail:
		return 2, true
	case VerdictFail:
		return 3, true
	}
	return 0, false
}

// fleetLimit is the statistics of one limit; us is in test order.
func fleetLimit(name string, us []*UnitSummary) LimitStats {
	ls := LimitStats{Name: name, Outliers: []Outlier{}}
	ls.Chart = ControlChart{Serials: []string{}, Started: []string{}, ValuesDB: []float64{}, Beyond: []int{}}
	for _, u := range us {
		worst, verdict, judged := math.Inf(1), -1, false
		for _, l := range u.Limits {
			r, ok := fleetVerdictRank(l.Verdict)
			if l.Name != name || !ok || !projFinite(l.WorstMarginDB) {
				continue
			}
			judged = true
			worst = math.Min(worst, l.WorstMarginDB)
			verdict = max(verdict, r)
		}
		if !judged {
			continue
		}
		ls.Units++
		if cp, _ := fleetVerdictRank(VerdictConditionalPass); verdict <= cp {
			ls.Passed++
		}
		ls.Chart.Serials = append(ls.Chart.Serials, u.Serial)
		ls.Chart.Started = append(ls.Chart.Started, u.Started)
		ls.Chart.ValuesDB = append(ls.Chart.ValuesDB, worst)
	}
	x := ls.Chart.ValuesDB
	if len(x) == 0 {
		return ls
	}
	ls.Yield = float64(ls.Passed) / float64(ls.Units)
	ls.MeanMarginDB = stat.Mean(x, nil)
	if len(x) >= 2 {
		ls.StdMarginDB = stat.StdDev(x, nil)
		if ls.StdMarginDB > 0 {
			ls.Cpk = ls.MeanMarginDB / (3 * ls.StdMarginDB)
		}
		mr := 0.0
		for i := 1; i < len(x); i++ {
			mr += math.Abs(x[i] - x[i-1])
		}
		ls.Chart.MeanMovingRange = mr / float64(len(x)-1)
	}
	ls.Chart.CentreDB = ls.MeanMarginDB
	ls.Chart.UpperDB = ls.MeanMarginDB + chartFactor*ls.Chart.MeanMovingRange
	ls.Chart.LowerDB = ls.MeanMarginDB - chartFactor*ls.Chart.MeanMovingRange
	for i, v := range x {
		if v > ls.Chart.UpperDB || v < ls.Chart.LowerDB {
			ls.Chart.Beyond = append(ls.Chart.Beyond, i)
		}
	}
	med, mad := fleetMedianMAD(x)
	if mad > 0 {
		for i, v := range x {
			if z := modifiedZScale * (v - med) / mad; math.Abs(z) > modifiedZLimit {
				ls.Outliers = append(ls.Outliers, Outlier{Serial: ls.Chart.Serials[i], MarginDB: v, ModifiedZ: z})
			}
		}
		sort.SliceStable(ls.Outliers, func(a, b int) bool { return ls.Outliers[a].Serial < ls.Outliers[b].Serial })
	}
	return ls
}

// fleetBand computes the golden band and the watch list; us is in serial
// order.
func fleetBand(us []*UnitSummary) (*GoldenBand, []WatchEntry) {
	watch := []WatchEntry{}
	var traced []*UnitSummary
	for _, u := range us {
		if u.Boresight != nil && diagTraceUsable(u.Boresight.FrequencyHz, u.Boresight.GTdBPerK) {
			traced = append(traced, u)
		}
	}
	if len(traced) < minBandUnits {
		return nil, watch
	}
	grid := traced[0].Boresight.FrequencyHz
	smooth := bandSmoothingPoints(len(grid))
	// on[i][k] is unit i's G/T at grid[k]; NaN outside its span.
	on := make([][]float64, len(traced))
	for i, u := range traced {
		fs, gt := u.Boresight.FrequencyHz, u.Boresight.GTdBPerK
		on[i] = make([]float64, len(grid))
		var inside []float64
		var at []int
		for k, g := range grid {
			on[i][k] = math.NaN()
			if g >= fs[0] && g <= fs[len(fs)-1] {
				inside = append(inside, g)
				at = append(at, k)
			}
		}
		for j, v := range resampleDB(fs, gt, inside) {
			on[i][at[j]] = v
		}
		on[i] = movingAverageNaN(on[i], smooth)
	}
	band := &GoldenBand{Units: len(traced), SmoothingPoints: smooth}
	var kept []int
	for k, g := range grid {
		var col []float64
		for i := range traced {
			if !math.IsNaN(on[i][k]) {
				col = append(col, on[i][k])
			}
		}
		if len(col) < minBandUnits {
			continue
		}
		med, mad := fleetMedianMAD(col)
		half := bandHalfWidthSigmas * madToSigma * mad
		band.FrequencyHz = append(band.FrequencyHz, g)
		band.MedianDB = append(band.MedianDB, med)
		band.LowDB = append(band.LowDB, med-half)
		band.HighDB = append(band.HighDB, med+half)
		kept = append(kept, k)
	}
	if len(kept) == 0 {
		return nil, watch
	}
	// The per-frequency MAD of a handful of units scatters as much as the
	// traces do: smooth the half-width over the same window.
	half := make([]float64, len(kept))
	for j := range kept {
		half[j] = (band.HighDB[j] - band.LowDB[j]) / 2
	}
	half = movingAverageNaN(half, smooth)
	for j := range kept {
		band.LowDB[j], band.HighDB[j] = band.MedianDB[j]-half[j], band.MedianDB[j]+half[j]
	}
	for i, u := range traced {
		if u.Verdict != VerdictPass && u.Verdict != VerdictConditionalPass {
			continue
		}
		var out []float64
		var ranges [][2]float64
		prev := -2
		for j, k := range kept {
			v := on[i][k]
			if !math.IsNaN(v) && (v < band.LowDB[j] || v > band.HighDB[j]) {
				out = append(out, grid[k])
				if j == prev+1 {
					ranges[len(ranges)-1][1] = grid[k]
				} else {
					ranges = append(ranges, [2]float64{grid[k], grid[k]})
				}
				prev = j
			}
		}
		if len(out) > 0 {
			watch = append(watch, WatchEntry{Serial: u.Serial, FrequenciesHz: out, RangesHz: ranges})
		}
	}
	return band, watch
}

// fleetMedianMAD returns the median of x and the median absolute deviation
// from it (unscaled). For an even count the median is the mean of the two
// middle values.
func fleetMedianMAD(x []float64) (median, mad float64) {
	med := fleetMedian(x)
	dev := make([]float64, len(x))
	for i, v := range x {
		dev[i] = math.Abs(v - med)
	}
	return med, fleetMedian(dev)
}

func fleetMedian(x []float64) float64 {
	s := append([]float64(nil), x...)
	sort.Float64s(s)
	n := len(s)
	if n == 0 {
		return math.NaN()
	}
	if n%2 == 1 {
		return s[n/2]
	}
	return (s[n/2-1] + s[n/2]) / 2
}

// fleetTestBefore orders two units by start: RFC 3339 times compare as
// instants, and come before starts that do not parse, which compare as text.
func fleetTestBefore(a, b *UnitSummary) bool {
	ta, ea := time.Parse(time.RFC3339, a.Started)
	tb, eb := time.Parse(time.RFC3339, b.Started)
	switch {
	case ea == nil && eb == nil:
		return ta.Before(tb)
	case ea == nil:
		return true
	case eb == nil:
		return false
	}
	return a.Started < b.Started
}

// bandSmoothingPoints is the moving-average width used for the golden
// band: about 1/40 of the grid, odd, at least 1 (801 points: 21).
func bandSmoothingPoints(n int) int {
	w := n / 40
	if w%2 == 0 {
		w++
	}
	return w
}

// movingAverageNaN is a centred moving average of width w (odd) that skips
// NaN values and shrinks at the ends; a NaN input stays NaN.
func movingAverageNaN(x []float64, w int) []float64 {
	if w <= 1 {
		return x
	}
	out := make([]float64, len(x))
	h := w / 2
	for i := range x {
		if math.IsNaN(x[i]) {
			out[i] = math.NaN()
			continue
		}
		var s float64
		var n int
		for j := max(0, i-h); j <= min(len(x)-1, i+h); j++ {
			if !math.IsNaN(x[j]) {
				s += x[j]
				n++
			}
		}
		out[i] = s / float64(n)
	}
	return out
}
