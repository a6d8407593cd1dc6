package render

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"html/template"
	"math"
	"slices"
	"sort"
	"strconv"

	"gtpack.example/gtpack/ingest"
	"gtpack.example/gtpack/reduce"
)

// Report renders a unit's acceptance report (units/<serial>/report.html):
// one self-contained HTML file that works offline and prints on A4 or
// Letter. It shows what reduce computed and nothing else.
func Report(u *reduce.Unit) ([]byte, error) {
	if u == nil {
		return nil, errors.New("render: report of a nil unit")
	}
	if _, err := loadPages(); err != nil {
		return nil, err
	}
	v, err := reportModel(u)
	if err != nil {
		return nil, err
	}
	// The embedded CSV and some 48 kB of charts and tables a beam.
	return executeSized("report.tmpl", v, len(v.CSVLink)+len(u.Beams)*48<<10+128<<10)
}

// UnitCSV is the per-frequency numbers of every beam as CSV, the file the
// report embeds for download. It is wide: one row per frequency (the union
// of the beams' grids, in Hz), one column per beam and quantity named
// <beam>_<quantity>, an empty cell where a beam has no point. Range loss
// and drift take one column each when every beam shares them. Values are
// written to 0.001 dB (drift to 0.0001 dB).
func UnitCSV(u *reduce.Unit) []byte {
	b, _ := unitCSV(u)
	return b
}

// csvColumn is a column of the per-frequency CSV: a quantity of a beam,
// or of every beam when shared.
type csvColumn struct {
	name string
	beam int
	q    *beamQuantity
}

func unitCSV(u *reduce.Unit) ([]byte, csvCols) {
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	cols := csvCols{}
	if u == nil {
		return nil, cols
	}
	// Union of the grids.
	set := map[float64]bool{}
	for _, b := range u.Beams {
		for _, f := range b.FrequencyHz {
			if finite(f) {
				set[f] = true
			}
		}
	}
	freqs := make([]float64, 0, len(set))
	for f := range set {
		freqs = append(freqs, f)
	}
	sort.Float64s(freqs)

	shared := sharedRange(u.Beams)
	var columns []csvColumn
	if shared {
		// A shared list that result.json always has (the range loss) has its
		// column even when the beams have no values.
		for i := range beamQuantities {
			q := &beamQuantities[i]
			if q.csv != "" && q.shared && (!q.optional || len(q.get(&u.Beams[0])) > 0) {
				columns = append(columns, csvColumn{q.csv, 0, q})
			}
		}
	}
	for i := range u.Beams {
		for j := range beamQuantities {
			q := &beamQuantities[j]
			if q.csv != "" && !(shared && q.shared) && len(q.get(&u.Beams[i])) > 0 {
				columns = append(columns, csvColumn{u.Beams[i].ID + "_" + q.csv, i, q})
			}
		}
	}
	header := make([]string, 0, len(columns)+1)
	header = append(header, "frequency_hz")
	for i, c := range columns {
		header = append(header, safeCSVText(c.name))
		if _, dup := cols[c.name]; !dup {
			cols[c.name] = i + 1
		}
	}
	_ = w.Write(header)
	w.Flush()

	// Per beam, the index of each frequency on its grid; none for a beam
	// whose grid is the union itself (the usual case), whose index is the
	// row's.
	index := make([]map[float64]int, len(u.Beams))
	for i, b := range u.Beams {
		if slices.Equal(b.FrequencyHz, freqs) {
			continue
		}
		index[i] = make(map[float64]int, len(b.FrequencyHz))
		for k, f := range b.FrequencyHz {
			if _, seen := index[i][f]; !seen {
				index[i][f] = k
			}
		}
	}
	vals := make([][]float64, len(columns))
	for j, c := range columns {
		vals[j] = c.q.get(&u.Beams[c.beam])
	}
	// The rows are numbers, which never need quoting: they are appended
	// as encoding/csv would write them, fields joined by commas, each
	// record ended by a newline. A value takes some 8 bytes.
	out := buf.Bytes()
	out = append(make([]byte, 0, len(out)+len(freqs)*(12+8*len(columns))), out...)
	at := make([]int, len(u.Beams)) // the row's index on each beam's grid, -1: none
	for row, f := range freqs {
		out = strconv.AppendFloat(out, f, 'f', -1, 64)
		for i := range at {
			at[i] = -1
			if index[i] == nil {
				at[i] = row
			} else if k, ok := index[i][f]; ok {
				at[i] = k
			}
		}
		for j, c := range columns {
			out = append(out, ',')
			if k := at[c.beam]; k >= 0 && k < len(vals[j]) && finite(vals[j][k]) {
				out = appendDecimal(out, vals[j][k], c.q.decimals)
			}
		}
		out = append(out, '\n')
	}
	return out, cols
}

