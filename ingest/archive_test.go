package ingest

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

const goodRoot = "../testdata/good"
const brokenRoot = "../testdata/broken"

func TestOpenGood(t *testing.T) {
	a, err := Open(goodRoot)
	if err != nil {
		t.Fatal(err)
	}
	if len(a.Problems) != 0 {
		t.Fatalf("problems: %v", a.Problems)
	}
	if len(a.Stations) != 1 || a.Stations["range-a"] == nil || a.Stations["range-a"].File != "stations/range-a.yaml" {
		t.Errorf("stations %v", a.Stations)
	}
	if len(a.Specs) != 1 || a.Specs["KU-TEST"] == nil || len(a.Specs["KU-TEST"].Limits) != 2 {
		t.Errorf("specs %v", a.Specs)
	}
	h2 := a.References["horn-02"]
	if h2 == nil || h2.TableFile != "references/tables/horn-02.csv" || len(h2.Table) != 3 || h2.Table[1] != (ReferencePoint{12e9, 20.7, 0.3, 4}) {
		t.Fatalf("horn-02 %+v", h2)
	}
	if h1 := a.References["horn-01"]; h1 == nil || h1.TableFile != "" || len(h1.Table) != 4 {
		t.Errorf("horn-01 %+v", h1)
	}
	// .scratch/run.yaml is not a run: folders starting with '.' are skipped.
	var got []string
	for _, u := range a.Units {
		for _, r := range u.Runs {
			got = append(got, u.Serial+" "+r.File+" "+r.Dir)
		}
	}
	want := []string{
		"KT-0001 units/KT-0001/2026-11-01/run.yaml units/KT-0001/2026-11-01",
		"KT-0001 units/KT-0001/2026-11-03/run.yaml units/KT-0001/2026-11-03",
		"KT-0002 units/KT-0002/run.yaml units/KT-0002",
	}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("runs\n got %q\nwant %q", got, want)
	}
	if acc := a.Units[0].Acceptance(); acc.File != "units/KT-0001/2026-11-03/run.yaml" {
		t.Errorf("acceptance run %s", acc.File)
	}
	old := a.Units[0].Runs[0]
	if old.RangePre != "units/KT-0001/2026-11-03/ref-pre.s2p" || old.Beams[0].Transmission != "units/KT-0001/2026-11-03/b00.s2p" ||
		old.Beams[0].Noise[0].File != "units/KT-0001/2026-11-03/b00-noise.csv" || old.RangePost != "" || old.Elements != "" {
		t.Errorf("paths of the older run: %+v", old)
	}
	acc := a.Units[0].Runs[1]
	if acc.Elements != "units/KT-0001/2026-11-03/elements.csv" || acc.Notes != "units/KT-0001/2026-11-03/notes.md" {
		t.Errorf("paths of the acceptance run: %+v", acc)
	}
	// Deterministic: a second Open gives the same value.
	b, _ := Open(goodRoot)
	if !reflect.DeepEqual(a, b) {
		t.Error("two Opens differ")
	}
}

