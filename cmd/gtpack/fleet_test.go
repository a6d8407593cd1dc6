package main

import (
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"os"
	"path/filepath"
	"slices"
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

// readManifests reads the site's manifest.json (schema 3) and every unit
// manifest it lists, checking each listed unit manifest's size and
// SHA-256 against the file.
func readManifests(t *testing.T, site string) (*render.Manifest, []*render.UnitManifest) {
	t.Helper()
	data, err := os.ReadFile(filepath.Join(site, "manifest.json"))
	if err != nil {
		t.Fatal(err)
	}
	m, err := render.ParseManifest(data)
	if err != nil {
		t.Fatal(err)
	}
	var units []*render.UnitManifest
	for _, u := range m.Units {
		p := filepath.Join(site, filepath.FromSlash(u.Manifest.Path))
		size, sum := fileSHA256(t, p)
		if size != u.Manifest.Size || sum != u.Manifest.SHA256 {
			t.Errorf("%s: manifest.json lists it with %d bytes %s, the file has %d bytes %s", u.Manifest.Path, u.Manifest.Size, u.Manifest.SHA256, size, sum)
		}
		data, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		um, err := render.ParseUnitManifest(u.Manifest.Path, data)
		if err != nil {
			t.Fatal(err)
		}
		if um.Serial != u.Serial || um.InputsSHA256 != u.InputsSHA256 {
			t.Errorf("%s: serial %s inputs %s; manifest.json says %s %s", u.Manifest.Path, um.Serial, um.InputsSHA256, u.Serial, u.InputsSHA256)
		}
		// The unit manifest's verdict is that of the files beside it (the
		// site's manifest gives the unit's verdict now: incomplete for a
		// unit whose retest was refused).
		var res struct {
			Verdict string `json:"verdict"`
		}
		if data, err := os.ReadFile(filepath.Join(site, "units", u.Serial, "result.json")); err != nil || json.Unmarshal(data, &res) != nil || res.Verdict != um.Verdict {
			t.Errorf("%s: verdict %s; result.json beside it says %q (%v)", u.Manifest.Path, um.Verdict, res.Verdict, err)
		}
		units = append(units, um)
	}
	return m, units
}

// manifest.json (schema 3) lists every unit's manifest and the fleet
// pages; the unit manifests list the unit's files and every input of
// every run of the unit; together they list every file of the site but
// manifest.json and SHA256SUMS, each with the size and SHA-256 of the file
// on disk.
func TestManifestListsEverything(t *testing.T) {
	archive := smallArchive(t)
	site := filepath.Join(t.TempDir(), "site")
	runQuiet(t, "build", archive, "-o", site, "--quiet")
	m, units := readManifests(t, site)

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
	for i, u := range units {
		checkOutput(m.Units[i].Manifest)
		for _, e := range u.Outputs {
			checkOutput(e)
			if !strings.HasPrefix(e.Path, "units/"+u.Serial+"/") {
				t.Errorf("unit %s lists output %s", u.Serial, e.Path)
			}
		}
	}
	files := siteDigest(t, site)
	for p := range files {
		if p != "manifest.json" && p != "SHA256SUMS" && !listed[p] {
			t.Errorf("site file %s is not in the manifest", p)
		}
	}
	if len(listed) != len(files)-2 {
		t.Errorf("manifest lists %d outputs, the site has %d files besides it and SHA256SUMS", len(listed), len(files)-2)
	}

	// Inputs: per unit, every file of its runs, against the archive.
	a, err := ingest.Open(archive)
	if err != nil {
		t.Fatal(err)
	}
	if len(units) != len(a.Units) {
		t.Fatalf("%d units, want %d", len(units), len(a.Units))
	}
	for i, u := range units {
		au := a.Units[i]
		if u.Serial != au.Serial {
			t.Fatalf("unit %d is %s, want %s", i, u.Serial, au.Serial)
		}
		var paths []string
		var lines string
		for _, e := range u.Inputs {
			paths = append(paths, e.Path)
			lines += e.SHA256 + " " + e.Path + "\n"
			size, sum := fileSHA256(t, filepath.Join(archive, filepath.FromSlash(e.Path)))
			if size != e.Size || sum != e.SHA256 {
				t.Errorf("%s input %s: manifest %d bytes %s, file %d bytes %s", u.Serial, e.Path, e.Size, e.SHA256, size, sum)
			}
		}
		var want []string
		for _, r := range au.Runs {
			want = append(want, ingest.RunFiles(a, r)...)
		}
		sort.Strings(want)
		want = slices.Compact(want)
		if strings.Join(paths, " ") != strings.Join(want, " ") {
			t.Errorf("%s inputs\n%v\nwant the files of its runs\n%v", u.Serial, paths, want)
		}
		if digest := sha256.Sum256([]byte(lines)); hex.EncodeToString(digest[:]) != u.InputsSHA256 {
			t.Errorf("%s inputs_sha256 %s is not the digest of its inputs", u.Serial, u.InputsSHA256)
		}
	}
}
