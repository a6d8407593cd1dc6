package ingest

import (
	"bytes"
	"fmt"
	"io/fs"
	"os"
	"path"
	"path/filepath"
	"runtime"
	"sort"
	"strings"
	"sync"
	"time"
)

// Open discovers an archive: the stations, references and specs at the
// root, and every run.yaml at any depth (folders starting with '.' are
// skipped). It returns an error only when root itself cannot be read;
// every other refusal goes to Archive.Problems, and discovery goes on.
//
// Choices made here:
//   - A run.yaml that is refused (broken YAML, unknown key, ...) is not in
//     Units; its problems name it.
//   - A run that names an unknown (or refused) station, reference or spec
//     stays in Units, so that its unit is listed as incomplete; the problem
//     is in Archive.Problems at the run.yaml line of that key (see
//     ProblemsOf). Load does not report it again.
//   - Two runs of one serial with the same start time: the one whose
//     run.yaml path sorts first is kept, the other is reported and dropped.
//   - Two stations (references, specs) with the same id (product): the file
//     that sorts first is kept.
//   - A reference's table_file is read here; a reference whose table_file is
//     refused is itself refused.
//   - Data paths of the runs are only joined here (archive-relative, '/');
//     whether they stay inside the archive and exist is checked by Load,
//     which reports it at the run.yaml line of the key.
func Open(root string) (*Archive, error) { return open(root, false) }

// OpenLean discovers an archive as Open does, but holds each run without
// its beams and with only the key lines discovery reports on (serial,
// started, station, reference, product): a few hundred bytes a run instead
// of some ten kilobytes, so that discovering an archive of ten thousand
// units does not take a hundred megabytes. Archive.Full reads a run's
// run.yaml again when the run is needed whole: Load needs whole runs.
func OpenLean(root string) (*Archive, error) { return open(root, true) }

// leanKeys are the key lines a lean run keeps: the ones Open reports on.
var leanKeys = []string{"serial", "started", "station", "reference", "product"}

// makeLean drops what only the run's own build needs.
func makeLean(r *Run) {
	keep := make(map[string]int, len(leanKeys))
	for _, k := range leanKeys {
		if l, ok := r.KeyLines[k]; ok {
			keep[k] = l
		}
	}
	r.KeyLines, r.Beams, r.lean = keep, nil, true
}

// Full returns r whole: r itself, or for a run of OpenLean its run.yaml
// read and parsed again. The error is a *Problem (or Problems) naming the
// run.yaml; a run.yaml that no longer names the same serial and start as
// when it was discovered is refused, since it changed while the build ran.
func (a *Archive) Full(r *Run) (*Run, error) {
	if !r.lean {
		return r, nil
	}
	data, p := newArchiveFS(a.Root).read(r.File, "", 0)
	if p != nil {
		return nil, p
	}
	full, err := ParseRun(data, r.File)
	if err != nil {
		return nil, err
	}
	rootRelative(full)
	if full.Serial != r.Serial || !full.Started.Equal(r.Started) {
		return nil, Problemf(r.File, full.KeyLines["serial"], "names serial %s started %s, but named %s started %s when the archive was opened; expected the file not to change during a build",
			full.Serial, full.Started.Format(time.RFC3339), r.Serial, r.Started.Format(time.RFC3339))
	}
	return full, nil
}