func TestLoadGood(t *testing.T) {
	a, err := Open(goodRoot)
	if err != nil {
		t.Fatal(err)
	}
	for _, u := range a.Units {
		for _, r := range u.Runs {
			d, probs := a.Load(r)
			if len(probs) != 0 {
				t.Errorf("%s: %v", r.File, probs)
			}
			for i, b := range d.Beams {
				if b.Transmission == nil || len(b.Noise) != len(r.Beams[i].Noise) {
					t.Errorf("%s beam %d: %+v", r.File, i, b)
				}
				for _, n := range b.Noise {
					if n == nil || len(n.FrequencyHz) != 5 {
						t.Errorf("%s beam %d noise %+v", r.File, i, n)
					}
				}
			}
		}
	}
	acc := a.Units[0].Acceptance()
	d, _ := a.Load(acc)
	var paths []string
	for _, in := range d.Inputs {
		paths = append(paths, in.Path)
		if len(in.SHA256) != 64 || in.Size <= 0 {
			t.Errorf("input %+v", in)
		}
	}
	wantPaths := []string{
		"references/horn-01.yaml", "specs/KU-TEST.yaml", "stations/range-a.yaml",
		"units/KT-0001/2026-11-03/b00-noise.csv", "units/KT-0001/2026-11-03/b00.s2p",
		"units/KT-0001/2026-11-03/b30-noise.csv", "units/KT-0001/2026-11-03/b30.s2p",
		"units/KT-0001/2026-11-03/elements.csv", "units/KT-0001/2026-11-03/notes.md",
		"units/KT-0001/2026-11-03/ref-post.s2p", "units/KT-0001/2026-11-03/ref-pre.s2p",
		"units/KT-0001/2026-11-03/run.yaml",
	}
	if !reflect.DeepEqual(paths, wantPaths) {
		t.Errorf("inputs\n got %q\nwant %q", paths, wantPaths)
	}
	if len(d.Elements) != 4 || d.Elements[1] != (Element{0, 1, -0.2, 3.5}) {
		t.Errorf("elements %v", d.Elements)
	}
	if !strings.HasPrefix(d.Notes, "# Retest\n") {
		t.Errorf("notes %q", d.Notes)
	}
	// The BOM and CRLF trace in MHz.
	if n := d.Beams[1].Noise[0]; n.FrequencyHz[0] != 10.7e9 || n.Values[4] != -142.4 || n.Column != "noise_dbm_hz" {
		t.Errorf("b30 noise %+v", n)
	}
	// The DB-format file: 20*log10|S21| is the file's own dB column, and
	// |S22| = 10^(dB/20) (definition of the decibel for a field quantity,
	// IEC 60027-3; general knowledge).
	b00 := d.Beams[0].Transmission
	wantDB := []float64{-9.10, -8.95, -8.80, -8.90, -9.20}
	wantS22DB := []float64{-14.0, -15.0, -16.0, -15.5, -14.5}
	for k := range wantDB {
		if math.Abs(b00.ParameterDB[k]-wantDB[k]) > 1e-12 || math.Abs(b00.AntennaMatch[k]-math.Pow(10, wantS22DB[k]/20)) > 1e-12 {
			t.Errorf("b00 point %d: %v dB, match %v", k, b00.ParameterDB[k], b00.AntennaMatch[k])
		}
	}
	if d.RangePost == nil || math.Abs(d.RangePost.ParameterDB[2]-(-45.52)) > 1e-12 {
		t.Errorf("range post %+v", d.RangePost)
	}
	// A CSV transmission has no match; the value column is the dB value.
	d2, _ := a.Load(a.Units[1].Acceptance())
	if tr := d2.Beams[0].Transmission; tr.AntennaMatch != nil || !reflect.DeepEqual(tr.ParameterDB, []float64{-9.0, -8.9, -8.7, -8.8, -9.1}) || tr.FrequencyHz[4] != 12.7e9 {
		t.Errorf("CSV transmission %+v", tr)
	}
	if len(d2.Beams[0].Noise) != 2 || d2.Beams[0].Noise[1].Column != "nf_db" {
		t.Errorf("two noise forms %+v", d2.Beams[0].Noise)
	}
	// The reference's table file is an input of the run that uses it.
	found := false
	for _, in := range d2.Inputs {
		found = found || in.Path == "references/tables/horn-02.csv"
	}
	if !found {
		t.Errorf("table file missing from inputs %v", d2.Inputs)
	}
}

