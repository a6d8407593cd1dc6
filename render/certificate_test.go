package render

import (
	"bytes"
	"encoding/json"
	"math"
	"reflect"
	"strings"
	"testing"

	"gtpack.example/gtpack/reduce"
)

// The laboratory, customer and approvals below are invented demo data.

const issueInputs = "9f1c2e5a7b3d4c6e8f0a1b2c3d4e5f60718293a4b5c6d7e8f90a1b2c3d4e5f6a"

var (
	demoLab = &reduce.LabInfo{Name: "Example Antenna Test Laboratory", Address: []string{"Building 4", "1 Example Road", "Example Town"},
		Contact: "acceptance@lab.example", Accreditation: "Accreditation number 0000 (example)"}
	demoCustomer = &reduce.CustomerInfo{Name: "Example Satellite Services", Address: []string{"2 Example Street", "Example City"}, Order: "PO-2026-0117"}
)

// issueUnit is the fixture unit under a plain serial, stated laboratory
// and customer, with the issue state is (its InputsSHA256 filled in).
func issueUnit(t *testing.T, is reduce.Issue) *reduce.Unit {
	t.Helper()
	u := fixtureUnit(t, 4, 101)
	u.Serial = "KP16-00017"
	u.Lab, u.Customer = demoLab, demoCustomer
	is.InputsSHA256 = issueInputs
	u.Issue = is
	return u
}

var (
	issuedR1 = reduce.Issue{State: reduce.IssueIssued, Revision: 1, ReportNumber: "EATL-GT-KP16-00017-R1", Issued: mustTime("2026-11-04T10:00:00Z"),
		Signatures: []reduce.Signature{
			{By: "A. Example", Role: "Quality engineer", Date: mustTime("2026-11-04T10:00:00Z"), File: "approvals/KP16-00017/20261104T100000Z-a-example.yaml"},
			{By: "B. Example", Role: "Laboratory manager", Date: mustTime("2026-11-04T11:30:00Z"), File: "approvals/KP16-00017/20261104T113000Z-b-example.yaml"},
		}}
	issuedR2 = reduce.Issue{State: reduce.IssueIssued, Revision: 2, ReportNumber: "EATL-GT-KP16-00017-R2", Issued: mustTime("2026-11-09T09:00:00Z"),
		Replaces:   "EATL-GT-KP16-00017-R1",
		Signatures: []reduce.Signature{{By: "A. Example", Role: "Quality engineer", Date: mustTime("2026-11-09T09:00:00Z"), File: "approvals/KP16-00017/20261109T090000Z-a-example.yaml"}}}
	voidR2 = reduce.Issue{State: reduce.IssueVoid, Revision: 2, ReportNumber: "EATL-GT-KP16-00017-R2", Replaces: "EATL-GT-KP16-00017-R1",
		Void: "R1, approved by A. Example on 2026-11-04T10:00:00Z (approvals/KP16-00017/20261104T100000Z-a-example.yaml), named inputs 0123456789ab (the unit's are now 9f1c2e5a7b3d)",
		Why:  "not yet approved by the laboratory: its approval issues this report as revision 2"}
	draftR1 = reduce.Issue{State: reduce.IssueDraft, Revision: 1, ReportNumber: "EATL-GT-KP16-00017-R1",
		Why: "not yet approved by the laboratory: its approval issues this report as revision 1"}
)

// pageBoxes is the report's own @page rule: what every printed page
// carries in its margins.
func pageBoxes(t *testing.T, page string) string {
	t.Helper()
	i := strings.Index(page, "@page {\n  @top-left")
	if i < 0 {
		t.Fatal("the report has no @page margin boxes")
	}
	j := strings.Index(page[i:], "</style>")
	return page[i : i+j]
}

