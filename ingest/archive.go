package ingest

import (
	"bytes"
	"errors"
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

	"gopkg.in/yaml.v3"
)

// Open discovers an archive: the stations, references and specs at the
// root, and every run.yaml at any depth (folders starting with '.' are
// skipped). It returns an error only when root itself cannot be read;
// every other refusal goes to Archive.Problems, and discovery goes on.
//
// Choices made here:
//   - A run.yaml that is refused (broken YAML, unknown key, ...) is not in
//     any unit's Runs; its problems name it. Its serial and start are read
//     leniently (recoverRun): with a serial it is in that unit's Refused
//     (a unit whose only run.yaml is refused is listed with no Runs), so
//     that an older good run is not taken for the acceptance run without
//     a word; without one it is in Archive.Orphans. A folder that cannot
//     be read is an orphan too: it may hold a run.
//   - Identifiers are unique regardless of case (CheckIdentifier has the
//     rest of the rule). Of two serial spellings that differ only in case,
//     the one of the good run whose run.yaml path sorts first stands (of
//     the refused runs when the serial has no good run); every run of the
//     other spelling is refused and reported at its serial line. A
//     station, reference or spec whose id (product) differs only in case
//     from one read before is refused.
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
	data, in, p := newArchiveFS(a.Root).read(r.File, "", 0)
	if p != nil {
		return nil, p
	}
	full, err := ParseRun(data, r.File)
	if err != nil {
		return nil, err
	}
	full.Source = in
	resolveBeams(a.Root, a.Specs[full.Product], full)
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
		Documents:  map[string]InputFile{},
	}
	fsys := newArchiveFS(root)
	stationIDs, refIDs, specIDs := foldedIDs{}, foldedIDs{}, foldedIDs{}
	refusedStations := map[string]string{}
	refusedRefs := map[string]string{}
	refusedSpecs := map[string]string{}

	readDocuments(fsys, "stations", &a.Problems, refusedStations, func(data []byte, in InputFile) error {
		rel := in.Path
		s, err := ParseStation(data, rel)
		if err != nil {
			return err
		}
		if prev, dup := a.Stations[s.ID]; dup {
			a.Problems = append(a.Problems, Problemf(rel, 0, "station id %q is already defined in %s; expected each id once (this file is ignored)", s.ID, prev.File))
			return nil
		}
		if first, twin := stationIDs.twin(s.ID, rel); twin {
			return Problemf(rel, keyLine(data, "id"), "station id %q is the same as %q in %s, regardless of case; expected each id once, in one spelling", s.ID, first.id, first.file)
		}
		a.Stations[s.ID] = s
		a.Documents[rel] = in
		return nil
	})
	readDocuments(fsys, "references", &a.Problems, refusedRefs, func(data []byte, in InputFile) error {
		rel := in.Path
		ref, tableLine, err := parseReference(data, rel)
		if err != nil {
			return err
		}
		var table InputFile
		if ref.TableFile != "" {
			tf := joinRel(path.Dir(rel), ref.TableFile)
			tdata, tin, p := fsys.read(tf, rel, tableLine)
			if p != nil {
				refusedRefs[ref.ID] = rel
				return p
			}
			tt, err := readReferenceTableCSV(tdata, tf, ref.TableCSV)
			if err != nil {
				refusedRefs[ref.ID] = rel
				return err
			}
			ref.TableFile, ref.Table = tf, tt
			table = tin
		}
		if prev, dup := a.References[ref.ID]; dup {
			a.Problems = append(a.Problems, Problemf(rel, 0, "reference id %q is already defined in %s; expected each id once (this file is ignored)", ref.ID, prev.File))
			return nil
		}
		if first, twin := refIDs.twin(ref.ID, rel); twin {
			return Problemf(rel, keyLine(data, "id"), "reference id %q is the same as %q in %s, regardless of case; expected each id once, in one spelling", ref.ID, first.id, first.file)
		}
		a.References[ref.ID] = ref
		a.Documents[rel] = in
		if ref.TableFile != "" {
			a.Documents[ref.TableFile] = table
		}
		return nil
	})
	readDocuments(fsys, "specs", &a.Problems, refusedSpecs, func(data []byte, in InputFile) error {
		rel := in.Path
		s, err := ParseSpec(data, rel)
		if err != nil {
			return err
		}
		if prev, dup := a.Specs[s.Product]; dup {
			a.Problems = append(a.Problems, Problemf(rel, 0, "spec for product %q is already defined in %s; expected one spec per product (this file is ignored)", s.Product, prev.File))
			return nil
		}
		if first, twin := specIDs.twin(s.Product, rel); twin {
			return Problemf(rel, keyLine(data, "product"), "spec for product %q is the same product as %q in %s, regardless of case; expected one spec per product, in one spelling", s.Product, first.id, first.file)
		}
		a.Specs[s.Product] = s
		a.Documents[rel] = in
		return nil
	})

	readLab(fsys, a)
	readApprovals(fsys, a)

	files, unreadable := fsys.runFiles(&a.Problems)
	var good []checkedRun
	var refused []*refusal
	for i, parsed := range parseRuns(fsys, files, lean) {
		if parsed.problems != nil {
			a.Problems = append(a.Problems, parsed.problems...)
			refused = append(refused, &refusal{
				run:        &RefusedRun{File: files[i], Dir: path.Dir(files[i]), Serial: parsed.serial, Started: parsed.started, Problems: parsed.problems},
				serialLine: parsed.serialLine,
			})
			continue
		}
		r := parsed.run
		if !r.lean {
			resolveBeams(a.Root, a.Specs[r.Product], r)
		}
		rootRelative(r)
		var probs []*Problem
		check := func(key, kind, id, folder string, known bool, refused map[string]string) {
			if known {
				return
			}
			if f, ok := refused[id]; ok {
				probs = append(probs, Problemf(r.File, r.KeyLines[key], "%s %q is not available: %s was refused", kind, id, f))
				return
			}
			probs = append(probs, Problemf(r.File, r.KeyLines[key], "%s %q is unknown; expected one defined in %s/ (%s)", kind, id, folder, knownList(kind, a)))
		}
		_, okS := a.Stations[r.Station]
		check("station", "station", r.Station, "stations", okS, refusedStations)
		_, okR := a.References[r.Reference]
		check("reference", "reference", r.Reference, "references", okR, refusedRefs)
		_, okP := a.Specs[r.Product]
		check("product", "spec for product", r.Product, "specs", okP, refusedSpecs)
		a.Problems = append(a.Problems, probs...)
		a.Documents[r.File] = r.Source
		good = append(good, checkedRun{r, probs})
	}

	// One spelling per serial regardless of case: QDA-1 and qda-1 would be
	// one folder of the site on a system that ignores case. The good runs
	// choose first, in path order, so that a broken file never takes a
	// unit's name from a good one; a serial with refused runs only takes
	// the spelling of its first refused run.
	serials := foldedIDs{}
	for _, c := range good {
		serials.twin(c.run.Serial, c.run.File)
	}
	for _, rf := range refused {
		if rf.run.Serial != "" {
			serials.twin(rf.run.Serial, rf.run.File)
		}
	}
	for _, rf := range refused {
		if rf.run.Serial == "" {
			continue
		}
		if first, twin := serials.twin(rf.run.Serial, rf.run.File); twin {
			p := twinSerial(rf.run.File, rf.serialLine, rf.run.Serial, first)
			a.Problems = append(a.Problems, p)
			rf.run.Problems = append(rf.run.Problems, p)
		}
	}
	var runs []*Run
	for _, c := range good {
		r := c.run
		first, twin := serials.twin(r.Serial, r.File)
		if !twin {
			runs = append(runs, r)
			continue
		}
		p := twinSerial(r.File, r.KeyLines["serial"], r.Serial, first)
		a.Problems = append(a.Problems, p)
		refused = append(refused, &refusal{run: &RefusedRun{File: r.File, Dir: r.Dir, Serial: r.Serial, Started: r.Started, Problems: append(c.problems, p)}})
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

	// Refused runs join the unit of their serial, made when it has no good
	// run; the rest are orphans.
	for _, rr := range unreadable {
		refused = append(refused, &refusal{run: rr})
	}
	sort.Slice(refused, func(i, j int) bool { return refused[i].path() < refused[j].path() })
	units := map[string]*Unit{}
	for _, u := range a.Units {
		units[strings.ToLower(u.Serial)] = u
	}
	for _, rf := range refused {
		if rf.run.Serial == "" {
			a.Orphans = append(a.Orphans, rf.run)
			continue
		}
		k := strings.ToLower(rf.run.Serial)
		u := units[k]
		if u == nil {
			u = &Unit{Serial: serials[k].id}
			units[k] = u
			a.Units = append(a.Units, u)
		}
		u.Refused = append(u.Refused, rf.run)
	}
	sort.Slice(a.Units, func(i, j int) bool { return a.Units[i].Serial < a.Units[j].Serial })
	a.Problems = SortProblems(a.Problems)
	return a, nil
}

