package demo

import (
	"bytes"
	"encoding/json"
	"flag"
	"io/fs"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"gtpack.example/gtpack/ingest"
)

var update = flag.Bool("update", false, "rewrite ../../sample-archive from SampleOptions")

// SampleOptions are the arguments sample-archive/ was written with; its
// README.md states them too (`gtpack demo sample-archive --units 8 --seed 1`).
var sampleOptions = Options{Units: 8, Seed: 1}

const sampleDir = "../../sample-archive"

// listFiles returns every file under root, relative with '/', sorted.
func listFiles(t *testing.T, root string) []string {
	t.Helper()
	var out []string
	err := filepath.WalkDir(root, func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		rel, err := filepath.Rel(root, path)
		if err != nil {
			return err
		}
		if d.IsDir() {
			// The gtpack demo command approves some reports after Write;
			// cmd/gtpack's TestDemoCommandIsTheSampleArchive checks them.
			if filepath.ToSlash(rel) == "approvals" {
				return filepath.SkipDir
			}
			return nil
		}
		out = append(out, filepath.ToSlash(rel))
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	sort.Strings(out)
	return out
}

// sameTree fails unless a and b hold the same files with the same bytes.
func sameTree(t *testing.T, a, b string) {
	t.Helper()
	fa, fb := listFiles(t, a), listFiles(t, b)
	if strings.Join(fa, "\n") != strings.Join(fb, "\n") {
		t.Fatalf("file lists differ:\n%s: %v\n%s: %v", a, fa, b, fb)
	}
	for _, f := range fa {
		da, err := os.ReadFile(filepath.Join(a, f))
		if err != nil {
			t.Fatal(err)
		}
		db, err := os.ReadFile(filepath.Join(b, f))
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(da, db) {
			t.Errorf("%s differs between %s and %s", f, a, b)
		}
	}
}

func TestWriteIsDeterministic(t *testing.T) {
	o := Options{Units: 3, Seed: 42, Beams: 5, Points: 41}
	a, b := filepath.Join(t.TempDir(), "a"), filepath.Join(t.TempDir(), "b")
	if _, err := Write(a, o); err != nil {
		t.Fatal(err)
	}
	if _, err := Write(b, o); err != nil {
		t.Fatal(err)
	}
	sameTree(t, a, b)
	// A different seed must change the measured data (not only the README).
	c := filepath.Join(t.TempDir(), "c")
	o.Seed = 43
	if _, err := Write(c, o); err != nil {
		t.Fatal(err)
	}
	x, _ := os.ReadFile(filepath.Join(a, "runs/QDA-26-0001/2026-02-02T0830/b00-noise.csv"))
	y, _ := os.ReadFile(filepath.Join(c, "runs/QDA-26-0001/2026-02-02T0830/b00-noise.csv"))
	if len(x) == 0 || bytes.Equal(x, y) {
		t.Errorf("seed 42 and 43 give the same noise trace (%d bytes)", len(x))
	}
}

func TestWriteRefusesNonEmptyDir(t *testing.T) {
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "x"), []byte("x"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := Write(dir, Options{Units: 1, Points: 11, Beams: 1}); err == nil {
		t.Fatal("Write into a non-empty folder succeeded; expected a refusal")
	}
	for _, o := range []Options{{Units: -1}, {Beams: 17}, {Points: 5}} {
		if _, err := Write(filepath.Join(t.TempDir(), "d"), o); err == nil {
			t.Errorf("Write(%+v) succeeded; expected a refusal", o)
		}
	}
}

func TestArchivePassesCheck(t *testing.T) {
	tests := []Options{
		{Units: 3, Seed: 5, Beams: 16, Points: 41},
		{Units: 9, Seed: 2, Beams: 4, Points: 21},
	}
	for _, o := range tests {
		dir := t.TempDir()
		tr, err := Write(dir, o)
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range ingest.Check(dir) {
			t.Errorf("%+v: %v", o, p)
		}
		a, err := ingest.Open(dir)
		if err != nil {
			t.Fatal(err)
		}
		if len(a.Units) != len(tr.Units) {
			t.Fatalf("%+v: discovery found %d units; the model has %d", o, len(a.Units), len(tr.Units))
		}
		for i, u := range a.Units {
			if u.Serial != tr.Units[i].Serial || len(u.Runs) != len(tr.Units[i].Runs) {
				t.Errorf("unit %d: found %s with %d runs; the model has %s with %d", i, u.Serial, len(u.Runs), tr.Units[i].Serial, len(tr.Units[i].Runs))
			}
		}
	}
}

// The files read back to the model: the reader's view of a noise-free
// archive equals the model's numbers (the writers are exact to float64
// rounding, and the dB conversions to about 1e-12).
func TestFilesReadBackToTheModel(t *testing.T) {
	tr, err := Plan(Options{Units: 2, Seed: 3, Beams: 16, Points: 31})
	if err != nil {
		t.Fatal(err)
	}
	tr.S21NoiseDB, tr.S21PhaseNoiseDeg, tr.NoiseTraceDB = 0, 0, 0
	dir := t.TempDir()
	if err := WriteTruth(dir, tr); err != nil {
		t.Fatal(err)
	}
	a, err := ingest.Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	const tol = 1e-9
	checked := 0
	for ui, u := range a.Units {
		for ri, run := range u.Runs {
			rt := &tr.Runs[tr.Units[ui].Runs[ri]]
			data, probs := a.Load(run)
			for _, p := range probs {
				t.Fatal(p)
			}
			for k, f := range data.RangePre.FrequencyHz {
				want := tr.ReferenceGainDBi(f) - rt.RangeLossPreDB(f)
				if d := math.Abs(data.RangePre.ParameterDB[k] - want); d > tol {
					t.Fatalf("%s pre: S21 %g dB at %g Hz; model %g", run.File, data.RangePre.ParameterDB[k], f, want)
				}
				want = tr.ReferenceGainDBi(f) - rt.RangeLossPostDB(f)
				if d := math.Abs(data.RangePost.ParameterDB[k] - want); d > tol {
					t.Fatalf("%s post: S21 %g dB at %g Hz; model %g", run.File, data.RangePost.ParameterDB[k], f, want)
				}
			}
			for b, bd := range data.Beams {
				for k, f := range bd.Transmission.FrequencyHz {
					if d := math.Abs(bd.Transmission.ParameterDB[k] - rt.S21DB(b, f)); d > tol {
						t.Fatalf("%s beam %d: S21 %g dB at %g Hz; model %g", run.File, b, bd.Transmission.ParameterDB[k], f, rt.S21DB(b, f))
					}
					checked++
				}
				for q, trace := range bd.Noise {
					for k, f := range trace.FrequencyHz {
						var want float64
						switch rt.Beams[b].NoiseQuantities[q] {
						case QuantityNoiseDensity:
							want = rt.NoiseDensityDBmHz(b, f)
						case QuantityNoiseRelative:
							want = rt.NoiseRelativeKT0DB(b, f)
						case QuantitySystemNF:
							want = rt.SystemNoiseFigureDB(b, f)
						}
						if trace.Values[k] != want {
							t.Fatalf("%s beam %d trace %d: %v at %g Hz; model %v", run.File, b, q, trace.Values[k], f, want)
						}
						checked++
					}
				}
			}
		}
	}
	if checked == 0 {
		t.Fatal("nothing compared")
	}
}

// TestSampleArchive proves that sample-archive/ is exactly what Write
// produces for sampleOptions: the same files, byte for byte, and no others.
// go test ./ingest/demo -run TestSampleArchive -update rewrites it.
func TestSampleArchive(t *testing.T) {
	if *update {
		t.Fatal("sample-archive also holds the approvals the gtpack demo command writes: rewrite it with rm -rf sample-archive && go run ./cmd/gtpack demo sample-archive --units 8 --seed 1")
	}
	fresh := filepath.Join(t.TempDir(), "sample")
	if _, err := Write(fresh, sampleOptions); err != nil {
		t.Fatal(err)
	}
	sameTree(t, sampleDir, fresh)
	readme, err := os.ReadFile(filepath.Join(sampleDir, "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(readme, []byte("gtpack demo DIR --units 8 --seed 1")) {
		t.Error("sample-archive/README.md does not state the arguments it was written with")
	}
}

// referencePython is the Debian python3 that carries scikit-rf.
const referencePython = "/usr/bin/python3"

// skrfS21Script prints, after a marker line (scikit-rf 0.15.4 prints a
// matplotlib notice on import), a JSON object: per file the frequencies in
// Hz and 20*log10|S21| as scikit-rf reads them.
const skrfS21Script = `
import json, sys
import skrf as rf
out = {}
for p in sys.argv[1:]:
    n = rf.Network(p)
    out[p] = {"f": [float(x) for x in n.f], "s21_db": [float(x) for x in n.s_db[:, 1, 0]]}
print("@@DEMO-JSON@@")
print(json.dumps(out))
`

// TestTouchstoneAgainstScikitRF: the demo's version-1 Touchstone files, in
// every format and frequency unit they use, read by scikit-rf (an outside
// reader; its 0.15.4 does not read version 2) give the model's S21 of a
// noise-free archive.
func TestTouchstoneAgainstScikitRF(t *testing.T) {
	skip := t.Skipf
	if os.Getenv("CI") == "true" {
		skip = t.Fatalf
	}
	if _, err := os.Stat(referencePython); err != nil {
		skip("%s missing: %v", referencePython, err)
	}
	if err := exec.Command(referencePython, "-c", "import skrf").Run(); err != nil {
		skip("scikit-rf not importable by %s: %v", referencePython, err)
	}
	tr, err := Plan(Options{Units: 1, Seed: 4, Beams: 16, Points: 21})
	if err != nil {
		t.Fatal(err)
	}
	tr.S21NoiseDB, tr.S21PhaseNoiseDeg, tr.NoiseTraceDB = 0, 0, 0
	dir := t.TempDir()
	if err := WriteTruth(dir, tr); err != nil {
		t.Fatal(err)
	}
	rt := &tr.Runs[0]
	runDir := filepath.Join(dir, filepath.FromSlash(rt.Dir))
	// Expected S21 per version-1 file.
	want := map[string]func(f float64) float64{}
	var files []string
	formats := map[string]bool{}
	add := func(name string, s21 func(float64) float64) {
		raw, err := os.ReadFile(filepath.Join(runDir, name))
		if err != nil {
			t.Fatal(err)
		}
		if bytes.Contains(raw, []byte("[Version]")) {
			return
		}
		for _, line := range strings.Split(string(raw), "\n") {
			if strings.HasPrefix(line, "#") {
				formats[strings.Join(strings.Fields(line)[1:4], " ")] = true
			}
		}
		p := filepath.Join(runDir, name)
		files = append(files, p)
		want[p] = s21
	}
	pre, post := "", ""
	for _, e := range listFiles(t, runDir) {
		if strings.HasPrefix(e, "ref-pre.") {
			pre = e
		}
		if strings.HasPrefix(e, "ref-post.") {
			post = e
		}
	}
	add(pre, func(f float64) float64 { return tr.ReferenceGainDBi(f) - rt.RangeLossPreDB(f) })
	add(post, func(f float64) float64 { return tr.ReferenceGainDBi(f) - rt.RangeLossPostDB(f) })
	for b := range rt.Beams {
		add(rt.Beams[b].TransmissionFile, func(f float64) float64 { return rt.S21DB(b, f) })
	}
	if len(formats) < 3 {
		t.Fatalf("version-1 files use only %v; expected DB, MA and RI", formats)
	}
	cmd := exec.Command(referencePython, append([]string{"-c", skrfS21Script}, files...)...)
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("python: %v\n%s", err, stderr.String())
	}
	const marker = "@@DEMO-JSON@@\n"
	i := bytes.Index(out, []byte(marker))
	if i < 0 {
		t.Fatalf("python printed no marker line:\n%s", out)
	}
	var got map[string]struct {
		F     []float64 `json:"f"`
		S21DB []float64 `json:"s21_db"`
	}
	if err := json.Unmarshal(out[i+len(marker):], &got); err != nil {
		t.Fatal(err)
	}
	grid := tr.FrequenciesHz(tr.Options.Points)
	for _, p := range files {
		g := got[p]
		if len(g.F) != len(grid) {
			t.Fatalf("%s: scikit-rf read %d points; written %d", p, len(g.F), len(grid))
		}
		for k, f := range grid {
			if math.Abs(g.F[k]-f) > 1e-12*f {
				t.Errorf("%s point %d: scikit-rf frequency %.1f Hz; model %.1f Hz", p, k, g.F[k], f)
			}
			// Shortest round-trip decimals: only the dB/linear
			// conversions round, ~1e-15 relative (general knowledge).
			if d := math.Abs(g.S21DB[k] - want[p](f)); d > 1e-9 {
				t.Errorf("%s at %g Hz: scikit-rf S21 %.12f dB; model %.12f dB", p, f, g.S21DB[k], want[p](f))
			}
		}
	}
	t.Logf("%d version-1 files compared with scikit-rf, option lines %v", len(files), formats)
}
