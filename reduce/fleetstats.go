package reduce

import (
	"fmt"
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
	// MinChartPoints is the fewest points before a control chart calls a
	// point out of control, and MinCapabilityUnits the fewest units
	// before a capability index is more than indicative (method.md
	// section 10: common practice).
	MinChartPoints     = 10
	MinCapabilityUnits = 30
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
// depend on the order of units. It sorts the units by serial (units with
// the same serial by start) and hands them to a FleetBuilder.
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
// order; the grid is the first one's (every k-th of its frequencies when
// it has more than maxBandGridPoints, bandGrid); every other trace is interpolated
// (piecewise linear) at the grid frequencies inside its own span. At each
// frequency covered by at least 5 units the band is the median and
// low/high = median -/+ 3*1.4826*MAD (1.4826*MAD estimates a normal sigma,
// so the band is a robust +-3 sigma); frequencies with fewer units are left
// out, and there is no band when none remains. Watch: units whose verdict
// is pass or conditional-pass and whose boresight G/T is below low or above
// high at some band frequency, with those frequencies.
func ComputeFleet(units []UnitSummary) *Fleet {
	order := make([]int, len(units))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool {
		ua, ub := &units[order[a]], &units[order[b]]
		if ua.Serial != ub.Serial {
			return ua.Serial < ub.Serial
		}
		return fleetTestBefore(ua.Started, ub.Started)
	})
	b := NewFleetBuilder()
	for _, i := range order {
		_ = b.Add(units[i]) // cannot fail: the units come in serial order
	}
	return b.Finish()
}

// FleetBuilder computes the fleet statistics of ComputeFleet from units
// given one at a time in serial order, so that a caller can read the
// units' summaries one by one and drop each after Add.
//
// What it keeps per unit is small: the FleetUnit (serial, product, start,
// verdict, one worst margin and verdict per limit name), the judged worst
// margin and verdict per limit name for the statistics, and, for a unit
// with a usable boresight trace, that trace resampled and smoothed onto
// its product's grid, as float32 differences from the product's first
// trace: 4 bytes a grid point, 3.2 kB a unit at 801 points. That last part
// stays linear in the number of units on purpose: the band's median and
// MAD at a frequency need every unit's value there, and the watch list
// compares every unit's trace with the finished band. The differences
// from the first trace are a few tenths of a dB, so their float32 form is
// within about 1e-8 dB of the float64 value (float32 keeps 24 bits, IEEE
// 754): far below the 1e-6 dB to which fleet.json writes the band.
type FleetBuilder struct {
	units      []fleetRecord
	checks     map[string][]RangeCheck // by serial: the range checks of its runs
	checkUnits map[string]bool         // serials of check units
	products   map[string]*fleetProductAcc
	last       string
}

// fleetRecord is one unit as the builder keeps it.
type fleetRecord struct {
	FleetUnit
	judged []fleetJudged // beside FleetUnit.Limits
}

// fleetJudged is a unit's judged result for one limit name: its worst
// margin and worst verdict rank over the results fleetVerdictRank accepts
// with a finite margin; ok is false when there is none.
type fleetJudged struct {
	worst float64
	rank  int
	ok    bool
}

// fleetProductAcc is what the builder gathers for one product.
type fleetProductAcc struct {
	units   []int             // indexes into FleetBuilder.units, serial order
	strings map[string]string // one copy of each limit name and beam
	grid    []float64         // the first traced unit's frequencies
	smooth  int               // moving-average width for the grid
	ref     []float64         // the first traced unit's smoothed trace, NaN as 0
	traced  []int             // indexes into FleetBuilder.units of traced units
	dev     [][]float32       // per traced unit: smoothed trace on grid - ref; NaN outside its span
}

// NewFleetBuilder returns an empty builder.
func NewFleetBuilder() *FleetBuilder {
	return &FleetBuilder{products: map[string]*fleetProductAcc{}, checks: map[string][]RangeCheck{}, checkUnits: map[string]bool{}}
}