func open(root string, lean bool) (*Archive, error) {
	info, err := os.Stat(root)
	if err != nil {
		return nil, err
	}
	if !info.IsDir() {
		return nil, fmt.Errorf("%s is not a folder; expected an archive folder", root)
	}
	if _, err := os.ReadDir(root); err != nil {
		return nil, err
	}
	a := &Archive{
		Root:       root,
		Stations:   map[string]*Station{},
		References: map[string]*Reference{},
		Specs:      map[string]*Spec{},
	}
	fsys := newArchiveFS(root)
	refusedStations := map[string]string{}
	refusedRefs := map[string]string{}
	refusedSpecs := map[string]string{}

	readDocuments(fsys, "stations", &a.Problems, refusedStations, func(data []byte, rel string) error {
		s, err := ParseStation(data, rel)
		if err != nil {
			return err
		}
		if prev, dup := a.Stations[s.ID]; dup {
			a.Problems = append(a.Problems, Problemf(rel, 0, "station id %q is already defined in %s; expected each id once (this file is ignored)", s.ID, prev.File))
			return nil
		}
		a.Stations[s.ID] = s
		return nil
	})
	readDocuments(fsys, "references", &a.Problems, refusedRefs, func(data []byte, rel string) error {
		ref, tableLine, err := parseReference(data, rel)
		if err != nil {
			return err
		}
		if ref.TableFile != "" {
			tf := joinRel(path.Dir(rel), ref.TableFile)
			tdata, p := fsys.read(tf, rel, tableLine)
			if p != nil {
				refusedRefs[ref.ID] = rel
				return p
			}
			table, err := readReferenceTable(bytes.NewReader(tdata), tf)
			if err != nil {
				refusedRefs[ref.ID] = rel
				return err
			}
			ref.TableFile, ref.Table = tf, table
		}
		if prev, dup := a.References[ref.ID]; dup {
			a.Problems = append(a.Problems, Problemf(rel, 0, "reference id %q is already defined in %s; expected each id once (this file is ignored)", ref.ID, prev.File))
			return nil
		}
		a.References[ref.ID] = ref
		return nil
	})
	readDocuments(fsys, "specs", &a.Problems, refusedSpecs, func(data []byte, rel string) error {
		s, err := ParseSpec(data, rel)
		if err != nil {
			return err
		}
		if prev, dup := a.Specs[s.Product]; dup {
			a.Problems = append(a.Problems, Problemf(rel, 0, "spec for product %q is already defined in %s; expected one spec per product (this file is ignored)", s.Product, prev.File))
			return nil
		}
		a.Specs[s.Product] = s
		return nil
	})

	var runs []*Run
	for _, parsed := range parseRuns(fsys, fsys.runFiles(&a.Problems), lean) {
		if parsed.problems != nil {
			a.Problems = append(a.Problems, parsed.problems...)
			continue
		}
		r := parsed.run
		rootRelative(r)
		check := func(key, kind, id, folder string, known bool, refused map[string]string) {
			if known {
				return
			}
			if f, ok := refused[id]; ok {
				a.Problems = append(a.Problems, Problemf(r.File, r.KeyLines[key], "%s %q is not available: %s was refused", kind, id, f))
				return
			}
			a.Problems = append(a.Problems, Problemf(r.File, r.KeyLines[key], "%s %q is unknown; expected one defined in %s/ (%s)", kind, id, folder, knownList(kind, a)))
		}
		_, okS := a.Stations[r.Station]
		check("station", "station", r.Station, "stations", okS, refusedStations)
		_, okR := a.References[r.Reference]
		check("reference", "reference", r.Reference, "references", okR, refusedRefs)
		_, okP := a.Specs[r.Product]
		check("product", "spec for product", r.Product, "specs", okP, refusedSpecs)
		runs = append(runs, r)
	}

	// Group by serial; oldest first; a repeated start time is a duplicate.
	sort.Slice(runs, func(i, j int) bool {
		ri, rj := runs[i], runs[j]
		if ri.Serial != rj.Serial {
			return ri.Serial < rj.Serial
		}
		if !ri.Started.Equal(rj.Started) {
			return ri.Started.Before(rj.Started)
		}
		return ri.File < rj.File
	})
	for _, r := range runs {
		var u *Unit
		if n := len(a.Units); n > 0 && a.Units[n-1].Serial == r.Serial {
			u = a.Units[n-1]
		} else {
			u = &Unit{Serial: r.Serial}
			a.Units = append(a.Units, u)
		}
		if n := len(u.Runs); n > 0 && u.Runs[n-1].Started.Equal(r.Started) {
			a.Problems = append(a.Problems, Problemf(r.File, r.KeyLines["started"], "run of %s started %s is a duplicate of %s; expected one run per start time (this run is ignored)", r.Serial, r.Started.Format("2006-01-02T15:04:05Z07:00"), u.Runs[n-1].File))
			continue
		}
		u.Runs = append(u.Runs, r)
	}
	a.Problems = SortProblems(a.Problems)
	return a, nil
}