func TestCertificateStates(t *testing.T) {
	noLab := issueUnit(t, issuedR1) // issued by the issue state, but no laboratory
	noLab.Lab = nil
	blank := issueUnit(t, reduce.Issue{}) // no issue state at all (a result.json of an older tool)
	tests := []struct {
		name        string
		u           *reduce.Unit
		state       reduce.IssueState
		issued      bool
		boxes       []string // in the @page rule
		want        []string // in the page
		notWant     []string
		notWantBoxs []string
	}{
		{"issued R1", issueUnit(t, issuedR1), stateIssued, true,
			[]string{`@top-left { content: "EATL-GT-KP16-00017-R1";`, `@top-right { content: "Revision 1";`,
				`@bottom-right { content: "page " counter(page) " of " counter(pages);`},
			[]string{
				"<title>EATL-GT-KP16-00017-R1 – KP16-00017 – CONDITIONAL PASS – G/T acceptance test report</title>",
				`<div class="lab-name">Example Antenna Test Laboratory</div>`,
				"<div>Building 4, 1 Example Road, Example Town</div>", "<div>acceptance@lab.example</div>",
				`<div class="report-number">EATL-GT-KP16-00017-R1</div>`, "<div>Revision 1 · issued 2026-11-04</div>",
				`<span class="tag issue-issued">ISSUED EATL-GT-KP16-00017-R1</span>`,
				"<b>Example Satellite Services</b><br>2 Example Street, Example City", "<td>PO-2026-0117</td>",
				"<tr><th>Date of issue</th><td><b>2026-11-04</b></td></tr>",
				"<tr><th>Date of the test</th><td>2026-11-03 09:15 UTC</td></tr>",
				`<td><b>A. Example</b></td><td>Quality engineer</td><td>2026-11-04 10:00 UTC</td>`,
				`<td><b>B. Example</b></td><td>Laboratory manager</td><td>2026-11-04 11:30 UTC</td>`,
				"The results relate only to the item tested",
				`<span class="tag v-cpass">CONDITIONAL PASS</span> against the specification “Ku-band receive panel, acceptance” (KU-PANEL-16), under the decision rule: guarded acceptance (ILAC-G8)`,
				"certificate <b>LAB-26-0211</b>",
				`<p class="end-of-report">End of report EATL-GT-KP16-00017-R1</p>`,
			},
			[]string{"DRAFT", "Replaces report", "Laboratory not stated"}, []string{"@top-center"}},
		{"R2 names R1", issueUnit(t, issuedR2), stateIssued, true,
			[]string{`content: "EATL-GT-KP16-00017-R2";`, `content: "Revision 2";`},
			[]string{"<div>Replaces report <b>EATL-GT-KP16-00017-R1</b></div>",
				"This revision replaces report <b>EATL-GT-KP16-00017-R1</b>, which it supersedes in full.",
				"<div>Revision 2 · issued 2026-11-09</div>", "End of report EATL-GT-KP16-00017-R2"},
			[]string{"DRAFT"}, []string{"@top-center"}},
		{"void", issueUnit(t, voidR2), stateVoid, false,
			[]string{`content: "EATL-GT-KP16-00017-R2";`, `@top-right { content: "Draft of revision 2";`, `@top-center { content: "DRAFT \2014  not issued";`},
			[]string{`<div class="draft-word">DRAFT — approval void</div>`,
				"<div><b>Approval void:</b> R1, approved by A. Example on 2026-11-04T10:00:00Z (approvals/KP16-00017/20261104T100000Z-a-example.yaml), named inputs 0123456789ab (the unit&#39;s are now 9f1c2e5a7b3d).</div>",
				"<div><b>Why not issued:</b> not yet approved by the laboratory: its approval issues this report as revision 2.</div>",
				"<div>Draft of revision 2 · not issued</div>", "<tr><th>Date of issue</th><td>none: not issued</td></tr>",
				`<span class="tag issue-void">DRAFT — approval void</span>`, "nobody has approved these results",
				"End of report EATL-GT-KP16-00017-R2 (DRAFT, not issued)", "<title>DRAFT – KP16-00017"},
			[]string{"Approved by", "ISSUED", "This revision replaces"}, nil},
		{"draft", issueUnit(t, draftR1), stateDraft, false,
			[]string{`content: "EATL-GT-KP16-00017-R1";`, `content: "Draft of revision 1";`, `@top-center { content: "DRAFT \2014  not issued";`},
			[]string{`<div class="draft-word">DRAFT — not issued</div>`,
				"<div><b>Why not issued:</b> not yet approved by the laboratory: its approval issues this report as revision 1.</div>",
				"End of report EATL-GT-KP16-00017-R1 (DRAFT, not issued)"},
			[]string{"Approved by", "ISSUED", "Approval void", "Replaces report"}, nil},
		{"no laboratory", noLab, stateDraft, false,
			// No report number: the unit and its inputs identify every page.
			[]string{`@top-left { content: "Unit KP16-00017, inputs 9f1c2e5a7b3d";`, `content: "Draft of revision 1";`, "@top-center"},
			[]string{`<div class="lab-missing">Laboratory not stated: this report cannot be issued.</div>`,
				"the laboratory is not stated (the archive has no lab.yaml): this report cannot be issued",
				`<div class="report-number">No report number</div>`,
				"End of report Unit KP16-00017, inputs 9f1c2e5a7b3d (DRAFT, not issued)"},
			[]string{"EATL-GT-", "Approved by", "ISSUED", "A. Example"}, nil},
		{"no issue state", blank, stateDraft, false,
			[]string{`content: "Draft";`, "@top-center"},
			[]string{`<div class="draft-word">DRAFT — not issued</div>`, "no approval names this unit&#39;s inputs and verdict"},
			[]string{"Approved by", "ISSUED"}, nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			c, err := certificateOf(tc.u)
			if err != nil {
				t.Fatal(err)
			}
			if c.State != tc.state || c.Issued != tc.issued {
				t.Errorf("state %q issued %v, want %q %v", c.State, c.Issued, tc.state, tc.issued)
			}
			page := string(mustReport(t, tc.u))
			boxes := pageBoxes(t, page)
			for _, w := range tc.boxes {
				if !strings.Contains(boxes, w) {
					t.Errorf("@page lacks %q:\n%s", w, boxes)
				}
			}
			for _, w := range tc.notWantBoxs {
				if strings.Contains(boxes, w) {
					t.Errorf("@page has %q", w)
				}
			}
			for _, w := range tc.want {
				if !strings.Contains(page, w) {
					t.Errorf("report lacks %q", w)
				}
			}
			for _, w := range tc.notWant {
				if strings.Contains(page, w) {
					t.Errorf("report has %q", w)
				}
			}
		})
	}
}

