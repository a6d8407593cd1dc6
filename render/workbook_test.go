package render

import (
	"archive/zip"
	"bytes"
	"encoding/json"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"
	"unicode/utf8"

	"gtpack.example/gtpack/reduce"
)

// The workbook tests read the files back with an independent reader:
// Debian's python3-openpyxl at /usr/bin/python3. openpyxl 3.x loads the
// charts of a drawing into ws._charts, so the charts are checked through
// it as well.

const openpyxlDump = `
import json, sys
import openpyxl
wb = openpyxl.load_workbook(sys.argv[1])
out = {"sheets": [], "props": {}}
p = wb.properties
out["props"] = {"title": p.title, "creator": p.creator,
    "created": p.created.isoformat() if p.created else None,
    "modified": p.modified.isoformat() if p.modified else None}
for ws in wb.worksheets:
    rows, fmts = [], []
    for row in ws.iter_rows():
        rows.append([c.value for c in row])
        fmts.append([c.number_format for c in row])
    charts = []
    for ch in ws._charts:
        ser = []
        for s in ch.series:
            tx = s.tx.strRef.f if s.tx is not None and s.tx.strRef is not None else None
            # An XY chart's series has x and y values where a line chart's
            # has categories and values.
            v, c = (s.yVal, s.xVal) if type(ch).__name__ == "ScatterChart" else (s.val, s.cat)
            val = v.numRef.f if v is not None and v.numRef is not None else None
            cat = None
            if c is not None:
                cat = c.numRef.f if c.numRef is not None else (c.strRef.f if c.strRef is not None else None)
            ser.append({"tx": tx, "val": val, "cat": cat, "catnum": c is not None and c.numRef is not None})
        x = ch.x_axis
        charts.append({"type": type(ch).__name__, "series": ser,
            "xmin": x.scaling.min, "xmax": x.scaling.max, "xlabels": x.tickLblPos})
    cfs = []
    for cf in ws.conditional_formatting:
        rules = []
        for r in cf.rules:
            fill = None
            if r.dxf is not None and r.dxf.fill is not None:
                f = r.dxf.fill
                fill = (f.bgColor.rgb if f.bgColor is not None else None) or (f.fgColor.rgb if f.fgColor is not None else None)
            rules.append({"type": r.type, "operator": r.operator, "formula": list(r.formula), "fill": fill})
        cfs.append({"range": str(cf.sqref), "rules": rules})
    widths = [[d.min, d.max, d.width] for d in ws.column_dimensions.values() if d.customWidth]
    out["sheets"].append({"title": ws.title, "rows": rows, "formats": fmts, "charts": charts,
        "freeze": ws.freeze_panes, "cf": cfs, "widths": widths})
# Read-only mode trusts each sheet's dimension: it must read the same rows.
ro = openpyxl.load_workbook(sys.argv[1], read_only=True)
out["readonly"] = {ws.title: sum(1 for _ in ws.iter_rows(values_only=True)) for ws in ro.worksheets}
ro.close()
# A date cell reads back as a datetime: "date:" and its ISO form.
def dates(o):
    if hasattr(o, "isoformat"):
        return "date:" + o.isoformat()
    raise TypeError(type(o))
with open(sys.argv[2], "w") as fh:
    json.dump(out, fh, default=dates)
`

type xlDump struct {
	Props struct {
		Title, Creator, Created, Modified string
	}
	Sheets []xlDumpSheet
	// ReadOnly is the number of rows of each sheet in openpyxl's
	// read-only mode, which reads as far as the dimension says.
	ReadOnly map[string]int
}

// xlDateText is how the dump shows a date cell of an RFC 3339 time.
func xlDateText(t *testing.T, tm time.Time) string {
	t.Helper()
	if tm.IsZero() {
		t.Fatal("no time")
	}
	return "date:" + tm.UTC().Format("2006-01-02T15:04:05")
}

type xlDumpSheet struct {
	Title   string
	Rows    [][]any
	Formats [][]string
	Charts  []struct {
		Type   string
		Series []struct {
			Tx, Val, Cat string
			CatNum       bool // the categories (x values) are referred to as numbers
		}
		XMin, XMax *float64 // the horizontal axis's fixed ends, if any
		XLabels    string   // where its labels stand
	}
	Freeze *string
	Widths [][3]float64 // min and max column, width
	CF     []struct {
		Range string
		Rules []struct {
			Type, Operator string
			Formula        []string
			Fill           string
		}
	}
}

func (d *xlDump) sheet(t *testing.T, title string) *xlDumpSheet {
	t.Helper()
	for i := range d.Sheets {
		if d.Sheets[i].Title == title {
			return &d.Sheets[i]
		}
	}
	t.Fatalf("workbook has no sheet %q", title)
	return nil
}

// cell returns the value at a 1-based row and column, nil when absent.
func (s *xlDumpSheet) cell(row, col int) any {
	if row-1 >= len(s.Rows) || col-1 >= len(s.Rows[row-1]) {
		return nil
	}
	return s.Rows[row-1][col-1]
}

func (s *xlDumpSheet) format(row, col int) string {
	if row-1 >= len(s.Formats) || col-1 >= len(s.Formats[row-1]) {
		return ""
	}
	return s.Formats[row-1][col-1]
}

// readWorkbook writes data to a temporary file and reads it with openpyxl.
func readWorkbook(t *testing.T, data []byte) *xlDump {
	t.Helper()
	const python = "/usr/bin/python3"
	if err := exec.Command(python, "-c", "import openpyxl").Run(); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("python3-openpyxl is required in CI: %v", err)
		}
		t.Skipf("python3-openpyxl not available at %s: %v", python, err)
	}
	dir := t.TempDir()
	in, out := filepath.Join(dir, "book.xlsx"), filepath.Join(dir, "dump.json")
	if err := os.WriteFile(in, data, 0o644); err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(python, "-c", openpyxlDump, in, out)
	if msg, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("openpyxl could not read the workbook: %v\n%s", err, msg)
	}
	raw, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	d := new(xlDump)
	if err := json.Unmarshal(raw, d); err != nil {
		t.Fatal(err)
	}
	return d
}

// sameNumber says whether a cell holds want to 15 significant digits (the
// precision of a spreadsheet number, general knowledge): the fleet
// workbook's numbers, and the whole numbers of the unit workbook.
func sameNumber(got any, want float64) bool {
	g, ok := got.(float64)
	if !ok {
		return false
	}
	return math.Abs(g-want) <= 1e-12*math.Max(1, math.Abs(want))
}

