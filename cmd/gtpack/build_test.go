package main

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"io/fs"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"strings"
	"syscall"
	"testing"
	"time"

	"gtpack.example/gtpack/ingest"
	"gtpack.example/gtpack/ingest/demo"
)

// siteDigest maps every file of a site (the build cache excluded) to its
// SHA-256.
func siteDigest(t *testing.T, dir string) map[string]string {
	t.Helper()
	out := map[string]string{}
	err := filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(dir, p)
		if d.IsDir() {
			if rel == stateDir {
				return filepath.SkipDir
			}
			return nil
		}
		data, err := os.ReadFile(p)
		if err != nil {
			return err
		}
		sum := sha256.Sum256(data)
		out[filepath.ToSlash(rel)] = hex.EncodeToString(sum[:])
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return out
}

func sameSite(t *testing.T, what string, a, b map[string]string) {
	t.Helper()
	var diffs []string
	for k, v := range a {
		if b[k] != v {
			diffs = append(diffs, k)
		}
	}
	for k := range b {
		if _, ok := a[k]; !ok {
			diffs = append(diffs, k+" (extra)")
		}
	}
	sort.Strings(diffs)
	if len(diffs) > 0 {
		t.Fatalf("%s: %d file(s) differ: %s", what, len(diffs), strings.Join(diffs, ", "))
	}
}

func smallArchive(t *testing.T) string {
	t.Helper()
	dir := filepath.Join(t.TempDir(), "archive")
	if _, err := demo.Write(dir, demo.Options{Units: 5, Seed: 7, Beams: 4, Points: 101}); err != nil {
		t.Fatal(err)
	}
	return dir
}

func runQuiet(t *testing.T, args ...string) int {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(args, &out, &errb)
	if code == exitUsage {
		t.Fatalf("gtpack %v: usage error: %s", args, errb.String())
	}
	return code
}

// Two builds of the same archive into fresh folders are byte-identical,
// also from a copy of the archive (other inodes, times and path), and a
// no-change rebuild leaves every file as it was.
func TestBuildIsDeterministic(t *testing.T) {
	archive := smallArchive(t)
	a := filepath.Join(t.TempDir(), "a")
	b := filepath.Join(t.TempDir(), "b")
	runQuiet(t, "build", archive, "-o", a, "--quiet")
	runQuiet(t, "build", archive, "-o", b, "--quiet", "-j", "1")
	da, db := siteDigest(t, a), siteDigest(t, b)
	if len(da) < 5*4+6 {
		t.Fatalf("site has %d files, want the 4 files of each of 5 units and the fleet files", len(da))
	}
	sameSite(t, "two clean builds", da, db)
	time.Sleep(10 * time.Millisecond)
	copied := filepath.Join(t.TempDir(), "elsewhere", "archive")
	if err := os.CopyFS(copied, os.DirFS(archive)); err != nil {
		t.Fatal(err)
	}
	c := filepath.Join(t.TempDir(), "c")
	runQuiet(t, "build", copied, "-o", c, "--quiet")
	sameSite(t, "a build of a copy of the archive", da, siteDigest(t, c))
	runQuiet(t, "build", archive, "-o", a, "--quiet")
	sameSite(t, "rebuild without change", da, siteDigest(t, a))
}