// Whatever the issue state says, a unit without a laboratory, a report
// number or a signature is never shown as issued.
func TestNeverIssuedWithoutLabNumberOrSignature(t *testing.T) {
	for name, edit := range map[string]func(u *reduce.Unit){
		"no laboratory":    func(u *reduce.Unit) { u.Lab = nil },
		"no report number": func(u *reduce.Unit) { u.Issue.ReportNumber = "" },
		"no signature":     func(u *reduce.Unit) { u.Issue.Signatures = nil },
	} {
		u := issueUnit(t, issuedR1)
		edit(u)
		is := issueShown(u)
		if is.Issued || is.State == stateIssued || is.IssueDate != "" {
			t.Errorf("%s: shown as %+v", name, is)
		}
		page := string(mustReport(t, u))
		if strings.Contains(page, "ISSUED") || strings.Contains(page, "Approved by") || !strings.Contains(page, `<div class="draft-word">`) {
			t.Errorf("%s: the report reads as issued", name)
		}
		if sum := summaryFields(u); sum[16][0] != "Issue state" || sum[16][1] != string(stateDraft) {
			t.Errorf("%s: workbook summary row %v", name, sum[16])
		}
	}
}

// A retested unit is one on its first page, and its report lists every
// earlier run with its date, verdict, worst limit, margin and notes, the
// notes rendered as safely as the run's own.
func TestCertificateRetest(t *testing.T) {
	u := issueUnit(t, issuedR1)
	m := -0.982866
	u.History = []reduce.HistoryEntry{
		{Run: "2026/10/KP16-00017/run-1", Started: mustTime("2026-10-28T14:02:00Z"), Verdict: reduce.VerdictFail,
			WorstLimit: "Gain at boresight", WorstBeam: "b00", WorstMarginDB: m, Notes: hostileNotes},
		{Run: "2026/10/KP16-00017/run-2", Started: mustTime("2026-10-30T08:00:00Z"), Verdict: reduce.VerdictIncomplete, WorstMarginDB: math.NaN()},
	}
	page := string(mustReport(t, u))
	for _, want := range []string{
		"<b>run 3 of 3: retest</b>",
		"<tr><th>Runs of this unit</th><td><b>Run 3 of 3: retest</b></td></tr>",
		`<b>Run 3 of 3: retest.</b> The first run, on 2026-10-28, was <span class="tag v-fail">FAIL</span> (worst: Gain at boresight, b00, -0.98 dB).`,
		`<td class="num">1</td><td>2026-10-28</td><td><span class="tag v-fail">FAIL</span></td><td>Gain at boresight</td><td>b00</td><td class="num">-0.98</td><td><code>2026/10/KP16-00017/run-1</code></td>`,
		`<td class="num">2</td><td>2026-10-30</td><td><span class="tag v-none">INCOMPLETE</span></td><td>–</td><td></td><td class="num">–</td>`,
		"<h3>Run 1 (2026-10-28): operator notes</h3>",
		`click me <code>javascript:window.__pwned=5</code> <span class="hint">(link not followed)</span>`,
		"<h3>Run 2 (2026-10-30): operator notes</h3><p>No notes.</p>",
		"<h2>Operator notes of this run</h2>",
	} {
		if !strings.Contains(page, want) {
			t.Errorf("report lacks %q", want)
		}
	}
	for _, bad := range []string{"<script>window.__pwned", "<img src=x onerror", `href="javascript:`} {
		if strings.Contains(page, bad) {
			t.Errorf("an earlier run's notes put %q into the page", bad)
		}
	}
	first := issueUnit(t, issuedR1)
	first.History = nil
	if p := string(mustReport(t, first)); !strings.Contains(p, "<td>1 (first run)</td>") || strings.Contains(p, ": retest") {
		t.Error("a unit's first run reads as a retest")
	}
}