// sameResult says whether a unit workbook cell holds want, a value as
// result.json holds it (asResult): the cell is written at the rounding of
// result.json, so it is that number, up to 1e-9 (a thousandth of the 1e-6
// step), which no unrounded value meets by chance.
func sameResult(got any, want float64) bool {
	g, ok := got.(float64)
	return ok && math.Abs(g-want) <= 1e-9
}

// asResult is the unit as result.json holds it: encoded by ResultJSON and
// read back by ParseResultJSON (the round trip `gtpack index` makes).
func asResult(t *testing.T, u *reduce.Unit) *reduce.Unit {
	t.Helper()
	data, err := ResultJSON(u)
	if err != nil {
		t.Fatal(err)
	}
	ru, err := ParseResultJSON(data)
	if err != nil {
		t.Fatal(err)
	}
	return ru
}

// round6 rounds v half away from zero to 1e-6 (general knowledge), for the
// values a cell holds that result.json leaves out (a budget term's stated
// value, a limit evaluated on the grid).
func round6(v float64) float64 { return math.Round(v*1e6) / 1e6 }

// onMicroGrid says whether the cell holds a whole number of 1e-6 within
// 0.5e-6 of want: want rounded to the precision of result.json, without
// deciding a near tie for it.
func onMicroGrid(got any, want float64) bool {
	g, ok := got.(float64)
	return ok && math.Abs(g-want) <= 0.5e-6+1e-12 && math.Abs(g*1e6-math.Round(g*1e6)) < 1e-6
}

// workbookUnit is the shared fixture with limit curves (one covering only
// the middle of the band, so that cells outside it stay empty) and beam ids
// that are not valid sheet names as they stand.
func workbookUnit(t *testing.T) *reduce.Unit {
	u := fixtureUnit(t, 5, 401)
	rename := map[string]string{
		"b02": "b-1",
		"b03": "b:1",
		"b04": "a/very*long?beam[identifier]that's-over-31",
	}
	for i := range u.Beams {
		if n, ok := rename[u.Beams[i].ID]; ok {
			u.Beams[i].ID = n
		}
	}
	for i := range u.Limits {
		if n, ok := rename[u.Limits[i].Beam]; ok {
			u.Limits[i].Beam = n
		}
	}
	for _, l := range u.Limits {
		if l.Quantity != "gt" {
			continue
		}
		for i := range u.Beams {
			bm := &u.Beams[i]
			if bm.ID != l.Beam {
				continue
			}
			start, n := 0, len(bm.FrequencyHz)
			if i == 1 {
				start, n = 100, 200
			}
			c := reduce.LimitCurve{Name: l.Name, Quantity: "gt", Start: start, LimitDB: make([]float64, n)}
			for k := range c.LimitDB {
				c.LimitDB[k] = l.LimitDB + 0.001*float64(k) // a sloped limit, so that the margin varies
			}
			bm.LimitCurves = append(bm.LimitCurves, c)
		}
	}
	return u
}

