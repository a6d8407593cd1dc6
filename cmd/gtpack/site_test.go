package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"sort"
	"strings"
	"sync"
	"testing"
	"time"

	"gtpack.example/gtpack/ingest"
	"gtpack.example/gtpack/render"
)

// These tests check the contract's promises about the site
// (shared/docs/archive-format.md, "Site layout" and "Command line"): a
// site holds only what gtpack wrote plus what a person added, nothing is
// written outside it, one writer at a time (exit 3 otherwise), and after
// any failure every unit folder holds the files of one build, described
// exactly by the manifest.

func runOut(args ...string) (int, string) {
	var out, errb bytes.Buffer
	code := run(args, &out, &errb)
	return code, out.String() + errb.String()
}

// runFolders maps each serial of a demo archive to its run folders.
func runFolders(t *testing.T, archive string) map[string][]string {
	t.Helper()
	out := map[string][]string{}
	matches, err := filepath.Glob(filepath.Join(archive, "runs", "*", "*", "run.yaml"))
	if err != nil || len(matches) == 0 {
		t.Fatalf("no runs in %s: %v", archive, err)
	}
	for _, m := range matches {
		serial := filepath.Base(filepath.Dir(filepath.Dir(m)))
		out[serial] = append(out[serial], filepath.Dir(m))
	}
	for _, v := range out {
		sort.Strings(v)
	}
	return out
}

func serialsOf(m map[string][]string) []string {
	var s []string
	for k := range m {
		s = append(s, k)
	}
	sort.Strings(s)
	return s
}

func editFile(t *testing.T, p string, edit func(string) string) {
	t.Helper()
	data, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(p, []byte(edit(string(data))), 0o644); err != nil {
		t.Fatal(err)
	}
}

// treeOf lists every file below dir with its bytes' digest.
func treeOf(t *testing.T, dir string) map[string]string {
	t.Helper()
	if _, err := os.Stat(dir); os.IsNotExist(err) {
		return map[string]string{}
	}
	return siteDigest(t, dir)
}

// checkManifestTruthful: every file the manifests list is in the site
// with the size and SHA-256 they give, and, with allListed, every unit
// folder's gtpack files are listed (a person's files have "person" in
// their names).
func checkManifestTruthful(t *testing.T, site string, allListed bool) {
	t.Helper()
	m, units := readManifests(t, site)
	digest := siteDigest(t, site)
	listed := map[string]bool{"manifest.json": true}
	check := func(o render.ManifestEntry) {
		listed[o.Path] = true
		if digest[o.Path] != o.SHA256 {
			t.Errorf("manifest lists %s with SHA-256 %s; the site's file has %q", o.Path, o.SHA256, digest[o.Path])
		}
	}
	for i, u := range units {
		check(m.Units[i].Manifest)
		for _, o := range u.Outputs {
			check(o)
		}
	}
	for _, o := range m.Outputs {
		check(o)
	}
	for p := range digest {
		if allListed && strings.HasPrefix(p, "units/") && !listed[p] && !strings.Contains(p, "person") {
			t.Errorf("%s is in the site but not in the manifest", p)
		}
	}
}