// readLab reads lab.yaml at the root, when there is one.
func readLab(fsys *archiveFS, a *Archive) {
	const rel = "lab.yaml"
	if _, err := os.Lstat(filepath.Join(fsys.root, rel)); errors.Is(err, fs.ErrNotExist) {
		return
	}
	data, in, p := fsys.read(rel, "", 0)
	if p != nil {
		a.Problems = append(a.Problems, p)
		return
	}
	l, err := ParseLab(data, rel)
	if err != nil {
		a.Problems = append(a.Problems, Problems(err)...)
		return
	}
	a.Lab = l
	a.Documents[rel] = in
}

// readApprovals reads approvals/<serial>/*.yaml. A refused approval is a
// problem and approves nothing.
func readApprovals(fsys *archiveFS, a *Archive) {
	a.Approvals = map[string][]*Approval{}
	entries, err := os.ReadDir(filepath.Join(fsys.root, "approvals"))
	if errors.Is(err, fs.ErrNotExist) {
		return
	}
	if err != nil {
		a.Problems = append(a.Problems, Problemf("approvals", 0, "folder cannot be read (%v)", err))
		return
	}
	for _, e := range entries {
		name := e.Name()
		if strings.HasPrefix(name, ".") {
			continue
		}
		if !e.IsDir() {
			a.Problems = append(a.Problems, Problemf("approvals/"+name, 0, "is not a folder; expected approvals/<serial>/ folders of approval files"))
			continue
		}
		if err := CheckIdentifier(name); err != nil {
			a.Problems = append(a.Problems, Problemf("approvals/"+name, 0, "folder name: %v", err))
			continue
		}
		for _, rel := range fsys.yamlFiles("approvals/"+name, &a.Problems) {
			data, in, p := fsys.read(rel, "", 0)
			if p != nil {
				a.Problems = append(a.Problems, p)
				continue
			}
			ap, err := ParseApproval(data, rel)
			if err != nil {
				a.Problems = append(a.Problems, Problems(err)...)
				continue
			}
			a.Approvals[ap.Serial] = append(a.Approvals[ap.Serial], ap)
			a.Documents[rel] = in
		}
	}
	for _, list := range a.Approvals {
		sort.SliceStable(list, func(i, j int) bool {
			if !list[i].Date.Equal(list[j].Date) {
				return list[i].Date.Before(list[j].Date)
			}
			return list[i].File < list[j].File
		})
	}
}