// sharedRange is true when every beam has the same grid and the same
// values of every shared quantity (range loss and drift): they come from
// one reference measurement, so a single column holds each.
func sharedRange(beams []reduce.Beam) bool {
	if len(beams) == 0 {
		return false
	}
	eq := func(a, b []float64) bool {
		if len(a) != len(b) {
			return false
		}
		for i := range a {
			if a[i] != b[i] && !(math.IsNaN(a[i]) && math.IsNaN(b[i])) {
				return false
			}
		}
		return true
	}
	b0 := &beams[0]
	for i := range beams[1:] {
		b := &beams[1+i]
		if !eq(b.FrequencyHz, b0.FrequencyHz) {
			return false
		}
		for j := range beamQuantities {
			if q := &beamQuantities[j]; q.shared && !eq(q.get(b), q.get(b0)) {
				return false
			}
		}
	}
	return true
}

// The report's view model.

// endRows is how many input files are printed on the last page with the
// end of the report, so that no last page holds the end line alone.
const endRows = 6

type reportView struct {
	pageAssets
	Version  string
	U        *reduce.Unit
	RuleText string
	Limits   []limitRow
	Worst    *limitRow
	Budget   *budgetView
	Beams    []beamRow
	// Grids lists once each note on what was put on a beam's grid, with
	// the beams it applies to: most notes are the same for every beam.
	Grids     []gridNote
	Projected []projectionRow
	Elements  *reduce.ElementState
	Charts    []chartSpec
	ElemChart *chartSpec
	NotesHTML template.HTML
	CSVLink   template.HTMLAttr // href="data:..." of the CSV
	CSVName   string
	CSVSize   int
	Problems  []problemRow
	// Cautions are the laboratory-safety cautions, in the method section.
	Cautions  string
	InputSize int64
	// Cert is the first page; History the earlier runs, oldest first.
	Cert    *certificate
	History []historyRow
	// InputsHead and InputsTail are the input files, the tail being the
	// last few, printed on one page with the end of the report.
	InputsHead, InputsTail []ingest.InputFile
	// Deviations is set when the method section must point at flags, an
	// expired reference or refused inputs.
	Deviations bool
}

type limitRow struct {
	reduce.LimitResult
	Worst bool
}

type budgetView struct {
	Limit      reduce.LimitResult
	Quantity   string
	FrequencyH float64
	Rows       []budgetRow
	CombinedDB float64
	ExpandedDB float64
	K          float64
}

type budgetRow struct {
	Name, Source, Distribution string
	Divisor, ValueDB, StdDB    float64
}

type gridNote struct {
	Note  string
	Beams []string
}

type beamRow struct {
	reduce.Beam
	Points     int
	FromGHz    float64
	ToGHz      float64
	MinGT      float64
	OtherMaxDB float64
	// OtherMeanDB is the band-mean difference the method tolerance judges.
	OtherMeanDB float64
	HasOther    bool
}

type projectionRow struct {
	Beam string
	reduce.Projection
	MinGT, CentreGT, MaxGT float64
	CentreHz               float64
}

type problemRow struct {
	ingest.Problem
	Text string
}