// TestLoadAgainstScikitRF compares the transmission of every Touchstone
// file of the good archive with scikit-rf's reading of the same file
// (s_db[:, i-1, j-1] and |s[:, i-1, i-1]|).
func TestLoadAgainstScikitRF(t *testing.T) {
	py := "/usr/bin/python3"
	if err := exec.Command(py, "-c", "import skrf").Run(); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("python3 with scikit-rf is needed: %v", err)
		}
		t.Skipf("python3 with scikit-rf not available: %v", err)
	}
	a, err := Open(goodRoot)
	if err != nil {
		t.Fatal(err)
	}
	type pair struct {
		tr   *Transmission
		i, j int
	}
	var list []pair
	for _, u := range a.Units {
		for _, r := range u.Runs {
			d, _ := a.Load(r)
			all := []*Transmission{d.RangePre, d.RangePost}
			for _, b := range d.Beams {
				all = append(all, b.Transmission)
			}
			for _, tr := range all {
				if tr != nil && !strings.HasSuffix(tr.File, ".csv") {
					list = append(list, pair{tr, 2, 1})
				}
			}
		}
	}
	if len(list) < 5 {
		t.Fatalf("only %d Touchstone transmissions", len(list))
	}
	var files []string
	for _, p := range list {
		files = append(files, filepath.Join(goodRoot, p.tr.File))
	}
	script := `
import json, sys
import numpy as np
import skrf
out = []
for f in sys.argv[1:]:
    n = skrf.Network(f)
    out.append({"f": n.f.tolist(), "db": n.s_db[:, 1, 0].tolist(), "match": np.abs(n.s[:, 1, 1]).tolist()})
print("@@JSON@@")
print(json.dumps(out))
`
	outb, err := exec.Command(py, append([]string{"-c", script}, files...)...).Output()
	if err != nil {
		t.Fatalf("scikit-rf: %v", err)
	}
	_, payload, ok := strings.Cut(string(outb), "@@JSON@@\n")
	if !ok {
		t.Fatalf("no payload in %q", outb)
	}
	var ref []struct{ F, DB, Match []float64 }
	if err := json.Unmarshal([]byte(payload), &ref); err != nil {
		t.Fatal(err)
	}
	for n, p := range list {
		for k := range p.tr.FrequencyHz {
			if math.Abs(p.tr.FrequencyHz[k]-ref[n].F[k]) > 1e-3 || math.Abs(p.tr.ParameterDB[k]-ref[n].DB[k]) > 1e-9 || math.Abs(p.tr.AntennaMatch[k]-ref[n].Match[k]) > 1e-12 {
				t.Errorf("%s point %d: ours %v Hz %v dB %v, scikit-rf %v Hz %v dB %v", p.tr.File, k, p.tr.FrequencyHz[k], p.tr.ParameterDB[k], p.tr.AntennaMatch[k], ref[n].F[k], ref[n].DB[k], ref[n].Match[k])
			}
		}
	}
}

// brokenCases is what each unit of testdata/broken must give: exactly one
// problem, at this file and line, containing this text.
var brokenCases = []struct {
	serial, file string
	line         int
	want         string
}{
	{"BRK-TRUNCATED", "units/BRK-TRUNCATED/b00-noise.csv", 7, `1 field in "12.7"; expected 2`},
	{"BRK-TEXT", "units/BRK-TEXT/b00.csv", 4, `s21_db "n/a": is not a number`},
	{"BRK-DECREASING", "units/BRK-DECREASING/b00-noise.csv", 5, "frequency 11.2 is not above the previous 11.7"},
	{"BRK-MISSING", "units/BRK-MISSING/run.yaml", 16, "beams[0].noise[0].file: units/BRK-MISSING/b00-noise.csv does not exist"},
	{"BRK-UNKNOWN-KEY", "units/BRK-UNKNOWN-KEY/run.yaml", 9, `unknown key "humidity_pct"`},
	{"BRK-ESCAPE", "units/BRK-ESCAPE/run.yaml", 14, "beams[0].transmission: ../good/units/KT-0001/2026-11-03/b00.s2p (relative to the archive root) leads out of the archive"},
	{"BRK-LINK", "units/BRK-LINK/run.yaml", 14, "beams[0].transmission: units/BRK-LINK/b00.s2p is a link that leads out of the archive"},
	{"BRK-EMPTY", "units/BRK-EMPTY/b00-noise.csv", 0, "file is empty"},
	{"BRK-PORTS", "units/BRK-PORTS/run.yaml", 14, "beams[0].transmission: units/BRK-PORTS/b00.s1p has 1 port; expected a transmission file with at least 2 ports"},
}

