package render

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"time"

	"gtpack.example/gtpack/reduce"
)

// FleetWorkbook returns fleet.xlsx: Units (verdict and worst margin per
// limit of every unit, then its runs, first verdict and its report's issue
// state, revision and number), Products (verdict counts), Monthly yield
// (first-pass and final yield per product and month, with a chart per
// product), Limits (yield, mean, standard deviation, Cpk), Control chart
// (the individuals chart data, with a chart per product and limit against
// the run date), Outliers, Watch, Band (the golden band per frequency, with
// a chart per product) and one sheet per station and reference antenna
// (the range check run by run, with its chart). Times are date cells.
func FleetWorkbook(f *reduce.Fleet) ([]byte, error) {
	return fleetWorkbook(f, fleetIssueOf)
}

func fleetWorkbook(f *reduce.Fleet, issueOf func(*reduce.FleetUnit) fleetIssue) ([]byte, error) {
	if f == nil {
		return nil, fmt.Errorf("render: FleetWorkbook of a nil fleet")
	}
	b := newXLBook("G/T fleet workbook", "Fleet statistics over the acceptance runs", workbookEpoch)
	units := b.addSheet("Units")
	products := b.addSheet("Products")
	months := b.addSheet("Monthly yield")
	limits := b.addSheet("Limits")
	chart := b.addSheet("Control chart")
	outliers := b.addSheet("Outliers")
	watch := b.addSheet("Watch")
	band := b.addSheet("Band")

	writeFleetUnits(b, units, f, issueOf)
	writeFleetProducts(b, products, f)
	writeMonthlyYield(b, months, f)
	writeFleetLimits(b, limits, f)
	writeControlChart(b, chart, f)
	writeOutliers(b, outliers, f)
	writeWatch(b, watch, f)
	writeBand(b, band, f)
	for _, st := range f.Stations {
		writeStation(b, b.addSheet("Range "+st.Station+" "+st.Reference), st)
	}
	b.setDimensions()
	return b.bytes()
}

// fleetLimitNames lists the limit names of a fleet: those with statistics
// first, in the order reduce gave them, then any other found in the units.
func fleetLimitNames(f *reduce.Fleet) []string {
	var names []string
	seen := map[string]bool{}
	add := func(n string) {
		if !seen[n] {
			seen[n] = true
			names = append(names, n)
		}
	}
	for _, p := range f.Products {
		for _, l := range p.Limits {
			add(l.Name)
		}
	}
	for _, u := range f.Units {
		for _, l := range u.Limits {
			add(l.Name)
		}
	}
	return names
}

// worstMargin is a unit's smallest finite margin over the beams of a limit
// (NaN when it has none): reduce.FleetUnitLimit.WorstMarginDB.
func worstMargin(u *reduce.FleetUnit, name string) float64 {
	for _, l := range u.Limits {
		if l.Name == name {
			return l.WorstMarginDB
		}
	}
	return math.NaN()
}

// The Units, Control chart and Watch sheets grow with the number of units
// (three limits of 10,000 units are 300,000 cells of control chart data):
// their rows are bulk rows, written into the sheet when the workbook is
// saved, as the unit workbook's frequency tables are, with numbers at
// fleet.json's rounding (appendJSONFloat). Only the headers, panes, rules
// and charts go through excelize.

// fleetIssueColumns close the Units sheet, after the limits' columns.
var fleetIssueColumns = []xlColumn{{"Runs", nfInt, 7}, {"First verdict", "", 16}, {"Issue state", "", 12}, {"Revision", nfInt, 9}, {"Report number", "", 30}}