// checkedRun is a good run and the problems its station, reference and
// spec gave (they do not refuse it).
type checkedRun struct {
	run      *Run
	problems []*Problem
}

// refusal is a refused run and the line of its serial in run.yaml, where
// a case twin is reported.
type refusal struct {
	run        *RefusedRun
	serialLine int
}

// path is what refused runs are sorted by: the run.yaml, or the folder
// that could not be read.
func (rf *refusal) path() string {
	if rf.run.File != "" {
		return rf.run.File
	}
	return rf.run.Dir
}

func twinSerial(file string, line int, serial string, first foldedID) *Problem {
	return Problemf(file, line, "serial %q is the same unit as %q in %s, regardless of case; expected one spelling of each serial (this run is refused)", serial, first.id, first.file)
}

// foldedIDs holds the first spelling of each identifier by its lower case,
// and the file it came from.
type foldedIDs map[string]foldedID

type foldedID struct{ id, file string }

// twin notes id (of file) when its lower case is new, and otherwise
// returns the first spelling, with true when id is spelled otherwise.
func (f foldedIDs) twin(id, file string) (foldedID, bool) {
	k := strings.ToLower(id)
	first, ok := f[k]
	if !ok {
		f[k] = foldedID{id, file}
		return foldedID{}, false
	}
	return first, first.id != id
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
	lines    runLines // of the data files a run.yaml names (Load: one archiveFS a run)
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

// read returns the bytes of rel and what was read: their size and
// SHA-256, and the file's stat before the read. A refusal is reported at
// (from, line) when from is given (the YAML naming the file), else at rel
// itself.
func (f *archiveFS) read(rel, from string, line int) ([]byte, InputFile, *Problem) {
	full, why := f.resolve(rel)
	if why == "" {
		var data []byte
		var st FileStat
		data, st, why = readStableLimited(full, rel)
		if why == "" && path.Base(from) == "run.yaml" {
			why = f.lines.take(data)
		}
		if why == "" {
			return data, inputOf(rel, data, st), nil
		}
	}
	if from == "" {
		return nil, InputFile{}, Problemf(rel, 0, "file %s", why)
	}
	return nil, InputFile{}, Problemf(from, line, "%s %s", rel, why)
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

// runFiles lists every run.yaml below the root, skipping '.' folders, and
// the folders that cannot be read: each may hold a run, so it is an orphan
// refused run with its Dir (and no File). The document folders at the root
// (stations, references, specs, approvals) hold no runs; their readers
// report them.
func (f *archiveFS) runFiles(probs *[]*Problem) ([]string, []*RefusedRun) {
	var out []string
	var unreadable []*RefusedRun
	filepath.WalkDir(f.root, func(p string, d fs.DirEntry, err error) error {
		rel, rerr := filepath.Rel(f.root, p)
		if rerr != nil {
			return nil
		}
		rel = filepath.ToSlash(rel)
		if err != nil {
			if rel != "." {
				p := Problemf(rel, 0, "cannot be read (%v)", err)
				*probs = append(*probs, p)
				if d != nil && d.IsDir() && !documentFolders[strings.Split(rel, "/")[0]] {
					unreadable = append(unreadable, &RefusedRun{Dir: rel, Problems: []*Problem{p}})
				}
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
	return out, unreadable
}

// documentFolders are the folders at the archive root that the contract
// gives to other documents than runs.
var documentFolders = map[string]bool{"stations": true, "references": true, "specs": true, "approvals": true}

// parsedRun is one run.yaml read and parsed, or the problems that refused
// it and what recoverRun could read of it.
type parsedRun struct {
	run        *Run
	problems   []*Problem
	serial     string
	serialLine int
	started    time.Time
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
				data, in, p := fsys.read(files[i], "", 0)
				if p != nil {
					out[i].problems = []*Problem{p}
					continue
				}
				r, err := ParseRun(data, files[i])
				if err != nil {
					out[i].problems = Problems(err)
					out[i].serial, out[i].serialLine, out[i].started = recoverRun(data)
					continue
				}
				r.Source = in
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
func readDocuments(fsys *archiveFS, folder string, probs *[]*Problem, refused map[string]string, accept func(data []byte, in InputFile) error) {
	for _, rel := range fsys.yamlFiles(folder, probs) {
		base := strings.TrimSuffix(path.Base(rel), ".yaml")
		data, in, p := fsys.read(rel, "", 0)
		if p != nil {
			*probs = append(*probs, p)
			refused[base] = rel
			continue
		}
		if err := accept(data, in); err != nil {
			*probs = append(*probs, Problems(err)...)
			refused[base] = rel
		}
	}
}

// topLevel returns the value nodes of the top-level keys of the first YAML
// document in data, the first of a repeated key; nil when yaml.v3 cannot
// parse it (it gives no partial tree) or it is not a mapping. It is the
// lenient reading of a document the strict readers refused.
func topLevel(data []byte) map[string]*yaml.Node {
	var doc yaml.Node
	if err := yaml.NewDecoder(bytes.NewReader(data)).Decode(&doc); err != nil || len(doc.Content) == 0 {
		return nil
	}
	m := resolve(doc.Content[0])
	if m == nil || m.Kind != yaml.MappingNode {
		return nil
	}
	out := map[string]*yaml.Node{}
	for i := 0; i+1 < len(m.Content); i += 2 {
		k, v := resolve(m.Content[i]), resolve(m.Content[i+1])
		if k == nil || k.Kind != yaml.ScalarNode || v == nil {
			continue
		}
		if _, seen := out[k.Value]; !seen {
			out[k.Value] = v
		}
	}
	return out
}

// keyLine returns the line of key's value in data, 0 when it cannot be
// found.
func keyLine(data []byte, key string) int {
	if v := topLevel(data)[key]; v != nil {
		return v.Line
	}
	return 0
}

// recoverRun reads the serial and start of a refused run.yaml, so that the
// refusal stays with its unit. Only what the strict reader would take is
// taken: a serial that CheckIdentifier accepts, a start in RFC 3339;
// anything else is left unknown ("", 0, zero time).
func recoverRun(data []byte) (serial string, line int, started time.Time) {
	top := topLevel(data)
	if v := top["serial"]; v != nil && v.Kind == yaml.ScalarNode && v.Tag != "!!null" && CheckIdentifier(v.Value) == nil {
		serial, line = v.Value, v.Line
	}
	if v := top["started"]; v != nil && v.Kind == yaml.ScalarNode {
		if t, err := time.Parse(time.RFC3339, v.Value); err == nil {
			started = t
		}
	}
	return serial, line, started
}