// A rebuild redoes only the units whose inputs changed, and units that left
// the archive leave the site.
func TestIncrementalBuild(t *testing.T) {
	archive := smallArchive(t)
	site := filepath.Join(t.TempDir(), "site")
	runQuiet(t, "build", archive, "-o", site, "--quiet")
	states := func() map[string][]byte {
		m := map[string][]byte{}
		entries, _ := os.ReadDir(filepath.Join(site, stateDir, "units"))
		for _, e := range entries {
			data, _ := os.ReadFile(filepath.Join(site, stateDir, "units", e.Name()))
			m[e.Name()] = data
		}
		return m
	}
	before := states()
	if len(before) != 5 {
		t.Fatalf("%d unit states, want 5", len(before))
	}

	a, err := ingest.Open(archive)
	if err != nil {
		t.Fatal(err)
	}
	changed := a.Units[1]
	notes := filepath.Join(archive, filepath.FromSlash(changed.Acceptance().Dir), "run.yaml")
	data, err := os.ReadFile(notes)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(notes, append(data, []byte("# edited\n")...), 0o644); err != nil {
		t.Fatal(err)
	}
	future := time.Now().Add(time.Hour)
	os.Chtimes(notes, future, future)

	var out, errb bytes.Buffer
	run([]string{"build", archive, "-o", site, "-j", "1"}, &out, &errb)
	log := errb.String()
	if !strings.Contains(log, "1 unit(s) built, 4 unchanged") {
		t.Fatalf("after one changed run.yaml the build said:\n%s", log)
	}
	after := states()
	for name, data := range before {
		if name == changed.Serial+".json" {
			continue
		}
		if !bytes.Equal(after[name], data) {
			t.Errorf("unit state %s was rewritten although its inputs did not change", name)
		}
	}

	removed := a.Units[0]
	for _, r := range removed.Runs {
		if err := os.RemoveAll(filepath.Join(archive, filepath.FromSlash(r.Dir))); err != nil {
			t.Fatal(err)
		}
	}
	runQuiet(t, "build", archive, "-o", site, "--quiet")
	if _, err := os.Stat(filepath.Join(site, "units", removed.Serial)); !os.IsNotExist(err) {
		t.Fatalf("unit %s left the archive but its folder is still in the site (%v)", removed.Serial, err)
	}
	var manifest struct {
		Units []struct{ Serial string } `json:"units"`
	}
	data, err = os.ReadFile(filepath.Join(site, "manifest.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(data, &manifest); err != nil {
		t.Fatal(err)
	}
	if len(manifest.Units) != 4 {
		t.Fatalf("manifest lists %d units after one was removed, want 4", len(manifest.Units))
	}
}

// Shards built separately and joined by `index` give the same site as one
// build.
func TestShardsThenIndex(t *testing.T) {
	archive := smallArchive(t)
	whole := filepath.Join(t.TempDir(), "whole")
	runQuiet(t, "build", archive, "-o", whole, "--quiet")
	sharded := filepath.Join(t.TempDir(), "sharded")
	for k := 0; k < 3; k++ {
		runQuiet(t, "build", archive, "-o", sharded, "--quiet", "--shard", string(rune('0'+k))+"/3")
	}
	if _, err := os.Stat(filepath.Join(sharded, "index.html")); !os.IsNotExist(err) {
		t.Fatalf("a sharded build wrote the fleet pages (%v)", err)
	}
	if code := runQuiet(t, "index", sharded); code != exitOK {
		t.Fatalf("index exited %d", code)
	}
	sameSite(t, "three shards and index vs one build", siteDigest(t, whole), siteDigest(t, sharded))
}

// A build killed with SIGKILL at random moments, five times, then run to
// the end, gives the same site as one clean build.
func TestKilledBuildRecovers(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the binary and kills it repeatedly")
	}
	archive := smallArchive(t)
	bin := filepath.Join(t.TempDir(), "gtpack")
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	clean := filepath.Join(t.TempDir(), "clean")
	if out, err := exec.Command(bin, "build", archive, "-o", clean, "--quiet").CombinedOutput(); err != nil {
		t.Fatalf("clean build: %v\n%s", err, out)
	}
	start := time.Now()
	if out, err := exec.Command(bin, "build", archive, "-o", filepath.Join(t.TempDir(), "timing"), "--quiet").CombinedOutput(); err != nil {
		t.Fatalf("timing build: %v\n%s", err, out)
	}
	full := time.Since(start)

	killed := filepath.Join(t.TempDir(), "killed")
	rng := rand.New(rand.NewPCG(42, 7))
	for i := 0; i < 5; i++ {
		cmd := exec.Command(bin, "build", archive, "-o", killed, "--quiet", "--force")
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		time.Sleep(time.Duration(rng.Float64() * float64(full)))
		cmd.Process.Signal(syscall.SIGKILL)
		cmd.Wait()
	}
	if out, err := exec.Command(bin, "build", archive, "-o", killed, "--quiet").CombinedOutput(); err != nil {
		t.Fatalf("build after kills: %v\n%s", err, out)
	}
	sameSite(t, "killed five times then rebuilt vs clean build", siteDigest(t, clean), siteDigest(t, killed))
}