// A serial (or other identifier) that is not a portable name is refused
// with file and line by check and build; nothing is written outside the
// site, and the other units still build.
func TestHostileSerialsAreRefused(t *testing.T) {
	base := smallArchive(t)
	for _, bad := range []string{"../../x", ".", "..", "a/b", "CON", "aux", "lpt1.txt", "QDA-1.", "QDA-1 ", "x\u202Eyx", "x\x01y", "-x"} {
		t.Run(fmt.Sprintf("%q", bad), func(t *testing.T) {
			top := t.TempDir()
			archive := filepath.Join(top, "a", "archive")
			if err := os.CopyFS(archive, os.DirFS(base)); err != nil {
				t.Fatal(err)
			}
			runs := runFolders(t, archive)
			victim := serialsOf(runs)[0]
			for _, d := range runs[victim] {
				editFile(t, filepath.Join(d, "run.yaml"), func(s string) string {
					return strings.Replace(s, "serial: "+victim, "serial: "+strconvQuote(bad), 1)
				})
			}
			code, out := runOut("check", archive)
			if code != exitRefused || !regexp.MustCompile(`run\.yaml:2: .*serial`).MatchString(out) {
				t.Fatalf("check exited %d; want 1 and a problem at run.yaml:2 naming the serial:\n%s", code, out)
			}
			site := filepath.Join(top, "a", "b", "site")
			before := treeOf(t, filepath.Join(top))
			code, out = runOut("build", archive, "-o", site, "--quiet")
			if code != exitRefused {
				t.Fatalf("build exited %d, want 1:\n%s", code, out)
			}
			// Nothing new anywhere but in the site.
			after := treeOf(t, top)
			for p := range after {
				if _, had := before[p]; !had && !strings.HasPrefix(p, "a/b/site/") {
					t.Errorf("build wrote %s outside the site", p)
				}
			}
			units, _ := filepath.Glob(filepath.Join(site, "units", "*", "report.html"))
			if len(units) != len(runs)-1 {
				t.Errorf("%d unit reports, want %d (all but the refused one)", len(units), len(runs)-1)
			}
		})
	}
}

func strconvQuote(s string) string {
	b, _ := json.Marshal(s) // a YAML double-quoted scalar takes JSON's escapes
	return string(b)
}

// Serials that differ only in case are one unit: refused, so that a copy
// of the site on a case-insensitive disk cannot have one overwrite the
// other.
func TestCaseTwinSerialsAreRefused(t *testing.T) {
	archive := smallArchive(t)
	runs := runFolders(t, archive)
	serials := serialsOf(runs)
	twin := strings.ToLower(serials[0])
	for _, d := range runs[serials[1]] {
		editFile(t, filepath.Join(d, "run.yaml"), func(s string) string {
			return strings.Replace(s, "serial: "+serials[1], "serial: "+twin, 1)
		})
	}
	code, out := runOut("check", archive)
	if code != exitRefused || !strings.Contains(out, twin) || !strings.Contains(out, "case") {
		t.Fatalf("check exited %d; want 1 and a problem about %q and case:\n%s", code, twin, out)
	}
}