func writeFleetUnits(b *xlBook, sheet string, f *reduce.Fleet, issueOf func(*reduce.FleetUnit) fleetIssue) {
	names := fleetLimitNames(f)
	cols := []xlColumn{{"Serial", "", 18}, {"Product", "", 16}, {"Started (UTC)", nfDate, 17}, {"Verdict", "", 16}}
	for _, n := range names {
		cols = append(cols, xlColumn{n + " worst margin (dB)", nfDB, 16})
	}
	cols = append(cols, fleetIssueColumns...)
	b.table(sheet, 1, cols, true)
	styles := b.columnStyles(cols)
	t := &bulkSheet{first: 2, width: len(cols), rows: make([][]bulkCell, 0, len(f.Units))}
	values := make([]any, len(cols))
	for i := range f.Units {
		u := &f.Units[i]
		values = append(values[:0], u.Serial, u.Product, timeCell(u.Started), string(u.Verdict))
		for _, n := range names {
			values = append(values, worstMargin(u, n))
		}
		fi := issueOf(u)
		var runs, revision any // empty cells when not known
		if fi.Runs > 0 {
			runs = fi.Runs
		}
		if fi.Revision > 0 {
			revision = fi.Revision
		}
		values = append(values, runs, string(fi.FirstVerdict), string(fi.State), revision, fi.ReportNumber)
		t.rows = append(t.rows, bulkRow(styles, values...))
	}
	b.addBulk(sheet, t)
	if len(f.Units) > 0 {
		for _, header := range []string{"Verdict", "First verdict"} {
			c := b.colName(1 + slices.IndexFunc(cols, func(c xlColumn) bool { return c.header == header }))
			b.verdictRules(sheet, fmt.Sprintf("%s2:%s%d", c, c, len(f.Units)+1))
		}
	}
}

// verdictColumns are the verdicts of the Products sheet: the known ones in
// order, then any other found, sorted.
func verdictColumns(f *reduce.Fleet) []reduce.Verdict {
	var vs []reduce.Verdict
	known := map[reduce.Verdict]bool{}
	for _, vc := range verdictColours {
		vs = append(vs, vc.verdict)
		known[vc.verdict] = true
	}
	var other []reduce.Verdict
	for _, p := range f.Products {
		for v := range p.VerdictCounts {
			if !known[v] {
				known[v] = true
				other = append(other, v)
			}
		}
	}
	sort.Slice(other, func(i, j int) bool { return other[i] < other[j] })
	return append(vs, other...)
}

func writeFleetProducts(b *xlBook, sheet string, f *reduce.Fleet) {
	vs := verdictColumns(f)
	cols := []xlColumn{{"Product", "", 18}, {"Units", nfInt, 8}}
	for _, v := range vs {
		cols = append(cols, xlColumn{string(v), nfInt, 16})
	}
	b.table(sheet, 1, cols, true)
	for i, p := range f.Products {
		r := i + 2
		b.setRow(sheet, r, p.Product, p.Units)
		for j, v := range vs {
			b.set(sheet, 3+j, r, p.VerdictCounts[v])
		}
	}
}

func writeFleetLimits(b *xlBook, sheet string, f *reduce.Fleet) {
	b.table(sheet, 1, []xlColumn{
		{"Product", "", 16}, {"Limit", "", 24}, {"Units", nfInt, 7}, {"Passed", nfInt, 7}, {"Yield", nfPct, 8},
		{"Mean margin (dB)", nfDB, 11}, {"Std margin (dB)", nfDB, 11}, {"Cpk", nfCpk, 7},
		{"Centre (dB)", nfDB, 10}, {"Upper (dB)", nfDB, 10}, {"Lower (dB)", nfDB, 10},
		{"Mean moving range (dB)", nfDB, 12}, {"Points beyond", nfInt, 9}, {"Outliers", nfInt, 9},
	}, true)
	r := 2
	for _, p := range f.Products {
		for _, l := range p.Limits {
			b.setRow(sheet, r, p.Product, l.Name, l.Units, l.Passed, l.Yield, l.MeanMarginDB, l.StdMarginDB, l.Cpk,
				l.Chart.CentreDB, l.Chart.UpperDB, l.Chart.LowerDB, l.Chart.MeanMovingRange, len(l.Chart.Beyond), len(l.Outliers))
			r++
		}
	}
}

