package render

import (
	"fmt"
	"math"
	"sort"

	"gtpack.example/gtpack/reduce"
)

// FleetWorkbook returns fleet.xlsx: Units (verdict and worst margin per
// limit of every unit, then its runs, first verdict and its report's issue
// state, revision and number), Products (verdict counts), Limits (yield, mean,
// standard deviation, Cpk), Control chart (the individuals chart data, with
// a chart per product and limit), Outliers, Watch and Band (the golden band
// per frequency, with a chart per product).
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
	limits := b.addSheet("Limits")
	chart := b.addSheet("Control chart")
	outliers := b.addSheet("Outliers")
	watch := b.addSheet("Watch")
	band := b.addSheet("Band")

	writeFleetUnits(b, units, f, issueOf)
	writeFleetProducts(b, products, f)
	writeFleetLimits(b, limits, f)
	writeControlChart(b, chart, f)
	writeOutliers(b, outliers, f)
	writeWatch(b, watch, f)
	writeBand(b, band, f)
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
	cols := []xlColumn{{"Serial", "", 18}, {"Product", "", 16}, {"Started", "", 21}, {"Verdict", "", 16}}
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
		values = append(values[:0], u.Serial, u.Product, u.Started, u.Verdict)
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
		values = append(values, runs, fi.FirstVerdict, fi.State, revision, fi.ReportNumber)
		t.rows = append(t.rows, bulkRow(styles, values...))
	}
	b.addBulk(sheet, t)
	if len(f.Units) > 0 {
		b.verdictRules(sheet, fmt.Sprintf("D2:D%d", len(f.Units)+1))
		first := b.colName(len(cols) - len(fleetIssueColumns) + 2)
		b.verdictRules(sheet, fmt.Sprintf("%s2:%s%d", first, first, len(f.Units)+1))
	}
}

// verdictColumns are the verdicts of the Products sheet: the known ones in
// order, then any other found, sorted.
func verdictColumns(f *reduce.Fleet) []string {
	var vs []string
	known := map[string]bool{}
	for _, vc := range verdictColours {
		vs = append(vs, vc.verdict)
		known[vc.verdict] = true
	}
	var other []string
	for _, p := range f.Products {
		for v := range p.VerdictCounts {
			if !known[v] {
				known[v] = true
				other = append(other, v)
			}
		}
	}
	sort.Strings(other)
	return append(vs, other...)
}

func writeFleetProducts(b *xlBook, sheet string, f *reduce.Fleet) {
	vs := verdictColumns(f)
	cols := []xlColumn{{"Product", "", 18}, {"Units", nfInt, 8}}
	for _, v := range vs {
		cols = append(cols, xlColumn{v, nfInt, 16})
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
// limit as one table, and a line chart of each block with two points or
// more beside it.
func writeControlChart(b *xlBook, sheet string, f *reduce.Fleet) {
	cols := []xlColumn{
		{"Product", "", 16}, {"Limit", "", 22}, {"Order", nfInt, 6}, {"Serial", "", 18}, {"Started", "", 21},
		{"Worst margin (dB)", nfDB, 12}, {"Centre (dB)", nfDB, 10}, {"Upper (dB)", nfDB, 10}, {"Lower (dB)", nfDB, 10},
		{"Beyond limits", "", 9},
	}
	b.table(sheet, 1, cols, true)
	styles := b.columnStyles(cols)
	t := &bulkSheet{first: 2, width: len(cols)}
	defer b.addBulk(sheet, t)
	r := 2
	charts := 0
	for _, p := range f.Products {
		for _, l := range p.Limits {
			c := &l.Chart
			beyond := map[int]bool{}
			for _, i := range c.Beyond {
				beyond[i] = true
			}
			first := r
			for i, v := range c.ValuesDB {
				var serial, started, flag any
				if i < len(c.Serials) {
					serial = c.Serials[i]
				}
				if i < len(c.Started) {
					started = c.Started[i]
				}
				if beyond[i] {
					flag = "yes"
				}
				t.rows = append(t.rows, bulkRow(styles, p.Product, l.Name, i+1, serial, started, v, c.CentreDB, c.UpperDB, c.LowerDB, flag))
				r++
			}
			if r-first >= 2 {
				var series []chartSeries
				for col := 6; col <= 9; col++ {
					series = append(series, chartSeries{name: b.ref(sheet, col, 1, 1), values: b.ref(sheet, col, first, r-1), dash: col > 6})
				}
				b.lineChart(sheet, b.cellName(12, 2+charts*22), fmt.Sprintf("%s: %s, worst margin in test order", p.Product, l.Name),
					"Test order", "Worst margin (dB)", b.ref(sheet, 3, first, r-1), chartX{points: r - first, format: "0"}, series)
				charts++
			}
		}
	}
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