// The laboratory-safety cautions stand in the method section, not on the
// certificate or at the end.
func TestCautionsInMethod(t *testing.T) {
	page := string(mustReport(t, issueUnit(t, issuedR1)))
	method, limits, caution := strings.Index(page, `<section id="method">`), strings.Index(page, `<section id="limits">`), strings.Index(page, "must not radiate")
	if method < 0 || limits < 0 || !(method < caution && caution < limits) {
		t.Errorf("cautions at %d, method section %d to %d", caution, method, limits)
	}
	if strings.Count(page, "must not radiate") != 1 {
		t.Error("the cautions appear more than once")
	}
	if !strings.Contains(page, "<tr><th>Deviations from the method</th><td>see <a href=\"#attention\">Flags and problems</a>: 4 flag(s), 2 problem(s) with the inputs; the reference antenna was past its calibration due date.</td></tr>") {
		t.Error("the method section does not point at the deviations")
	}
}

func TestLimitSummary(t *testing.T) {
	u := fixtureUnit(t, 4, 11)
	got := limitSummary(u.Limits)
	if len(got) != 3 || got[0].Name != "G/T at boresight" || got[1].Name != "G/T scanned" || got[2].Name != "Gain at boresight" {
		t.Fatalf("limit names %+v", got)
	}
	// G/T scanned: beams b01..b03, the smallest margin and the worst verdict.
	worst, beam, verdict := 1e9, "", reduce.VerdictPass
	for _, l := range u.Limits {
		if l.Name == "G/T scanned" {
			if l.WorstMarginDB < worst {
				worst, beam = l.WorstMarginDB, l.Beam
			}
			verdict = reduce.WorseVerdict(verdict, l.Verdict)
		}
	}
	if g := got[1]; g.Beams != 3 || g.WorstMarginDB != worst || g.Beam != beam || g.Verdict != verdict || !g.HasMargin {
		t.Errorf("G/T scanned: %+v, want 3 beams, %v at %s, %s", g, worst, beam, verdict)
	}
}