func TestBrokenArchive(t *testing.T) {
	link := filepath.Join(brokenRoot, "units/BRK-LINK/b00.s2p")
	if fi, err := os.Lstat(link); err != nil || fi.Mode()&os.ModeSymlink == 0 {
		t.Fatalf("%s must be a symbolic link (git checkout with core.symlinks=false?): %v", link, err)
	}
	a, err := Open(brokenRoot)
	if err != nil {
		t.Fatal(err)
	}
	bySerial := map[string]*Unit{}
	for _, u := range a.Units {
		bySerial[u.Serial] = u
	}
	for _, c := range brokenCases {
		t.Run(c.serial, func(t *testing.T) {
			var probs []*Problem
			u := bySerial[c.serial]
			if c.serial == "BRK-UNKNOWN-KEY" {
				// A refused run.yaml is not a run; discovery reports it,
				// and keeps it with its unit, which has no good run.
				if u == nil || len(u.Runs) != 0 || len(u.Refused) != 1 || u.AcceptanceRefused() != u.Refused[0] || u.Acceptance() != nil {
					t.Fatalf("a refused run.yaml alone makes unit %+v; expected one with no runs and it refused", u)
				}
				if rr := u.Refused[0]; rr.File != c.file || rr.Dir != "units/"+c.serial || rr.Serial != c.serial || rr.Started.IsZero() || len(rr.Problems) != 1 {
					t.Errorf("refused run %+v", rr)
				}
				for _, p := range a.Problems {
					if strings.HasPrefix(p.File, "units/"+c.serial+"/") {
						probs = append(probs, p)
					}
				}
			} else {
				if u == nil || len(u.Runs) != 1 {
					t.Fatalf("unit %s not discovered", c.serial)
				}
				if p := a.ProblemsOf(u.Runs[0]); len(p) != 0 {
					t.Fatalf("discovery problems %v", p)
				}
				var d *RunData
				d, probs = a.Load(u.Runs[0])
				// The files that are fine are still read.
				if d.RangePre == nil || len(d.RangePre.FrequencyHz) != 5 {
					t.Errorf("range reference not read: %+v", d.RangePre)
				}
				if d.Beams[0].Transmission == nil && d.Beams[0].Noise[0] == nil {
					t.Errorf("neither transmission nor noise read")
				}
			}
			if len(probs) != 1 {
				t.Fatalf("got %d problems, want 1: %v", len(probs), probs)
			}
			p := probs[0]
			if p.File != c.file || p.Line != c.line || !strings.Contains(p.Message, c.want) {
				t.Errorf("got %q\nwant %s:%d containing %q", p.Error(), c.file, c.line, c.want)
			}
		})
	}
	good := bySerial["BRK-GOOD"]
	if good == nil {
		t.Fatal("BRK-GOOD not discovered")
	}
	d, probs := a.Load(good.Runs[0])
	if len(probs) != 0 || d.RangePre == nil || d.Beams[0].Transmission == nil || d.Beams[0].Noise[0] == nil {
		t.Errorf("BRK-GOOD: %v %+v", probs, d)
	}

	// Check returns all of them, sorted by file then line, and nothing else.
	all := Check(brokenRoot)
	if len(all) != len(brokenCases) {
		t.Fatalf("Check gave %d problems, want %d:\n%v", len(all), len(brokenCases), ProblemList(all))
	}
	seen := map[string]bool{}
	for i, p := range all {
		if i > 0 && (p.File < all[i-1].File || (p.File == all[i-1].File && p.Line < all[i-1].Line)) {
			t.Errorf("not sorted at %d: %v after %v", i, p, all[i-1])
		}
		for _, c := range brokenCases {
			if p.File == c.file && p.Line == c.line && strings.Contains(p.Message, c.want) {
				seen[c.serial] = true
			}
		}
	}
	if len(seen) != len(brokenCases) {
		t.Errorf("Check missed some cases: saw %v in %v", seen, ProblemList(all))
	}
}

func TestCheckGood(t *testing.T) {
	if p := Check(goodRoot); len(p) != 0 {
		t.Errorf("good archive: %v", ProblemList(p))
	}
	p := Check(filepath.Join(t.TempDir(), "nothing-here"))
	if len(p) != 1 || !strings.Contains(p[0].Error(), "nothing-here") {
		t.Errorf("missing root: %v", p)
	}
}

