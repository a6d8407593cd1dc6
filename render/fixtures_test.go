package render

import (
	"fmt"
	"math"
	"testing"
	"time"

	"gtpack.example/gtpack/ingest"
	"gtpack.example/gtpack/reduce"
)

// The fixtures below are invented demo data with a plausible shape (a
// Ku-band receive panel): they exercise the renderers, they are not
// measurements. Hostile strings sit in every free-text field a user can
// fill in, so that every renderer is tested against injection.

// hostileSerial, hostileOperator and hostileNotes carry payloads that set
// window.__pwned if they ever run in a browser.
const (
	hostileSerial   = `KP16-<script>window.__pwned=1</script>00017`
	hostileOperator = `AB<img src=x onerror="window.__pwned=2">`
	hostileNotes    = "# Run notes\n\n" +
		"Panel mounted with the *connector down*; absorber cone replaced before the run.\n\n" +
		"- cable `W12` re-torqued\n- ambient logged every 10 min\n\n" +
		"<script>window.__pwned=3</script>\n\n" +
		"<img src=x onerror=\"window.__pwned=4\">\n\n" +
		"[click me](javascript:window.__pwned=5) and " +
		"[a safe link](https://example.org/procedure) and <b>bold?</b>\n"
)

// fixtureUnit builds a realistic reduced unit: beams beams (the first at
// boresight, the others scanned in theta) of points frequency points from
// 10.7 to 12.75 GHz, with budgets, a scan, elements, flags, problems,
// history, a projection on beam 0 and hostile notes.
func fixtureUnit(t testing.TB, beams, points int) *reduce.Unit {
	t.Helper()
	if beams < 1 || points < 2 {
		t.Fatalf("fixtureUnit: need at least 1 beam and 2 points, got %d, %d", beams, points)
	}
	const f0, f1 = 10.7e9, 12.75e9
	freq := make([]float64, points)
	for k := range freq {
		freq[k] = f0 + (f1-f0)*float64(k)/float64(points-1)
	}
	u := &reduce.Unit{
		Serial:       hostileSerial,
		Product:      "KU-PANEL-16",
		Run:          "2026/11/KP16-00017/run-2",
		Started:      mustTime("2026-11-03T09:15:00Z"),
		Verdict:      reduce.VerdictConditionalPass,
		DecisionRule: "guarded",
		SpecTitle:    "Ku-band receive panel, acceptance",
		Station: reduce.StationInfo{
			ID: "range-b", Description: "Compact range, 8-18 GHz feed",
			ReceiverMatch: 0.03, DriftToleranceDB: 0.25, MethodToleranceDB: 0.30,
		},
		Reference: reduce.ReferenceInfo{
			ID: "horn-0042", Description: "Ku-band standard gain horn",
			Certificate: "LAB-26-0211", Calibrated: mustDate("2025-10-10"), Due: mustDate("2026-10-10"),
			GainKind: "realized", Expired: true,
		},
		Operator: hostileOperator,
		AmbientC: 22.8,
		Firmware: "3.4.1",
		Notes:    hostileNotes,
	}
	scanBeams := []reduce.ScanBeam{}
	for b := 0; b < beams; b++ {
		theta := 0.0
		if b > 0 {
			theta = float64((b-1)%6+1) * 10 // 10..60 degrees
		}
		phi := float64(((b - 1) / 6) * 45)
		if b == 0 {
			phi = 0
		}
		scanLoss := 13 * math.Log10(math.Cos(theta*math.Pi/180)) // n = 1.3
		bm := reduce.Beam{
			ID: fmt.Sprintf("b%02d", b), ThetaDeg: theta, PhiDeg: phi, Polarization: "RHCP",
			GTForm: "noise-density",
		}
		n := points
		bm.FrequencyHz = freq
		bm.S21DB = make([]float64, n)
		bm.RangeLossDB = make([]float64, n)
		bm.RangeDriftDB = make([]float64, n)
		bm.GainDBi = make([]float64, n)
		bm.GainExpandedUncertaintyDB = make([]float64, n)
		bm.GTdBPerK = make([]float64, n)
		bm.GTExpandedUncertaintyDB = make([]float64, n)
		bm.NoiseRelativeKT0DB = make([]float64, n)
		other := &reduce.OtherForm{Form: "system-noise-figure", GTdBPerK: make([]float64, n), DifferenceDB: make([]float64, n)}
		for k, f := range freq {
			x := (f - f0) / (f1 - f0)
			ripple := 0.15*math.Sin(2*math.Pi*x*7+float64(b)) + 0.03*math.Sin(float64(k)*1.7+float64(b))
			rl := 52.0 + 1.2*x + 0.05*math.Sin(2*math.Pi*x*3)
			gain := 31.0 + 0.8*x + scanLoss + ripple
			nrel := 3.2 + 0.3*x + 0.04*float64(b%5) + 0.1*math.Sin(2*math.Pi*x*2+float64(b)) + 0.02*math.Cos(float64(k)*2.3)
			bm.RangeLossDB[k] = rl
			bm.S21DB[k] = gain - rl
			bm.RangeDriftDB[k] = 0.05 + 0.02*x
			bm.GainDBi[k] = gain
			bm.GainExpandedUncertaintyDB[k] = 0.42 + 0.03*x
			bm.NoiseRelativeKT0DB[k] = nrel
			bm.GTdBPerK[k] = gain - nrel - 10*math.Log10(290)
			bm.GTExpandedUncertaintyDB[k] = 0.55 + 0.04*x
			other.DifferenceDB[k] = 0.08 * math.Sin(2*math.Pi*x*2)
			other.GTdBPerK[k] = bm.GTdBPerK[k] - other.DifferenceDB[k]
			if math.Abs(other.DifferenceDB[k]) > other.MaxAbsDifferenceDB {
				other.MaxAbsDifferenceDB = math.Abs(other.DifferenceDB[k])
			}
		}
		bm.OtherForm = other
		bm.Noise = []reduce.NoiseStatistics{{
			File: fmt.Sprintf("b%02d-noise.csv", b), Quantity: "noise-density-dbm-hz",
			ScatterDB: 0.021, RadiometerDB: 0.0434, SmoothingPoints: 5,
		}}
		bm.GainBudget = fixtureBudget(n, false)
		bm.GTBudget = fixtureBudget(n, true)
		// U of each quantity is its budget's expanded uncertainty.
		copy(bm.GainExpandedUncertaintyDB, bm.GainBudget.ExpandedDB)
		copy(bm.GTExpandedUncertaintyDB, bm.GTBudget.ExpandedDB)
		if b == 0 {
			bm.Interpolated = []string{"reference gain table (21 points) interpolated onto 801 points"}
			p := &reduce.Projection{
				PassiveGainDBi: 30.2, ChamberAntennaK: 296.0, OperatingAntennaK: 50,
				SystemNoiseK: make([]float64, n), ReceiverNoiseK: make([]float64, n), OperatingGTdBPerK: make([]float64, n),
				Assumptions: "passive gain 30.2 dBi from design data; antenna temperature 50 K in operation",
			}
			for k := range freq {
				gtLin := math.Pow(10, bm.GTdBPerK[k]/10)
				gp := math.Pow(10, 30.2/10)
				p.SystemNoiseK[k] = gp / gtLin
				p.ReceiverNoiseK[k] = p.SystemNoiseK[k] - 296
				p.OperatingGTdBPerK[k] = 10 * math.Log10(gp/(50+p.ReceiverNoiseK[k]))
			}
			bm.Projection = p
		}
		u.Beams = append(u.Beams, bm)
		if b > 0 {
			sl := make([]float64, n)
			for k := range sl {
				sl[k] = u.Beams[b].GTdBPerK[k] - u.Beams[0].GTdBPerK[k]
			}
			law := scanLoss
			scanBeams = append(scanBeams, reduce.ScanBeam{ID: bm.ID, ThetaDeg: theta, ScanLossDB: sl, LawLossDB: &law})
		}
	}
	// Limits: boresight G/T (min), scanned G/T (min) per beam, gain (mean).
	// The limit rises linearly from 2.6 to 3.2 dB/K over the band at
	// boresight (the worst margin falls inside U: a conditional pass
	// under the guarded rule); scanned beams follow the scan law with
	// n = 1.3, 0.6 dB lower.
	for _, bm := range u.Beams {
		name := "G/T scanned"
		off := 13*math.Log10(math.Cos(bm.ThetaDeg*math.Pi/180)) - 0.6
		if bm.ThetaDeg == 0 {
			name = "G/T at boresight"
			off = 0
		}
		limitAt := func(f float64) float64 { return 2.6 + 0.6*(f-f0)/(f1-f0) + off }
		worst, at := math.Inf(1), 0
		for k, v := range bm.GTdBPerK {
			if m := v - limitAt(bm.FrequencyHz[k]); m < worst {
				worst, at = m, k
			}
		}
		verdict := reduce.VerdictPass
		if worst < bm.GTExpandedUncertaintyDB[at] {
			verdict = reduce.VerdictConditionalPass
		}
		u.Limits = append(u.Limits, reduce.LimitResult{
			Name: name, Quantity: "gt", Beam: bm.ID, Statistic: "min",
			WorstMarginDB: worst, AtFrequencyHz: bm.FrequencyHz[at], ValueDB: bm.GTdBPerK[at], LimitDB: limitAt(bm.FrequencyHz[at]),
			ExpandedUncertaintyDB: bm.GTExpandedUncertaintyDB[at], Verdict: verdict,
			LimitCurve: []reduce.LimitVertex{{FrequencyHz: f0, ValueDB: limitAt(f0)}, {FrequencyHz: f1, ValueDB: limitAt(f1)}},
		})
	}
	mean := 0.0
	for _, v := range u.Beams[0].GainDBi {
		mean += v
	}
	mean /= float64(points)
	u.Limits = append(u.Limits, reduce.LimitResult{
		Name: "Gain at boresight", Quantity: "gain", Beam: "b00", Statistic: "mean",
		WorstMarginDB: mean - 29.5, AtFrequencyHz: u.Beams[0].FrequencyHz[points/2], ValueDB: mean, LimitDB: 29.5,
		ExpandedUncertaintyDB: u.Beams[0].GainExpandedUncertaintyDB[points/2], Verdict: reduce.VerdictPass,
		LimitCurve: []reduce.LimitVertex{{FrequencyHz: f0, ValueDB: 29.5}, {FrequencyHz: f1, ValueDB: 29.5}},
	})
	if beams > 1 {
		ns := make([]float64, points)
		for k := range ns {
			ns[k] = 1.3 + 0.01*math.Sin(float64(k)/50)
		}
		u.Scan = &reduce.Scan{FrequencyHz: freq, ExponentN: ns, MeanExponentN: 1.3, Beams: scanBeams}
	}
	u.Elements = fixtureElements(16, 16)
	u.Flags = []reduce.Flag{
		{Kind: "reference-expired", Message: "reference horn-0042 was due 2026-10-10, before the run on 2026-11-03"},
		{Kind: "drift", Beam: "", Message: "range drift 0.07 dB is within the 0.25 dB tolerance"},
		{Kind: "method", Beam: "b03", Message: `noise forms differ by 0.31 dB at 11.2 GHz <script>window.__pwned=6</script>`},
		{Kind: "elements", Message: "2 elements beyond 25 degrees of residual phase"},
	}
	u.Problems = []ingest.Problem{
		{File: "2026/11/KP16-00017/run-2/b07-noise.csv", Line: 17, Message: "frequency 11.2e9 is not above the previous 11.3e9; point skipped"},
		{File: "2026/11/KP16-00017/run-2/notes.md", Line: 0, Message: `file has a byte-order mark <img src=x onerror="window.__pwned=7">`},
	}
	u.History = []reduce.HistoryEntry{
		{Run: "2026/10/KP16-00017/run-1", Started: mustTime("2026-10-28T14:02:00Z"), Verdict: reduce.VerdictFail, WorstMarginDB: math.NaN()},
	}
	inputs := []string{"run.yaml", "ref-pre.s2p", "ref-post.s2p", "elements.csv", "notes.md"}
	for b := 0; b < beams; b++ {
		inputs = append(inputs, fmt.Sprintf("b%02d.s2p", b), fmt.Sprintf("b%02d-noise.csv", b))
	}
	for i, p := range inputs {
		u.Inputs = append(u.Inputs, ingest.InputFile{
			Path: u.Run + "/" + p, Size: int64(1000 + 37*i*points),
			SHA256: fmt.Sprintf("%064x", uint64(i+1)*0x9e3779b97f4a7c15),
		})
	}
	u.Inputs = append(u.Inputs,
		ingest.InputFile{Path: "references/horn-0042.yaml", Size: 912, SHA256: fmt.Sprintf("%064x", uint64(0xabcdef))},
		ingest.InputFile{Path: "specs/KU-PANEL-16.yaml", Size: 640, SHA256: fmt.Sprintf("%064x", uint64(0x123456))},
		ingest.InputFile{Path: "stations/range-b.yaml", Size: 733, SHA256: fmt.Sprintf("%064x", uint64(0x777))},
	)
	return u
}