// A first build into a folder that holds anything and is not a site is
// refused (exit 2) and changes nothing; a site's files that a person
// added survive --force and the removal of their unit, and are named.
func TestPersonsFilesAreKept(t *testing.T) {
	archive := smallArchive(t)
	top := t.TempDir()
	foreign := filepath.Join(top, "foreign")
	if err := os.MkdirAll(filepath.Join(foreign, "units", "important"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(foreign, "units", "important", "thesis.docx"), []byte("years of work"), 0o644); err != nil {
		t.Fatal(err)
	}
	before := treeOf(t, foreign)
	if code, out := runOut("build", archive, "-o", foreign, "--quiet"); code != exitUsage || !strings.Contains(out, "not empty") {
		t.Fatalf("build into a folder that is not a site exited %d, want 2 with a reason:\n%s", code, out)
	}
	if _, err := os.Stat(filepath.Join(foreign, stateDir)); err == nil {
		t.Errorf("the refused build made %s", stateDir)
	}
	sameSite(t, "a folder that is not a site, after a refused build", before, treeOf(t, foreign))

	site := filepath.Join(top, "site")
	if code, out := runOut("build", archive, "-o", site, "--quiet"); code != exitOK {
		t.Fatalf("build: %d\n%s", code, out)
	}
	runs := runFolders(t, archive)
	serials := serialsOf(runs)
	personal := map[string]string{
		"units/" + serials[0] + "/signed-person.pdf": "signature",
		"units/" + serials[1] + "/person-notes.txt":  "notes",
		"person-cover.html":                          "cover",
	}
	for p, text := range personal {
		if err := os.WriteFile(filepath.Join(site, p), []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	code, out := runOut("build", archive, "-o", site, "--force", "--quiet")
	if code != exitOK {
		t.Fatalf("build --force: %d\n%s", code, out)
	}
	for p := range personal {
		if !strings.Contains(out, p) {
			t.Errorf("build did not name %s, a file it did not write:\n%s", p, out)
		}
	}
	// Unit serials[1] leaves the archive: gtpack's files of it go, the
	// person's file and so its folder stay.
	for _, d := range runs[serials[1]] {
		if err := os.RemoveAll(d); err != nil {
			t.Fatal(err)
		}
	}
	if code, out := runOut("build", archive, "-o", site, "--quiet"); code != exitOK {
		t.Fatalf("build after a unit left: %d\n%s", code, out)
	}
	for p, text := range personal {
		data, err := os.ReadFile(filepath.Join(site, p))
		if err != nil || string(data) != text {
			t.Errorf("%s: %q, %v; want the person's file unchanged", p, data, err)
		}
	}
	if _, err := os.Stat(filepath.Join(site, "units", serials[1], "report.html")); !os.IsNotExist(err) {
		t.Errorf("the report of a unit that left the archive is still there (%v)", err)
	}
	checkManifestTruthful(t, site, true)
}

// A unit folder that is a symbolic link is never followed: the build does
// not write or delete through it (exit 3 for that unit) and the rest of
// the site is built.
func TestUnitFolderLinkIsNotFollowed(t *testing.T) {
	archive := smallArchive(t)
	top := t.TempDir()
	site := filepath.Join(top, "site")
	if code, out := runOut("build", archive, "-o", site, "--quiet"); code != exitOK {
		t.Fatalf("build: %d\n%s", code, out)
	}
	serial := serialsOf(runFolders(t, archive))[2]
	target := filepath.Join(top, "elsewhere")
	if err := os.MkdirAll(target, 0o755); err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"report.html", "result.json", serial + ".xlsx", "keep.txt"} {
		os.WriteFile(filepath.Join(target, name), []byte("not the site's"), 0o644)
	}
	unit := filepath.Join(site, "units", serial)
	if err := os.RemoveAll(unit); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(target, unit); err != nil {
		t.Fatal(err)
	}
	before := treeOf(t, target)
	code, out := runOut("build", archive, "-o", site, "--force", "--quiet")
	if code != exitSite || !strings.Contains(out, "symbolic link") {
		t.Fatalf("build with a linked unit folder exited %d, want 3 naming the link:\n%s", code, out)
	}
	sameSite(t, "the link's target after a build", before, treeOf(t, target))
	// The other units were built.
	if n, _ := filepath.Glob(filepath.Join(site, "units", "*", "result.json")); len(n) < 4 {
		t.Errorf("%d units have result.json; want the other four built", len(n))
	}
	// The unit leaves the archive: its files are not removed through the
	// link either, and once the link is gone the site builds again (no
	// journal was left that a later start would trip on).
	for _, d := range runFolders(t, archive)[serial] {
		os.RemoveAll(d)
	}
	if code, out := runOut("build", archive, "-o", site, "--quiet"); code != exitSite || !strings.Contains(out, "symbolic link") {
		t.Fatalf("removing a unit whose folder is a link exited %d, want 3 naming the link:\n%s", code, out)
	}
	sameSite(t, "the link's target after the unit's removal", before, treeOf(t, target))
	os.Remove(unit)
	if code, out := runOut("build", archive, "-o", site, "--quiet"); code != exitOK {
		t.Fatalf("build after the link was removed exited %d:\n%s", code, out)
	}
	checkManifestTruthful(t, site, true)
}

// A retest whose run.yaml is refused is still the acceptance run: the
// unit keeps its last report, is incomplete and stale in the overview,
// and an older run never silently takes its place.
func TestRefusedRetestKeepsLastReport(t *testing.T) {
	archive := smallArchive(t)
	site := filepath.Join(t.TempDir(), "site")
	if code, out := runOut("build", archive, "-o", site, "--quiet"); code != exitOK {
		t.Fatalf("build: %d\n%s", code, out)
	}
	runs := runFolders(t, archive)
	serial := serialsOf(runs)[0]
	last := runs[serial][len(runs[serial])-1]
	report := filepath.Join(site, "units", serial, "report.html")
	kept, err := os.ReadFile(report)
	if err != nil {
		t.Fatal(err)
	}
	// The retest: a copy of the last run, a year later, with one bad key.
	retest := filepath.Join(filepath.Dir(last), "retest")
	if err := os.CopyFS(retest, os.DirFS(last)); err != nil {
		t.Fatal(err)
	}
	editFile(t, filepath.Join(retest, "run.yaml"), func(s string) string {
		s = regexp.MustCompile(`started: (\d{4})`).ReplaceAllStringFunc(s, func(m string) string {
			var y int
			fmt.Sscanf(m, "started: %d", &y)
			return fmt.Sprintf("started: %d", y+1)
		})
		return s + "colour: blue\n"
	})
	code, out := runOut("build", archive, "-o", site)
	if code != exitRefused || !strings.Contains(out, "colour") || !strings.Contains(out, "1 stale") {
		t.Fatalf("build with a refused retest exited %d; want 1, the problem and one stale unit:\n%s", code, out)
	}
	if now, _ := os.ReadFile(report); !bytes.Equal(now, kept) {
		t.Errorf("the unit's last report changed although its retest was refused")
	}
	var fleet struct {
		Units []struct {
			Serial, Verdict, Stale string
		} `json:"units"`
	}
	data, err := os.ReadFile(filepath.Join(site, "fleet.json"))
	if err != nil {
		t.Fatal(err)
	}
	json.Unmarshal(data, &fleet)
	found := false
	for _, u := range fleet.Units {
		if u.Serial == serial {
			found = true
			if u.Verdict != "incomplete" || !strings.Contains(u.Stale, "retest/run.yaml") {
				t.Errorf("fleet.json has %s as %q, stale %q; want incomplete and stale naming the refused run", serial, u.Verdict, u.Stale)
			}
		}
	}
	if !found {
		t.Fatalf("fleet.json lacks %s", serial)
	}
	index, _ := os.ReadFile(filepath.Join(site, "index.html"))
	if !bytes.Contains(index, []byte(">stale<")) {
		t.Errorf("index.html does not mark the stale unit")
	}
	checkManifestTruthful(t, site, true)
	// A second build changes nothing more; mending the retest rebuilds
	// the unit from it.
	if code, out := runOut("build", archive, "-o", site, "--quiet"); code != exitRefused {
		t.Fatalf("second build exited %d\n%s", code, out)
	}
	editFile(t, filepath.Join(retest, "run.yaml"), func(s string) string { return strings.Replace(s, "colour: blue\n", "", 1) })
	if code, out := runOut("build", archive, "-o", site, "--quiet"); code != exitOK {
		t.Fatalf("build after the retest was mended exited %d\n%s", code, out)
	}
	data, _ = os.ReadFile(filepath.Join(site, "units", serial, "result.json"))
	if !bytes.Contains(data, []byte("retest")) {
		t.Errorf("result.json is not of the mended retest")
	}
}

// One writer at a time: a build into a site another writer holds exits 3
// at once, naming the holder; shards of the same count run together; a
// lock left by a killed build is recovered.
func TestOneWriterAtATime(t *testing.T) {
	archive := smallArchive(t)
	site := filepath.Join(t.TempDir(), "site")
	if code, out := runOut("build", archive, "-o", site, "--quiet"); code != exitOK {
		t.Fatalf("build: %d\n%s", code, out)
	}
	for _, c := range []struct {
		held  lockScope
		args  []string
		allow bool
	}{
		{lockScope{}, []string{"build", archive, "-o", site, "--quiet"}, false},
		{lockScope{}, []string{"build", archive, "-o", site, "--quiet", "--shard", "0/2"}, false},
		{lockScope{}, []string{"index", site}, false},
		{lockScope{0, 2}, []string{"build", archive, "-o", site, "--quiet", "--shard", "1/2"}, true},
		{lockScope{0, 2}, []string{"build", archive, "-o", site, "--quiet", "--shard", "0/2"}, false},
		{lockScope{0, 2}, []string{"build", archive, "-o", site, "--quiet", "--shard", "1/3"}, false},
		{lockScope{0, 2}, []string{"build", archive, "-o", site, "--quiet"}, false},
		{lockScope{0, 2}, []string{"index", site}, false},
	} {
		holder, err := openSite(site, false, "holder", c.held)
		if err != nil {
			t.Fatal(err)
		}
		start := time.Now()
		code, out := runOut(c.args...)
		holder.close()
		if c.allow && code != exitOK {
			t.Errorf("%v beside a holder of %s exited %d, want 0:\n%s", c.args[:len(c.args)], c.held, code, out)
		}
		if !c.allow && (code != exitSite || !strings.Contains(out, `"holder"`) || !strings.Contains(out, c.held.String())) {
			t.Errorf("%v beside a holder of %s exited %d, want 3 naming the holder:\n%s", c.args, c.held, code, out)
		}
		if !c.allow && time.Since(start) > 10*time.Second {
			t.Errorf("refusal took %v; want it at once", time.Since(start))
		}
	}
	// A killed build's lock file: nobody holds its flock any more.
	stale := filepath.Join(site, stateDir, "locks", "12345-deadbeef.lock")
	os.WriteFile(stale, []byte(`{"build_id":"12345-deadbeef","pid":12345,"command":"build"}`), 0o644)
	leftover := filepath.Join(site, "units", ".report.html.12345-deadbeef"+tempSuffix)
	os.WriteFile(leftover, []byte("half"), 0o644)
	if code, out := runOut("build", archive, "-o", site, "--quiet"); code != exitOK {
		t.Fatalf("build after a killed build's lock exited %d:\n%s", code, out)
	}
	for _, p := range []string{stale, leftover} {
		if _, err := os.Stat(p); !os.IsNotExist(err) {
			t.Errorf("%s left by a dead build is still there", p)
		}
	}
}

var binOnce struct {
	sync.Once
	path string
	err  error
}

// gtpackBinary builds the command once for the tests that run it as a
// process.
func gtpackBinary(t *testing.T) string {
	t.Helper()
	binOnce.Do(func() {
		dir, err := os.MkdirTemp("", "gtpack-bin")
		if err != nil {
			binOnce.err = err
			return
		}
		binOnce.path = filepath.Join(dir, "gtpack")
		if out, err := exec.Command("go", "build", "-o", binOnce.path, ".").CombinedOutput(); err != nil {
			binOnce.err = fmt.Errorf("go build: %v\n%s", err, out)
		}
	})
	if binOnce.err != nil {
		t.Fatal(binOnce.err)
	}
	return binOnce.path
}

// Shards started a fraction of a second apart, as a batch scheduler
// starts them, all land: then index gives the site of a whole build.
func TestShardsStartedTogetherAllLand(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the binary")
	}
	bin := gtpackBinary(t)
	archive := smallArchive(t)
	clean := filepath.Join(t.TempDir(), "clean")
	if out, err := exec.Command(bin, "build", archive, "-o", clean, "--quiet").CombinedOutput(); err != nil {
		t.Fatalf("clean build: %v\n%s", err, out)
	}
	for round := 0; round < 3; round++ {
		site := filepath.Join(t.TempDir(), "sharded")
		var cmds []*exec.Cmd
		var outs []*bytes.Buffer
		for k := 0; k < 4; k++ {
			var b bytes.Buffer
			c := exec.Command(bin, "build", archive, "-o", site, "--quiet", "--shard", fmt.Sprintf("%d/4", k))
			c.Stdout, c.Stderr = &b, &b
			if err := c.Start(); err != nil {
				t.Fatal(err)
			}
			cmds, outs = append(cmds, c), append(outs, &b)
			time.Sleep(time.Duration(k*7) * time.Millisecond)
		}
		for k, c := range cmds {
			if err := c.Wait(); err != nil {
				t.Fatalf("shard %d/4: %v\n%s", k, err, outs[k])
			}
		}
		if out, err := exec.Command(bin, "index", site).CombinedOutput(); err != nil {
			t.Fatalf("index: %v\n%s", err, out)
		}
		sameSite(t, "four shards then index vs one build", siteDigest(t, clean), siteDigest(t, site))
	}
}

// index refuses a folder that is not a site, and leaves out (and names) a
// unit whose files were deleted or changed.
func TestIndexChecksUnits(t *testing.T) {
	top := t.TempDir()
	if code, out := runOut("index", filepath.Join(top, "no-such-site")); code != exitUsage {
		t.Fatalf("index of a missing folder exited %d, want 2:\n%s", code, out)
	}
	if _, err := os.Stat(filepath.Join(top, "no-such-site")); !os.IsNotExist(err) {
		t.Errorf("index made the folder it was wrongly given")
	}
	os.MkdirAll(filepath.Join(top, "plain"), 0o755)
	if code, _ := runOut("index", filepath.Join(top, "plain")); code != exitUsage {
		t.Errorf("index of a folder that is not a site exited %d, want 2", code)
	}
	archive := smallArchive(t)
	site := filepath.Join(top, "site")
	if code, out := runOut("build", archive, "-o", site, "--quiet"); code != exitOK {
		t.Fatalf("build: %d\n%s", code, out)
	}
	serials := serialsOf(runFolders(t, archive))
	if err := os.RemoveAll(filepath.Join(site, "units", serials[0])); err != nil {
		t.Fatal(err)
	}
	editFile(t, filepath.Join(site, "units", serials[1], "result.json"), func(s string) string { return strings.Replace(s, "pass", "PASS", 1) })
	code, out := runOut("index", site)
	if code != exitRefused || !strings.Contains(out, serials[0]) || !strings.Contains(out, serials[1]) {
		t.Fatalf("index exited %d; want 1 naming %s and %s:\n%s", code, serials[0], serials[1], out)
	}
	man, _ := os.ReadFile(filepath.Join(site, "manifest.json"))
	for _, s := range serials[:2] {
		if bytes.Contains(man, []byte(`"serial": "`+s+`"`)) {
			t.Errorf("manifest.json still lists %s", s)
		}
	}
	checkManifestTruthful(t, site, false)
	// The next build makes both again.
	if code, out := runOut("build", archive, "-o", site, "--quiet"); code != exitOK {
		t.Fatalf("build after index: %d\n%s", code, out)
	}
	checkManifestTruthful(t, site, true)
	if data, _ := os.ReadFile(filepath.Join(site, "units", serials[1], "result.json")); bytes.Contains(data, []byte("PASS")) {
		t.Errorf("the changed result.json was kept")
	}
}

// A rebuild on a full disk exits 3; every unit folder then holds the files
// of one build, as its state records them; the manifest, where there is
// one, describes exactly the files there; and the next build with space
// finishes the work. The test mounts a small tmpfs (root only, as in CI).
func TestFullDiskRebuild(t *testing.T) {
	if testing.Short() {
		t.Skip("mounts a tmpfs")
	}
	mnt := t.TempDir()
	if out, err := exec.Command("mount", "-t", "tmpfs", "-o", "size=64m", "tmpfs", mnt).CombinedOutput(); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("CI runs as root and must be able to mount a tmpfs: %v %s", err, out)
		}
		t.Skipf("cannot mount a tmpfs here (needs root): %v %s", err, out)
	}
	t.Cleanup(func() { exec.Command("umount", mnt).Run() })
	archive := smallArchive(t)
	site := filepath.Join(mnt, "site")
	if code, out := runOut("build", archive, "-o", site, "--quiet"); code != exitOK {
		t.Fatalf("build: %d\n%s", code, out)
	}
	used := func() int64 {
		var st syscallStatfs
		if err := statfs(mnt, &st); err != nil {
			t.Fatal(err)
		}
		return st.used
	}
	unitBytes := int64(0)
	for p := range siteDigest(t, site) {
		if strings.HasPrefix(p, "units/") {
			fi, _ := os.Stat(filepath.Join(site, p))
			unitBytes += fi.Size()
		}
	}
	runs := runFolders(t, archive)
	unitBytes /= int64(len(runs))
	// Room for a third of a unit: nothing can be written. Room for one and
	// a half: some units are, then the disk fills.
	for round, room := range []int64{unitBytes / 3, unitBytes + unitBytes/2} {
		// Every unit changes (the operator is printed in its report).
		for _, dirs := range runs {
			for _, d := range dirs {
				editFile(t, filepath.Join(d, "run.yaml"), func(s string) string {
					return regexp.MustCompile(`operator: \S+`).ReplaceAllString(s, fmt.Sprintf("operator: Z%d", round))
				})
			}
		}
		size := used() + room
		if out, err := exec.Command("mount", "-o", fmt.Sprintf("remount,size=%d", size), mnt).CombinedOutput(); err != nil {
			t.Fatalf("remount: %v %s", err, out)
		}
		code, out := runOut("build", archive, "-o", site, "--quiet", "-j", "1")
		if code != exitSite && (round == 0 || code != exitOK) {
			t.Fatalf("rebuild with %d bytes of room exited %d, want 3:\n%s", room, code, out)
		}
		t.Logf("room %d bytes (a unit is %d): exit %d\n%s", room, unitBytes, code, out)
		checkUnitsWhole(t, site)
		if _, err := os.Stat(filepath.Join(site, "manifest.json")); err == nil {
			checkManifestTruthful(t, site, true)
		} else if _, err := os.Stat(filepath.Join(site, "index.html")); err == nil {
			t.Errorf("index.html is there without a manifest")
		}
	}
	if out, err := exec.Command("mount", "-o", "remount,size=64m", mnt).CombinedOutput(); err != nil {
		t.Fatalf("remount: %v %s", err, out)
	}
	if code, out := runOut("build", archive, "-o", site, "--quiet"); code != exitOK {
		t.Fatalf("build with room again: %d\n%s", code, out)
	}
	clean := filepath.Join(t.TempDir(), "clean")
	if code, out := runOut("build", archive, "-o", clean, "--quiet"); code != exitOK {
		t.Fatalf("clean build: %d\n%s", code, out)
	}
	sameSite(t, "site finished after a full disk vs clean build", siteDigest(t, clean), siteDigest(t, site))
}

