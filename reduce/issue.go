package reduce

import (
	"fmt"
	"strings"
	"time"

	"gtpack.example/gtpack/ingest"
)

// IssueState is the state of a unit's report as an issued document.
type IssueState string

// Issue states of a unit's report.
const (
	// IssueIssued: an approval names the unit's inputs and verdict.
	IssueIssued IssueState = "issued"
	// IssueDraft: no approval yet, or the report cannot be issued (no
	// laboratory, an incomplete unit).
	IssueDraft IssueState = "draft"
	// IssueVoid: a draft whose earlier revision's approval named other
	// inputs or another verdict.
	IssueVoid IssueState = "void"
)

// Issue is the state of a unit's report as a document a laboratory issues
// (contract, "approvals/<serial>/*.yaml"; ISO/IEC 17025 clause 7.8).
type Issue struct {
	State IssueState
	// Revision is the issued revision, or for a draft the revision it
	// would be once approved (1 for a unit never approved).
	Revision int
	// ReportNumber is <report_prefix>-<serial>-R<revision>; "" without a
	// laboratory.
	ReportNumber string
	// Issued is the date of issue (the revision's first approval); zero
	// for a draft.
	Issued     time.Time
	Signatures []Signature
	// Replaces is the report number of the revision before, from R2 on.
	Replaces string
	// Void says which approval no longer holds and why (state void).
	Void string
	// Why says what keeps a draft from being issued now.
	Why string
	// InputsSHA256 is the digest of the unit's inputs the approvals name.
	InputsSHA256 string
}

// Signature is one approval of the issued revision.
type Signature struct {
	By      string
	Role    string
	Date    time.Time
	Comment string
	File    string
}

// ReportNumber is the number of a revision of a serial's report.
func ReportNumber(lab *ingest.Lab, serial string, revision int) string {
	if lab == nil || revision < 1 {
		return ""
	}
	return fmt.Sprintf("%s-%s-R%d", lab.ReportPrefix, serial, revision)
}

// IssueOf is the issue state of a unit whose inputs have the digest
// inputsSHA256 and whose reduction gave verdict with problems, under the
// serial's approvals (in date order) and the laboratory (nil: none).
//
// Revisions follow the contract: each approval of an inputs_sha256 not
// approved before starts the next revision; a further approval of the
// same inputs is another signature on it. The unit is issued when an
// approval names its inputs and its verdict, the laboratory is stated and
// the unit is complete; otherwise it is a draft of the next revision, void
// when an earlier approval exists (which then names other inputs or
// another verdict).
func IssueOf(lab *ingest.Lab, serial, inputsSHA256 string, verdict Verdict, problems int, approvals []*ingest.Approval) Issue {
	revOf := map[string]int{}
	var byRev [][]*ingest.Approval // approvals of revision i+1
	for _, a := range approvals {
		r, ok := revOf[a.InputsSHA256]
		if !ok {
			byRev = append(byRev, nil)
			r = len(byRev)
			revOf[a.InputsSHA256] = r
		}
		byRev[r-1] = append(byRev[r-1], a)
	}
	is := Issue{InputsSHA256: inputsSHA256}
	complete := verdict != VerdictIncomplete && problems == 0
	if r, ok := revOf[inputsSHA256]; ok && complete && lab != nil {
		var sigs []Signature
		for _, a := range byRev[r-1] {
			if Verdict(a.Verdict) == verdict {
				sigs = append(sigs, signatureOf(a))
			}
		}
		if len(sigs) > 0 {
			is.State, is.Revision, is.Signatures, is.Issued = IssueIssued, r, sigs, sigs[0].Date
			is.ReportNumber = ReportNumber(lab, serial, r)
			if r > 1 {
				is.Replaces = ReportNumber(lab, serial, r-1)
			}
			return is
		}
	}
	// Not issued: a draft of the next revision, unless the inputs are
	// those of a revision whose approvals name another verdict only.
	is.State, is.Revision = IssueDraft, len(byRev)+1
	if len(byRev) > 0 {
		last := approvals[len(approvals)-1]
		var what []string
		if last.InputsSHA256 != inputsSHA256 {
			what = append(what, fmt.Sprintf("inputs %s (the unit's are now %s)", short(last.InputsSHA256), short(inputsSHA256)))
		}
		if Verdict(last.Verdict) != verdict {
			what = append(what, fmt.Sprintf("verdict %s (the unit's is now %s)", last.Verdict, verdict))
		}
		if len(what) > 0 {
			is.State = IssueVoid
			is.Void = fmt.Sprintf("R%d, approved by %s on %s (%s), named %s", revOf[last.InputsSHA256], last.ApprovedBy,
				last.Date.UTC().Format(time.RFC3339), last.File, strings.Join(what, " and "))
		} else {
			// Approved as it is, but not issuable now (see Why): the
			// revision stays the approved one.
			is.Revision = revOf[inputsSHA256]
		}
	}
	if is.Revision > 1 {
		is.Replaces = ReportNumber(lab, serial, is.Revision-1)
	}
	is.ReportNumber = ReportNumber(lab, serial, is.Revision)
	switch {
	case lab == nil:
		is.Why = "the laboratory is not stated (the archive has no lab.yaml): the report cannot be issued"
	case !complete:
		is.Why = "the unit is incomplete or has problems: it cannot be approved"
	default:
		is.Why = fmt.Sprintf("not yet approved by the laboratory: its approval issues this report as revision %d", is.Revision)
	}
	return is
}

func signatureOf(a *ingest.Approval) Signature {
	return Signature{By: a.ApprovedBy, Role: a.Role, Date: a.Date, Comment: a.Comment, File: a.File}
}

func short(h string) string {
	if len(h) > 12 {
		return h[:12]
	}
	return h
}