func TestUnitWorkbookReadBack(t *testing.T) {
	u := workbookUnit(t)
	data, err := UnitWorkbook(u)
	if err != nil {
		t.Fatal(err)
	}
	d := readWorkbook(t, data)
	ru := asResult(t, u)

	wantSheets := []string{"Summary", "Beam b00", "Beam b01", "Beam b-1", "Beam b-1 (2)",
		"Beam a_very_long_beam(identifie", "Limits", "Uncertainty", "Flags", "Inputs"}
	var got []string
	for _, s := range d.Sheets {
		got = append(got, s.Title)
	}
	if !reflect.DeepEqual(got, wantSheets) {
		t.Fatalf("sheets %q, want %q", got, wantSheets)
	}

	if d.Props.Creator != "gtpack" || d.Props.Title != "G/T acceptance workbook, unit "+u.Serial {
		t.Errorf("properties creator %q title %q", d.Props.Creator, d.Props.Title)
	}
	if d.Props.Created != "2026-11-03T09:15:00" || d.Props.Modified != "2026-11-03T09:15:00" {
		t.Errorf("created %q modified %q, want the run's start 2026-11-03T09:15:00", d.Props.Created, d.Props.Modified)
	}

	t.Run("summary", func(t *testing.T) {
		s := d.sheet(t, "Summary")
		for i, kv := range summaryFields(ru) {
			r := i + 2
			if s.cell(r, 1) != kv[0] {
				t.Errorf("A%d = %v, want %v", r, s.cell(r, 1), kv[0])
			}
			switch want := kv[1].(type) {
			case float64:
				if !sameResult(s.cell(r, 2), want) || s.format(r, 2) != "0.0" {
					t.Errorf("B%d = %v (%s), want %v (0.0)", r, s.cell(r, 2), s.format(r, 2), want)
				}
			case int:
				if s.cell(r, 2) != float64(want) || s.format(r, 2) != "0" {
					t.Errorf("B%d = %v (%s), want %d (0)", r, s.cell(r, 2), s.format(r, 2), want)
				}
			case string:
				if got := s.cell(r, 2); !(got == want || want == "" && got == nil) {
					t.Errorf("B%d = %v, want %q", r, got, want)
				}
			case nil:
				if got := s.cell(r, 2); got != nil {
					t.Errorf("B%d = %v, want an empty cell", r, got)
				}
			}
		}
		hr := findRow(s, 1, "Limit")
		if hr < 0 {
			t.Fatal("Summary has no limits table")
		}
		for i, l := range ru.Limits {
			r := hr + 1 + i
			if s.cell(r, 1) != l.Name || s.cell(r, 2) != l.Beam || s.cell(r, 6) != string(l.Verdict) {
				t.Errorf("limit row %d: %v %v %v, want %s %s %s", r, s.cell(r, 1), s.cell(r, 2), s.cell(r, 6), l.Name, l.Beam, l.Verdict)
			}
			for _, c := range []struct {
				col    int
				want   float64
				format string
			}{{3, l.WorstMarginDB, "0.000"}, {4, l.AtFrequencyHz / 1e9, "0.000000"}, {5, l.ExpandedUncertaintyDB, "0.000"}} {
				if !sameResult(s.cell(r, c.col), c.want) || s.format(r, c.col) != c.format {
					t.Errorf("limit row %d col %d = %v (%s), want %v (%s)", r, c.col, s.cell(r, c.col), s.format(r, c.col), c.want, c.format)
				}
			}
		}
		if len(s.Charts) != 1 || s.Charts[0].Type != "ScatterChart" || len(s.Charts[0].Series) != len(u.Beams) {
			t.Fatalf("Summary charts %+v, want one line chart of %d series", s.Charts, len(u.Beams))
		}
		if s.Charts[0].Series[4].Val != "'Beam a_very_long_beam(identifie'!$G$2:$G$402" {
			t.Errorf("Summary series 5 values %q", s.Charts[0].Series[4].Val)
		}
		checkVerdictRules(t, s, "B7")
	})

	for i := range u.Beams {
		s := d.sheet(t, wantSheets[1+i])
		t.Run(s.Title, func(t *testing.T) { checkBeamSheet(t, s, &u.Beams[i], &ru.Beams[i]) })
	}

	t.Run("limits", func(t *testing.T) {
		s := d.sheet(t, "Limits")
		if len(s.Rows) != len(u.Limits)+1 {
			t.Fatalf("%d rows, want %d", len(s.Rows), len(u.Limits)+1)
		}
		for i, l := range ru.Limits {
			r := i + 2
			texts := []string{l.Name, string(l.Quantity), l.Beam, l.Statistic}
			for c, w := range texts {
				if s.cell(r, c+1) != w {
					t.Errorf("row %d col %d = %v, want %q", r, c+1, s.cell(r, c+1), w)
				}
			}
			nums := []float64{l.WorstMarginDB, l.AtFrequencyHz / 1e9, l.ValueDB, l.LimitDB, l.ExpandedUncertaintyDB}
			for c, w := range nums {
				if !sameResult(s.cell(r, c+5), w) {
					t.Errorf("row %d col %d = %v, want %v", r, c+5, s.cell(r, c+5), w)
				}
			}
			if s.cell(r, 10) != string(l.Verdict) {
				t.Errorf("row %d verdict %v, want %s", r, s.cell(r, 10), l.Verdict)
			}
		}
		checkVerdictRules(t, s, "J2:J7")
		if s.Freeze == nil || *s.Freeze != "A2" {
			t.Errorf("Limits frozen at %v, want A2", s.Freeze)
		}
	})

	t.Run("uncertainty", func(t *testing.T) {
		s := d.sheet(t, "Uncertainty")
		// Beam b00: its G/T limit's worst margin is at AtFrequencyHz, a grid point.
		var l reduce.LimitResult
		for _, x := range u.Limits {
			if x.Beam == "b00" && x.Quantity == "gt" {
				l = x
			}
		}
		bm := &u.Beams[0]
		k := nearestIndex(bm.FrequencyHz, l.AtFrequencyHz)
		if bm.FrequencyHz[k] != l.AtFrequencyHz {
			t.Fatalf("fixture's worst frequency %g is not on the grid", l.AtFrequencyHz)
		}
		bud, rbud := bm.GTBudget, ru.Beams[0].GTBudget
		atHz := ru.Beams[0].FrequencyHz[k]
		var rows []int
		for r := 2; r <= len(s.Rows); r++ {
			if s.cell(r, 1) == "b00" && s.cell(r, 2) == "G/T" {
				rows = append(rows, r)
			}
		}
		if len(rows) != len(bud.Terms)+2 {
			t.Fatalf("%d G/T budget rows of b00, want %d terms + combined + expanded", len(rows), len(bud.Terms))
		}
		sumSq := 0.0
		for i, tm := range bud.Terms {
			r := rows[i]
			if s.cell(r, 5) != tm.Name || s.cell(r, 6) != string(tm.Source) || s.cell(r, 7) != tm.Distribution {
				t.Errorf("row %d: %v %v %v, want %s %s %s", r, s.cell(r, 5), s.cell(r, 6), s.cell(r, 7), tm.Name, tm.Source, tm.Distribution)
			}
			// result.json holds the divisor and u; the stated value it
			// leaves out, so the cell is that value rounded to 1e-6.
			rt := rbud.Terms[i]
			if !sameResult(s.cell(r, 3), atHz/1e9) || !sameResult(s.cell(r, 8), rt.Divisor) ||
				!sameResult(s.cell(r, 9), round6(tm.ValueDB[k])) || !sameResult(s.cell(r, 10), rt.StandardDB[k]) {
				t.Errorf("row %d: %v GHz, divisor %v, value %v, u %v; want %v, %v, %v, %v", r, s.cell(r, 3), s.cell(r, 8),
					s.cell(r, 9), s.cell(r, 10), atHz/1e9, rt.Divisor, round6(tm.ValueDB[k]), rt.StandardDB[k])
			}
			uc, _ := s.cell(r, 10).(float64)
			sumSq += uc * uc
		}
		rc, re := rows[len(rows)-2], rows[len(rows)-1]
		if !sameResult(s.cell(rc, 10), rbud.CombinedDB[k]) || !sameResult(s.cell(re, 9), rbud.ExpandedDB[k]) {
			t.Errorf("combined %v expanded %v, want %v %v", s.cell(rc, 10), s.cell(re, 9), rbud.CombinedDB[k], rbud.ExpandedDB[k])
		}
		// JCGM 100:2008 (GUM) 5.1.2 and 6.2.1: u_c is the root sum of
		// squares of the rows' standard uncertainties, U = k u_c with k = 2.
		// Every cell is rounded to 1e-6 (at most 0.5e-6 off): the root sum
		// of squares of n rounded terms is within 0.5e-6 sqrt(n) of the
		// exact one (triangle inequality of the Euclidean norm), u_c adds
		// its own 0.5e-6, and U = 2 u_c is off by at most 0.5e-6 + 2 x 0.5e-6.
		uc, _ := s.cell(rc, 10).(float64)
		U, _ := s.cell(re, 9).(float64)
		tolUC := 0.5e-6*(1+math.Sqrt(float64(len(bud.Terms)))) + 1e-12
		if math.Abs(uc-math.Sqrt(sumSq)) > tolUC || math.Abs(U-2*uc) > 1.5e-6+1e-12 {
			t.Errorf("sheet's u_c %v, U %v; GUM gives u_c %v, U %v", uc, U, math.Sqrt(sumSq), 2*uc)
		}
	})

	t.Run("inputs and flags", func(t *testing.T) {
		s := d.sheet(t, "Inputs")
		if len(s.Rows) != len(u.Inputs)+1 {
			t.Fatalf("%d input rows, want %d", len(s.Rows)-1, len(u.Inputs))
		}
		for i, in := range u.Inputs {
			r := i + 2
			if s.cell(r, 1) != in.Path || !sameNumber(s.cell(r, 2), float64(in.Size)) || s.cell(r, 3) != in.SHA256 {
				t.Errorf("input row %d: %v %v %v, want %s %d %s", r, s.cell(r, 1), s.cell(r, 2), s.cell(r, 3), in.Path, in.Size, in.SHA256)
			}
		}
		f := d.sheet(t, "Flags")
		if len(f.Rows) != 1+len(u.Flags)+len(u.Problems) {
			t.Fatalf("%d flag rows, want %d", len(f.Rows)-1, len(u.Flags)+len(u.Problems))
		}
		p := u.Problems[0]
		r := 2 + len(u.Flags)
		if f.cell(r, 1) != "problem" || f.cell(r, 3) != p.File || !sameNumber(f.cell(r, 4), float64(p.Line)) || f.cell(r, 5) != p.Message {
			t.Errorf("problem row: %v", f.Rows[r-1])
		}
		if f.cell(2, 1) != string(u.Flags[0].Kind) || f.cell(2, 5) != u.Flags[0].Message {
			t.Errorf("first flag row: %v", f.Rows[1])
		}
	})
}