// Add takes one unit's summary; it keeps none of u's lists. Units must
// come in serial order (equal serials are allowed): the golden band's grid
// is the first traced unit's in that order. Add refuses a serial that
// sorts before the previous one.
func (b *FleetBuilder) Add(u UnitSummary) error {
	if len(b.units) > 0 && u.Serial < b.last {
		return fmt.Errorf("reduce: fleet unit %q added after %q: units must come in serial order", u.Serial, b.last)
	}
	b.last = u.Serial
	p := b.products[u.Product]
	if p == nil {
		p = &fleetProductAcc{strings: map[string]string{}}
		b.products[u.Product] = p
	}
	intern := func(s string) string {
		if c, ok := p.strings[s]; ok {
			return c
		}
		p.strings[s] = s
		return s
	}
	rec := fleetRecord{FleetUnit: FleetUnit{Serial: u.Serial, Product: u.Product, Started: u.Started,
		Verdict: u.Verdict, Limits: []FleetUnitLimit{}, Stale: u.Stale, NoReport: u.NoReport,
		Runs: max(u.Runs, 1), FirstVerdict: u.FirstVerdict, CheckUnit: u.CheckUnit,
		IssueState: u.IssueState, Revision: u.Revision, ReportNumber: u.ReportNumber}}
	if rec.FirstVerdict == "" {
		rec.FirstVerdict = u.Verdict // a summary of 0.3.0 or before: one run known
	}
	for _, l := range u.Limits {
		j := -1
		for k := range rec.Limits {
			if rec.Limits[k].Name == l.Name {
				j = k
				break
			}
		}
		if j < 0 {
			rec.Limits = append(rec.Limits, FleetUnitLimit{Name: intern(l.Name), WorstMarginDB: math.NaN(), Verdict: Verdict(intern(string(l.Verdict)))})
			rec.judged = append(rec.judged, fleetJudged{worst: math.Inf(1), rank: -1})
			j = len(rec.Limits) - 1
		} else {
			rec.Limits[j].Verdict = Verdict(intern(string(WorseVerdict(rec.Limits[j].Verdict, l.Verdict))))
		}
		e, jd := &rec.Limits[j], &rec.judged[j]
		if !projFinite(l.WorstMarginDB) {
			continue
		}
		if math.IsNaN(e.WorstMarginDB) || l.WorstMarginDB < e.WorstMarginDB {
			e.WorstMarginDB, e.Beam = l.WorstMarginDB, intern(l.Beam)
		}
		if r, ok := fleetVerdictRank(l.Verdict); ok {
			jd.ok = true
			jd.worst = math.Min(jd.worst, l.WorstMarginDB)
			jd.rank = max(jd.rank, r)
		}
	}
	if len(u.RangeChecks) > 0 {
		b.checks[u.Serial] = append(b.checks[u.Serial], u.RangeChecks...)
		if u.CheckUnit {
			b.checkUnits[u.Serial] = true
		}
	}
	idx := len(b.units)
	b.units = append(b.units, rec)
	if u.CheckUnit {
		// A check standard, not production: range health shows it.
		if len(p.units) == 0 {
			delete(b.products, u.Product)
		}
		return nil
	}
	p.units = append(p.units, idx)
	if t := u.Boresight; t != nil && diagTraceUsable(t.FrequencyHz, t.GTdBPerK) {
		p.addTrace(idx, t.FrequencyHz, t.GTdBPerK)
	}
	return nil
}

// addTrace resamples one unit's trace onto the product's grid (the first
// trace's), smooths it and keeps it as float32 differences from the first.
func (p *fleetProductAcc) addTrace(idx int, fs, gt []float64) {
	if p.grid == nil {
		p.grid = bandGrid(fs)
		p.smooth = bandSmoothingPoints(len(p.grid))
	}
	grid := p.grid
	on := make([]float64, len(grid))
	var inside []float64
	var at []int
	for k, g := range grid {
		on[k] = math.NaN()
		if g >= fs[0] && g <= fs[len(fs)-1] {
			inside = append(inside, g)
			at = append(at, k)
		}
	}
	for j, v := range resampleDB(fs, gt, inside) {
		on[at[j]] = v
	}
	on = movingAverageNaN(on, p.smooth)
	if p.ref == nil {
		p.ref = make([]float64, len(grid))
		for k, v := range on {
			if !math.IsNaN(v) {
				p.ref[k] = v
			}
		}
	}
	d := make([]float32, len(grid))
	for k, v := range on {
		d[k] = float32(v - p.ref[k])
	}
	p.traced = append(p.traced, idx)
	p.dev = append(p.dev, d)
}

// at is traced unit i's smoothed G/T at grid point k; NaN outside its span.
func (p *fleetProductAcc) at(i, k int) float64 {
	return p.ref[k] + float64(p.dev[i][k])
}