// writeControlChart writes the individuals chart data of every product and
// limit, one block after the other: a title row, a header, then per unit in
// test order its serial, run date, worst margin and whether it is beyond
// the limits. Beside each block, its centre line and limits at the first
// and last date, and an XY chart of the block against the run date. Four
// cells a unit rather than ten (product, limit and the three limit values
// on every row took openpyxl most of its 8 s at 10,000 units).
func writeControlChart(b *xlBook, sheet string, f *reduce.Fleet) {
	cols := []xlColumn{{"Serial", "", 18}, {"Started (UTC)", nfDate, 17}, {"Worst margin (dB)", nfDB, 12}, {"Beyond limits", "", 9}}
	side := []xlColumn{{"", "", 3}, {"At (UTC)", nfDate, 17}, {"Centre (dB)", nfDB, 11}, {"Upper (dB)", nfDB, 11}, {"Lower (dB)", nfDB, 11}, {"Limit (dB)", nfDB, 9}}
	b.table(sheet, 1, cols, true)
	for i, h := range side {
		name := b.colName(len(cols) + 1 + i)
		b.check(b.f.SetColWidth(sheet, name, name, h.width))
	}
	styles := b.columnStyles(append(append([]xlColumn(nil), cols...), side...))
	t := &bulkSheet{first: 2, width: len(cols) + len(side)}
	defer b.addBulk(sheet, t)
	charts := 0
	for _, p := range f.Products {
		for _, l := range p.Limits {
			c := &l.Chart
			beyond := map[int]bool{}
			for _, i := range c.Beyond {
				beyond[i] = true
			}
			title := t.first + len(t.rows)
			t.rows = append(t.rows, bulkRow(nil, p.Product+": "+l.Name), bulkRow(nil, "Serial", "Started (UTC)", "Worst margin (dB)", "Beyond limits"))
			first := title + 2
			var lo, hi time.Time
			for i, v := range c.ValuesDB {
				var serial, flag any
				started := at(c.Started, i)
				if i < len(c.Serials) {
					serial = c.Serials[i]
				}
				if beyond[i] {
					flag = "yes"
				}
				if !started.IsZero() {
					if lo.IsZero() || started.Before(lo) {
						lo = started
					}
					if hi.IsZero() || started.After(hi) {
						hi = started
					}
				}
				t.rows = append(t.rows, bulkRow(styles, serial, timeCell(started), v, flag))
			}
			last := t.first + len(t.rows) - 1
			if last-first < 1 || lo.IsZero() {
				continue
			}
			// The lines of the block beside it, two points each (the first
			// and last run date), in the block's header row and first two rows.
			hdr := &t.rows[first-1-t.first]
			*hdr = append(*hdr, bulkRow(nil, nil, "At (UTC)", "Centre (dB)", "Upper (dB)", "Lower (dB)", "Limit (dB)")...)
			for k, at := range []time.Time{lo, hi} {
				row := &t.rows[first+k-t.first]
				*row = append(*row, bulkRow(styles[len(cols):], nil, timeCell(at), c.CentreDB, c.UpperDB, c.LowerDB, 0.0)...)
			}
			x := b.ref(sheet, 6, first, first+1)
			series := []xySeries{{name: b.ref(sheet, 3, first-1, first-1), x: b.ref(sheet, 2, first, last), y: b.ref(sheet, 3, first, last), markers: true}}
			for col := 7; col <= 10; col++ {
				series = append(series, xySeries{name: b.ref(sheet, col, first-1, first-1), x: x, y: b.ref(sheet, col, first, first+1), dash: col == 8 || col == 9})
			}
			b.dateChart(sheet, b.cellName(12, 2+charts*22), fmt.Sprintf("%s: %s, worst margin against the run date", p.Product, l.Name),
				"Run date", "Worst margin (dB)", series)
			charts++
		}
	}
}