// writeArchive makes an archive in a temporary folder from name -> content.
func writeArchive(t *testing.T, files map[string]string) string {
	t.Helper()
	root := t.TempDir()
	for name, content := range files {
		full := filepath.Join(root, filepath.FromSlash(name))
		if err := os.MkdirAll(filepath.Dir(full), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(full, []byte(content), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return root
}

func readGood(t *testing.T, rel string) string {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(goodRoot, rel))
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// baseArchive is a one-run archive built from the good test data.
func baseArchive(t *testing.T) map[string]string {
	run := readGood(t, "units/KT-0001/2026-11-01/run.yaml")
	run = strings.ReplaceAll(run, "../2026-11-03/", "")
	return map[string]string{
		"stations/range-a.yaml":   readGood(t, "stations/range-a.yaml"),
		"references/horn-01.yaml": readGood(t, "references/horn-01.yaml"),
		"specs/KU-TEST.yaml":      readGood(t, "specs/KU-TEST.yaml"),
		"u/a/run.yaml":            run,
		"u/a/ref-pre.s2p":         readGood(t, "units/KT-0001/2026-11-03/ref-pre.s2p"),
		"u/a/b00.s2p":             readGood(t, "units/KT-0001/2026-11-03/b00.s2p"),
		"u/a/b00-noise.csv":       readGood(t, "units/KT-0001/2026-11-03/b00-noise.csv"),
	}
}

func TestOpenCases(t *testing.T) {
	base := func(t *testing.T) map[string]string { return baseArchive(t) }
	cases := []struct {
		name   string
		change func(t *testing.T, f map[string]string)
		units  int
		file   string
		line   int
		want   string
	}{
		{"duplicate start", func(t *testing.T, f map[string]string) {
			f["u/b/run.yaml"] = strings.ReplaceAll(f["u/a/run.yaml"], "pre: ", "pre: ../a/")
		}, 1, "u/b/run.yaml", 6, "is a duplicate of u/a/run.yaml"},
		{"unknown station", func(t *testing.T, f map[string]string) {
			f["u/a/run.yaml"] = strings.Replace(f["u/a/run.yaml"], "station: range-a", "station: range-z", 1)
		}, 1, "u/a/run.yaml", 4, `station "range-z" is unknown; expected one defined in stations/ (known: range-a)`},
		{"unknown spec", func(t *testing.T, f map[string]string) {
			f["u/a/run.yaml"] = strings.Replace(f["u/a/run.yaml"], "product: KU-TEST", "product: KU-OTHER", 1)
		}, 1, "u/a/run.yaml", 3, `spec for product "KU-OTHER" is unknown`},
		{"refused station", func(t *testing.T, f map[string]string) {
			f["stations/range-a.yaml"] += "colour: blue\n"
		}, 1, "stations/range-a.yaml", 17, `unknown key "colour"`},
		{"refused reference table", func(t *testing.T, f map[string]string) {
			f["references/horn-01.yaml"] = strings.Split(f["references/horn-01.yaml"], "table:")[0] + "table_file: ../../outside.csv\n"
		}, 1, "references/horn-01.yaml", 9, "../outside.csv (relative to the archive root) leads out of the archive"},
		{"broken reference table", func(t *testing.T, f map[string]string) {
			f["references/horn-01.yaml"] = strings.Split(f["references/horn-01.yaml"], "table:")[0] + "table_file: t.csv\n"
			f["references/t.csv"] = "frequency_ghz,gain_dbi,uncertainty_db\n12,20,0.3\n11,20,0.3\n"
		}, 1, "references/t.csv", 3, "not above the previous 12 GHz"},
		{"refused run", func(t *testing.T, f map[string]string) {
			f["u/a/run.yaml"] = strings.Replace(f["u/a/run.yaml"], "schema: 1", "schema: 2", 1)
		}, 1, "u/a/run.yaml", 1, "schema 2 is not supported"},
		{"hidden folder", func(t *testing.T, f map[string]string) {
			f["u/.trash/run.yaml"] = "not: a run\n"
		}, 1, "", 0, ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f := base(t)
			c.change(t, f)
			a, err := Open(writeArchive(t, f))
			if err != nil {
				t.Fatal(err)
			}
			if len(a.Units) != c.units {
				t.Errorf("%d units, want %d", len(a.Units), c.units)
			}
			if c.file == "" {
				if len(a.Problems) != 0 {
					t.Errorf("problems %v", a.Problems)
				}
				return
			}
			if len(a.Problems) == 0 {
				t.Fatal("no problem")
			}
			p := a.Problems[0]
			if p.File != c.file || p.Line != c.line || !strings.Contains(p.Message, c.want) {
				t.Errorf("got %q, want %s:%d containing %q (all: %v)", p.Error(), c.file, c.line, c.want, a.Problems)
			}
		})
	}
}

func TestLoadPaths(t *testing.T) {
	outside := t.TempDir()
	secret := filepath.Join(outside, "secret.csv")
	os.WriteFile(secret, []byte("frequency_ghz,v\n1,1\n"), 0o644)
	cases := []struct {
		name  string
		noise string
		setup func(root string)
		line  int
		want  string
	}{
		{"absolute", secret, nil, 16, "is an absolute path"},
		{"escape", "../../../x.csv", nil, 16, "../x.csv (relative to the archive root) leads out of the archive"},
		{"link out", "ln.csv", func(root string) { os.Symlink(secret, filepath.Join(root, "u/a/ln.csv")) }, 16, "is a link that leads out of the archive"},
		{"dangling link", "ln.csv", func(root string) { os.Symlink(filepath.Join(root, "none"), filepath.Join(root, "u/a/ln.csv")) }, 16, "is a link to a missing file"},
		{"folder", "sub", func(root string) { os.Mkdir(filepath.Join(root, "u/a/sub"), 0o755) }, 16, "is not a regular file"},
		{"missing", "nope.csv", nil, 16, "does not exist"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f := baseArchive(t)
			f["u/a/run.yaml"] = strings.Replace(f["u/a/run.yaml"], "file: b00-noise.csv", "file: "+c.noise, 1)
			root := writeArchive(t, f)
			if c.setup != nil {
				c.setup(root)
			}
			a, err := Open(root)
			if err != nil || len(a.Problems) != 0 || len(a.Units) != 1 {
				t.Fatalf("open: %v %v", err, a.Problems)
			}
			d, probs := a.Load(a.Units[0].Runs[0])
			if len(probs) != 1 {
				t.Fatalf("got %v, want one problem", probs)
			}
			p := probs[0]
			if p.File != "u/a/run.yaml" || p.Line != c.line || !strings.Contains(p.Message, c.want) || (c.name == "link out" && strings.Contains(p.Message, outside)) {
				t.Errorf("got %q, want u/a/run.yaml:%d containing %q", p.Error(), c.line, c.want)
			}
			if d.Beams[0].Noise[0] != nil || d.Beams[0].Transmission == nil || d.RangePre == nil {
				t.Errorf("the refused file must be nil and the others read: %+v", d)
			}
		})
	}

	// A link that stays inside the archive is followed.
	f := baseArchive(t)
	f["u/a/run.yaml"] = strings.Replace(f["u/a/run.yaml"], "file: b00-noise.csv", "file: ln.csv", 1)
	root := writeArchive(t, f)
	os.Symlink("b00-noise.csv", filepath.Join(root, "u/a/ln.csv"))
	a, _ := Open(root)
	if d, probs := a.Load(a.Units[0].Runs[0]); len(probs) != 0 || d.Beams[0].Noise[0] == nil {
		t.Errorf("inside link: %v", probs)
	}
}

func TestLoadInputsHash(t *testing.T) {
	// SHA-256("abc") from FIPS 180-2, appendix B.1.
	const abc = "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
	f := baseArchive(t)
	f["u/a/run.yaml"] += "notes: notes.md\n"
	f["u/a/notes.md"] = "abc"
	a, _ := Open(writeArchive(t, f))
	d, probs := a.Load(a.Units[0].Runs[0])
	if len(probs) != 0 {
		t.Fatal(probs)
	}
	for _, in := range d.Inputs {
		if in.Path == "u/a/notes.md" {
			if in.SHA256 != abc || in.Size != 3 {
				t.Errorf("notes input %+v, want SHA-256 %s", in, abc)
			}
			if d.Notes != "abc" {
				t.Errorf("notes %q", d.Notes)
			}
			return
		}
	}
	t.Errorf("notes not in inputs %v", d.Inputs)
}

func TestLoadTouchstoneContent(t *testing.T) {
	cases := []struct {
		name, param, file string
		line              int
		want              string
	}{
		{"zero transmission", "", "# GHz S RI R 50\n10.7 0.1 0 0 0 0 0 0.1 0\n", 0, "S21 is 0 at 1.07e+10 Hz"},
		{"parameter beyond ports", "S31", "# GHz S RI R 50\n10.7 0.1 0 0.3 0 0 0 0.1 0\n", 15, "holds no S31"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f := baseArchive(t)
			f["u/a/b00.s2p"] = c.file
			if c.param != "" {
				f["u/a/run.yaml"] = strings.Replace(f["u/a/run.yaml"], "  pre: ref-pre.s2p\n", "  pre: ref-pre.s2p\n  parameter: "+c.param+"\n", 1)
			}
			a, err := Open(writeArchive(t, f))
			if err != nil || len(a.Problems) != 0 {
				t.Fatalf("%v %v", err, a.Problems)
			}
			_, probs := a.Load(a.Units[0].Runs[0])
			var hit bool
			for _, p := range probs {
				hit = hit || (p.Line == c.line && strings.Contains(p.Message, c.want))
			}
			if !hit {
				t.Errorf("got %v, want line %d containing %q", probs, c.line, c.want)
			}
		})
	}
}