// fixtureBudget is a GUM budget per point: terms with their divisors
// (normal k=2: 2; rectangular: sqrt 3; U-shaped: sqrt 2; JCGM 100:2008
// 4.3.7 and 4.3.9), combined in quadrature, expanded with k = 2.
func fixtureBudget(n int, gt bool) reduce.Budget {
	type term struct {
		name, source, dist string
		div, value         float64
	}
	terms := []term{
		{"Reference antenna gain", "data", "normal", 2, 0.30},
		{"Range drift (pre/post)", "data", "rectangular", math.Sqrt(3), 0.03},
		{"Mismatch, reference antenna", "data", "u-shaped", math.Sqrt(2), 0.02},
		{"Quiet-zone amplitude ripple", "station", "rectangular", math.Sqrt(3), 0.10},
	}
	if gt {
		terms = append(terms,
			term{"Noise-trace scatter", "data", "normal", 1, 0.021},
			term{"Ambient temperature", "data", "rectangular", math.Sqrt(3), 0.009},
			term{"Noise receiver calibration", "station", "normal", 2, 0.20},
		)
	} else {
		terms = append(terms, term{"Mismatch, antenna under test", "data", "u-shaped", math.Sqrt(2), 0.025})
	}
	bud := reduce.Budget{CoverageK: 2, CombinedDB: make([]float64, n), ExpandedDB: make([]float64, n)}
	for _, tm := range terms {
		bt := reduce.BudgetTerm{Name: tm.name, Source: reduce.TermSource(tm.source), Distribution: tm.dist, Divisor: tm.div,
			ValueDB: make([]float64, n), StandardDB: make([]float64, n)}
		for k := 0; k < n; k++ {
			v := tm.value // a station's figure holds across the band
			if tm.source == "data" {
				v *= 1 + 0.1*float64(k)/float64(n)
			}
			bt.ValueDB[k] = v
			bt.StandardDB[k] = v / tm.div
		}
		bud.Terms = append(bud.Terms, bt)
	}
	for k := 0; k < n; k++ {
		s := 0.0
		for _, bt := range bud.Terms {
			s += bt.StandardDB[k] * bt.StandardDB[k]
		}
		bud.CombinedDB[k] = math.Sqrt(s)
		bud.ExpandedDB[k] = 2 * bud.CombinedDB[k]
	}
	return bud
}