func reportModel(u *reduce.Unit) (*reportView, error) {
	v := &reportView{pageAssets: inlineAssets(), Version: Version, U: u, Cautions: cautions}
	switch u.DecisionRule {
	case "guarded":
		v.RuleText = "guarded acceptance (ILAC-G8): pass when value − U ≥ limit, fail when value + U < limit, otherwise conditional pass (value ≥ limit) or conditional fail"
	case "simple":
		v.RuleText = "simple acceptance (ILAC-G8): pass when value ≥ limit, else fail"
	default:
		v.RuleText = u.DecisionRule
	}
	worst := -1
	for i, l := range u.Limits {
		v.Limits = append(v.Limits, limitRow{LimitResult: l})
		if finite(l.WorstMarginDB) && (worst < 0 || l.WorstMarginDB < u.Limits[worst].WorstMarginDB) {
			worst = i
		}
	}
	if worst >= 0 {
		v.Limits[worst].Worst = true
		v.Worst = &v.Limits[worst]
		v.Budget = budgetAt(u, u.Limits[worst])
	}
	for _, b := range u.Beams {
		r := beamRow{Beam: b, Points: len(b.FrequencyHz), MinGT: math.NaN()}
		if n := len(b.FrequencyHz); n > 0 {
			r.FromGHz, r.ToGHz = b.FrequencyHz[0], b.FrequencyHz[n-1]
		}
		for _, g := range b.GTdBPerK {
			if finite(g) && (math.IsNaN(r.MinGT) || g < r.MinGT) {
				r.MinGT = g
			}
		}
		if b.OtherForm != nil {
			r.HasOther, r.OtherMaxDB, r.OtherMeanDB = true, b.OtherForm.MaxAbsDifferenceDB, b.OtherForm.MeanDifferenceDB
		}
		v.Beams = append(v.Beams, r)
		for _, note := range b.Interpolated {
			v.Grids = addGridNote(v.Grids, note, b.ID)
		}
		if p := b.Projection; p != nil {
			pr := projectionRow{Beam: b.ID, Projection: *p, MinGT: math.NaN(), MaxGT: math.NaN(), CentreGT: math.NaN(), CentreHz: math.NaN()}
			for _, g := range p.OperatingGTdBPerK {
				if finite(g) {
					if math.IsNaN(pr.MinGT) || g < pr.MinGT {
						pr.MinGT = g
					}
					if math.IsNaN(pr.MaxGT) || g > pr.MaxGT {
						pr.MaxGT = g
					}
				}
			}
			if k := centreIndex(b.FrequencyHz); k >= 0 && k < len(p.OperatingGTdBPerK) {
				pr.CentreGT, pr.CentreHz = p.OperatingGTdBPerK[k], b.FrequencyHz[k]
			}
			v.Projected = append(v.Projected, pr)
		}
	}
	for _, p := range u.Problems {
		p := p
		v.Problems = append(v.Problems, problemRow{Problem: p, Text: p.Error()})
	}
	for _, in := range u.Inputs {
		v.InputSize += in.Size
	}
	cut := max(0, len(u.Inputs)-endRows)
	v.InputsHead, v.InputsTail = u.Inputs[:cut], u.Inputs[cut:]
	notes, err := markdown(u.Notes)
	if err != nil {
		return nil, err
	}
	v.NotesHTML = notes
	if v.Cert, err = certificateOf(u); err != nil {
		return nil, err
	}
	if v.History, err = historyRows(u.History); err != nil {
		return nil, err
	}
	v.Deviations = len(u.Flags) > 0 || len(u.Problems) > 0 || u.Reference.Expired

	data, cols := unitCSV(u)
	v.CSVLink = dataURLAttr("text/csv;charset=utf-8", data)
	v.CSVName = fileName(u.Serial) + "-per-frequency.csv"
	v.CSVSize = len(data)

	focus := 0
	if v.Worst != nil {
		for i, b := range u.Beams {
			if b.ID == v.Worst.Beam {
				focus = i
			}
		}
	}
	if len(u.Beams) > 0 {
		gt, err := gtChart(u, cols, focus)
		if err != nil {
			return nil, err
		}
		v.Charts = append(v.Charts, gt)
	}
	type q struct{ id, title, key, y, unit, caption string }
	for _, c := range []q{
		{"chart-gain", "Gain against frequency", "gain_dbi", "Gain (dBi)", "dBi", "Realized gain of the unit, active gain included (S21 of the unit plus range loss)."},
		{"chart-noise", "Output noise density", "noise_relative_kt0_db", "Noise above kT₀ (dB)", "dB", "Output noise density of each beam above k·T₀ (T₀ = 290 K), after the smoothing stated in the beam table."},
	} {
		spec, ok, err := quantityChart(u, cols, c.id, c.title, c.key, c.y, c.unit, c.caption)
		if err != nil {
			return nil, err
		}
		if ok {
			v.Charts = append(v.Charts, spec)
		}
	}
	if spec, ok, err := rangeChart(u, cols); err != nil {
		return nil, err
	} else if ok {
		v.Charts = append(v.Charts, spec)
	}
	if spec, ok, err := scanChart(u); err != nil {
		return nil, err
	} else if ok {
		v.Charts = append(v.Charts, spec)
	}
	if e := u.Elements; e != nil && e.Rows > 0 && e.Cols > 0 {
		spec, err := elementChart(e)
		if err != nil {
			return nil, err
		}
		v.ElemChart = &spec
		v.Elements = e
	}
	return v, nil
}

// budgetAt is the uncertainty budget of a limit's quantity on its beam at
// the grid point nearest the limit's worst-margin frequency.
func budgetAt(u *reduce.Unit, l reduce.LimitResult) *budgetView {
	for i := range u.Beams {
		b := &u.Beams[i]
		if b.ID != l.Beam {
			continue
		}
		bud := b.GTBudget
		q := "G/T"
		if l.Quantity == reduce.QuantityGain {
			bud, q = b.GainBudget, "gain"
		}
		if len(b.FrequencyHz) == 0 || len(bud.Terms) == 0 {
			return nil
		}
		k := 0
		if finite(l.AtFrequencyHz) {
			k = nearestIndex(b.FrequencyHz, l.AtFrequencyHz) // as the workbook's budgetPoint
		}
		at := func(xs []float64) float64 {
			if k < len(xs) {
				return xs[k]
			}
			return math.NaN()
		}
		bv := &budgetView{Limit: l, Quantity: q, FrequencyH: b.FrequencyHz[k], CombinedDB: at(bud.CombinedDB), ExpandedDB: at(bud.ExpandedDB), K: bud.CoverageK}
		for _, t := range bud.Terms {
			bv.Rows = append(bv.Rows, budgetRow{Name: t.Name, Source: string(t.Source), Distribution: t.Distribution,
				Divisor: t.Divisor, ValueDB: at(t.ValueDB), StdDB: at(t.StandardDB)})
		}
		return bv
	}
	return nil
}

// compile-time use of fmt for the templates' helpers.
var _ = fmt.Sprint

// addGridNote adds beam to the note's beams, or the note with that beam.
func addGridNote(notes []gridNote, note, beam string) []gridNote {
	for i := range notes {
		if notes[i].Note == note {
			notes[i].Beams = append(notes[i].Beams, beam)
			return notes
		}
	}
	return append(notes, gridNote{Note: note, Beams: []string{beam}})
}