func TestSortProblems(t *testing.T) {
	in := []*Problem{{"b", 2, "x"}, {"a", 9, "y"}, {"b", 1, "z"}, {"a", 9, "y"}, {"a", 0, "w"}}
	got := SortProblems(in)
	want := []*Problem{{"a", 0, "w"}, {"a", 9, "y"}, {"b", 1, "z"}, {"b", 2, "x"}}
	if !reflect.DeepEqual(got, want) {
		var buf bytes.Buffer
		json.NewEncoder(&buf).Encode(got)
		t.Errorf("got %s", buf.String())
	}
}

// BenchmarkOpenLoad discovers the good archive and loads every run.
func BenchmarkOpenLoad(b *testing.B) {
	for b.Loop() {
		a, err := Open(goodRoot)
		if err != nil {
			b.Fatal(err)
		}
		for _, u := range a.Units {
			for _, r := range u.Runs {
				if _, p := a.Load(r); len(p) != 0 {
					b.Fatal(p)
				}
			}
		}
	}
}

// OpenLean holds runs without their beams; Full reads each one back to
// what Open holds, and the lists and loads of a build come out the same.
func TestOpenLeanFullEqualsOpen(t *testing.T) {
	whole, err := Open(goodRoot)
	if err != nil {
		t.Fatal(err)
	}
	lean, err := OpenLean(goodRoot)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(whole.Problems, lean.Problems) || len(whole.Units) != len(lean.Units) {
		t.Fatalf("lean discovery differs: %d units and %v, want %d and %v", len(lean.Units), lean.Problems, len(whole.Units), whole.Problems)
	}
	for ui, u := range lean.Units {
		for ri, r := range u.Runs {
			want := whole.Units[ui].Runs[ri]
			if !r.Lean() || r.Beams != nil || len(r.KeyLines) > len(leanKeys) {
				t.Errorf("%s: held with %d beams and %d key lines, expected none and at most %d", r.File, len(r.Beams), len(r.KeyLines), len(leanKeys))
			}
			if got := RunFiles(lean, r); !reflect.DeepEqual(got, RunFiles(whole, want)) {
				t.Errorf("%s: RunFiles of the lean run %q, want %q", r.File, got, RunFiles(whole, want))
			}
			if _, probs := lean.Load(r); len(probs) != 1 || !strings.Contains(probs[0].Message, "Archive.Full") {
				t.Errorf("%s: Load of a lean run gave %v, expected one problem asking for Full", r.File, probs)
			}
			full, err := lean.Full(r)
			if err != nil {
				t.Fatal(err)
			}
			if !reflect.DeepEqual(full, want) {
				t.Errorf("%s: Full gives\n%+v\nOpen holds\n%+v", r.File, full, want)
			}
			if same, _ := whole.Full(want); same != want {
				t.Errorf("%s: Full of a whole run is not the run itself", r.File)
			}
		}
	}
}

// A run.yaml that changes between discovery and the build is refused by
// Full, with its file named, rather than built as another unit.
func TestFullRefusesChangedRun(t *testing.T) {
	root := copyTree(t, goodRoot)
	a, err := OpenLean(root)
	if err != nil {
		t.Fatal(err)
	}
	r := a.Units[1].Acceptance()
	p := filepath.Join(root, filepath.FromSlash(r.File))
	data, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	changed := strings.Replace(string(data), "serial: "+r.Serial, "serial: "+r.Serial+"-B", 1)
	if changed == string(data) {
		t.Fatalf("%s does not name serial %s", p, r.Serial)
	}
	if err := os.WriteFile(p, []byte(changed), 0o644); err != nil {
		t.Fatal(err)
	}
	_, err = a.Full(r)
	var prob *Problem
	if !errors.As(err, &prob) || prob.File != r.File || prob.Line == 0 || !strings.Contains(prob.Message, "expected the file not to change") {
		t.Errorf("Full of a changed run.yaml: %v", err)
	}
	if err := os.Remove(p); err != nil {
		t.Fatal(err)
	}
	if _, err := a.Full(r); err == nil {
		t.Error("Full of a removed run.yaml gave no error")
	}
}