// writeMonthlyYield writes each product's months (fleet.json's months)
// and a chart of first-pass and final yield per month.
func writeMonthlyYield(b *xlBook, sheet string, f *reduce.Fleet) {
	cols := []xlColumn{{"Product", "", 16}, {"Month", nfMonth, 9}, {"Units", nfInt, 7}, {"Pass", nfInt, 7}, {"Conditional pass", nfInt, 11},
		{"Conditional fail", nfInt, 11}, {"Fail", nfInt, 7}, {"Incomplete", nfInt, 10}, {"First-pass yield", nfPct, 10}, {"Final yield", nfPct, 10}, {"Retested", nfInt, 9}}
	b.table(sheet, 1, cols, true)
	r := 2
	charts := 0
	for _, p := range f.Products {
		first := r
		for _, m := range p.Months {
			b.set(sheet, 1, r, p.Product)
			b.setMonth(sheet, 2, r, m.Month, nfMonth)
			for j, v := range []any{m.Units, m.VerdictCounts[reduce.VerdictPass], m.VerdictCounts[reduce.VerdictConditionalPass],
				m.VerdictCounts[reduce.VerdictConditionalFail], m.VerdictCounts[reduce.VerdictFail], m.VerdictCounts[reduce.VerdictIncomplete],
				m.FirstPassYield, m.FinalYield, m.Retested} {
				b.set(sheet, 3+j, r, v)
			}
			r++
		}
		if r == first {
			continue
		}
		series := []chartSeries{{name: b.ref(sheet, 9, 1, 1), values: b.ref(sheet, 9, first, r-1)}, {name: b.ref(sheet, 10, 1, 1), values: b.ref(sheet, 10, first, r-1)}}
		b.lineChart(sheet, b.cellName(13, 2+charts*22), p.Product+": first-pass and final yield by month", "Month", "Yield",
			b.ref(sheet, 2, first, r-1), chartX{points: r - first, format: nfMonth}, series)
		charts++
	}
}

// writeStation writes one station and reference antenna's range check
// run by run (fleet.json's stations), its control limits and a chart of
// the range loss against the run date.
func writeStation(b *xlBook, sheet string, st reduce.RangeChart) {
	b.set(sheet, 1, 1, fmt.Sprintf("Range check of %s with %s at %s GHz", st.Station, st.Reference, fmtGHz(st.FrequencyHz)))
	b.check(b.f.SetCellStyle(sheet, "A1", "A1", b.title))
	b.setRow(sheet, 2, "Centre (dB)", st.CentreDB, "Lower control limit (dB)", st.LCLDB, "Upper control limit (dB)", st.UCLDB, "Baseline runs", st.Baseline, "Drift tolerance (dB)", st.DriftToleranceDB)
	cols := []xlColumn{{"Serial", "", 18}, {"Run", "", 30}, {"Started (UTC)", nfDate, 17}, {"Range loss (dB)", nfDB, 12}, {"Pre/post drift (dB)", nfDB, 12}, {"Out of control", "", 10}}
	b.table(sheet, 4, cols, true)
	styles := b.columnStyles(cols)
	out := map[int]bool{}
	for _, i := range st.OutOfControl {
		out[i] = true
	}
	t := &bulkSheet{first: 5, width: len(cols)}
	var lo, hi time.Time
	for i, p := range st.Points {
		var drift any
		if p.DriftDB != nil {
			drift = *p.DriftDB
		}
		var flag any
		if out[i] {
			flag = "yes"
		}
		if !p.Started.IsZero() {
			if lo.IsZero() || p.Started.Before(lo) {
				lo = p.Started
			}
			if hi.IsZero() || p.Started.After(hi) {
				hi = p.Started
			}
		}
		t.rows = append(t.rows, bulkRow(styles, p.Serial, p.Run, timeCell(p.Started), p.RangeLossDB, drift, flag))
	}
	b.addBulk(sheet, t)
	if len(st.Points) < 2 || lo.IsZero() || st.Baseline < 2 {
		return
	}
	// The lines beside the table, two points each (the first and last
	// run date), in its first two rows.
	b.setRow(sheet, 4, nil, nil, nil, nil, nil, nil, nil, "At (UTC)", "Centre (dB)", "Upper control limit (dB)", "Lower control limit (dB)")
	b.check(b.f.SetCellStyle(sheet, "H4", "K4", b.header))
	sideStyles := []int{b.numStyle(nfDate), b.numStyle(nfDB), b.numStyle(nfDB), b.numStyle(nfDB)}
	for k, at := range []time.Time{lo, hi} {
		row := &t.rows[k]
		for len(*row) < len(cols)+1 {
			*row = append(*row, bulkCell{})
		}
		*row = append(*row, bulkRow(sideStyles, timeCell(at), st.CentreDB, st.UCLDB, st.LCLDB)...)
	}
	t.width = 11
	last := 4 + len(st.Points)
	x := b.ref(sheet, 8, 5, 6)
	series := []xySeries{{name: b.ref(sheet, 4, 4, 4), x: b.ref(sheet, 3, 5, last), y: b.ref(sheet, 4, 5, last), markers: true}}
	for col := 9; col <= 11; col++ {
		series = append(series, xySeries{name: b.ref(sheet, col, 4, 4), x: x, y: b.ref(sheet, col, 5, 6), dash: col > 9})
	}
	b.dateChart(sheet, b.cellName(13, 4), fmt.Sprintf("Range loss of %s with %s against the run date", st.Station, st.Reference), "Run date", "Range loss (dB)", series)
}