// checkBeamSheet compares every 50th frequency row with the beam's values
// as result.json holds them (rb, from asResult), and checks that the cells
// are those values and not the unrounded ones of bm.
func checkBeamSheet(t *testing.T, s *xlDumpSheet, bm, rb *reduce.Beam) {
	cols := beamColumns(bm)
	n := len(bm.FrequencyHz)
	if len(s.Rows) != n+1 {
		t.Fatalf("%d rows, want %d", len(s.Rows), n+1)
	}
	type expect struct {
		header string
		value  func(k int) (float64, bool)
		format string
		raw    []float64 // the unrounded values, for a dB column of bm
	}
	plain := func(xs []float64) func(int) (float64, bool) {
		return func(k int) (float64, bool) { return xs[k], true }
	}
	exp := []expect{
		{"Frequency (GHz)", func(k int) (float64, bool) { return rb.FrequencyHz[k] / 1e9, true }, "0.000000", nil},
		{"S21 (dB)", plain(rb.S21DB), "0.000", bm.S21DB},
		{"Range loss (dB)", plain(rb.RangeLossDB), "0.000", bm.RangeLossDB},
		{"Gain (dBi)", plain(rb.GainDBi), "0.000", bm.GainDBi},
		{"Gain U (dB)", plain(rb.GainExpandedUncertaintyDB), "0.000", bm.GainExpandedUncertaintyDB},
		{"Noise above kT0 (dB)", plain(rb.NoiseRelativeKT0DB), "0.000", bm.NoiseRelativeKT0DB},
		{"G/T (dB/K)", plain(rb.GTdBPerK), "0.000", bm.GTdBPerK},
		{"G/T U (dB)", plain(rb.GTExpandedUncertaintyDB), "0.000", bm.GTExpandedUncertaintyDB},
	}
	for _, c := range rb.LimitCurves {
		c := c
		in := func(k int) bool { return k >= c.Start && k < c.Start+len(c.LimitDB) }
		exp = append(exp,
			expect{"Limit " + c.Name + " (dB/K)", func(k int) (float64, bool) {
				if !in(k) {
					return 0, false
				}
				return c.LimitDB[k-c.Start], true
			}, "0.000", nil},
			// method.md section 7: margin = x - L, of the values as the
			// sheet (and result.json) holds them.
			expect{"Margin " + c.Name + " (dB)", func(k int) (float64, bool) {
				if !in(k) {
					return 0, false
				}
				return rb.GTdBPerK[k] - c.LimitDB[k-c.Start], true
			}, "0.000", nil})
	}
	unrounded := 0 // cells of a dB column away from bm's unrounded value
	if len(cols) < len(exp) {
		t.Fatalf("%d columns, want at least %d", len(cols), len(exp))
	}
	for ci, e := range exp {
		if s.cell(1, ci+1) != e.header {
			t.Fatalf("header %d = %v, want %q", ci+1, s.cell(1, ci+1), e.header)
		}
		for k := 0; k < n; k += 50 {
			r := k + 2
			want, ok := e.value(k)
			got := s.cell(r, ci+1)
			if !ok {
				if got != nil {
					t.Errorf("%s row %d = %v, want empty (outside the limit's band)", e.header, r, got)
				}
				continue
			}
			if !sameResult(got, want) || s.format(r, ci+1) != e.format {
				t.Errorf("%s row %d = %v (%s), want %v (%s)", e.header, r, got, s.format(r, ci+1), want, e.format)
			}
			if g, ok := got.(float64); ok && e.raw != nil && math.Abs(g-e.raw[k]) > 1e-9 {
				unrounded++
			}
		}
	}
	// The fixture's values have more than six decimals: had the cells kept
	// 15 digits, none would be away from the unrounded value.
	if unrounded == 0 {
		t.Error("every dB cell holds the unrounded value, not result.json's")
	}
	if s.Freeze == nil || *s.Freeze != "A2" {
		t.Errorf("frozen at %v, want A2", s.Freeze)
	}
	for ci, c := range cols {
		w := 0.0
		for _, d := range s.Widths {
			if int(d[0]) <= ci+1 && ci+1 <= int(d[1]) {
				w = d[2]
			}
		}
		if w != c.width {
			t.Errorf("column %d (%s) width %v, want %v", ci+1, c.header, w, c.width)
		}
	}
	if len(s.Charts) != 1 || s.Charts[0].Type != "ScatterChart" {
		t.Fatalf("charts %+v, want one XY chart", s.Charts)
	}
	// The frequency axis: the band rounded out to 0.1 GHz, labelled below
	// the plot.
	if ch := s.Charts[0]; ch.XMin == nil || ch.XMax == nil || *ch.XMin != math.Floor(bm.FrequencyHz[0]/1e8)/10 ||
		*ch.XMax != math.Ceil(bm.FrequencyHz[n-1]/1e8)/10 || ch.XLabels != "low" {
		t.Errorf("frequency axis from %v to %v, labels %q; want the band rounded out to 0.1 GHz, labels low", ch.XMin, ch.XMax, ch.XLabels)
	}
	ser := s.Charts[0].Series
	if len(ser) != 1+len(bm.LimitCurves) {
		t.Fatalf("%d series, want G/T and %d limits", len(ser), len(bm.LimitCurves))
	}
	q := "'" + s.Title + "'!"
	last := n + 1
	if ser[0].Val != q+"$G$2:$G$"+itoa(last) || ser[0].Cat != q+"$A$2:$A$"+itoa(last) || !ser[0].CatNum || ser[0].Tx != q+"$G$1:$G$1" {
		t.Errorf("G/T series %+v", ser[0])
	}
	if len(ser) > 1 && ser[1].Val != q+"$I$2:$I$"+itoa(last) {
		t.Errorf("limit series %+v", ser[1])
	}
}

func itoa(i int) string { return strconv.Itoa(i) }

func findRow(s *xlDumpSheet, col int, v string) int {
	for r := 1; r <= len(s.Rows); r++ {
		if s.cell(r, col) == v {
			return r
		}
	}
	return -1
}

