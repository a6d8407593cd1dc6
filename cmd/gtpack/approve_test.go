package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// issueOf reads the issue state a build wrote into a unit's result.json.
func issueOf(t *testing.T, site, serial string) map[string]any {
	t.Helper()
	data, err := os.ReadFile(filepath.Join(site, "units", serial, "result.json"))
	if err != nil {
		t.Fatal(err)
	}
	var r struct {
		Issue map[string]any `json:"issue"`
	}
	if err := json.Unmarshal(data, &r); err != nil {
		t.Fatal(err)
	}
	return r.Issue
}

// gtpack approve and the issue states a build shows (contract,
// "approvals/<serial>/*.yaml"): without lab.yaml nothing is issued and
// approve refuses; R1 once approved, co-signed by a second approval; a
// changed input makes R1 void and the unit a draft of R2; R2 once approved
// names R1; an incomplete unit is refused.
func TestApproveAndIssueStates(t *testing.T) {
	archive := smallArchive(t)
	os.Remove(filepath.Join(archive, "lab.yaml"))
	serials := serialsOf(runFolders(t, archive))
	serial := serials[0]
	site := filepath.Join(t.TempDir(), "site")

	// No laboratory: never issued, and approve says why.
	runQuiet(t, "build", archive, "-o", site, "--quiet")
	if is := issueOf(t, site, serial); is["state"] != "draft" || is["report_number"] != nil || !strings.Contains(is["why"].(string), "lab.yaml") {
		t.Errorf("without lab.yaml: %v", is)
	}
	if code, out := runOut("approve", archive, serial, "--by", "A. Tester"); code != exitRefused || !strings.Contains(out, "no lab.yaml") {
		t.Errorf("approve without lab.yaml: %d\n%s", code, out)
	}
	lab := "schema: 1\nname: Example Antenna Test Laboratory\naddress: [Building 4, 1 Example Road]\nreport_prefix: EATL-GT\n"
	if err := os.WriteFile(filepath.Join(archive, "lab.yaml"), []byte(lab), 0o644); err != nil {
		t.Fatal(err)
	}

	// R1, then a co-signature.
	if code, out := runOut("approve", archive, serial, "--by", "A. Tester", "--role", "Test engineer", "--date", "2026-11-04T10:00:00Z"); code != exitOK || !strings.Contains(out, "issued EATL-GT-"+serial+"-R1") {
		t.Fatalf("approve: %d\n%s", code, out)
	}
	if code, out := runOut("approve", archive, serial, "--by", "A. Tester", "--date", "2026-11-04T11:00:00Z"); code != exitRefused || !strings.Contains(out, "already approved") {
		t.Errorf("the same person again: %d\n%s", code, out)
	}
	if code, out := runOut("approve", archive, serial, "--by", "Q. Reviewer", "--date", "2026-11-05T09:00:00Z"); code != exitOK {
		t.Fatalf("co-signature: %d\n%s", code, out)
	}
	runQuiet(t, "build", archive, "-o", site, "--quiet")
	is := issueOf(t, site, serial)
	if is["state"] != "issued" || is["revision"] != 1.0 || is["report_number"] != "EATL-GT-"+serial+"-R1" || is["issued"] != "2026-11-04T10:00:00Z" || len(is["signatures"].([]any)) != 2 {
		t.Errorf("R1 co-signed: %v", is)
	}
	if is := issueOf(t, site, serials[1]); is["state"] != "draft" || is["report_number"] != "EATL-GT-"+serials[1]+"-R1" {
		t.Errorf("an unapproved unit: %v", is)
	}

	// A changed input: R1 void, a draft of R2.
	run := acceptanceRun(t, archive, 0)
	editFile(t, filepath.Join(run, "run.yaml"), func(s string) string { return strings.Replace(s, "operator: ", "operator: X", 1) })
	runQuiet(t, "build", archive, "-o", site, "--quiet")
	is = issueOf(t, site, serial)
	if is["state"] != "void" || is["revision"] != 2.0 || is["replaces"] != "EATL-GT-"+serial+"-R1" || !strings.Contains(is["void"].(string), "R1, approved by Q. Reviewer") {
		t.Errorf("after a changed input: %v", is)
	}
	if code, out := runOut("approve", archive, serial, "--by", "Q. Reviewer", "--date", "2026-11-09T09:00:00Z"); code != exitOK || !strings.Contains(out, "issued EATL-GT-"+serial+"-R2") {
		t.Fatalf("approve R2: %d\n%s", code, out)
	}
	runQuiet(t, "build", archive, "-o", site, "--quiet")
	if is := issueOf(t, site, serial); is["state"] != "issued" || is["revision"] != 2.0 || is["replaces"] != "EATL-GT-"+serial+"-R1" {
		t.Errorf("R2: %v", is)
	}
	// The approvals are in the unit's manifest, not in its inputs.
	_, units := readManifests(t, site)
	if len(units[0].Approvals) != 3 {
		t.Errorf("unit manifest lists %d approvals, want 3", len(units[0].Approvals))
	}
	for _, in := range units[0].Inputs {
		if strings.HasPrefix(in.Path, "approvals/") {
			t.Errorf("approval %s among the inputs", in.Path)
		}
	}
	if code, out := runOut("verify", site, "--archive", archive); code != exitOK {
		t.Errorf("verify: %d\n%s", code, out)
	}

	// An incomplete unit is refused, and nothing is written.
	other := acceptanceRun(t, archive, 2)
	// b01's only noise trace (with a beam plan, a beam measured in both
	// noise forms would fall back on the other form).
	files, _ := filepath.Glob(filepath.Join(other, "b01-noise.csv"))
	if len(files) == 0 {
		t.Fatal("no noise trace")
	}
	os.Remove(files[0])
	if code, out := runOut("approve", archive, serials[2], "--by", "A. Tester"); code != exitRefused || !strings.Contains(out, "cannot be approved") {
		t.Errorf("approve of an incomplete unit: %d\n%s", code, out)
	}
	if _, err := os.Stat(filepath.Join(archive, "approvals", serials[2])); !os.IsNotExist(err) {
		t.Errorf("approvals of the incomplete unit: %v", err)
	}
	// Same archive and approvals, same bytes.
	a, b := filepath.Join(t.TempDir(), "a"), filepath.Join(t.TempDir(), "b")
	runQuiet(t, "build", archive, "-o", a, "--quiet")
	runQuiet(t, "build", archive, "-o", b, "--quiet")
	sameSite(t, "two builds with approvals", siteDigest(t, a), siteDigest(t, b))
}
