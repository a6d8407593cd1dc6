package ingest

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// refusedArchive is baseArchive with its run (KT-0001) started at started.
func refusedArchive(t *testing.T, started string) map[string]string {
	t.Helper()
	f := baseArchive(t)
	f["u/a/run.yaml"] = mutate(t, f["u/a/run.yaml"], "started: 2026-11-01T14:00:00+01:00", "started: "+started)
	return f
}

// retest is the run of u/a as a retest in u/b: started at started, with
// old replaced by new. Its data files are not there: discovery does not
// read them.
func retest(t *testing.T, f map[string]string, started, old, new string) string {
	t.Helper()
	run := mutate(t, f["u/a/run.yaml"], "started: 2026-01-01T09:00:00Z", "started: "+started)
	if old == "" {
		return run
	}
	return mutate(t, run, old, new)
}

func day(s string) time.Time {
	t, err := time.Parse(time.RFC3339, s)
	if err != nil {
		panic(err)
	}
	return t
}

// A refused run.yaml stays with its unit, so that an older good run is not
// silently taken for the acceptance run; one whose serial cannot be read
// (or that cannot be read at all) is an orphan. Open and OpenLean agree,
// and every problem of a refused run is in Archive.Problems.
func TestOpenKeepsRefusedRuns(t *testing.T) {
	const good = "2026-01-01T09:00:00Z"
	type want struct {
		runs       int       // good runs of KT-0001
		refused    string    // Dir of the refused run in KT-0001, or ""
		started    time.Time // the recovered start of the refused run or orphan
		acceptance bool      // whether AcceptanceRefused returns it
		orphan     string    // Dir of the orphan, or ""
		orphanFile string
		line       int // line of the first problem of the refused run
		message    string
	}
	cases := []struct {
		name   string
		change func(t *testing.T, f map[string]string)
		setup  func(t *testing.T, root string)
		want   want
	}{
		{"retest with an unknown key", func(t *testing.T, f map[string]string) {
			f["u/b/run.yaml"] = retest(t, f, "2026-02-01T09:00:00Z", "operator: ", "humidity_pct: 40\noperator: ")
		}, nil, want{runs: 1, refused: "u/b", started: day("2026-02-01T09:00:00Z"), acceptance: true, line: 7, message: `unknown key "humidity_pct"`}},
		{"retest with a broken start", func(t *testing.T, f map[string]string) {
			f["u/b/run.yaml"] = retest(t, f, "2026-02-30T09:00:00Z", "", "")
		}, nil, want{runs: 1, refused: "u/b", acceptance: true, line: 6, message: `started is "2026-02-30T09:00:00Z"`}},
		{"older refused run", func(t *testing.T, f map[string]string) {
			f["u/b/run.yaml"] = retest(t, f, "2025-12-01T09:00:00Z", "ambient_c: ", "ambient_c: 295 #")
		}, nil, want{runs: 1, refused: "u/b", started: day("2025-12-01T09:00:00Z"), acceptance: false, line: 8, message: "ambient_c 295 is outside"}},
		{"refused run at the same start", func(t *testing.T, f map[string]string) {
			f["u/b/run.yaml"] = retest(t, f, good, "schema: 1", "schema: 2")
		}, nil, want{runs: 1, refused: "u/b", started: day(good), acceptance: true, line: 1, message: "schema 2 is not supported"}},
		{"only run refused", func(t *testing.T, f map[string]string) {
			f["u/a/run.yaml"] += "colour: red\n"
		}, nil, want{runs: 0, refused: "u/a", started: day(good), acceptance: true, line: 18, message: `unknown key "colour"`}},
		{"bad serial", func(t *testing.T, f map[string]string) {
			f["u/b/run.yaml"] = retest(t, f, "2026-02-01T09:00:00Z", "serial: KT-0001", `serial: "../KT-0001"`)
		}, nil, want{runs: 1, orphan: "u/b", orphanFile: "u/b/run.yaml", started: day("2026-02-01T09:00:00Z"), line: 2, message: `serial "../KT-0001" has "/" at character 3`}},
		// yaml.v3 gives no tree at all for a file it cannot parse, so the
		// serial line above the mistake is not read: an orphan.
		{"YAML syntax error", func(t *testing.T, f map[string]string) {
			f["u/b/run.yaml"] = retest(t, f, "2026-02-01T09:00:00Z", "operator: CD", "operator: CD\n  oops: [")
		}, nil, want{runs: 1, orphan: "u/b", orphanFile: "u/b/run.yaml", message: "not valid YAML"}},
		{"run.yaml a dangling link", nil, func(t *testing.T, root string) {
			os.Mkdir(filepath.Join(root, "u/b"), 0o755)
			if err := os.Symlink("missing.yaml", filepath.Join(root, "u/b/run.yaml")); err != nil {
				t.Fatal(err)
			}
		}, want{runs: 1, orphan: "u/b", orphanFile: "u/b/run.yaml", message: "is a link to a missing file"}},
		{"run.yaml a link to a folder", nil, func(t *testing.T, root string) {
			os.MkdirAll(filepath.Join(root, "u/b/sub"), 0o755)
			if err := os.Symlink("sub", filepath.Join(root, "u/b/run.yaml")); err != nil {
				t.Fatal(err)
			}
		}, want{runs: 1, orphan: "u/b", orphanFile: "u/b/run.yaml", message: "is not a regular file"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f := refusedArchive(t, good)
			if c.change != nil {
				c.change(t, f)
			}
			root := writeArchive(t, f)
			if c.setup != nil {
				c.setup(t, root)
			}
			for _, lean := range []bool{false, true} {
				a, err := open(root, lean)
				if err != nil {
					t.Fatal(err)
				}
				checkRefused(t, a, lean)
				w := c.want
				if len(a.Units) != 1 || a.Units[0].Serial != "KT-0001" {
					t.Fatalf("lean %v: units %+v, want KT-0001 alone", lean, a.Units)
				}
				u := a.Units[0]
				if len(u.Runs) != w.runs || (w.runs > 0 && u.Acceptance().File != "u/a/run.yaml") || (w.runs == 0 && u.Acceptance() != nil) {
					t.Errorf("lean %v: runs %+v, want %d", lean, u.Runs, w.runs)
				}
				var rr *RefusedRun
				switch {
				case w.refused != "":
					if len(u.Refused) != 1 || len(a.Orphans) != 0 {
						t.Fatalf("lean %v: refused %+v, orphans %+v; want one refused run of the unit", lean, u.Refused, a.Orphans)
					}
					rr = u.Refused[0]
					if rr.Dir != w.refused || rr.File != w.refused+"/run.yaml" || rr.Serial != "KT-0001" || !rr.Started.Equal(w.started) {
						t.Errorf("lean %v: refused run %+v, want %s started %v", lean, rr, w.refused, w.started)
					}
					if got := u.AcceptanceRefused(); (got == rr) != w.acceptance {
						t.Errorf("lean %v: AcceptanceRefused() = %+v; want it (%v)", lean, got, w.acceptance)
					}
				default:
					if len(u.Refused) != 0 || len(a.Orphans) != 1 || u.AcceptanceRefused() != nil {
						t.Fatalf("lean %v: refused %+v, orphans %+v; want one orphan", lean, u.Refused, a.Orphans)
					}
					rr = a.Orphans[0]
					if rr.Dir != w.orphan || rr.File != w.orphanFile || rr.Serial != "" || !rr.Started.Equal(w.started) {
						t.Errorf("lean %v: orphan %+v, want %s", lean, rr, w.orphan)
					}
				}
				if len(rr.Problems) == 0 {
					t.Fatalf("lean %v: the refused run has no problem", lean)
				}
				if p := rr.Problems[0]; p.File != rr.File || (w.line != 0 && p.Line != w.line) || !strings.Contains(p.Message, w.message) {
					t.Errorf("lean %v: got %q, want line %d containing %q", lean, p.Error(), w.line, w.message)
				}
			}
		})
	}
}

