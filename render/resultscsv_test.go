package render

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"os"
	"os/exec"
	"slices"
	"strings"
	"testing"

	"gtpack.example/gtpack/reduce"
)

// The writer gives ResultsCSV's bytes unit by unit, and refuses units out
// of serial order.
func TestResultsCSVWriter(t *testing.T) {
	_, sums := fixtureFleetAndSummaries(t)
	sums = append(sums, reduce.UnitSummary{Serial: "ZZ-0001", Product: "P", Verdict: reduce.VerdictIncomplete})
	want := ResultsCSV(sums)
	var got bytes.Buffer
	w, err := NewResultsCSVWriter(&got)
	if err != nil {
		t.Fatal(err)
	}
	for i := range sums {
		if err := w.Unit(&sums[i]); err != nil {
			t.Fatal(err)
		}
	}
	if err := w.Flush(); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got.Bytes(), want) {
		t.Errorf("streamed results.csv differs from ResultsCSV (%d vs %d bytes)", got.Len(), len(want))
	}
	if err := w.Unit(&sums[0]); err == nil {
		t.Error("a unit out of serial order was accepted")
	}
}

// undoSafeCSVText is the rule a program applies to get a text field back:
// drop one leading quote when the leading quotes are followed by one of
// the six formula characters.
func undoSafeCSVText(s string) string {
	rest := strings.TrimLeft(s, "'")
	if rest != s && rest != "" && strings.IndexByte("=+-@\t\r", rest[0]) >= 0 {
		return s[1:]
	}
	return s
}

// The six characters that make a spreadsheet read a cell as a formula, and
// the quote in front, are OWASP's ("CSV Injection", the Cheat Sheet Series'
// guidance: prepend a single quote to cells beginning with =, +, -, @, tab
// 0x09 or carriage return 0x0D).
func TestSafeCSVText(t *testing.T) {
	tests := []struct{ in, want string }{
		{`=HYPERLINK("http://x","y")`, `'=HYPERLINK("http://x","y")`},
		{"=1+2", "'=1+2"},
		{"+1", "'+1"},
		{"-1", "'-1"}, // as text (a serial, a name): numbers never come here
		{"@SUM(A1)", "'@SUM(A1)"},
		{"\tb00", "'\tb00"},
		{"\rb00", "'\rb00"},
		{"'=1", "''=1"}, // one more quote, so that the rule can be undone
		{"''-x", "'''-x"},
		{"'quoted", "'quoted"},
		{"'", "'"},
		{"", ""},
		{"b00", "b00"},
		{"G/T min", "G/T min"},
		{"x=1", "x=1"},
		{" =1", " =1"}, // a space is not one of the six
	}
	for _, tc := range tests {
		got := safeCSVText(tc.in)
		if got != tc.want {
			t.Errorf("safeCSVText(%q) = %q, want %q", tc.in, got, tc.want)
		}
		if back := undoSafeCSVText(got); back != tc.in {
			t.Errorf("undoing safeCSVText(%q) = %q gives %q", tc.in, got, back)
		}
	}
}

// formulaSummary is a unit whose every text field looks like a formula to
// a spreadsheet application, with negative numbers that must stay numbers.
func formulaSummary() reduce.UnitSummary {
	return reduce.UnitSummary{
		Serial: "=cmd|' /C calc'!A0", Product: "+PRODUCT", Started: mustTime("2026-11-03T00:00:00Z"), Verdict: "@pass",
		Limits: []reduce.LimitResult{{
			Name: `=HYPERLINK("http://x","y")`, Quantity: "\tgt", Beam: "\rb00", Statistic: "-min",
			WorstMarginDB: -1.25, AtFrequencyHz: 11.725e9, ValueDB: -0.5, LimitDB: 0.75,
			ExpandedUncertaintyDB: 0.25, Verdict: "=fail",
		}},
		IssueState: "=issued", Revision: 3, ReportNumber: "-R3",
	}
}

// A formula-like text in results.csv reads back, by Go's RFC 4180 reader
// and by Python's csv module, as the text with a quote in front; the
// numbers are the numbers, "-1.25" without a quote.
func TestResultsCSVFormulaText(t *testing.T) {
	data := ResultsCSV([]reduce.UnitSummary{formulaSummary()})
	want := []string{
		"'=cmd|' /C calc'!A0", "'+PRODUCT", "2026-11-03T00:00:00Z", "'@pass", "'\rb00", `'=HYPERLINK("http://x","y")`,
		"'\tgt", "'-min", "-1.25", "11.725", "-0.5", "0.75", "0.25", "'=fail", "'=issued", "3", "'-R3",
	}
	for reader, rows := range map[string][][]string{"encoding/csv": goCSV(t, data), "python csv": pythonCSV(t, data)} {
		if len(rows) != 2 {
			t.Errorf("%s: %d rows, want the header and one", reader, len(rows))
			continue
		}
		if !slices.Equal(rows[1], want) {
			t.Errorf("%s: row\n%q\nwant\n%q", reader, rows[1], want)
		}
	}
}

// The per-frequency CSV's column names carry the beam ids: text, quoted
// when formula-like; its cells are numbers, negative ones unquoted.
func TestUnitCSVFormulaText(t *testing.T) {
	u := &reduce.Unit{Serial: "S", Beams: []reduce.Beam{
		{ID: "=b", FrequencyHz: []float64{1e9, 2e9}, GTdBPerK: []float64{-1.25, 2}, RangeLossDB: []float64{50, 51}},
		{ID: "-b", FrequencyHz: []float64{1e9, 2e9}, GTdBPerK: []float64{-3.5, -0.0004}, RangeLossDB: []float64{52, 53}},
	}}
	data := UnitCSV(u)
	want := [][]string{
		{"frequency_hz", "'=b_range_loss_db", "'=b_gt_db_per_k", "'-b_range_loss_db", "'-b_gt_db_per_k"},
		{"1000000000", "50", "-1.25", "52", "-3.5"},
		{"2000000000", "51", "2", "53", "0"},
	}
	for reader, rows := range map[string][][]string{"encoding/csv": goCSV(t, data), "python csv": pythonCSV(t, data)} {
		if !slices.EqualFunc(rows, want, slices.Equal[[]string]) {
			t.Errorf("%s: rows\n%q\nwant\n%q", reader, rows, want)
		}
	}
}

func goCSV(t *testing.T, data []byte) [][]string {
	t.Helper()
	rows, err := csv.NewReader(bytes.NewReader(data)).ReadAll()
	if err != nil {
		t.Fatalf("encoding/csv: %v", err)
	}
	return rows
}

// pythonCSV reads data with Python's csv module (the reader most scripts
// that take results.csv use), or skips when python3 is missing (fails
// under CI=true).
func pythonCSV(t *testing.T, data []byte) [][]string {
	t.Helper()
	const python = "/usr/bin/python3"
	if _, err := os.Stat(python); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("python3 is required in CI: %v", err)
		}
		t.Skipf("python3 not available at %s: %v", python, err)
	}
	const script = `
import csv, io, json, sys
rows = list(csv.reader(io.StringIO(sys.stdin.buffer.read().decode("utf-8"), newline="")))
json.dump(rows, sys.stdout)
`
	cmd := exec.Command(python, "-c", script)
	cmd.Stdin = bytes.NewReader(data)
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("python csv: %v", err)
	}
	var rows [][]string
	if err := json.Unmarshal(out, &rows); err != nil {
		t.Fatalf("python csv output: %v", err)
	}
	return rows
}