// checkVerdictRules checks the conditional formatting of a verdict range:
// one equality rule per verdict, with our fill colours.
func checkVerdictRules(t *testing.T, s *xlDumpSheet, rangeRef string) {
	t.Helper()
	for _, cf := range s.CF {
		if cf.Range != rangeRef {
			continue
		}
		if len(cf.Rules) != len(verdictColours) {
			t.Fatalf("%s: %d rules, want %d", rangeRef, len(cf.Rules), len(verdictColours))
		}
		for i, r := range cf.Rules {
			vc := verdictColours[i]
			if r.Type != "cellIs" || r.Operator != "equal" || len(r.Formula) != 1 || r.Formula[0] != `"`+string(vc.verdict)+`"` ||
				!strings.HasSuffix(r.Fill, vc.fill) {
				t.Errorf("%s rule %d: %+v, want cellIs equal \"%s\" fill %s", rangeRef, i, r, vc.verdict, vc.fill)
			}
		}
		return
	}
	t.Errorf("no conditional formatting on %s (have %+v)", rangeRef, s.CF)
}

func TestUnitWorkbookDeterministic(t *testing.T) {
	tests := []struct {
		started time.Time
		want    time.Time
	}{
		{mustTime("2026-11-03T09:15:00Z"), time.Date(2026, 11, 3, 9, 15, 0, 0, time.UTC)},
		{mustTime("2026-11-03T10:15:00+01:00"), time.Date(2026, 11, 3, 9, 15, 0, 0, time.UTC)},
		{mustTime("1970-01-01T00:00:00Z"), time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)}, // before zip times
		{time.Time{}, time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)},
	}
	for i, tc := range tests {
		u := fixtureUnit(t, 2, 51)
		u.Started = tc.started
		a, err := UnitWorkbook(u)
		if err != nil {
			t.Fatal(err)
		}
		if i == 0 {
			time.Sleep(1100 * time.Millisecond) // a wall-clock time in the file would now differ
		}
		// Three more builds: an order taken from a map would show within them.
		for j := 0; j < 3; j++ {
			b, err := UnitWorkbook(u)
			if err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(a, b) {
				t.Errorf("started %q: builds differ (%d and %d bytes)", tc.started, len(a), len(b))
				break
			}
		}
		checkZipTimes(t, a, tc.want)
	}
}

// checkZipTimes checks that every zip entry carries the fixed time, and
// that docProps/core.xml states it.
func checkZipTimes(t *testing.T, data []byte, want time.Time) {
	t.Helper()
	zr, err := zip.NewReader(bytes.NewReader(data), int64(len(data)))
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range zr.File {
		if !f.Modified.Equal(want) {
			t.Errorf("zip entry %s modified %v, want %v", f.Name, f.Modified, want)
		}
		if f.Name == "docProps/core.xml" {
			rc, _ := f.Open()
			core, _ := io.ReadAll(rc)
			rc.Close()
			stamp := want.Format(time.RFC3339)
			if !bytes.Contains(core, []byte(">"+stamp+"</dcterms:created>")) || !bytes.Contains(core, []byte(">"+stamp+"</dcterms:modified>")) {
				t.Errorf("core.xml does not date the workbook %s: %s", stamp, core)
			}
		}
	}
}

