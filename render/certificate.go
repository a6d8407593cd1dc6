package render

import (
	"html/template"
	"math"
	"strconv"
	"time"

	"gtpack.example/gtpack/reduce"
)

// The report's first page is the acceptance certificate: who issues it,
// for whom, what was tested where and when, the verdict against which
// specification under which decision rule, and who approved it, or an
// unmistakable draft. It shows reduce's Issue as it is, with one guard of
// its own: a report is shown as issued only with a laboratory, a report
// number and a signature, whatever the issue state says (a result.json
// edited by hand, or written by a tool that got it wrong, never prints as
// an issued report).

// Issue states as the pages show them.
const (
	stateIssued = reduce.IssueIssued
	stateDraft  = reduce.IssueDraft
	stateVoid   = reduce.IssueVoid
)

// certificate is the view of the first page.
type certificate struct {
	shownIssue
	// Label is what the page says of its state: "Issued", "DRAFT — not
	// issued", "DRAFT — approval void".
	Label string
	// Identity is the report's identification on every printed page: its
	// report number, or, without one, the unit and its inputs' digest.
	Identity   string
	Signatures []signatureRow
	Lab        *reduce.LabInfo
	Customer   *reduce.CustomerInfo
	RunDate    string // the run's start, yyyy-mm-dd hh:mm UTC
	Limits     []certLimit
	// Run is this run's number among the unit's runs (Runs); First is the
	// unit's first run when this one is a retest.
	Run, Runs int
	First     *historyRow
}

type signatureRow struct {
	reduce.Signature
	When string
}

// certLimit is one limit name's result over the beams it applies to.
type certLimit struct {
	Name      string
	Quantity  reduce.Quantity
	Statistic string
	Beams     int
	// Beam is where the worst margin is; WorstMarginDB the smallest finite
	// margin (NaN when none), with the value, the limit and U there.
	Beam                   string
	WorstMarginDB          float64
	ValueDB, LimitDB, UDB  float64
	Verdict                reduce.Verdict
	HasMargin, OnlyOneBeam bool
}

// historyRow is an earlier run in the report's history and on the
// certificate.
type historyRow struct {
	reduce.HistoryEntry
	N         int // run number, 1 for the first
	Date      string
	MarginDB  float64 // NaN when the run has no finite margin
	HasMargin bool
	NotesHTML template.HTML
}

// shownIssue is the issue state as the pages and the workbook show it:
// reduce's Issue, but never issued without a laboratory, a report number
// and a signature.
type shownIssue struct {
	State                  reduce.IssueState
	Issued                 bool
	Why, Void              string
	ReportNumber, Replaces string
	Revision               int
	// RevisionText is "Revision 1" or "Draft of revision 2".
	RevisionText string
	IssueDate    string // yyyy-mm-dd, "" for a draft
}

func issueShown(u *reduce.Unit) shownIssue {
	is := u.Issue
	c := shownIssue{ReportNumber: is.ReportNumber, Revision: is.Revision, Replaces: is.Replaces, Why: is.Why, Void: is.Void}
	switch {
	case u.Lab == nil:
		c.State = stateDraft
		if is.State == stateVoid {
			c.State = stateVoid
		}
		c.Why = "the laboratory is not stated (the archive has no lab.yaml): this report cannot be issued"
		c.ReportNumber, c.Replaces = "", ""
	case is.State == stateIssued && is.ReportNumber != "" && len(is.Signatures) > 0:
		c.State, c.Issued = stateIssued, true
	case is.State == stateVoid:
		c.State = stateVoid
	default:
		c.State = stateDraft
		if is.State == stateIssued {
			c.Why = "the issue state names no report number or no approval: this report is not issued"
		}
	}
	if c.Issued {
		c.RevisionText = "Revision " + itoaRev(c.Revision)
		c.IssueDate = dateOf(is.Issued)
		c.Why, c.Void = "", ""
	} else {
		if c.Why == "" {
			c.Why = "no approval names this unit's inputs and verdict"
		}
		c.RevisionText = "Draft"
		if c.Revision > 0 {
			c.RevisionText = "Draft of revision " + itoaRev(c.Revision)
		}
	}
	return c
}