// checkRefused checks what holds for every archive: each problem of a
// refused run is in Archive.Problems, and a unit has a run or a refusal.
func checkRefused(t *testing.T, a *Archive, lean bool) {
	t.Helper()
	all := map[Problem]bool{}
	for _, p := range a.Problems {
		all[*p] = true
	}
	var refused []*RefusedRun
	for _, u := range a.Units {
		if len(u.Runs) == 0 && len(u.Refused) == 0 {
			t.Errorf("lean %v: unit %s has neither runs nor refused runs", lean, u.Serial)
		}
		refused = append(refused, u.Refused...)
	}
	for _, rr := range append(refused, a.Orphans...) {
		for _, p := range rr.Problems {
			if !all[*p] {
				t.Errorf("lean %v: problem %q of a refused run is not in Archive.Problems", lean, p.Error())
			}
		}
	}
}

// AcceptanceRefused picks among several refused runs: an unknown start
// first, then the latest; none older than the latest good run.
func TestAcceptanceRefused(t *testing.T) {
	jan, feb, mar := day("2026-01-01T00:00:00Z"), day("2026-02-01T00:00:00Z"), day("2026-03-01T00:00:00Z")
	old := &RefusedRun{File: "old", Started: jan}
	late := &RefusedRun{File: "late", Started: mar}
	unknown := &RefusedRun{File: "unknown"}
	good := []*Run{{Started: jan}, {Started: feb}}
	cases := []struct {
		name string
		u    Unit
		want *RefusedRun
	}{
		{"no refused runs", Unit{Runs: good}, nil},
		{"older only", Unit{Runs: good, Refused: []*RefusedRun{old}}, nil},
		{"later", Unit{Runs: good, Refused: []*RefusedRun{old, late}}, late},
		{"unknown start", Unit{Runs: good, Refused: []*RefusedRun{late, unknown}}, unknown},
		{"no good runs", Unit{Refused: []*RefusedRun{old, late}}, late},
		{"no good runs, old alone", Unit{Refused: []*RefusedRun{old}}, old},
	}
	for _, c := range cases {
		if got := c.u.AcceptanceRefused(); got != c.want {
			t.Errorf("%s: got %+v, want %+v", c.name, got, c.want)
		}
	}
}

