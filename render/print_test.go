package render

import (
	"bytes"
	"context"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"gtpack.example/gtpack/reduce"
)

// The print test does what a customer's printer does: headless Chromium
// prints the report to PDF on A4 and on Letter, and poppler's pdftotext
// (Debian poppler-utils) reads the text of every page back.

// needTool returns the path of an outside tool, or skips the test (fails
// under CI=true) when it is not installed.
func needTool(t *testing.T, path, pkg string) string {
	t.Helper()
	if _, err := os.Stat(path); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("%s (Debian %s) is required under CI: %v", path, pkg, err)
		}
		t.Skipf("%s not installed (Debian %s): %v", path, pkg, err)
	}
	return path
}

// printPDF prints an HTML file to PDF with headless Chromium on a fresh
// profile, the way the README says a report is printed.
func printPDF(t *testing.T, chromium, html, pdf string) {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Minute)
	defer cancel()
	cmd := exec.CommandContext(ctx, chromium, "--headless", "--no-sandbox", "--disable-gpu",
		"--disable-background-networking", "--disable-component-update", "--disable-sync", "--no-first-run",
		"--user-data-dir="+t.TempDir(), "--no-pdf-header-footer", "--print-to-pdf="+pdf, "file://"+html)
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("chromium --print-to-pdf: %v\n%s", err, out)
	}
	if b, err := os.ReadFile(pdf); err != nil || !bytes.HasPrefix(b, []byte("%PDF-")) {
		t.Fatalf("chromium wrote no PDF to %s: %v", pdf, err)
	}
}

// pdfPages is the text of each page of a PDF (pdftotext -layout, pages
// split on form feeds).
func pdfPages(t *testing.T, pdftotext, pdf string) []string {
	t.Helper()
	out, err := exec.Command(pdftotext, "-layout", pdf, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext %s: %v", pdf, err)
	}
	pages := strings.Split(string(out), "\f")
	if n := len(pages); n > 0 && strings.TrimSpace(pages[n-1]) == "" {
		pages = pages[:n-1] // pdftotext ends every page with a form feed
	}
	return pages
}

// pdfPageSize is the size of a PDF's first page in points (pdfinfo).
func pdfPageSize(t *testing.T, pdfinfo, pdf string) (w, h float64) {
	t.Helper()
	out, err := exec.Command(pdfinfo, pdf).Output()
	if err != nil {
		t.Fatalf("pdfinfo %s: %v", pdf, err)
	}
	m := regexp.MustCompile(`Page size:\s+([\d.]+) x ([\d.]+) pts`).FindSubmatch(out)
	if m == nil {
		t.Fatalf("pdfinfo gave no page size:\n%s", out)
	}
	fmt.Sscan(string(m[1]), &w)
	fmt.Sscan(string(m[2]), &h)
	return w, h
}

var pageOf = regexp.MustCompile(`page (\d+) of (\d+)`)