func TestUsageErrors(t *testing.T) {
	for _, args := range [][]string{
		{},
		{"frobnicate"},
		{"build"},
		{"build", "a", "b"},
		{"build", "a", "--shard", "3/3"},
		{"build", "a", "--shard", "x"},
		{"inspect"},
		{"demo", "d", "--units", "0"},
		{"build", "../../testdata/good", "-o", "../../testdata/good/site"}, // never write into the archive
		{"build", "../../testdata/good", "-o", "../../testdata/good"},
	} {
		var out, errb bytes.Buffer
		if code := run(args, &out, &errb); code != exitUsage {
			t.Errorf("gtpack %q exited %d, want %d (usage)", args, code, exitUsage)
		}
	}
}

// shardOf must be FNV-1a 64 as the FNV specification defines it
// (offset basis 14695981039346656037, prime 1099511628211; IETF draft
// "The FNV Non-Cryptographic Hash Algorithm"), so that any other tool can
// tell which shard holds a serial.
func TestShardOfIsFNV1a(t *testing.T) {
	for _, serial := range []string{"FHA-26-0001", "FHA-26-0002", "x", ""} {
		h := uint64(14695981039346656037)
		for _, c := range []byte(serial) {
			h ^= uint64(c)
			h *= 1099511628211
		}
		for _, n := range []int{1, 3, 16} {
			if got, want := shardOf(serial, n), int(h%uint64(n)); got != want {
				t.Errorf("shardOf(%q, %d) = %d, want %d", serial, n, got, want)
			}
		}
	}
}

// `check` on the broken archive lists one problem per broken unit as
// file:line: message, and exits 1; `build` still builds every unit.
func TestCheckAndBuildBrokenArchive(t *testing.T) {
	var out, errb bytes.Buffer
	if code := run([]string{"check", "../../testdata/broken"}, &out, &errb); code != exitRefused {
		t.Fatalf("check exited %d, want %d\n%s%s", code, exitRefused, out.String(), errb.String())
	}
	want := []string{
		"units/BRK-DECREASING/b00-noise.csv:5: ",
		"units/BRK-EMPTY/b00-noise.csv: ",
		"units/BRK-ESCAPE/run.yaml:14: ",
		"units/BRK-LINK/run.yaml:14: ",
		"units/BRK-MISSING/run.yaml:16: ",
		"units/BRK-PORTS/run.yaml:14: ",
		"units/BRK-TEXT/b00.csv:4: ",
		"units/BRK-TRUNCATED/b00-noise.csv:7: ",
		"units/BRK-UNKNOWN-KEY/run.yaml:9: ",
	}
	lines := strings.Split(strings.TrimSpace(out.String()), "\n")
	if len(lines) != len(want)+1 {
		t.Fatalf("check printed %d lines, want %d problems and a count:\n%s", len(lines), len(want), out.String())
	}
	for i, w := range want {
		if !strings.HasPrefix(lines[i], w) {
			t.Errorf("problem %d: %q, want it to start with %q", i, lines[i], w)
		}
	}

	site := filepath.Join(t.TempDir(), "site")
	out.Reset()
	errb.Reset()
	if code := run([]string{"build", "../../testdata/broken", "-o", site, "--quiet"}, &out, &errb); code != exitRefused {
		t.Fatalf("build exited %d, want %d (inputs refused, the rest built)", code, exitRefused)
	}
	if _, err := os.Stat(filepath.Join(site, "units", "BRK-GOOD", "report.html")); err != nil {
		t.Fatalf("the good unit of the broken archive was not built: %v", err)
	}
	var res struct {
		Verdict  string `json:"verdict"`
		Problems []struct {
			File string `json:"file"`
			Line int    `json:"line"`
		} `json:"problems"`
	}
	data, err := os.ReadFile(filepath.Join(site, "units", "BRK-DECREASING", "result.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(data, &res); err != nil {
		t.Fatal(err)
	}
	if res.Verdict != "incomplete" || len(res.Problems) == 0 ||
		res.Problems[0].File != "units/BRK-DECREASING/b00-noise.csv" || res.Problems[0].Line != 5 {
		t.Errorf("BRK-DECREASING result: verdict %s, problems %+v; want incomplete with b00-noise.csv:5 first", res.Verdict, res.Problems)
	}
}

// Two builds of sample-archive/ are byte-identical (the site contract's
// determinism, on the committed sample).
func TestSampleArchiveBuildsAreIdentical(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the sample archive twice")
	}
	a := filepath.Join(t.TempDir(), "a")
	b := filepath.Join(t.TempDir(), "b")
	if code := runQuiet(t, "build", "../../sample-archive", "-o", a, "--quiet"); code != exitOK {
		t.Fatalf("build of sample-archive exited %d", code)
	}
	runQuiet(t, "build", "../../sample-archive", "-o", b, "--quiet")
	da := siteDigest(t, a)
	if len(da) != 8*4+7 {
		t.Errorf("sample site has %d files, want 8 units x 4 files (report, workbook, result.json, manifest) + 7 (index, health, fleet.json, fleet.xlsx, results.csv, manifest.json, SHA256SUMS)", len(da))
	}
	sameSite(t, "two builds of sample-archive", da, siteDigest(t, b))
}