func writeOutliers(b *xlBook, sheet string, f *reduce.Fleet) {
	b.table(sheet, 1, []xlColumn{
		{"Product", "", 16}, {"Limit", "", 24}, {"Serial", "", 18}, {"Margin (dB)", nfDB, 11}, {"Modified z", nfCpk, 10},
	}, true)
	r := 2
	for _, p := range f.Products {
		for _, l := range p.Limits {
			for _, o := range l.Outliers {
				b.setRow(sheet, r, p.Product, l.Name, o.Serial, o.MarginDB, o.ModifiedZ)
				r++
			}
		}
	}
}

func writeWatch(b *xlBook, sheet string, f *reduce.Fleet) {
	cols := []xlColumn{{"Product", "", 16}, {"Serial", "", 18}, {"Frequency outside the band (GHz)", nfGHz, 18}}
	b.table(sheet, 1, cols, true)
	styles := b.columnStyles(cols)
	t := &bulkSheet{first: 2, width: len(cols)}
	for _, p := range f.Products {
		for _, w := range p.Watch {
			if len(w.FrequenciesHz) == 0 {
				t.rows = append(t.rows, bulkRow(styles, p.Product, w.Serial))
			}
			for _, hz := range w.FrequenciesHz {
				t.rows = append(t.rows, bulkRow(styles, p.Product, w.Serial, frequencyHz(hz)))
			}
		}
	}
	b.addBulk(sheet, t)
}

func writeBand(b *xlBook, sheet string, f *reduce.Fleet) {
	b.table(sheet, 1, []xlColumn{
		{"Product", "", 16}, {"Frequency (GHz)", nfGHz, 14}, {"Median (dB/K)", nfDB, 12},
		{"Low (dB/K)", nfDB, 12}, {"High (dB/K)", nfDB, 12}, {"Units", nfInt, 7},
	}, true)
	r := 2
	charts := 0
	for _, p := range f.Products {
		g := p.Band
		if g == nil || len(g.FrequencyHz) == 0 {
			continue
		}
		first := r
		for k, hz := range g.FrequencyHz {
			b.setRow(sheet, r, p.Product, toGHz(hz), valueAt(g.MedianDB, k), valueAt(g.LowDB, k), valueAt(g.HighDB, k), g.Units)
			r++
		}
		series := []chartSeries{
			{name: b.ref(sheet, 3, 1, 1), values: b.ref(sheet, 3, first, r-1)},
			{name: b.ref(sheet, 4, 1, 1), values: b.ref(sheet, 4, first, r-1), dash: true},
			{name: b.ref(sheet, 5, 1, 1), values: b.ref(sheet, 5, first, r-1), dash: true},
		}
		b.lineChart(sheet, b.cellName(8, 2+charts*22), fmt.Sprintf("%s: boresight G/T band over %d units", p.Product, g.Units),
			"Frequency (GHz)", "G/T (dB/K)", b.ref(sheet, 2, first, r-1), chartX{points: r - first, numeric: true,
				min: bandEdge(g.FrequencyHz, false), max: bandEdge(g.FrequencyHz, true)}, series)
		charts++
	}
}