func TestPrintReport(t *testing.T) {
	chromium := needTool(t, chromiumPath, "chromium")
	pdftotext := needTool(t, "/usr/bin/pdftotext", "poppler-utils")
	pdfinfo := needTool(t, "/usr/bin/pdfinfo", "poppler-utils")

	retest := issueUnit(t, voidR2)
	m := -0.98
	retest.History = []reduce.HistoryEntry{{Run: "2026/10/KP16-00017/run-1", Started: mustTime("2026-10-28T14:02:00Z"),
		Verdict: reduce.VerdictFail, WorstLimit: "Gain at boresight", WorstBeam: "b00", WorstMarginDB: m, Notes: hostileNotes}}
	units := []struct {
		name string
		u    *reduce.Unit
		// state is what page 1 says of the issue state.
		state string
		draft bool
	}{
		{"issued", issueUnit(t, issuedR1), "ISSUED EATL-GT-KP16-00017-R1", false},
		{"void", retest, "DRAFT — APPROVAL VOID", true},
		{"draft", issueUnit(t, draftR1), "DRAFT — NOT ISSUED", true},
	}
	for _, tc := range units {
		// A realistic size: 16 beams of 801 points.
		full := fixtureUnit(t, 16, 801)
		full.Serial, full.Lab, full.Customer, full.Issue, full.History = tc.u.Serial, tc.u.Lab, tc.u.Customer, tc.u.Issue, tc.u.History
		html := mustReport(t, full)
		id := issueShown(full).ReportNumber
		for _, paper := range []struct {
			name string
			w, h float64 // points
		}{{"A4", 595.28, 841.89}, {"letter", 612, 792}} {
			t.Run(tc.name+" "+paper.name, func(t *testing.T) {
				t.Parallel()
				dir := t.TempDir()
				// The report leaves the paper to the printer (@page size
				// auto); the test chooses it as a print dialog would.
				page := bytes.Replace(html, []byte("</head>"), []byte("<style>@page { size: "+paper.name+"; }</style></head>"), 1)
				in, out := filepath.Join(dir, "report.html"), filepath.Join(dir, "report.pdf")
				if err := os.WriteFile(in, page, 0o644); err != nil {
					t.Fatal(err)
				}
				printPDF(t, chromium, in, out)
				if w, h := pdfPageSize(t, pdfinfo, out); abs(w-paper.w) > 1 || abs(h-paper.h) > 1 {
					t.Errorf("page size %.1f x %.1f pt, want %s (%.1f x %.1f)", w, h, paper.name, paper.w, paper.h)
				}
				pages := pdfPages(t, pdftotext, out)
				if len(pages) < 3 {
					t.Fatalf("%d pages", len(pages))
				}
				t.Logf("%s on %s: %d pages", tc.name, paper.name, len(pages))
				if dir := os.Getenv("GTPACK_SCREENSHOTS"); dir != "" {
					_ = os.WriteFile(filepath.Join(dir, "report-"+tc.name+"-"+paper.name+".pdf"), mustRead(t, out), 0o644)
				}
				for i, text := range pages {
					n := i + 1
					m := pageOf.FindAllStringSubmatch(text, -1)
					if len(m) != 1 || m[0][1] != fmt.Sprint(n) || m[0][2] != fmt.Sprint(len(pages)) {
						t.Errorf("page %d carries %q, want once \"page %d of %d\"", n, m, n, len(pages))
					}
					if !strings.Contains(text, id) {
						t.Errorf("page %d does not carry the report number %s", n, id)
					}
					if !strings.Contains(text, "Revision 1") && !strings.Contains(text, "Draft of revision") {
						t.Errorf("page %d does not carry the revision", n)
					}
					if tc.draft != strings.Contains(text, "DRAFT — not issued") {
						t.Errorf("page %d: DRAFT in the margin %v, want %v", n, !tc.draft, tc.draft)
					}
					// No near-empty page: every page has a body, the last
					// one the last rows of the input files and the end.
					if lines := bodyLines(text); lines < 8 {
						t.Errorf("page %d holds %d lines of text:\n%s", n, lines, text)
					}
				}
				first := pages[0]
				for _, want := range []string{"CONDITIONAL PASS", tc.state, "Example Antenna Test Laboratory", "Example Satellite Services",
					"The results relate only to the item tested", "Statement of conformity"} {
					if !strings.Contains(first, want) {
						t.Errorf("page 1 lacks %q:\n%s", want, first)
					}
				}
				if tc.draft == strings.Contains(first, "Approved by") {
					t.Errorf("page 1: approvals shown %v for a draft %v", !tc.draft, tc.draft)
				}
				if tc.name == "void" && !strings.Contains(first, "Run 2 of 2: retest") {
					t.Errorf("page 1 does not say the unit was retested:\n%s", first)
				}
				last := pages[len(pages)-1]
				if !strings.Contains(last, "End of report "+id) {
					t.Errorf("the last page does not mark the end of report %s:\n%s", id, last)
				}
				for i, text := range pages[:len(pages)-1] {
					if strings.Contains(text, "End of report") {
						t.Errorf("page %d says the report ends", i+1)
					}
				}
			})
		}
	}
}

// bodyLines counts a page's non-empty lines, leaving out the margin boxes
// (the first and last non-empty lines).
func bodyLines(page string) int {
	n := 0
	for _, l := range strings.Split(page, "\n") {
		if strings.TrimSpace(l) != "" {
			n++
		}
	}
	return max(0, n-2)
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

func mustRead(t *testing.T, path string) []byte {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return b
}