// openpyxl reads the issue state from the unit workbook's Summary sheet.
func TestUnitWorkbookIssueState(t *testing.T) {
	for _, tc := range []struct {
		name string
		u    *reduce.Unit
		want map[string]any // Summary label -> value as openpyxl reads it
	}{
		{"issued", issueUnit(t, issuedR2), map[string]any{
			"Issue state": "issued", "Revision": 2.0, "Report number": "EATL-GT-KP16-00017-R2", "Date of issue": "2026-11-09",
			"Signatures": "A. Example, Quality engineer, 2026-11-09T09:00:00Z", "Replaces": "EATL-GT-KP16-00017-R1",
			"Not issued because": nil, "Laboratory": "Example Antenna Test Laboratory", "Customer": "Example Satellite Services",
			"Order": "PO-2026-0117", "Runs": 2.0, "First run verdict": "fail", "Verdict": "conditional-pass"}},
		{"void", issueUnit(t, voidR2), map[string]any{
			"Issue state": "void", "Revision": 2.0, "Report number": "EATL-GT-KP16-00017-R2", "Date of issue": nil, "Signatures": nil,
			"Not issued because": "approval void: " + voidR2.Void + "; " + voidR2.Why}},
		{"no laboratory", func() *reduce.Unit { u := issueUnit(t, issuedR1); u.Lab = nil; return u }(), map[string]any{
			"Issue state": "draft", "Report number": nil, "Date of issue": nil, "Signatures": nil, "Laboratory": nil,
			"Not issued because": "the laboratory is not stated (the archive has no lab.yaml): this report cannot be issued"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			data, err := UnitWorkbook(tc.u)
			if err != nil {
				t.Fatal(err)
			}
			s := readWorkbook(t, data).sheet(t, "Summary")
			for label, want := range tc.want {
				r := findRow(s, 1, label)
				if r < 0 {
					t.Errorf("Summary has no row %q", label)
					continue
				}
				if got := s.cell(r, 2); got != want {
					t.Errorf("%s = %#v, want %#v", label, got, want)
				}
			}
			if r := findRow(s, 1, "Revision"); s.format(r, 2) != "0" {
				t.Errorf("revision format %q, want 0", s.format(r, 2))
			}
		})
	}
}

// result.json carries the issue state, the laboratory, the customer and
// the earlier runs, and they survive ParseResultJSON and a second encoding.
func TestResultJSONIssueRoundTrip(t *testing.T) {
	u := issueUnit(t, issuedR2)
	m := -0.982866
	u.History = []reduce.HistoryEntry{{Run: "2026/10/KP16-00017/run-1", Started: mustTime("2026-10-28T14:02:00Z"), Verdict: reduce.VerdictFail,
		WorstLimit: "Gain at boresight", WorstBeam: "b00", WorstMarginDB: m, Notes: "cable not seated"}}
	first, err := ResultJSON(u)
	if err != nil {
		t.Fatal(err)
	}
	back, err := ParseResultJSON(first)
	if err != nil {
		t.Fatal(err)
	}
	second, err := ResultJSON(back)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(first, second) {
		t.Error("result.json with an issue state does not survive a parse and a second encoding")
	}
	if !reflect.DeepEqual(back.Issue, u.Issue) || !reflect.DeepEqual(back.Lab, u.Lab) || !reflect.DeepEqual(back.Customer, u.Customer) ||
		!reflect.DeepEqual(back.History, u.History) {
		t.Errorf("after the round trip: issue %+v lab %+v customer %+v history %+v", back.Issue, back.Lab, back.Customer, back.History)
	}
	var doc struct {
		Issue map[string]any `json:"issue"`
	}
	if err := json.Unmarshal(first, &doc); err != nil {
		t.Fatal(err)
	}
	for k, want := range map[string]any{"state": "issued", "revision": 2.0, "report_number": "EATL-GT-KP16-00017-R2",
		"issued": "2026-11-09T09:00:00Z", "replaces": "EATL-GT-KP16-00017-R1", "inputs_sha256": issueInputs} {
		if doc.Issue[k] != want {
			t.Errorf("result.json issue.%s = %v, want %v", k, doc.Issue[k], want)
		}
	}
	// The parsed file shows the same issue state as the unit.
	if a, b := issueShown(back), issueShown(u); !reflect.DeepEqual(a, b) {
		t.Errorf("issue shown from the parsed file %+v, from the unit %+v", a, b)
	}
}