// checkUnitsWhole: every unit folder's files are the ones its state
// records, byte for byte.
func checkUnitsWhole(t *testing.T, dir string) {
	t.Helper()
	s := &site{dir: dir}
	root, err := os.OpenRoot(dir)
	if err != nil {
		t.Fatal(err)
	}
	defer root.Close()
	s.root = root
	serials, err := s.serials()
	if err != nil {
		t.Fatal(err)
	}
	for _, serial := range serials {
		st, err := s.readState(serial)
		if err != nil {
			t.Fatal(err)
		}
		if why := s.checkOutputs(st); why != "" {
			t.Errorf("unit %s is not whole: %s", serial, why)
		}
		entries, _ := os.ReadDir(filepath.Join(dir, "units", serial))
		if len(entries) != len(st.Outputs) {
			t.Errorf("unit %s holds %d files, its state records %d", serial, len(entries), len(st.Outputs))
		}
	}
}

// A unit whose only run.yaml becomes unreadable (here a dangling link, as
// when a share is unmounted under it) keeps its last report and is stale;
// a new unit whose folder holds a person's report.html is not written over
// it (exit 3) and the rest is built.
func TestUnreadableRunAndPersonsFileInTheWay(t *testing.T) {
	archive := smallArchive(t)
	site := filepath.Join(t.TempDir(), "site")
	runs := runFolders(t, archive)
	serials := serialsOf(runs)
	// The last unit is added later; a person puts a report.html where its
	// report will go.
	newcomer := serials[len(serials)-1]
	away := filepath.Join(t.TempDir(), "away")
	if err := os.Rename(filepath.Join(archive, "runs", newcomer), away); err != nil {
		t.Fatal(err)
	}
	if code, out := runOut("build", archive, "-o", site, "--quiet"); code != exitOK {
		t.Fatalf("build: %d\n%s", code, out)
	}
	os.MkdirAll(filepath.Join(site, "units", newcomer), 0o755)
	os.WriteFile(filepath.Join(site, "units", newcomer, "report.html"), []byte("a person's page"), 0o644)
	if err := os.Rename(away, filepath.Join(archive, "runs", newcomer)); err != nil {
		t.Fatal(err)
	}
	victim := serials[0]
	if len(runs[victim]) != 1 {
		victim = serials[1]
	}
	yaml := filepath.Join(runs[victim][0], "run.yaml")
	report := filepath.Join(site, "units", victim, "report.html")
	kept, _ := os.ReadFile(report)
	os.Remove(yaml)
	if err := os.Symlink(filepath.Join(t.TempDir(), "gone", "run.yaml"), yaml); err != nil {
		t.Fatal(err)
	}
	code, out := runOut("build", archive, "-o", site, "--quiet")
	if code != exitSite || !strings.Contains(out, "not written by gtpack") {
		t.Fatalf("build exited %d; want 3 for the person's report.html:\n%s", code, out)
	}
	if data, _ := os.ReadFile(filepath.Join(site, "units", newcomer, "report.html")); string(data) != "a person's page" {
		t.Errorf("the person's report.html was overwritten")
	}
	if now, _ := os.ReadFile(report); !bytes.Equal(now, kept) || len(kept) == 0 {
		t.Errorf("the report of the unit whose run.yaml became unreadable changed or went")
	}
	fleet, _ := os.ReadFile(filepath.Join(site, "fleet.json"))
	if !bytes.Contains(fleet, []byte(`"stale": "acceptance run`)) {
		t.Errorf("fleet.json does not mark %s stale", victim)
	}
	if !bytes.Contains(fleet, []byte("could not be written")) {
		t.Errorf("fleet.json has no notice of the unit that could not be written")
	}
}