// fixtureElements is a rows x cols element state with two missing
// elements and two outliers.
func fixtureElements(rows, cols int) *reduce.ElementState {
	es := &reduce.ElementState{Rows: rows, Cols: cols, RMSResidualDeg: 6.1, PhaseLossDB: -0.049,
		TaperEfficiency: 0.97, TaperLossDB: -0.13, Flagged: true}
	tol := 5.0
	es.ToleranceDeg = &tol
	for r := 0; r < rows; r++ {
		ph := make([]float64, cols)
		pr := make([]bool, cols)
		for c := 0; c < cols; c++ {
			ph[c] = 4 * math.Sin(float64(r*cols+c)*0.77)
			pr[c] = true
		}
		es.ResidualPhaseDeg = append(es.ResidualPhaseDeg, ph)
		es.Present = append(es.Present, pr)
	}
	es.ResidualPhaseDeg[3][5] = 31.5
	es.ResidualPhaseDeg[12][9] = -27.2
	es.Present[7][7], es.ResidualPhaseDeg[7][7] = false, 0
	es.Present[0][15], es.ResidualPhaseDeg[0][15] = false, 0
	es.Worst = []reduce.ElementOutlier{{Row: 3, Col: 5, ResidualDeg: 31.5}, {Row: 12, Col: 9, ResidualDeg: -27.2}}
	return es
}