func TestFleetWorkbookReadBack(t *testing.T) {
	f := fixtureFleet(t)
	data, err := FleetWorkbook(f)
	if err != nil {
		t.Fatal(err)
	}
	a2, _ := FleetWorkbook(f)
	if !bytes.Equal(data, a2) {
		t.Error("two fleet workbooks differ")
	}
	checkZipTimes(t, data, time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC))
	d := readWorkbook(t, data)

	t.Run("units", func(t *testing.T) {
		s := d.sheet(t, "Units")
		if len(s.Rows) != len(f.Units)+1 {
			t.Fatalf("%d rows, want %d", len(s.Rows), len(f.Units)+1)
		}
		if s.cell(1, 5) != "G/T at boresight worst margin (dB)" || s.cell(1, 6) != "Gain at boresight worst margin (dB)" {
			t.Fatalf("headers %v", s.Rows[0])
		}
		for i, u := range f.Units {
			r := i + 2
			// Dates are date cells with a date format.
			if s.cell(r, 1) != u.Serial || s.cell(r, 2) != u.Product || s.cell(r, 3) != xlDateText(t, u.Started) || s.format(r, 3) != nfDate || s.cell(r, 4) != string(u.Verdict) {
				t.Errorf("row %d: %v", r, s.Rows[r-1])
			}
			for j, name := range []string{"G/T at boresight", "Gain at boresight"} {
				want, found := math.Inf(1), false
				for _, l := range u.Limits {
					if l.Name == name {
						want, found = math.Min(want, l.WorstMarginDB), true
					}
				}
				// The sheets that grow with the units hold fleet.json's
				// rounding (bulk rows, appendJSONFloat).
				got := s.cell(r, 5+j)
				if !found && got != nil || found && (!sameResult(got, resultValue(want)) || s.format(r, 5+j) != "0.000") {
					t.Errorf("row %d %s = %v (%s), want %v (found %v)", r, name, got, s.format(r, 5+j), want, found)
				}
			}
		}
		checkVerdictRules(t, s, "D2:D26")
	})

	t.Run("limits", func(t *testing.T) {
		s := d.sheet(t, "Limits")
		r := 2
		for _, p := range f.Products {
			for _, l := range p.Limits {
				want := []float64{float64(l.Units), float64(l.Passed), l.Yield, l.MeanMarginDB, l.StdMarginDB, l.Cpk,
					l.Chart.CentreDB, l.Chart.UpperDB, l.Chart.LowerDB, l.Chart.MeanMovingRange}
				if s.cell(r, 1) != p.Product || s.cell(r, 2) != l.Name {
					t.Errorf("row %d: %v", r, s.Rows[r-1])
				}
				for c, w := range want {
					if !sameNumber(s.cell(r, 3+c), w) {
						t.Errorf("row %d col %d = %v, want %v", r, 3+c, s.cell(r, 3+c), w)
					}
				}
				if s.format(r, 5) != "0.0%" || s.format(r, 8) != "0.00" {
					t.Errorf("yield/Cpk formats %q %q", s.format(r, 5), s.format(r, 8))
				}
				r++
			}
		}
		if len(s.Rows) != r-1 {
			t.Errorf("%d rows, want %d", len(s.Rows), r-1)
		}
	})

	t.Run("control chart", func(t *testing.T) {
		s := d.sheet(t, "Control chart")
		c := f.Products[0].Limits[0].Chart
		// A block: its title, its header, then a row a unit in test order.
		if s.cell(2, 1) != "KU-PANEL-16: G/T at boresight" || s.cell(3, 3) != "Worst margin (dB)" {
			t.Fatalf("block head %v %v", s.Rows[1], s.Rows[2])
		}
		for i, v := range c.ValuesDB {
			r := i + 4
			beyond := s.cell(r, 4) == "yes"
			if s.cell(r, 1) != c.Serials[i] || s.cell(r, 2) != xlDateText(t, c.Started[i]) || !sameResult(s.cell(r, 3), resultValue(v)) ||
				beyond != slices.Contains(c.Beyond, i) {
				t.Errorf("row %d: %v", r, s.Rows[r-1])
			}
		}
		// Beside it the lines at the first and last date.
		if s.cell(3, 7) != "Centre (dB)" || s.cell(4, 6) != xlDateText(t, c.Started[0]) || s.cell(5, 6) != xlDateText(t, c.Started[len(c.Started)-1]) ||
			!sameResult(s.cell(4, 8), resultValue(c.UpperDB)) || !sameResult(s.cell(5, 9), resultValue(c.LowerDB)) {
			t.Errorf("lines %v %v", s.Rows[3], s.Rows[4])
		}
		if len(s.Charts) != 2 {
			t.Fatalf("%d control charts, want 2 (the single-unit product has none)", len(s.Charts))
		}
		ch := s.Charts[0]
		if ch.Type != "ScatterChart" || len(ch.Series) != 5 || ch.Series[0].Val != "'Control chart'!$C$4:$C$27" || ch.Series[0].Cat != "'Control chart'!$B$4:$B$27" || !ch.Series[0].CatNum {
			t.Errorf("first chart %+v: want an XY chart of the margins against the run dates", ch)
		}
	})

	t.Run("dimensions", func(t *testing.T) {
		// openpyxl's read-only mode reads each sheet as far as its
		// dimension: every sheet must read whole.
		for _, sh := range d.Sheets {
			if got := d.ReadOnly[sh.Title]; got != len(sh.Rows) {
				t.Errorf("sheet %s: %d rows in read-only mode, %d in full", sh.Title, got, len(sh.Rows))
			}
		}
	})

	t.Run("monthly yield", func(t *testing.T) {
		s := d.sheet(t, "Monthly yield")
		ms := f.Products[0].Months
		if len(s.Rows) != 1+len(ms) {
			t.Fatalf("%d rows, want %d", len(s.Rows), 1+len(ms))
		}
		for i, m := range ms {
			r := i + 2
			if s.cell(r, 1) != "KU-PANEL-16" || s.cell(r, 2) != "date:"+m.Month+"-01T00:00:00" || s.format(r, 2) != nfMonth || !sameNumber(s.cell(r, 3), float64(m.Units)) ||
				!sameNumber(s.cell(r, 9), m.FirstPassYield) || !sameNumber(s.cell(r, 10), m.FinalYield) || s.format(r, 9) != nfPct || !sameNumber(s.cell(r, 11), float64(m.Retested)) {
				t.Errorf("row %d: %v", r, s.Rows[r-1])
			}
		}
		if len(s.Charts) != 1 || len(s.Charts[0].Series) != 2 || s.Charts[0].Series[0].Val != "'Monthly yield'!$I$2:$I$3" {
			t.Errorf("monthly charts %+v", s.Charts)
		}
	})

	t.Run("outliers, watch and band", func(t *testing.T) {
		o := d.sheet(t, "Outliers")
		ol := f.Products[0].Limits[0].Outliers[0]
		if len(o.Rows) != 2 || o.cell(2, 3) != ol.Serial || !sameNumber(o.cell(2, 4), ol.MarginDB) || !sameNumber(o.cell(2, 5), ol.ModifiedZ) {
			t.Errorf("outliers %v", o.Rows)
		}
		w := d.sheet(t, "Watch")
		we := f.Products[0].Watch[0]
		if len(w.Rows) != 1+len(we.FrequenciesHz) || w.cell(3, 2) != we.Serial || !sameNumber(w.cell(3, 3), we.FrequenciesHz[1]/1e9) {
			t.Errorf("watch %v", w.Rows)
		}
		b := d.sheet(t, "Band")
		g := f.Products[0].Band
		if len(b.Rows) != 1+len(g.FrequencyHz) {
			t.Fatalf("%d band rows, want %d", len(b.Rows)-1, len(g.FrequencyHz))
		}
		for k := 0; k < len(g.FrequencyHz); k += 10 {
			r := k + 2
			if !sameNumber(b.cell(r, 2), g.FrequencyHz[k]/1e9) || !sameNumber(b.cell(r, 3), g.MedianDB[k]) ||
				!sameNumber(b.cell(r, 4), g.LowDB[k]) || !sameNumber(b.cell(r, 5), g.HighDB[k]) {
				t.Errorf("band row %d: %v", r, b.Rows[r-1])
			}
		}
		if len(b.Charts) != 1 || b.Charts[0].Type != "ScatterChart" || len(b.Charts[0].Series) != 3 || b.Charts[0].Series[0].Cat != "'Band'!$B$2:$B$102" {
			t.Errorf("band charts %+v", b.Charts)
		}
	})
}

// The range health of each station is a sheet of its own with a chart.
func TestFleetWorkbookStations(t *testing.T) {
	f := healthFleet()
	data, err := FleetWorkbook(f)
	if err != nil {
		t.Fatal(err)
	}
	d := readWorkbook(t, data)
	if len(f.Stations) != 1 {
		t.Fatalf("fixture has %d stations", len(f.Stations))
	}
	st := f.Stations[0]
	s := d.sheet(t, "Range range-b horn-0042")
	if len(s.Rows) != 4+len(st.Points) || d.ReadOnly[s.Title] != len(s.Rows) {
		t.Fatalf("%d rows (%d read-only), want %d", len(s.Rows), d.ReadOnly[s.Title], 4+len(st.Points))
	}
	if !sameNumber(s.cell(2, 2), st.CentreDB) || !sameNumber(s.cell(2, 4), st.LCLDB) || !sameNumber(s.cell(2, 6), st.UCLDB) {
		t.Errorf("limits row %v", s.Rows[1])
	}
	out := map[int]bool{}
	for _, i := range st.OutOfControl {
		out[i] = true
	}
	if len(out) == 0 {
		t.Fatal("the fixture's planted step gives no run out of control")
	}
	for i, p := range st.Points {
		r := i + 5
		if s.cell(r, 1) != p.Serial || s.cell(r, 2) != p.Run || s.cell(r, 3) != xlDateText(t, p.Started) || s.format(r, 3) != nfDate ||
			!sameNumber(s.cell(r, 4), p.RangeLossDB) || (s.cell(r, 6) == "yes") != out[i] {
			t.Errorf("row %d: %v", r, s.Rows[r-1])
		}
	}
	if len(s.Charts) != 1 || s.Charts[0].Type != "ScatterChart" || len(s.Charts[0].Series) != 4 {
		t.Errorf("station charts %+v", s.Charts)
	}
}