// A run folder that cannot be read is an orphan with its Dir. Root reads
// a folder of mode 000, so this runs only as another user.
func TestOpenUnreadableRunFolder(t *testing.T) {
	if os.Geteuid() == 0 {
		t.Skip("root reads a folder of mode 000")
	}
	root := writeArchive(t, refusedArchive(t, "2026-01-01T09:00:00Z"))
	locked := filepath.Join(root, "u", "locked")
	if err := os.Mkdir(locked, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.Chmod(locked, 0); err != nil {
		t.Fatal(err)
	}
	defer os.Chmod(locked, 0o755) // so that t.TempDir can remove it
	for _, lean := range []bool{false, true} {
		a, err := open(root, lean)
		if err != nil {
			t.Fatal(err)
		}
		checkRefused(t, a, lean)
		if len(a.Orphans) != 1 || a.Orphans[0].Dir != "u/locked" || a.Orphans[0].File != "" || len(a.Orphans[0].Problems) != 1 {
			t.Fatalf("lean %v: orphans %+v, want u/locked", lean, a.Orphans)
		}
		if p := a.Orphans[0].Problems[0]; p.File != "u/locked" || !strings.Contains(p.Message, "cannot be read") {
			t.Errorf("lean %v: problem %q", lean, p.Error())
		}
		if len(a.Units) != 1 || len(a.Units[0].Runs) != 1 {
			t.Errorf("lean %v: the readable run is not kept: %+v", lean, a.Units)
		}
	}
}