// ProblemsOf returns the discovery problems that name r's run.yaml (an
// unknown station, reference or spec).
func (a *Archive) ProblemsOf(r *Run) []*Problem {
	var out []*Problem
	for _, p := range a.Problems {
		if p.File == r.File {
			out = append(out, p)
		}
	}
	return out
}

func knownList(kind string, a *Archive) string {
	var ids []string
	switch kind {
	case "station":
		for id := range a.Stations {
			ids = append(ids, id)
		}
	case "reference":
		for id := range a.References {
			ids = append(ids, id)
		}
	default:
		for id := range a.Specs {
			ids = append(ids, id)
		}
	}
	if len(ids) == 0 {
		return "none is"
	}
	sort.Strings(ids)
	if len(ids) > 8 {
		ids = append(ids[:8], "...")
	}
	return "known: " + strings.Join(ids, ", ")
}

// joinRel joins a path written in a YAML file to that file's folder. An
// absolute path is kept as written, so that Load refuses it; a `..` escape
// shows as a leading "../" after cleaning.
func joinRel(dir, p string) string {
	if strings.HasPrefix(p, "/") || filepath.IsAbs(p) {
		return p
	}
	return path.Join(dir, p)
}

// rootRelative turns the run's data paths into archive-relative ones.
func rootRelative(r *Run) {
	r.Dir = path.Dir(r.File)
	j := func(p string) string {
		if p == "" {
			return ""
		}
		return joinRel(r.Dir, p)
	}
	r.RangePre = j(r.RangePre)
	r.RangePost = j(r.RangePost)
	r.Elements = j(r.Elements)
	r.Notes = j(r.Notes)
	for i := range r.Beams {
		b := &r.Beams[i]
		b.Transmission = j(b.Transmission)
		for k := range b.Noise {
			b.Noise[k].File = j(b.Noise[k].File)
		}
	}
}

// SortProblems sorts problems by file, line and message, and drops exact
// repeats (a data file shared by several runs is reported once).
func SortProblems(ps []*Problem) []*Problem {
	sort.SliceStable(ps, func(i, j int) bool {
		if ps[i].File != ps[j].File {
			return ps[i].File < ps[j].File
		}
		if ps[i].Line != ps[j].Line {
			return ps[i].Line < ps[j].Line
		}
		return ps[i].Message < ps[j].Message
	})
	out := ps[:0]
	for i, p := range ps {
		if i > 0 && *p == *ps[i-1] {
			continue
		}
		out = append(out, p)
	}
	return out
}

// archiveFS reads files of one archive, refusing what lies outside it.
type archiveFS struct {
	root     string
	realRoot string
}

func newArchiveFS(root string) *archiveFS {
	real, err := filepath.EvalSymlinks(root)
	if err != nil {
		real = root
	}
	if abs, err := filepath.Abs(real); err == nil {
		real = abs
	}
	return &archiveFS{root: root, realRoot: real}
}

// resolve checks that the archive-relative rel names a regular file inside
// the archive and returns its path on disk, or the reason it is refused.
func (f *archiveFS) resolve(rel string) (string, string) {
	switch {
	case strings.HasPrefix(rel, "/") || filepath.IsAbs(rel):
		return "", "is an absolute path; expected a path relative to the file's folder, inside the archive"
	case rel == ".." || strings.HasPrefix(rel, "../"):
		return "", "(relative to the archive root) leads out of the archive; expected a path that stays inside it"
	}
	full := filepath.Join(f.root, filepath.FromSlash(rel))
	real, err := filepath.EvalSymlinks(full)
	if err != nil {
		if _, lerr := os.Lstat(full); lerr == nil {
			return "", "is a link to a missing file; expected an existing file inside the archive"
		}
		if os.IsNotExist(err) {
			return "", "does not exist; expected an existing file inside the archive"
		}
		return "", fmt.Sprintf("cannot be read (%v)", err)
	}
	if abs, err := filepath.Abs(real); err == nil {
		real = abs
	}
	back, err := filepath.Rel(f.realRoot, real)
	if err != nil || back == ".." || strings.HasPrefix(back, ".."+string(filepath.Separator)) {
		return "", "is a link that leads out of the archive; expected a file inside it"
	}
	st, err := os.Stat(real)
	if err != nil {
		return "", fmt.Sprintf("cannot be read (%v)", err)
	}
	if !st.Mode().IsRegular() {
		return "", "is not a regular file; expected a file"
	}
	return real, ""
}