func certificateOf(u *reduce.Unit) (*certificate, error) {
	sh := issueShown(u)
	c := &certificate{shownIssue: sh, Lab: u.Lab, Customer: u.Customer, RunDate: dateTimeText(u.Started),
		Runs: len(u.History) + 1}
	c.Run = c.Runs
	switch c.State {
	case stateIssued:
		c.Label = "Issued"
		for _, s := range u.Issue.Signatures {
			c.Signatures = append(c.Signatures, signatureRow{Signature: s, When: dateTimeText(s.Date)})
		}
	case stateVoid:
		c.Label = "DRAFT — approval void"
	default:
		c.Label = "DRAFT — not issued"
	}
	c.Identity = c.ReportNumber
	if c.Identity == "" {
		c.Identity = "Unit " + u.Serial
		if h := u.Issue.InputsSHA256; h != "" {
			c.Identity += ", inputs " + h[:min(12, len(h))]
		}
	}
	c.Limits = limitSummary(u.Limits)
	if len(u.History) > 0 {
		rows, err := historyRows(u.History)
		if err != nil {
			return nil, err
		}
		c.First = &rows[0]
	}
	return c, nil
}

func itoaRev(r int) string {
	if r < 1 {
		return "–"
	}
	return strconv.Itoa(r)
}

// limitSummary is one row per limit name, in the order of the names'
// first results: the worst margin over the limit's beams and the worst
// verdict (reduce.WorseVerdict), as the fleet's FleetUnitLimit has them.
func limitSummary(ls []reduce.LimitResult) []certLimit {
	var out []certLimit
	at := map[string]int{}
	for _, l := range ls {
		i, ok := at[l.Name]
		if !ok {
			i = len(out)
			at[l.Name] = i
			out = append(out, certLimit{Name: l.Name, Quantity: l.Quantity, Statistic: l.Statistic, Verdict: l.Verdict,
				WorstMarginDB: math.NaN(), ValueDB: math.NaN(), LimitDB: math.NaN(), UDB: math.NaN()})
		}
		c := &out[i]
		c.Beams++
		c.Verdict = reduce.WorseVerdict(c.Verdict, l.Verdict)
		if finite(l.WorstMarginDB) && (!c.HasMargin || l.WorstMarginDB < c.WorstMarginDB) {
			c.HasMargin, c.WorstMarginDB, c.Beam = true, l.WorstMarginDB, l.Beam
			c.ValueDB, c.LimitDB, c.UDB = l.ValueDB, l.LimitDB, l.ExpandedUncertaintyDB
		}
	}
	for i := range out {
		out[i].OnlyOneBeam = out[i].Beams == 1
	}
	return out
}

// historyRows are the earlier runs, oldest first, with their notes
// rendered as the acceptance run's are (notesRenderer: nothing loads,
// nothing runs).
func historyRows(hs []reduce.HistoryEntry) ([]historyRow, error) {
	rows := make([]historyRow, len(hs))
	for i, h := range hs {
		r := historyRow{HistoryEntry: h, N: i + 1, Date: dateOf(h.Started), MarginDB: math.NaN()}
		if finite(h.WorstMarginDB) {
			r.MarginDB, r.HasMargin = h.WorstMarginDB, true
		}
		if h.Notes != "" {
			notes, err := markdown(h.Notes)
			if err != nil {
				return nil, err
			}
			r.NotesHTML = notes
		}
		rows[i] = r
	}
	return rows, nil
}

// dateTimeText is a time as "yyyy-mm-dd hh:mm UTC" (seconds when they
// are not zero), "" for the zero time.
func dateTimeText(t time.Time) string {
	if t.IsZero() {
		return ""
	}
	t = t.UTC()
	if t.Second() != 0 {
		return t.Format("2006-01-02 15:04:05") + " UTC"
	}
	return t.Format("2006-01-02 15:04") + " UTC"
}