func TestWorkbookNonFiniteAndEmpty(t *testing.T) {
	u := fixtureUnit(t, 1, 11)
	u.Beams[0].GTdBPerK[3] = math.NaN()
	u.Beams[0].GainDBi[4] = math.Inf(1)
	u.Beams[0].S21DB = u.Beams[0].S21DB[:5] // shorter than the grid: cells stay empty
	u.AmbientC = math.NaN()
	data, err := UnitWorkbook(u)
	if err != nil {
		t.Fatal(err)
	}
	empty := &reduce.Unit{Serial: "E-1"}
	if _, err := UnitWorkbook(empty); err != nil {
		t.Fatalf("unit without beams or limits: %v", err)
	}
	if _, err := UnitWorkbook(nil); err == nil {
		t.Error("nil unit: no error")
	}
	if _, err := FleetWorkbook(&reduce.Fleet{}); err != nil {
		t.Fatalf("empty fleet: %v", err)
	}
	d := readWorkbook(t, data)
	s := d.sheet(t, "Beam b00")
	for _, c := range []struct{ row, col int }{{5, 7}, {6, 4}, {7, 2}, {12, 2}} {
		if v := s.cell(c.row, c.col); v != nil {
			t.Errorf("cell (%d,%d) = %v, want empty", c.row, c.col, v)
		}
	}
	if !onMicroGrid(s.cell(6, 2), u.Beams[0].S21DB[4]) || !onMicroGrid(s.cell(6, 7), u.Beams[0].GTdBPerK[4]) {
		t.Errorf("finite neighbours lost: %v %v", s.cell(6, 2), s.cell(6, 7))
	}
	if v := d.sheet(t, "Summary").cell(15, 2); v != nil {
		t.Errorf("NaN ambient shown as %v", v)
	}
}

func TestUniqueSheetName(t *testing.T) {
	used := map[string]bool{}
	tests := []struct{ in, want string }{
		{"Summary", "Summary"},
		{"summary", "summary (2)"}, // names compare without case
		{"Beam a/b", "Beam a_b"},
		{"Beam a\\b", "Beam a_b (2)"},
		{"Beam [x]:*?", "Beam (x)-__"},
		{"Beam it's", "Beam it_s"},
		{"", "Sheet"},
		{"   ", "Sheet (2)"},
		{"History", "History (data)"},
		{"Beam 0123456789012345678901234567890123", "Beam 01234567890123456789012345"},
		{"Beam 0123456789012345678901234567890199", "Beam 0123456789012345678901 (2)"},
		{"Beam \x01tab", "Beam _tab"},
		{"Beam ééééééééééééééééééééééééééééééé", "Beam éééééééééééééééééééééééééé"},
	}
	for _, tc := range tests {
		got := uniqueSheetName(tc.in, used)
		if got != tc.want {
			t.Errorf("uniqueSheetName(%q) = %q, want %q", tc.in, got, tc.want)
		}
		if n := utf8.RuneCountInString(got); n > 31 || strings.ContainsAny(got, `[]:*?/\'`) {
			t.Errorf("%q is not a valid sheet name (%d characters)", got, n)
		}
	}
}

func BenchmarkUnitWorkbook16x801(b *testing.B) {
	u := fixtureUnit(b, 16, 801)
	b.ReportAllocs()
	size := 0
	for i := 0; i < b.N; i++ {
		data, err := UnitWorkbook(u)
		if err != nil {
			b.Fatal(err)
		}
		b.SetBytes(int64(len(data)))
		size = len(data)
	}
	b.ReportMetric(float64(size), "file-bytes")
}

// Text that looks like a formula stays text: a cell written from a user's
// field never carries a formula element (<f>), and each beam sheet plus the
// Summary has its chart part.
func TestWorkbookTextIsNotFormula(t *testing.T) {
	u := fixtureUnit(t, 3, 21)
	u.Operator = `=HYPERLINK("http://example.invalid","x")`
	u.Firmware = "@SUM(A1:A2)"
	u.Beams[1].ID = "+1"
	u.Flags[0].Message = "-2+3"
	data, err := UnitWorkbook(u)
	if err != nil {
		t.Fatal(err)
	}
	zr, err := zip.NewReader(bytes.NewReader(data), int64(len(data)))
	if err != nil {
		t.Fatal(err)
	}
	charts := 0
	for _, f := range zr.File {
		if strings.HasPrefix(f.Name, "xl/charts/chart") {
			charts++
		}
		if !strings.HasPrefix(f.Name, "xl/worksheets/sheet") {
			continue
		}
		rc, _ := f.Open()
		x, _ := io.ReadAll(rc)
		rc.Close()
		if bytes.Contains(x, []byte("<f>")) || bytes.Contains(x, []byte("<f ")) {
			t.Errorf("%s holds a formula", f.Name)
		}
	}
	if charts != 1+len(u.Beams) {
		t.Errorf("%d chart parts, want %d (Summary and one per beam)", charts, 1+len(u.Beams))
	}
	d := readWorkbook(t, data)
	s := d.sheet(t, "Summary")
	if r := findRow(s, 1, "Operator"); r < 0 || s.cell(r, 2) != u.Operator {
		t.Errorf("operator cell not the text %q", u.Operator)
	}
	if d.Sheets[2].Title != "Beam +1" {
		t.Errorf("sheet %q, want \"Beam +1\"", d.Sheets[2].Title)
	}
}

// The limit and margin columns come from Beam.LimitCurves, reduce's limit
// on the beam's grid, and from nothing else: without them the beam sheet
// has no limit columns (render evaluates no limit of its own), even when
// the limit results carry the vertices of the limit line.
func TestBeamSheetLimitColumnsOnlyFromReduce(t *testing.T) {
	u := fixtureUnit(t, 1, 101)
	u.Beams[0].LimitCurves = nil
	u.Limits = []reduce.LimitResult{{Name: "wide", Quantity: "gt", Beam: "b00", Statistic: "min", Verdict: "pass",
		LimitCurve: []reduce.LimitVertex{{FrequencyHz: 10.7e9, ValueDB: 2.0}, {FrequencyHz: 12.75e9, ValueDB: 2.6}}}}
	data, err := UnitWorkbook(u)
	if err != nil {
		t.Fatal(err)
	}
	s := readWorkbook(t, data).sheet(t, "Beam b00")
	for col := 1; col <= 12; col++ {
		if h, ok := s.cell(1, col).(string); ok && (strings.HasPrefix(h, "Limit ") || strings.HasPrefix(h, "Margin ")) {
			t.Errorf("column %d is %q: a limit column without reduce's limit curve", col, h)
		}
	}
	if s.cell(1, 8) != "G/T U (dB)" {
		t.Errorf("column 8 is %v, want the last data column \"G/T U (dB)\"", s.cell(1, 8))
	}
}