// A folder that cannot be read reaches the build as an orphan with only
// its Dir (ingest's TestOpenUnreadableRunFolder, run as a user without
// root's reading rights). Whatever level that folder is at (a run folder,
// a unit's folder, runs/ itself), every unit the site recorded a run
// below it gets the orphan, so none of them looks as if it had left the
// archive.
func TestOrphanFolderKeepsItsUnits(t *testing.T) {
	archive := smallArchive(t)
	site := filepath.Join(t.TempDir(), "site")
	if code, out := runOut("build", archive, "-o", site, "--quiet"); code != exitOK {
		t.Fatalf("build: %d\n%s", code, out)
	}
	runs := runFolders(t, archive)
	serials := serialsOf(runs)
	rel := func(p string) string {
		r, _ := filepath.Rel(archive, p)
		return filepath.ToSlash(r)
	}
	for _, c := range []struct {
		dir  string
		want []string
	}{
		{rel(runs[serials[0]][0]), serials[:1]},
		{rel(filepath.Dir(runs[serials[1]][0])), serials[1:2]},
		{"runs", serials},
		{"run", nil}, // a prefix of a name is not a folder above it
	} {
		s, err := openSite(site, false, "test", lockScope{})
		if err != nil {
			t.Fatal(err)
		}
		a := &ingest.Archive{Orphans: []*ingest.RefusedRun{{Dir: c.dir}}}
		err = adoptOrphans(s, a)
		s.close()
		if err != nil {
			t.Fatal(err)
		}
		var got []string
		for _, u := range a.Units {
			if len(u.Refused) == 1 && u.Refused[0].Dir == c.dir {
				got = append(got, u.Serial)
			}
		}
		if strings.Join(got, ",") != strings.Join(c.want, ",") {
			t.Errorf("orphan folder %s went to units %v, want %v", c.dir, got, c.want)
		}
	}
}
