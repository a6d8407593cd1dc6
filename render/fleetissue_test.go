package render

import (
	"strings"
	"testing"

	"gtpack.example/gtpack/reduce"
)

// fixtureIssueOf gives the fleet pages the issue states of the fixture's
// summaries (fixtureFleetAndSummaries), as reduce.FleetUnit will carry
// them.
func fixtureIssueOf(sums []reduce.UnitSummary) func(*reduce.FleetUnit) fleetIssue {
	by := map[string]fleetIssue{}
	for _, s := range sums {
		by[s.Serial] = fleetIssue{State: s.IssueState, Revision: s.Revision, ReportNumber: s.ReportNumber, Runs: s.Runs, FirstVerdict: s.FirstVerdict}
	}
	return func(u *reduce.FleetUnit) fleetIssue { return by[u.Serial] }
}

func TestIndexIssueColumns(t *testing.T) {
	f, sums := fixtureFleetAndSummaries(t)
	if _, err := loadPages(); err != nil {
		t.Fatal(err)
	}
	index := func(issueOf func(*reduce.FleetUnit) fleetIssue) string {
		v, err := indexModel(f, issueOf)
		if err != nil {
			t.Fatal(err)
		}
		b, err := execute("index.tmpl", v)
		if err != nil {
			t.Fatal(err)
		}
		return string(b)
	}
	// What the fleet does not know, the overview does not show.
	plain := index(noFleetIssue)
	if strings.Contains(plain, "Report state") || strings.Contains(plain, "Reports:") {
		t.Error("the overview shows issue columns for a fleet that carries no issue state")
	}
	page := index(fixtureIssueOf(sums))
	for _, want := range []string{
		`<th data-key="issue">Report state</th><th data-key="runs" class="num">Runs</th>`,
		// Counts: 24 units of KU-PANEL-16, every fourth and the 15th issued (7), one void, 16 drafts.
		`Reports: <span class="tag issue-issued">issued</span> 7 · <span class="tag issue-draft">draft</span> 16 · <span class="tag issue-void">void</span> 1 · retested units: <b>2</b>`,
	} {
		if !strings.Contains(page, want) {
			t.Errorf("overview lacks %q", want)
		}
	}
	// The rows come from the unit data (page.js draws them: TestBrowserIndex).
	d := indexDataOf(t, page)
	rows := map[string][]any{}
	for _, r := range d.Units {
		rows[r[0].(string)] = r
	}
	verdict := func(x any) string {
		if i := int(x.(float64)); i >= 0 {
			return d.Verdicts[i]
		}
		return ""
	}
	for _, tc := range []struct {
		serial, state, report, first string
		runs                         float64
	}{
		{"KP16-00001", "issued", "EATL-GT-KP16-00001-R1", "pass", 1}, // issued R1
		{"KP16-00010", "void", "EATL-GT-KP16-00010-R2", "pass", 2},   // its R1 void by a retest, a draft of R2; first run passed
		{"KP16-00015", "issued", "EATL-GT-KP16-00015-R1", "fail", 3}, // three runs, the first failed
		{"XB4-00001", "", "", "", 0},                                 // the unit of the other product has no issue state
	} {
		r := rows[tc.serial]
		if r == nil || r[8] != tc.state || r[9] != tc.report || verdict(r[7]) != tc.first || r[6].(float64) != tc.runs {
			t.Errorf("%s: row %v, want state %q, report %q, first verdict %q, runs %v", tc.serial, r, tc.state, tc.report, tc.first, tc.runs)
		}
	}
}

func TestFleetWorkbookIssueColumns(t *testing.T) {
	f, sums := fixtureFleetAndSummaries(t)
	data, err := fleetWorkbook(f, fixtureIssueOf(sums))
	if err != nil {
		t.Fatal(err)
	}
	s := readWorkbook(t, data).sheet(t, "Units")
	// Serial, product, started, verdict, two limits, then the issue columns.
	for i, h := range []string{"Runs", "First verdict", "Issue state", "Revision", "Report number"} {
		if got := s.cell(1, 7+i); got != h {
			t.Errorf("header %d = %v, want %q", 7+i, got, h)
		}
	}
	bySerial := map[string]reduce.UnitSummary{}
	for _, u := range sums {
		bySerial[u.Serial] = u
	}
	for i, u := range f.Units {
		r, want := i+2, bySerial[u.Serial]
		var runs, rev any
		if want.Runs > 0 {
			runs = float64(want.Runs)
		}
		if want.Revision > 0 {
			rev = float64(want.Revision)
		}
		text := func(s string) any {
			if s == "" {
				return nil
			}
			return s
		}
		got := []any{s.cell(r, 7), s.cell(r, 8), s.cell(r, 9), s.cell(r, 10), s.cell(r, 11)}
		exp := []any{runs, text(string(want.FirstVerdict)), text(string(want.IssueState)), rev, text(want.ReportNumber)}
		for j := range got {
			if got[j] != exp[j] {
				t.Errorf("%s column %d = %v, want %v", u.Serial, 7+j, got[j], exp[j])
			}
		}
	}
	checkVerdictRules(t, s, "H2:H26")
	// Without issue states the columns stay, empty.
	none, err := fleetWorkbook(f, noFleetIssue)
	if err != nil {
		t.Fatal(err)
	}
	plain := readWorkbook(t, none).sheet(t, "Units")
	if plain.cell(1, 9) != "Issue state" || plain.cell(2, 9) != nil {
		t.Errorf("a fleet without issue states: header %v, first cell %v", plain.cell(1, 9), plain.cell(2, 9))
	}
}

func noFleetIssue(*reduce.FleetUnit) fleetIssue { return fleetIssue{} }