func TestAppendResultGHz(t *testing.T) {
	tests := []struct {
		hz   float64
		want string
	}{
		{0, "0"}, {11.725e9, "11.725"}, {10.7e9, "10.7"}, {12e9, "12"}, {1e9, "1"},
		{11725000001, "11.725000001"}, {500000, "0.0005"}, {1, "0.000000001"}, {0.5, "0.0000000005"},
		{-2.5e6, "-0.0025"}, {123456789012, "123.456789012"},
		// 11.7e9 + 0.30000000000000004 Hz: result.json keeps 15 significant digits, 11700000000.3.
		{11.7e9 + 0.30000000000000004, "11.7000000003"},
		// 10.7e9 + 1e-6 Hz: below the 15th digit, result.json writes 10700000000.
		{10.7e9 + 1e-6, "10.7"},
	}
	for _, tc := range tests {
		if got := string(appendResultGHz(nil, tc.hz)); got != tc.want {
			t.Errorf("appendResultGHz(%v) = %s, want %s", tc.hz, got, tc.want)
		}
		want, _ := strconv.ParseFloat(tc.want, 64)
		if got := resultGHz(tc.hz); got != want {
			t.Errorf("resultGHz(%v) = %v, want %v", tc.hz, got, want)
		}
	}
}

// resultValue is the number result.json's text reads back to: rounded
// half away from zero to 1e-6 below 1e9 (expected values worked out by
// hand), 15 significant digits above.
func TestResultValue(t *testing.T) {
	tests := []struct{ v, want float64 }{
		{0, 0}, {math.Copysign(0, -1), 0}, {-0.0000004, 0}, {1.23456749, 1.234567}, {1.2345675, 1.234568},
		{-21.21237019029, -21.21237}, {52.59935532253548, 52.599355}, {0.1 + 0.2, 0.3}, {-1234, -1234},
		{11725000000.123456, 11725000000.1235}, {math.Inf(1), math.Inf(1)},
	}
	for _, tc := range tests {
		got := resultValue(tc.v)
		if got != tc.want || math.Signbit(got) != math.Signbit(tc.want) {
			t.Errorf("resultValue(%v) = %v, want %v", tc.v, got, tc.want)
		}
		// The same number as the text result.json writes.
		if text := string(appendJSONFloat(nil, tc.v)); !math.IsInf(tc.v, 0) && text != strconv.FormatFloat(got, 'f', -1, 64) {
			t.Errorf("resultValue(%v) = %v, result.json writes %s", tc.v, got, text)
		}
	}
	if !math.IsNaN(resultValue(math.NaN())) {
		t.Error("resultValue(NaN) is not NaN")
	}
}

// The rows written into a sheet: a cell after an empty one states its
// reference (ECMA-376 Part 1, 18.3.1.4), the others follow on; text is an
// inline string, escaped for XML 1.0; the dimension covers the table.
// Expected XML written out by hand.
func TestWriteBulkSheet(t *testing.T) {
	tbl := &bulkSheet{first: 2, n: 3, width: 3,
		rows: [][]bulkCell{
			{textCell("a<b & c>", 1), {}, textCell(" =SUM(A1) ", 0)},
			{numCell(math.NaN(), 4), textCell("x\x01y_x0041_\r", 0), numCell(-0.5, 4)},
		},
		cols: []bulkColumn{
			{values: []float64{10.7, 10.75, 10.8}, style: 3},
			{values: []float64{1.5, math.NaN(), -2}, style: 4},
			{values: []float64{7}, start: 1, style: 4},
		}}
	sheet := []byte(`<worksheet><dimension ref="A1"></dimension><sheetData><row r="1"><c r="A1" t="s"><v>0</v></c></row></sheetData><drawing r:id="rId1"></drawing></worksheet>`)
	var out bytes.Buffer
	if err := writeBulkSheet(&out, sheet, tbl); err != nil {
		t.Fatal(err)
	}
	want := `<worksheet><dimension ref="A1:C6"></dimension><sheetData><row r="1"><c r="A1" t="s"><v>0</v></c></row>` +
		`<row r="2"><c s="1" t="inlineStr"><is><t>a&lt;b &amp; c&gt;</t></is></c><c r="C2" t="inlineStr"><is><t xml:space="preserve"> =SUM(A1) </t></is></c></row>` +
		`<row r="3"><c r="B3" t="inlineStr"><is><t xml:space="preserve">x` + "\uFFFD" + `y_x005F_x0041_&#xD;</t></is></c><c s="4"><v>-0.5</v></c></row>` +
		`<row r="4"><c s="3"><v>10.7</v></c><c s="4"><v>1.5</v></c></row>` +
		`<row r="5"><c s="3"><v>10.75</v></c><c r="C5" s="4"><v>7</v></c></row>` +
		`<row r="6"><c s="3"><v>10.8</v></c><c s="4"><v>-2</v></c></row>` +
		`</sheetData><drawing r:id="rId1"></drawing></worksheet>`
	if out.String() != want {
		t.Errorf("got\n%s\nwant\n%s", out.String(), want)
	}
	out.Reset()
	if err := writeBulkSheet(&out, []byte(`<worksheet><sheetData/></worksheet>`), &bulkSheet{first: 1, rows: [][]bulkCell{{numCell(1, 0)}}}); err != nil {
		t.Fatal(err)
	}
	if want := `<worksheet><sheetData><row r="1"><c><v>1</v></c></row></sheetData></worksheet>`; out.String() != want {
		t.Errorf("got %s, want %s", out.String(), want)
	}
	out.Reset()
	widths := &bulkSheet{widths: []float64{14, 11, 11, 0, 9.5}}
	if err := writeBulkSheet(&out, []byte(`<worksheet><sheetViews></sheetViews><sheetData></sheetData></worksheet>`), widths); err != nil {
		t.Fatal(err)
	}
	if want := `<worksheet><sheetViews></sheetViews><cols><col min="1" max="1" width="14" customWidth="1"/>` +
		`<col min="2" max="3" width="11" customWidth="1"/><col min="5" max="5" width="9.5" customWidth="1"/></cols>` +
		`<sheetData></sheetData></worksheet>`; out.String() != want {
		t.Errorf("got %s, want %s", out.String(), want)
	}
	if err := writeBulkSheet(io.Discard, []byte(`<worksheet></worksheet>`), tbl); err == nil {
		t.Error("a sheet without sheetData was accepted")
	}
}