func TestInside(t *testing.T) {
	dir := t.TempDir()
	archive := filepath.Join(dir, "archive")
	os.MkdirAll(filepath.Join(archive, "runs"), 0o755)
	link := filepath.Join(dir, "link")
	if err := os.Symlink(archive, link); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		path string
		want bool
	}{
		{archive, true},
		{filepath.Join(archive, "site"), true},
		{filepath.Join(archive, "runs", "new", "site"), true}, // below a folder that does not exist yet
		{filepath.Join(link, "site"), true},                   // through a link to the archive
		{filepath.Join(dir, "archive-site"), false},           // a sibling whose name starts alike
		{dir, false},
	} {
		if got := inside(c.path, archive); got != c.want {
			t.Errorf("inside(%s, archive) = %v, want %v", c.path, got, c.want)
		}
	}
}

// A build that changes no unit leaves the fleet pages alone (they would
// come out the same); a missing page, or a changed unit, makes the fleet
// stage run again.
func TestFleetPagesKeptWhenNothingChanged(t *testing.T) {
	archive := smallArchive(t)
	site := filepath.Join(t.TempDir(), "site")
	runQuiet(t, "build", archive, "-o", site, "--quiet")
	pages := []string{"index.html", "fleet.json", "fleet.xlsx", "results.csv", "manifest.json"}
	first := map[string][]byte{}
	past := time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)
	age := func() {
		for _, p := range pages {
			if err := os.Chtimes(filepath.Join(site, p), past, past); err != nil {
				t.Fatal(err)
			}
		}
	}
	for _, p := range pages {
		data, err := os.ReadFile(filepath.Join(site, p))
		if err != nil {
			t.Fatal(err)
		}
		first[p] = data
	}
	rewritten := func() (names []string) {
		for _, p := range pages {
			fi, err := os.Stat(filepath.Join(site, p))
			if err != nil {
				t.Fatal(err)
			}
			if !fi.ModTime().Equal(past) {
				names = append(names, p)
			}
		}
		return names
	}

	age()
	runQuiet(t, "build", archive, "-o", site, "--quiet")
	if got := rewritten(); len(got) != 0 {
		t.Errorf("a build with nothing changed rewrote %v", got)
	}

	if err := os.Remove(filepath.Join(site, "index.html")); err != nil {
		t.Fatal(err)
	}
	runQuiet(t, "build", archive, "-o", site, "--quiet")
	for _, p := range pages {
		data, err := os.ReadFile(filepath.Join(site, p))
		if err != nil || !bytes.Equal(data, first[p]) {
			t.Errorf("%s after index.html was removed and the site rebuilt: %d bytes (%v), want the first build's %d", p, len(data), err, len(first[p]))
		}
	}

	a, err := ingest.Open(archive)
	if err != nil {
		t.Fatal(err)
	}
	runYAML := filepath.Join(archive, filepath.FromSlash(a.Units[2].Acceptance().File))
	data, err := os.ReadFile(runYAML)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(runYAML, append(data, "# edited\n"...), 0o644); err != nil {
		t.Fatal(err)
	}
	age()
	runQuiet(t, "build", archive, "-o", site, "--quiet")
	if got := rewritten(); len(got) != len(pages) {
		t.Errorf("after a unit changed the build rewrote only %v of %v", got, pages)
	}
}

