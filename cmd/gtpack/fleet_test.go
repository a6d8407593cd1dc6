package main

import (
	"crypto/sha256"
	"encoding/hex"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"gtpack.example/gtpack/ingest"
	"gtpack.example/gtpack/render"
)

// fileSHA256 is the size and SHA-256 (crypto/sha256, FIPS 180-4) of a file.
func fileSHA256(t *testing.T, p string) (int64, string) {
	t.Helper()
	data, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	sum := sha256.Sum256(data)
	return int64(len(data)), hex.EncodeToString(sum[:])
}

// manifest.json (schema 2) lists every file of the site but itself and
// every input of every unit, each with the size and SHA-256 of the file on
// disk; the inputs of a unit are exactly the files its acceptance run
// reads (ingest.RunFiles), the shared ones listed once.
func TestManifestListsEverything(t *testing.T) {
	archive := smallArchive(t)
	site := filepath.Join(t.TempDir(), "site")
	runQuiet(t, "build", archive, "-o", site, "--quiet")
	data, err := os.ReadFile(filepath.Join(site, "manifest.json"))
	if err != nil {
		t.Fatal(err)
	}
	m, err := render.ParseManifest(data)
	if err != nil {
		t.Fatal(err)
	}

	// Outputs: the site's files, each once, with its hash.
	listed := map[string]bool{}
	checkOutput := func(e render.ManifestEntry) {
		if listed[e.Path] {
			t.Errorf("output %s listed twice", e.Path)
		}
		listed[e.Path] = true
		size, sum := fileSHA256(t, filepath.Join(site, filepath.FromSlash(e.Path)))
		if size != e.Size || sum != e.SHA256 {
			t.Errorf("output %s: manifest %d bytes %s, file %d bytes %s", e.Path, e.Size, e.SHA256, size, sum)
		}
	}
	for _, e := range m.Outputs {
		checkOutput(e)
	}
	for _, u := range m.Units {
		for _, e := range u.Outputs {
			checkOutput(e)
			if !strings.HasPrefix(e.Path, "units/"+u.Serial+"/") {
				t.Errorf("unit %s lists output %s", u.Serial, e.Path)
			}
		}
	}
	for p := range siteDigest(t, site) {
		if p != "manifest.json" && !listed[p] {
			t.Errorf("site file %s is not in the manifest", p)
		}
	}
	if len(listed) != len(siteDigest(t, site))-1 {
		t.Errorf("manifest lists %d outputs, the site has %d files besides it", len(listed), len(siteDigest(t, site))-1)
	}

	// Inputs: per unit, own and shared, against the archive.
	a, err := ingest.Open(archive)
	if err != nil {
		t.Fatal(err)
	}
	shared := map[string]render.ManifestEntry{}
	for _, e := range m.SharedInputs {
		shared[e.Path] = e
	}
	if len(m.Units) != len(a.Units) || len(m.SharedInputs) == 0 {
		t.Fatalf("%d units and %d shared inputs; want %d units and the shared station, reference and spec",
			len(m.Units), len(m.SharedInputs), len(a.Units))
	}
	for i, u := range m.Units {
		au := a.Units[i]
		if u.Serial != au.Serial {
			t.Fatalf("unit %d is %s, want %s", i, u.Serial, au.Serial)
		}
		all := append([]render.ManifestEntry(nil), u.Inputs...)
		for _, p := range u.SharedInputs {
			all = append(all, shared[p])
		}
		var paths []string
		var lines string
		sort.Slice(all, func(i, j int) bool { return all[i].Path < all[j].Path })
		for _, e := range all {
			paths = append(paths, e.Path)
			lines += e.SHA256 + " " + e.Path + "\n"
			size, sum := fileSHA256(t, filepath.Join(archive, filepath.FromSlash(e.Path)))
			if size != e.Size || sum != e.SHA256 {
				t.Errorf("%s input %s: manifest %d bytes %s, file %d bytes %s", u.Serial, e.Path, e.Size, e.SHA256, size, sum)
			}
		}
		if want := ingest.RunFiles(a, au.Acceptance()); strings.Join(paths, " ") != strings.Join(want, " ") {
			t.Errorf("%s inputs\n%v\nwant the run's files\n%v", u.Serial, paths, want)
		}
		if digest := sha256.Sum256([]byte(lines)); hex.EncodeToString(digest[:]) != u.InputsSHA256 {
			t.Errorf("%s inputs_sha256 %s is not the digest of its inputs", u.Serial, u.InputsSHA256)
		}
		runDir := au.Acceptance().Dir + "/"
		for _, e := range u.Inputs {
			if !strings.HasPrefix(e.Path, runDir) {
				t.Errorf("%s lists %s as its own input, outside its run folder %s", u.Serial, e.Path, runDir)
			}
		}
	}
}
