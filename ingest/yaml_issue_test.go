package ingest

import (
	"strings"
	"testing"
	"time"
)

// lab.yaml, a customer and approval files as the contract writes them
// (shared/docs/archive-format.md), and their refusals with file and line.
func TestParseLabCustomerApproval(t *testing.T) {
	lab, err := ParseLab([]byte("schema: 1\nname: Example Antenna Test Laboratory\naddress: [Building 4, 1 Example Road, Example Town]\ncontact: acceptance@lab.example\naccreditation: body and number\nreport_prefix: EATL-GT\n"), "lab.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if lab.Name != "Example Antenna Test Laboratory" || len(lab.Address) != 3 || lab.Address[2] != "Example Town" || lab.ReportPrefix != "EATL-GT" || lab.Contact == "" || lab.Accreditation == "" {
		t.Errorf("lab: %+v", lab)
	}
	for _, tc := range []struct{ text, want string }{
		{"schema: 1\nname: L\naddress: [A]\n", "lab.yaml:1: "},
		{"schema: 1\nname: L\naddress: [A]\nreport_prefix: ../x\n", "lab.yaml:4: "},
		{"schema: 1\nname: L\naddress: []\nreport_prefix: P\n", "lab.yaml:3: "},
		{"schema: 1\nname: L\naddress: [A]\nreport_prefix: P\nphone: 1\n", "lab.yaml:5: "},
	} {
		if _, err := ParseLab([]byte(tc.text), "lab.yaml"); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%q: %v, want %q", tc.text, err, tc.want)
		}
	}

	h := strings.Repeat("ab", 32)
	text := "schema: 1\nserial: KP16-00017\ninputs_sha256: " + h + "\nverdict: pass\napproved_by: A. Example\nrole: Quality engineer\ndate: 2026-11-04T10:00:00Z\ncomment: |-\n  first line\n  second line\n"
	ap, err := ParseApproval([]byte(text), "approvals/KP16-00017/a.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if ap.Serial != "KP16-00017" || ap.InputsSHA256 != h || ap.Verdict != "pass" || ap.ApprovedBy != "A. Example" || !ap.Date.Equal(time.Date(2026, 11, 4, 10, 0, 0, 0, time.UTC)) || ap.Comment != "first line\nsecond line" {
		t.Errorf("approval: %+v", ap)
	}
	// What approve writes reads back as it was.
	back, err := ParseApproval(ApprovalYAML(ap), ap.File)
	if err != nil || back.Comment != ap.Comment || back.Role != ap.Role || back.InputsSHA256 != h || !back.Date.Equal(ap.Date) {
		t.Errorf("ApprovalYAML round trip: %v %+v\n%s", err, back, ApprovalYAML(ap))
	}
	for _, tc := range []struct{ file, text, want string }{
		{"approvals/OTHER/a.yaml", text, "approvals/OTHER/a.yaml:2: approval: serial \"KP16-00017\" is not the folder's \"OTHER\""},
		{"approvals/KP16-00017/a.yaml", strings.Replace(text, h, "ABC", 1), "a.yaml:3: "},
		{"approvals/KP16-00017/a.yaml", strings.Replace(text, "verdict: pass", "verdict: incomplete", 1), "a.yaml:4: "},
		{"approvals/KP16-00017/a.yaml", strings.Replace(text, "2026-11-04T10:00:00Z", "4 Nov 2026", 1), "a.yaml:7: "},
	} {
		if _, err := ParseApproval([]byte(tc.text), tc.file); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: %v, want %q", tc.want, err, tc.want)
		}
	}
}

func TestSpecAndRunCustomer(t *testing.T) {
	a, err := Open("../sample-archive")
	if err != nil {
		t.Fatal(err)
	}
	if a.Lab == nil || a.Lab.ReportPrefix == "" {
		t.Fatalf("sample-archive lab: %+v", a.Lab)
	}
	for _, s := range a.Specs {
		if s.Customer == nil || s.Customer.Name == "" || s.Customer.Order == "" || len(s.Customer.Address) == 0 {
			t.Errorf("%s: customer %+v", s.File, s.Customer)
		}
	}
	n := 0
	for serial, list := range a.Approvals {
		for i, ap := range list {
			n++
			if ap.Serial != serial || (i > 0 && ap.Date.Before(list[i-1].Date)) {
				t.Errorf("%s: approvals of %s out of order or misfiled", ap.File, serial)
			}
			if _, ok := a.Documents[ap.File]; !ok {
				t.Errorf("%s is not among the documents read", ap.File)
			}
		}
	}
	if n != 4 {
		t.Errorf("%d approvals in sample-archive, want 4", n)
	}
	for _, p := range a.Problems {
		t.Errorf("sample-archive: %v", p)
	}
}
