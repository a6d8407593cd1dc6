package reduce

import (
	"strings"
	"testing"
	"time"

	"gtpack.example/gtpack/ingest"
)

// Issue states and revision numbers as the contract states them
// (shared/docs/archive-format.md, "approvals/<serial>/*.yaml"): each
// approval of inputs not approved before starts the next revision, a
// further approval of the same inputs co-signs it, and a unit whose
// inputs or verdict no approval names is a draft of the next revision.
func TestIssueOf(t *testing.T) {
	lab := &ingest.Lab{Name: "Example Antenna Test Laboratory", ReportPrefix: "EATL-GT"}
	const serial = "QDA-26-0001"
	h1, h2 := strings.Repeat("1", 64), strings.Repeat("2", 64)
	day := func(d int) time.Time { return time.Date(2026, 11, d, 10, 0, 0, 0, time.UTC) }
	ap := func(h, verdict, by string, d int) *ingest.Approval {
		return &ingest.Approval{Serial: serial, InputsSHA256: h, Verdict: verdict, ApprovedBy: by, Date: day(d), File: "approvals/" + serial + "/" + by + ".yaml"}
	}
	r1 := ap(h1, "pass", "A. Example", 4)
	cosign := ap(h1, "pass", "B. Example", 5)
	r2 := ap(h2, "fail", "A. Example", 9)

	// Never approved: a draft of R1 with its number.
	is := IssueOf(lab, serial, h1, "pass", 0, nil)
	if is.State != IssueDraft || is.Revision != 1 || is.ReportNumber != "EATL-GT-QDA-26-0001-R1" || !is.Issued.IsZero() || !strings.Contains(is.Why, "not yet approved by the laboratory") {
		t.Errorf("never approved: %+v", is)
	}
	// R1 issued; a co-signature adds a signature, not a revision; the date
	// of issue is the first approval's.
	is = IssueOf(lab, serial, h1, "pass", 0, []*ingest.Approval{r1, cosign})
	if is.State != IssueIssued || is.Revision != 1 || len(is.Signatures) != 2 || !is.Issued.Equal(mustTime("2026-11-04T10:00:00Z")) || is.Replaces != "" || is.ReportNumber != "EATL-GT-QDA-26-0001-R1" {
		t.Errorf("R1 co-signed: %+v", is)
	}
	// A changed input makes R1 void: a draft of R2 that names R1 and says
	// what changed.
	is = IssueOf(lab, serial, h2, "fail", 0, []*ingest.Approval{r1, cosign})
	if is.State != IssueVoid || is.Revision != 2 || is.Replaces != "EATL-GT-QDA-26-0001-R1" ||
		!strings.Contains(is.Void, "R1, approved by B. Example") || !strings.Contains(is.Void, "inputs 111111111111 (the unit's are now 222222222222)") ||
		!strings.Contains(is.Void, "verdict pass (the unit's is now fail)") {
		t.Errorf("R1 void: %+v", is)
	}
	// R2 approved: issued, naming R1.
	is = IssueOf(lab, serial, h2, "fail", 0, []*ingest.Approval{r1, cosign, r2})
	if is.State != IssueIssued || is.Revision != 2 || is.Replaces != "EATL-GT-QDA-26-0001-R1" || len(is.Signatures) != 1 || is.ReportNumber != "EATL-GT-QDA-26-0001-R2" {
		t.Errorf("R2: %+v", is)
	}
	// Same inputs, another verdict (a new tool version judging otherwise):
	// void, a draft of the next revision.
	is = IssueOf(lab, serial, h1, "conditional-pass", 0, []*ingest.Approval{r1})
	if is.State != IssueVoid || is.Revision != 2 || !strings.Contains(is.Void, "verdict pass (the unit's is now conditional-pass)") || strings.Contains(is.Void, "inputs") {
		t.Errorf("another verdict: %+v", is)
	}
	// Without a laboratory a unit is never issued, approved or not, and
	// has no report number.
	is = IssueOf(nil, serial, h1, "pass", 0, []*ingest.Approval{r1})
	if is.State != IssueDraft || is.ReportNumber != "" || !strings.Contains(is.Why, "lab.yaml") {
		t.Errorf("no laboratory: %+v", is)
	}
	// An incomplete unit, or one with problems, is not issued.
	for _, tc := range []struct {
		verdict  Verdict
		problems int
	}{{VerdictIncomplete, 1}, {"pass", 2}} {
		is = IssueOf(lab, serial, h1, tc.verdict, tc.problems, []*ingest.Approval{ap(h1, string(tc.verdict), "A", 4)})
		if is.State == IssueIssued || !strings.Contains(is.Why, "incomplete") {
			t.Errorf("%s with %d problems: %+v", tc.verdict, tc.problems, is)
		}
	}
}