// fixtureFleet builds a fleet of two products: one with 24 units (with a
// control chart, outliers, a golden band and a watch list), one with a
// single unit (statistics that need two units stay empty). One serial is
// hostile.
func fixtureFleet(t testing.TB) *reduce.Fleet {
	t.Helper()
	fl, _ := fixtureFleetAndSummaries(t)
	return fl
}

// fixtureFleetAndSummaries is fixtureFleet with the unit summaries its
// units were made from (sorted by serial), as results.csv takes them.
func fixtureFleetAndSummaries(t testing.TB) (*reduce.Fleet, []reduce.UnitSummary) {
	t.Helper()
	const n = 24
	fl := &reduce.Fleet{}
	var sums []reduce.UnitSummary
	verdicts := map[reduce.Verdict]int{}
	margins := make([]float64, n)
	serials := make([]string, n)
	started := make([]time.Time, n)
	for i := 0; i < n; i++ {
		serials[i] = fmt.Sprintf("KP16-%05d", i+1)
		if i == 5 {
			serials[i] = hostileSerial
		}
		started[i] = mustTime(fmt.Sprintf("2026-11-%02dT%02d:00:00Z", 1+i/4, 8+i%4*2))
		margins[i] = 0.9 + 0.35*math.Sin(float64(i)*1.3)
		v := reduce.VerdictPass
		switch {
		case i == 9:
			margins[i] = -0.8
			v = reduce.VerdictFail
		case i == 14:
			margins[i] = 0.2
			v = reduce.VerdictConditionalPass
		case i == 20:
			v = reduce.VerdictIncomplete
		}
		verdicts[v]++
		lr := []reduce.LimitResult{
			{Name: "G/T at boresight", Quantity: "gt", Beam: "b00", Statistic: "min", WorstMarginDB: margins[i],
				AtFrequencyHz: 12.75e9, ValueDB: 2.6 + margins[i], LimitDB: 2.6, ExpandedUncertaintyDB: 0.55, Verdict: v},
			{Name: "Gain at boresight", Quantity: "gain", Beam: "b00", Statistic: "mean", WorstMarginDB: 1.5 + margins[i]/3,
				AtFrequencyHz: 11.725e9, ValueDB: 31 + margins[i]/3, LimitDB: 29.5, ExpandedUncertaintyDB: 0.43, Verdict: reduce.VerdictPass},
		}
		sum := reduce.UnitSummary{Serial: serials[i], Product: "KU-PANEL-16", Started: started[i], Verdict: v, Limits: lr,
			Runs: 1, FirstVerdict: v, IssueState: reduce.IssueDraft, Revision: 1, ReportNumber: "EATL-GT-" + serials[i] + "-R1"}
		switch {
		case i%4 == 0: // every fourth unit issued as R1
			sum.IssueState = reduce.IssueIssued
		case i == 9: // approved as R1, then retested: R1 void, a draft of R2
			sum.IssueState, sum.Revision, sum.ReportNumber = reduce.IssueVoid, 2, "EATL-GT-"+serials[i]+"-R2"
			sum.Runs, sum.FirstVerdict = 2, reduce.VerdictPass
		case i == 14: // failed, retested, issued
			sum.IssueState, sum.Runs, sum.FirstVerdict = reduce.IssueIssued, 3, reduce.VerdictFail
		}
		sums = append(sums, sum)
	}
	sums = append(sums, reduce.UnitSummary{Serial: "XB4-00001", Product: "X-BAND-4", Started: mustTime("2026-11-20T10:00:00Z"),
		Verdict: reduce.VerdictFail, Limits: []reduce.LimitResult{{Name: "G/T at boresight", Quantity: "gt", Beam: "b00",
			Statistic: "min", WorstMarginDB: -0.31, AtFrequencyHz: 8.1e9, ValueDB: -4.31, LimitDB: -4, ExpandedUncertaintyDB: 0.6,
			Verdict: reduce.VerdictFail}}})
	sortUnitSummaries(sums)
	// The units as reduce.FleetBuilder keeps them: one entry per limit name.
	b := reduce.NewFleetBuilder()
	for _, u := range sums {
		if err := b.Add(u); err != nil {
			t.Fatal(err)
		}
	}
	fl.Units = b.Finish().Units

	stats := func(name string, ms []float64) reduce.LimitStats {
		ls := reduce.LimitStats{Name: name, Units: len(ms)}
		mean := 0.0
		for _, m := range ms {
			mean += m
			if m >= 0 {
				ls.Passed++
			}
		}
		mean /= float64(len(ms))
		v, mr := 0.0, 0.0
		for i, m := range ms {
			v += (m - mean) * (m - mean)
			if i > 0 {
				mr += math.Abs(m - ms[i-1])
			}
		}
		sd := math.Sqrt(v / float64(len(ms)-1))
		mr /= float64(len(ms) - 1)
		ls.Yield = float64(ls.Passed) / float64(len(ms))
		ls.Indicative = len(ms) < reduce.MinCapabilityUnits
		ls.MeanMarginDB, ls.StdMarginDB, ls.Cpk = mean, sd, mean/(3*sd)
		ls.Chart = reduce.ControlChart{Serials: serials, Started: started, ValuesDB: ms, CentreDB: mean,
			UpperDB: mean + 2.66*mr, LowerDB: mean - 2.66*mr, MeanMovingRange: mr}
		for i, m := range ms {
			if m > ls.Chart.UpperDB || m < ls.Chart.LowerDB {
				ls.Chart.Beyond = append(ls.Chart.Beyond, i)
			}
		}
		return ls
	}
	gainMs := make([]float64, n)
	for i, m := range margins {
		gainMs[i] = 1.5 + m/3
	}
	gt := stats("G/T at boresight", margins)
	gt.Outliers = []reduce.Outlier{{Serial: serials[9], MarginDB: -0.8, ModifiedZ: -5.2}}
	band := &reduce.GoldenBand{Units: n - 1}
	for k := 0; k < 101; k++ {
		f := 10.7e9 + 2.05e9*float64(k)/100
		med := 3.1 + 0.5*float64(k)/100 + 0.1*math.Sin(float64(k)/7)
		band.FrequencyHz = append(band.FrequencyHz, f)
		band.MedianDB = append(band.MedianDB, med)
		band.LowDB = append(band.LowDB, med-0.6)
		band.HighDB = append(band.HighDB, med+0.6)
	}
	fl.Products = []reduce.ProductFleet{
		{Product: "KU-PANEL-16", Units: n, VerdictCounts: verdicts, Limits: []reduce.LimitStats{gt, stats("Gain at boresight", gainMs)},
			Band: band, Watch: []reduce.WatchEntry{{Serial: serials[3], FrequenciesHz: []float64{12.1e9, 12.2e9, 12.4e9}, RangesHz: [][2]float64{{12.1e9, 12.2e9}, {12.4e9, 12.4e9}},
				SpanHz: [2]float64{12.1e9, 12.4e9}, Points: 3, WorstExcursionDB: -0.42, WorstAtHz: 12.2e9}},
			// Invented demo values: two months of the 24 units.
			FirstPassYield: 21.0 / 23, FinalYield: 22.0 / 23,
			Months: []reduce.MonthYield{
				{Month: "2026-10", Units: 12, VerdictCounts: map[reduce.Verdict]int{reduce.VerdictPass: 11, reduce.VerdictFail: 1}, FirstPassYield: 11.0 / 12, FinalYield: 11.0 / 12, Retested: 1},
				{Month: "2026-11", Units: 12, VerdictCounts: map[reduce.Verdict]int{reduce.VerdictPass: 10, reduce.VerdictConditionalPass: 1, reduce.VerdictIncomplete: 1}, FirstPassYield: 10.0 / 11, FinalYield: 1, Retested: 1},
			}},
		{Product: "X-BAND-4", Units: 1, VerdictCounts: map[reduce.Verdict]int{reduce.VerdictFail: 1},
			Limits: []reduce.LimitStats{{Name: "G/T at boresight", Units: 1, Passed: 0, Yield: 0, MeanMarginDB: -0.31,
				Indicative: true, Chart: reduce.ControlChart{Serials: []string{"XB4-00001"}, Started: []time.Time{mustTime("2026-11-20T10:00:00Z")}, ValuesDB: []float64{-0.31}, CentreDB: -0.31, UpperDB: -0.31, LowerDB: -0.31, TooFew: true}}},
			Watch: nil},
	}
	return fl, sums
}