// The gtpack demo command writes sample-archive/ byte for byte: the
// files of ingest/demo and the approvals it makes (one unit issued and
// co-signed, one approved before its retest, one more issued).
func TestDemoCommandIsTheSampleArchive(t *testing.T) {
	if testing.Short() {
		t.Skip("reduces four units")
	}
	dir := filepath.Join(t.TempDir(), "demo")
	if code, out := runOut("demo", dir, "--units", "8", "--seed", "1"); code != exitOK || !strings.Contains(out, "with 4 approval(s)") {
		t.Fatalf("demo: %d\n%s", code, out)
	}
	want, got := siteDigest(t, "../../sample-archive"), siteDigest(t, dir)
	sameSite(t, "gtpack demo --units 8 --seed 1 and sample-archive/", want, got)
	n := 0
	for p := range got {
		if strings.HasPrefix(p, "approvals/") {
			n++
		}
	}
	if n != 4 {
		t.Errorf("%d approval files, want 4", n)
	}
}

// The sample archive's runs written both ways, naming the spec's beam
// plan (as sample-archive is) and with every beam in full, reduce to the
// same results: the same beams, numbers, limits and verdicts.
func TestBeamPlanAndExplicitRunsAgree(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the sample archive twice")
	}
	results := func(explicit bool) map[string]map[string]any {
		dir := t.TempDir()
		archive, site := filepath.Join(dir, "archive"), filepath.Join(dir, "site")
		if _, err := demo.Write(archive, demo.Options{Units: 8, Seed: 1, ExplicitBeams: explicit}); err != nil {
			t.Fatal(err)
		}
		if code, out := runOut("build", archive, "-o", site, "--quiet"); code != exitOK {
			t.Fatalf("build (explicit %v): %d\n%s", explicit, code, out)
		}
		files, _ := filepath.Glob(filepath.Join(site, "units", "*", "result.json"))
		if len(files) != 8 {
			t.Fatalf("%d results", len(files))
		}
		out := map[string]map[string]any{}
		for _, f := range files {
			data, err := os.ReadFile(f)
			if err != nil {
				t.Fatal(err)
			}
			var r map[string]any
			if err := json.Unmarshal(data, &r); err != nil {
				t.Fatal(err)
			}
			out[filepath.Base(filepath.Dir(f))] = r
		}
		return out
	}
	plan, explicit := results(false), results(true)
	for serial, p := range plan {
		e := explicit[serial]
		for _, k := range []string{"verdict", "beams", "limits", "scan", "elements", "flags", "history"} {
			a, _ := json.Marshal(p[k])
			b, _ := json.Marshal(e[k])
			if !bytes.Equal(a, b) {
				t.Errorf("%s: %s differ between the plan and the explicit runs (%d and %d bytes)", serial, k, len(a), len(b))
			}
		}
	}
}
