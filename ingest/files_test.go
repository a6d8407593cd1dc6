package ingest

import (
	"slices"
	"testing"
)

// RunFiles, which the build stamps to decide whether a unit changed, lists
// exactly the files Load reads and hashes for the run.
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