// read returns the bytes of rel. A refusal is reported at (from, line) when
// from is given (the YAML naming the file), else at rel itself.
func (f *archiveFS) read(rel, from string, line int) ([]byte, *Problem) {
	full, why := f.resolve(rel)
	if why == "" {
		data, err := os.ReadFile(full)
		if err == nil {
			return data, nil
		}
		why = fmt.Sprintf("cannot be read (%v)", err)
	}
	if from == "" {
		return nil, Problemf(rel, 0, "file %s", why)
	}
	return nil, Problemf(from, line, "%s %s", rel, why)
}

// yamlFiles lists folder/*.yaml, sorted.
func (f *archiveFS) yamlFiles(folder string, probs *[]*Problem) []string {
	entries, err := os.ReadDir(filepath.Join(f.root, folder))
	if err != nil {
		if !os.IsNotExist(err) {
			*probs = append(*probs, Problemf(folder, 0, "folder cannot be read (%v)", err))
		}
		return nil
	}
	var out []string
	for _, e := range entries {
		if strings.HasPrefix(e.Name(), ".") || !strings.HasSuffix(e.Name(), ".yaml") || e.IsDir() {
			continue
		}
		out = append(out, folder+"/"+e.Name())
	}
	sort.Strings(out)
	return out
}

// runFiles lists every run.yaml below the root, skipping '.' folders.
func (f *archiveFS) runFiles(probs *[]*Problem) []string {
	var out []string
	filepath.WalkDir(f.root, func(p string, d fs.DirEntry, err error) error {
		rel, rerr := filepath.Rel(f.root, p)
		if rerr != nil {
			return nil
		}
		rel = filepath.ToSlash(rel)
		if err != nil {
			if rel != "." {
				*probs = append(*probs, Problemf(rel, 0, "cannot be read (%v)", err))
			}
			if d != nil && d.IsDir() {
				return fs.SkipDir
			}
			return nil
		}
		if d.IsDir() {
			if rel != "." && strings.HasPrefix(d.Name(), ".") {
				return fs.SkipDir
			}
			return nil
		}
		if d.Name() == "run.yaml" {
			out = append(out, rel)
		}
		return nil
	})
	sort.Strings(out)
	return out
}

// parsedRun is one run.yaml read and parsed, or the problems that refused it.
type parsedRun struct {
	run      *Run
	problems []*Problem
}

// parseRuns reads and parses run files on every core: on a large archive
// the YAML parser is most of the time Open takes. The result is in the
// order of files, whatever the order of the work.
func parseRuns(fsys *archiveFS, files []string, lean bool) []parsedRun {
	out := make([]parsedRun, len(files))
	workers := min(runtime.NumCPU(), len(files))
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func(w int) {
			defer wg.Done()
			for i := w; i < len(files); i += workers {
				data, p := fsys.read(files[i], "", 0)
				if p != nil {
					out[i].problems = []*Problem{p}
					continue
				}
				r, err := ParseRun(data, files[i])
				if err != nil {
					out[i].problems = Problems(err)
					continue
				}
				if lean {
					makeLean(r)
				}
				out[i].run = r
			}
		}(w)
	}
	wg.Wait()
	return out
}

// readDocuments reads every folder/*.yaml and hands it to accept. A file
// that cannot be read, or that accept refuses, is noted in refused under
// its base name (the id a run would use), so that a run naming it is told
// the document was refused rather than unknown. accept reports a duplicate
// id itself and returns nil: the first document of that id stands.
func readDocuments(fsys *archiveFS, folder string, probs *[]*Problem, refused map[string]string, accept func(data []byte, rel string) error) {
	for _, rel := range fsys.yamlFiles(folder, probs) {
		base := strings.TrimSuffix(path.Base(rel), ".yaml")
		data, p := fsys.read(rel, "", 0)
		if p != nil {
			*probs = append(*probs, p)
			refused[base] = rel
			continue
		}
		if err := accept(data, rel); err != nil {
			*probs = append(*probs, Problems(err)...)
			refused[base] = rel
		}
	}
}
