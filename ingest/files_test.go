package ingest

import (
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// RunFiles lists exactly the files Load reads and hashes for the run.
func TestRunFilesAreTheLoadedInputs(t *testing.T) {
	a, err := Open("../testdata/good")
	if err != nil {
		t.Fatal(err)
	}
	if len(a.Units) == 0 {
		t.Fatal("the good archive has no unit")
	}
	for _, u := range a.Units {
		for _, r := range u.Runs {
			d, probs := a.Load(r)
			if len(probs) > 0 {
				t.Fatalf("%s: %v", r.File, probs[0])
			}
			var loaded []string
			for _, in := range d.Inputs {
				loaded = append(loaded, in.Path)
			}
			files := RunFiles(a, r)
			if !slices.Equal(files, loaded) {
				t.Errorf("%s: RunFiles %v, Load read %v", r.File, files, loaded)
			}
			if !slices.Contains(files, r.File) || len(files) < 5 {
				t.Errorf("%s: RunFiles %v lacks the run.yaml or the data files", r.File, files)
			}
		}
	}
}

// copyTree copies a test archive so that a test can change it.
func copyTree(t *testing.T, src string) string {
	t.Helper()
	dst := t.TempDir()
	err := filepath.WalkDir(src, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(src, p)
		if d.IsDir() {
			return os.MkdirAll(filepath.Join(dst, rel), 0o755)
		}
		data, err := os.ReadFile(p)
		if err != nil {
			return err
		}
		return os.WriteFile(filepath.Join(dst, rel), data, 0o644)
	})
	if err != nil {
		t.Fatal(err)
	}
	return dst
}

// A second station with an id already defined is reported and ignored (the
// first stands); a spec that cannot be parsed makes the runs naming its
// product say it was refused, not that it is unknown.
func TestOpenDuplicateAndRefusedDocuments(t *testing.T) {
	root := copyTree(t, "../testdata/good")
	first, err := os.ReadFile(filepath.Join(root, "stations", "range-a.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(root, "stations", "range-z.yaml"), first, 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(root, "specs", "KU-TEST.yaml"), []byte("schema: 1\nproduct: [\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	a, err := Open(root)
	if err != nil {
		t.Fatal(err)
	}
	if s := a.Stations["range-a"]; s == nil || s.File != "stations/range-a.yaml" {
		t.Fatalf("station range-a: %+v, want the one of stations/range-a.yaml", s)
	}
	var dup, refused int
	for _, p := range a.Problems {
		switch {
		case p.File == "stations/range-z.yaml" && strings.Contains(p.Message, `station id "range-a" is already defined in stations/range-a.yaml`):
			dup++
		case strings.HasSuffix(p.File, "run.yaml") && strings.Contains(p.Message, "specs/KU-TEST.yaml was refused"):
			refused++
		}
	}
	if dup != 1 || refused == 0 {
		t.Errorf("%d duplicate-id problems (want 1) and %d runs told the spec was refused (want some); problems:\n%v", dup, refused, a.Problems)
	}
}
