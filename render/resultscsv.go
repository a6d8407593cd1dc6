package render

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"

	"gtpack.example/gtpack/reduce"
)

// The columns of results.csv (the site contract): the unit's, its limit's
// (empty for a unit without limits) and the report's issue state, appended
// so that the columns before keep their places.
var (
	resultsUnitColumns  = []string{"serial", "product", "started", "unit_verdict"}
	resultsLimitColumns = []string{"beam", "limit", "quantity", "statistic",
		"worst_margin_db", "at_frequency_ghz", "value", "limit_value", "expanded_uncertainty_db", "verdict"}
	resultsIssueColumns = []string{"issue_state", "revision", "report_number"}
	resultsCSVHeader    = slices.Concat(resultsUnitColumns, resultsLimitColumns, resultsIssueColumns)
)

// ResultsCSV returns results.csv: a header and one row per unit, beam and
// limit (one per reduce.LimitResult), units sorted by serial, limits in the
// order reduce gave them, each row ending with the unit's issue state,
// revision and report number. A unit without limits still has one row,
// with the limit columns empty. Numbers are the shortest text that reads back to
// the same float64; frequencies are in GHz to 1 Hz; a non-finite number is
// an empty field. Text fields go through safeCSVText, so that a
// spreadsheet application opening the file shows a text such as "=1+2" as
// text and never evaluates it; numbers are written as they are.
// ResultsCSVWriter writes the same bytes one unit at a time.
func ResultsCSV(units []reduce.UnitSummary) []byte {
	order := make([]int, len(units))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return units[order[a]].Serial < units[order[b]].Serial })
	var buf bytes.Buffer
	w, _ := NewResultsCSVWriter(&buf) // writes to a bytes.Buffer do not fail
	for _, i := range order {
		_ = w.Unit(&units[i]) // in serial order: cannot fail
	}
	_ = w.Flush()
	return buf.Bytes()
}

// ResultsCSVWriter writes results.csv to a writer one unit at a time, so
// that a site's file never has to be held whole.
type ResultsCSVWriter struct {
	w     *csv.Writer
	row   []string
	last  string
	units int
}

// NewResultsCSVWriter writes the header of results.csv to w.
func NewResultsCSVWriter(w io.Writer) (*ResultsCSVWriter, error) {
	r := &ResultsCSVWriter{w: csv.NewWriter(w), row: make([]string, 0, len(resultsCSVHeader))}
	if err := r.w.Write(resultsCSVHeader); err != nil {
		return nil, err
	}
	return r, nil
}

// Unit writes the rows of one unit. Units must come in serial order (as
// ResultsCSV sorts them); a serial before the previous one is refused.
func (r *ResultsCSVWriter) Unit(u *reduce.UnitSummary) error {
	if r.units > 0 && u.Serial < r.last {
		return fmt.Errorf("render: results.csv: unit %q after %q, expected serial order", u.Serial, r.last)
	}
	r.last = u.Serial
	r.units++
	head := []string{safeCSVText(u.Serial), safeCSVText(u.Product), safeCSVText(timeText(u.Started)), safeCSVText(string(u.Verdict))}
	revision := ""
	if u.Revision > 0 {
		revision = strconv.Itoa(u.Revision)
	}
	issue := []string{safeCSVText(string(u.IssueState)), revision, safeCSVText(u.ReportNumber)}
	if len(u.Limits) == 0 {
		return r.w.Write(append(append(append(r.row[:0], head...), make([]string, len(resultsLimitColumns))...), issue...))
	}
	for _, l := range u.Limits {
		row := append(append(r.row[:0], head...),
			safeCSVText(l.Beam), safeCSVText(l.Name), safeCSVText(string(l.Quantity)), safeCSVText(l.Statistic),
			csvFloat(l.WorstMarginDB), csvGHz(l.AtFrequencyHz), csvFloat(l.ValueDB), csvFloat(l.LimitDB),
			csvFloat(l.ExpandedUncertaintyDB), safeCSVText(string(l.Verdict)))
		row = append(row, issue...)
		if err := r.w.Write(row); err != nil {
			return err
		}
	}
	return nil
}

// Flush writes what is buffered to the underlying writer.
func (r *ResultsCSVWriter) Flush() error {
	r.w.Flush()
	return r.w.Error()
}

// safeCSVText is a text field of a CSV file as a spreadsheet application
// must show it: as text. A cell that begins with '=', '+', '-', '@', a tab
// or a carriage return is read as a formula by such applications (OWASP,
// "CSV Injection"), so such a text gets a single quote in front, which they
// take as "this is text". A text whose leading single quotes are followed
// by one of those characters gets one more quote, so that the rule can be
// undone exactly: a program that wants the original drops one leading
// quote from a text field whose leading quotes are followed by one of the
// six. Only text goes through here, never a field formatted from a number:
// "-1.25" stays a number.
func safeCSVText(s string) string {
	rest := strings.TrimLeft(s, "'")
	if rest != "" && strings.IndexByte("=+-@\t\r", rest[0]) >= 0 {
		return "'" + s
	}
	return s
}

func csvFloat(f float64) string {
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return ""
	}
	return strconv.FormatFloat(f, 'g', -1, 64)
}

// csvGHz writes a frequency in GHz to 1 Hz, without trailing zeros, so that
// 11.725e9 Hz is "11.725" and not the binary neighbour of 11.725e9/1e9.
func csvGHz(hz float64) string {
	if math.IsNaN(hz) || math.IsInf(hz, 0) {
		return ""
	}
	s := strconv.FormatFloat(hz/1e9, 'f', 9, 64)
	s = strings.TrimRight(s, "0")
	s = strings.TrimSuffix(s, ".")
	if s == "-0" {
		s = "0"
	}
	return s
}