// Finish returns the fleet of the units added so far.
func (b *FleetBuilder) Finish() *Fleet {
	f := &Fleet{Units: make([]FleetUnit, len(b.units)), Products: []ProductFleet{}}
	names := make([]string, 0, len(b.products))
	for n := range b.products {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		f.Products = append(f.Products, b.product(n, b.products[n]))
	}
	for i := range b.units {
		f.Units[i] = b.units[i].FleetUnit
	}
	f.Stations, f.References = RangeCharts(b.checks), ReferencesHealth(b.checks)
	only := map[string][]RangeCheck{}
	for s := range b.checkUnits {
		only[s] = b.checks[s]
	}
	f.CheckUnits = CheckUnitCharts(only)
	return f
}

// product computes one product's statistics.
func (b *FleetBuilder) product(name string, acc *fleetProductAcc) ProductFleet {
	p := ProductFleet{Product: name, Units: len(acc.units), VerdictCounts: map[Verdict]int{},
		Limits: []LimitStats{}, Watch: []WatchEntry{}}
	for _, i := range acc.units {
		p.VerdictCounts[b.units[i].Verdict]++
	}
	// Test order: start, then serial.
	inTestOrder := make([]*fleetRecord, len(acc.units))
	for j, i := range acc.units {
		inTestOrder[j] = &b.units[i]
	}
	sort.SliceStable(inTestOrder, func(a, c int) bool {
		ra, rc := inTestOrder[a], inTestOrder[c]
		if fleetTestBefore(ra.Started, rc.Started) {
			return true
		}
		if fleetTestBefore(rc.Started, ra.Started) {
			return false
		}
		return ra.Serial < rc.Serial
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
	p.Band, p.Watch = b.band(acc)
	p.FirstPassYield, p.FinalYield, p.Months = yields(inTestOrder)
	return p
}

// passed says whether a verdict counts towards yield: pass or
// conditional pass.
func passed(v Verdict) bool { return v == VerdictPass || v == VerdictConditionalPass }

// judged says whether a verdict is a judgement (not incomplete).
func judged(v Verdict) bool { _, ok := fleetVerdictRank(v); return ok }

// yields are the first-pass and final yields of units (in test order),
// overall and per calendar month of the acceptance run.
func yields(units []*fleetRecord) (firstPass, final float64, months []MonthYield) {
	months = []MonthYield{}
	type acc struct{ n, first, final int }
	var all acc
	byMonth := map[string]*MonthYield{}
	counts := map[string]*acc{}
	for _, u := range units {
		m := "unknown"
		if !u.Started.IsZero() {
			m = u.Started.UTC().Format("2006-01")
		}
		my := byMonth[m]
		if my == nil {
			my = &MonthYield{Month: m, VerdictCounts: map[Verdict]int{}}
			byMonth[m] = my
			counts[m] = &acc{}
		}
		my.Units++
		my.VerdictCounts[u.Verdict]++
		if u.Runs > 1 {
			my.Retested++
		}
		if !judged(u.Verdict) {
			continue
		}
		for _, a := range []*acc{&all, counts[m]} {
			a.n++
			if passed(u.FirstVerdict) {
				a.first++
			}
			if passed(u.Verdict) {
				a.final++
			}
		}
	}
	ratio := func(k, n int) float64 {
		if n == 0 {
			return math.NaN()
		}
		return float64(k) / float64(n)
	}
	keys := make([]string, 0, len(byMonth))
	for k := range byMonth {
		keys = append(keys, k)
	}
	sort.Strings(keys) // "unknown" sorts after the digits
	for _, k := range keys {
		my, a := byMonth[k], counts[k]
		my.FirstPassYield, my.FinalYield = ratio(a.first, a.n), ratio(a.final, a.n)
		months = append(months, *my)
	}
	return ratio(all.first, all.n), ratio(all.final, all.n), months
}

// fleetVerdictRank ranks a judged verdict, best first; ok is false for
// incomplete or unknown verdicts.
func fleetVerdictRank(v Verdict) (rank int, ok bool) {
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
func fleetLimit(name string, us []*fleetRecord) LimitStats {
	ls := LimitStats{Name: name, Outliers: []Outlier{}}
	ls.Chart = ControlChart{Serials: []string{}, Started: []time.Time{}, ValuesDB: []float64{}, Beyond: []int{}}
	cp, _ := fleetVerdictRank(VerdictConditionalPass)
	for _, u := range us {
		var jd *fleetJudged
		for k := range u.Limits {
			if u.Limits[k].Name == name {
				jd = &u.judged[k]
				break
			}
		}
		if jd == nil || !jd.ok {
			continue
		}
		ls.Units++
		if jd.rank <= cp {
			ls.Passed++
		}
		ls.Chart.Serials = append(ls.Chart.Serials, u.Serial)
		ls.Chart.Started = append(ls.Chart.Started, u.Started)
		ls.Chart.ValuesDB = append(ls.Chart.ValuesDB, jd.worst)
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
	ls.Indicative = len(x) < MinCapabilityUnits
	ls.Chart.TooFew = len(x) < MinChartPoints
	for i, v := range x {
		if !ls.Chart.TooFew && (v > ls.Chart.UpperDB || v < ls.Chart.LowerDB) {
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

// band computes the golden band and the watch list of one product from
// its traced units (in serial order).
func (b *FleetBuilder) band(acc *fleetProductAcc) (*GoldenBand, []WatchEntry) {
	watch := []WatchEntry{}
	if len(acc.traced) < minBandUnits {
		return nil, watch
	}
	grid, smooth := acc.grid, acc.smooth
	band := &GoldenBand{Units: len(acc.traced), SmoothingPoints: smooth}
	var kept []int
	col := make([]float64, 0, len(acc.traced))
	scratch := make([]float64, len(acc.traced))
	for k, g := range grid {
		col = col[:0]
		for i := range acc.traced {
			if v := acc.at(i, k); !math.IsNaN(v) {
				col = append(col, v)
			}
		}
		if len(col) < minBandUnits {
			continue
		}
		med, mad := fleetMedianMADInPlace(col, scratch)
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
	for i, ui := range acc.traced {
		u := &b.units[ui]
		if u.Verdict != VerdictPass && u.Verdict != VerdictConditionalPass {
			continue
		}
		var out []float64
		var ranges [][2]float64
		worst, worstAt := 0.0, 0.0
		prev := -2
		for j, k := range kept {
			v := acc.at(i, k)
			if !math.IsNaN(v) && (v < band.LowDB[j] || v > band.HighDB[j]) {
				ex := v - band.HighDB[j]
				if v < band.LowDB[j] {
					ex = v - band.LowDB[j]
				}
				if math.Abs(ex) > math.Abs(worst) {
					worst, worstAt = ex, grid[k]
				}
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
			watch = append(watch, WatchEntry{Serial: u.Serial, FrequenciesHz: out, RangesHz: ranges,
				SpanHz: [2]float64{out[0], out[len(out)-1]}, Points: len(out), WorstExcursionDB: worst, WorstAtHz: worstAt})
		}
	}
	return band, watch
}

// fleetMedianMADInPlace is fleetMedianMAD that sorts x in place and uses
// scratch (at least as long as x) for the deviations.
func fleetMedianMADInPlace(x, scratch []float64) (median, mad float64) {
	sort.Float64s(x)
	med := sortedMedian(x)
	dev := scratch[:len(x)]
	for i, v := range x {
		dev[i] = math.Abs(v - med)
	}
	sort.Float64s(dev)
	return med, sortedMedian(dev)
}

// sortedMedian is the median of sorted values (NaN for none); for an even
// count the mean of the two middle values.
func sortedMedian(s []float64) float64 {
	n := len(s)
	if n == 0 {
		return math.NaN()
	}
	if n%2 == 1 {
		return s[n/2]
	}
	return (s[n/2-1] + s[n/2]) / 2
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
	return sortedMedian(s)
}

// fleetTestBefore orders two starts: known starts as instants, before
// unknown (zero) ones.
func fleetTestBefore(a, b time.Time) bool {
	if a.IsZero() || b.IsZero() {
		return !a.IsZero() && b.IsZero()
	}
	return a.Before(b)
}

// maxBandGridPoints bounds the golden band's grid: the builder keeps every
// traced unit's trace on it (4 bytes a point), so that a product whose
// traces have the most points a trace may have (ingest.MaxTracePoints,
// 100,001) would take 400 kB a unit, 4 GB at 10,000 units. 1,601 points,
// the most of a usual acceptance sweep (general knowledge), keep such
// grids as they are and 10,000 units within 64 MB.
const maxBandGridPoints = 1601

// bandGrid is the golden band's grid for a product whose first traced
// unit has the frequencies fs: fs itself up to maxBandGridPoints, else
// every k-th frequency of fs (k the smallest that gives no more than
// maxBandGridPoints), with the last frequency kept, so that the band spans
// the trace.
func bandGrid(fs []float64) []float64 {
	if len(fs) <= maxBandGridPoints {
		return append([]float64(nil), fs...)
	}
	step := (len(fs) - 1 + maxBandGridPoints - 2) / (maxBandGridPoints - 1)
	grid := make([]float64, 0, maxBandGridPoints)
	for k := 0; k < len(fs)-1; k += step {
		grid = append(grid, fs[k])
	}
	return append(grid, fs[len(fs)-1])
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