func sortUnitSummaries(us []reduce.UnitSummary) {
	for i := 1; i < len(us); i++ {
		for j := i; j > 0 && us[j].Serial < us[j-1].Serial; j-- {
			us[j], us[j-1] = us[j-1], us[j]
		}
	}
}

func TestFixtureShape(t *testing.T) {
	u := fixtureUnit(t, 16, 801)
	if len(u.Beams) != 16 || len(u.Beams[15].GTdBPerK) != 801 {
		t.Fatalf("fixture has %d beams of %d points, want 16 x 801", len(u.Beams), len(u.Beams[15].GTdBPerK))
	}
	// GUM (JCGM 100:2008, 5.1.2): u_c is the root sum of squares of the
	// standard uncertainties; U = k u_c with k = 2.
	b := u.Beams[0].GTBudget
	s := 0.0
	for _, tm := range b.Terms {
		s += tm.StandardDB[400] * tm.StandardDB[400]
	}
	if got := b.ExpandedDB[400]; math.Abs(got-2*math.Sqrt(s)) > 1e-12 {
		t.Errorf("expanded U %.6f, want 2*sqrt(sum u_i^2) = %.6f", got, 2*math.Sqrt(s))
	}
	fl := fixtureFleet(t)
	if len(fl.Units) != 25 || len(fl.Products) != 2 {
		t.Fatalf("fleet has %d units, %d products; want 25, 2", len(fl.Units), len(fl.Products))
	}
	for i := 1; i < len(fl.Units); i++ {
		if fl.Units[i].Serial < fl.Units[i-1].Serial {
			t.Errorf("fleet units not sorted by serial at %d", i)
		}
	}
}

// mustTime parses an RFC 3339 time of a test.
func mustTime(s string) time.Time {
	t, err := time.Parse(time.RFC3339, s)
	if err != nil {
		panic(err)
	}
	return t
}

// mustDate parses a date YYYY-MM-DD of a test.
func mustDate(s string) time.Time {
	t, err := time.Parse(time.DateOnly, s)
	if err != nil {
		panic(err)
	}
	return t
}
