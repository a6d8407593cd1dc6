package main

import (
	"bufio"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"hash"
	"io"
	"io/fs"
	"os"
	"path"
	"path/filepath"
	"runtime"
	"slices"
	"sort"
	"strings"
	"sync"

	"gtpack.example/gtpack/ingest"
	"gtpack.example/gtpack/reduce"
	"gtpack.example/gtpack/render"
)

// A site holds only what gtpack wrote there and what a person added. The
// build keeps, beside the package, a folder SITE/.gtpack/ (a build cache,
// not part of the package, never in the manifest):
//
//	.gtpack/units/<serial>.json   per unit: what it was built from and the
//	                              files gtpack wrote for it (its outputs)
//	.gtpack/fleet-stamp.json      the fleet pages gtpack wrote, and from what
//	.gtpack/pending/*.json        journals of commits under way (below)
//	.gtpack/locks/                one lock file per live writer (lock.go)
//
// Ownership: the outputs recorded there are the only files a build
// replaces or removes. Anything else in the site is a person's: it is left
// where it is, named once at the end of a build, and a build that would
// have to overwrite it stops for that unit instead.
//
// Whole units: a unit's files are written under temporary names, synced,
// and a journal listing the renames (the unit's new state last) is synced
// into .gtpack/pending/ before the first rename. A build killed at any
// moment leaves either the old unit (no journal yet: its temporaries are
// removed at the next start) or a journal, which the next build carries
// out to its end before anything else. The fleet pages, results.csv,
// manifest.json and the fleet stamp are committed the same way, as one.
//
// Confinement: every path the build writes or removes is relative to the
// site, cleaned, without "..", and no part of it that exists may be a
// symbolic link; the operations themselves go through an os.Root of the
// site, which refuses any path that resolves outside it.
const stateDir = ".gtpack"

// tempSuffix ends the name of a file being written:
// ".<name>.<build id>.gtpack-tmp" beside its final name.
const tempSuffix = ".gtpack-tmp"

type site struct {
	dir  string
	root *os.Root
	id   string // this process's build id
	lock *siteLock
	// said is what the site layer has to tell the user once the command
	// is done (build and index print it).
	said []string
}

// siteError is a failure to write the site itself (no space, no
// permission, a link or a person's file in the way): exit 3.
type siteError struct{ err error }

func (e *siteError) Error() string { return e.err.Error() }
func (e *siteError) Unwrap() error { return e.err }

func siteErr(err error) error {
	var se *siteError
	if err == nil || errors.As(err, &se) {
		return err
	}
	return &siteError{err}
}

// notSiteError is a folder that is not a site (exit 2): nothing in it is
// changed.
type notSiteError struct{ msg string }

func (e *notSiteError) Error() string { return e.msg }

// unitState is a unit's record in SITE/.gtpack/units/<serial>.json: what
// its files in the site were built from, compact enough that a rebuild
// reads it for every unit to tell which changed. The unit's full summary
// for the fleet pages (its limits and boresight trace, some 30 kB) is
// kept beside it, in .gtpack/summaries/<serial>.json; the record holds
// only the summary's head (Limits, Boresight and RangeChecks empty), which is all the
// unit stage needs.
type unitState struct {
	Serial      string   `json:"serial"`
	ToolVersion string   `json:"tool_version"`
	Runs        []string `json:"runs,omitempty"` // run folders, oldest first
	// ReportStarted is the start of the run the outputs were built from;
	// it stays when a refused retest makes the unit stale.
	ReportStarted string `json:"report_started,omitempty"`
	// Documents are the YAML documents the runs depend on (run.yaml,
	// station, reference and its table, spec): another set of them is
	// another unit, even where every file recorded is unchanged.
	Documents []string `json:"documents,omitempty"`
	// Inputs are every file read for the unit's files, of every run,
	// with the size and SHA-256 of the bytes used and their stat; Absent
	// the files the runs name that could not be read.
	Inputs []recordedInput `json:"inputs"`
	Absent []string        `json:"absent,omitempty"`
	// Approvals are the serial's approval files the outputs show: not
	// inputs (an approval issues a report of the inputs), but a change of
	// them changes the report.
	Approvals []recordedInput `json:"approvals,omitempty"`
	// Folders are the run folders with the digest of their listings
	// (ingest.FolderListing) when the build began reading them: a file
	// added to or removed from one (which a beam plan's glob may match)
	// makes the unit be built again.
	Folders []recordedInput        `json:"folders,omitempty"`
	Outputs []render.ManifestEntry `json:"outputs"`
	// Summary is the head of the summary in the record, and the whole
	// summary once readSummary has read it or a build made it; the record
	// holds it in its wire form (SummaryRecord), which readState and
	// putState convert.
	Summary       reduce.UnitSummary   `json:"-"`
	SummaryRecord render.SummaryRecord `json:"summary"`
	// Damaged is set by gtpack index for a unit whose files no longer
	// are the ones recorded: the next build makes it again.
	Damaged bool `json:"damaged,omitempty"`
}

// openSite opens the site at dir for writing with the lock of scope. A
// missing folder is made when create is set; an existing folder must be
// a site (it has .gtpack/) or, when create is set, empty. Journals of
// dead builds are carried out and their temporary files removed before
// it returns.
func openSite(dir string, create bool, command string, scope lockScope) (*site, error) {
	fi, err := os.Stat(dir)
	switch {
	case errors.Is(err, fs.ErrNotExist) && create:
		if err := os.MkdirAll(dir, 0o755); err != nil {
			return nil, siteErr(err)
		}
	case errors.Is(err, fs.ErrNotExist):
		return nil, &notSiteError{fmt.Sprintf("%s does not exist; expected a site folder that gtpack build wrote", dir)}
	case err != nil:
		return nil, siteErr(err)
	case !fi.IsDir():
		return nil, &notSiteError{fmt.Sprintf("%s is not a folder; expected a site folder", dir)}
	}
	sfi, err := os.Lstat(filepath.Join(dir, stateDir))
	switch {
	case err == nil && !sfi.IsDir():
		return nil, &notSiteError{fmt.Sprintf("%s is not a folder (a file or a link); expected the site's own .gtpack folder", filepath.Join(dir, stateDir))}
	case errors.Is(err, fs.ErrNotExist) && !create:
		return nil, &notSiteError{fmt.Sprintf("%s is not a gtpack site (it has no %s folder); expected a folder that gtpack build wrote", dir, stateDir)}
	case errors.Is(err, fs.ErrNotExist):
		entries, err := os.ReadDir(dir)
		if err != nil {
			return nil, siteErr(err)
		}
		// A build started beside this one may have made .gtpack between
		// the two looks: that folder is a site being made, not a
		// person's.
		if len(entries) == 1 && entries[0].Name() == stateDir && entries[0].IsDir() {
			break
		}
		if len(entries) > 0 {
			return nil, &notSiteError{fmt.Sprintf("%s is not empty and is not a gtpack site (it holds %s and has no %s folder); gtpack writes a new site only into a new or empty folder, so that it never overwrites or deletes what it did not write", dir, entries[0].Name(), stateDir)}
		}
	case err != nil:
		return nil, siteErr(err)
	}
	root, err := os.OpenRoot(dir)
	if err != nil {
		return nil, siteErr(err)
	}
	s := &site{dir: dir, root: root, id: newBuildID()}
	for _, d := range []string{"units", "summaries", "pending", "locks"} {
		if err := root.MkdirAll(path.Join(stateDir, d), 0o755); err != nil {
			root.Close()
			return nil, siteErr(err)
		}
	}
	s.lock, err = acquireLock(dir, s.id, command, scope, s.recover)
	if err != nil {
		root.Close()
		return nil, siteErr(err)
	}
	return s, nil
}

// close releases the site's lock.
func (s *site) close() {
	s.lock.release()
	s.root.Close()
}

// rel checks that p (slash-separated, relative to the site) is a path the
// build may write or remove: clean, inside the site, and with no part that
// is a symbolic link. It returns p.
func (s *site) rel(p string) (string, error) {
	if p == "" || path.IsAbs(p) || path.Clean(p) != p || p == "." || strings.Contains(p, "\\") {
		return "", &siteError{fmt.Errorf("%s: not a clean path inside the site; gtpack writes nowhere else", p)}
	}
	parts := strings.Split(p, "/")
	for i := range parts {
		if parts[i] == ".." || parts[i] == "." {
			return "", &siteError{fmt.Errorf("%s: leads out of the site; gtpack writes nowhere else", p)}
		}
		fi, err := s.root.Lstat(path.Join(parts[:i+1]...))
		if errors.Is(err, fs.ErrNotExist) {
			break
		}
		if err != nil {
			return "", siteErr(err)
		}
		if fi.Mode()&fs.ModeSymlink != 0 {
			return "", &siteError{fmt.Errorf("%s: %s is a symbolic link; gtpack follows no link inside a site (remove the link and build again)", p, path.Join(parts[:i+1]...))}
		}
		if i < len(parts)-1 && !fi.IsDir() {
			return "", &siteError{fmt.Errorf("%s: %s is a file where gtpack needs a folder", p, path.Join(parts[:i+1]...))}
		}
	}
	return p, nil
}

func (s *site) statePath(serial string) string {
	return path.Join(stateDir, "units", serial+".json")
}

func (s *site) summaryPath(serial string) string {
	return path.Join(stateDir, "summaries", serial+".json")
}

func unitDir(serial string) string { return path.Join("units", serial) }

// recover runs under the lock guard: it carries out the journals of builds
// that are no longer alive and removes their temporary files. live holds
// the build ids of the writers alive now.
func (s *site) recover(live map[string]bool) error {
	pending := path.Join(stateDir, "pending")
	entries, err := fs.ReadDir(s.root.FS(), pending)
	if err != nil {
		return err
	}
	for _, e := range entries {
		name, ok := strings.CutSuffix(e.Name(), ".json")
		if !ok || live[name[strings.LastIndexByte(name, '.')+1:]] {
			continue
		}
		if err := s.replay(path.Join(pending, e.Name())); err != nil {
			return fmt.Errorf("%s: %w", filepath.Join(s.dir, pending, e.Name()), err)
		}
	}
	return fs.WalkDir(s.root.FS(), ".", func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		name, ok := strings.CutSuffix(d.Name(), tempSuffix)
		if d.IsDir() || !ok || d.Type()&fs.ModeSymlink != 0 {
			return nil
		}
		if live[name[strings.LastIndexByte(name, '.')+1:]] {
			return nil // a live build's file
		}
		return s.root.Remove(p)
	})
}

// journal is a commit under way: renames in order, then removals.
type journal struct {
	Renames []renameOp `json:"renames"`
	Removes []string   `json:"removes"`
}

type renameOp struct {
	Tmp   string `json:"tmp"`
	Final string `json:"final"`
}

// replay carries out a journal left by a dead build: every rename whose
// temporary file is still there, every removal, then drops the journal.
func (s *site) replay(jpath string) error {
	data, err := s.root.ReadFile(jpath)
	if err != nil {
		return err
	}
	var j journal
	if err := json.Unmarshal(data, &j); err != nil {
		// Journals are written whole and synced before they are renamed
		// into place, so this one was not written by gtpack.
		return fmt.Errorf("not a journal gtpack wrote: %v; remove it by hand", err)
	}
	if err := s.apply(j); err != nil {
		return err
	}
	return s.root.Remove(jpath)
}

func (s *site) apply(j journal) error {
	dirs := map[string]bool{}
	for _, r := range j.Renames {
		if _, err := s.rel(r.Tmp); err != nil {
			return err
		}
		if _, err := s.rel(r.Final); err != nil {
			return err
		}
		if _, err := s.root.Lstat(r.Tmp); errors.Is(err, fs.ErrNotExist) {
			continue // renamed before the build stopped
		}
		if err := s.root.Rename(r.Tmp, r.Final); err != nil {
			return err
		}
		dirs[path.Dir(r.Final)] = true
	}
	for _, p := range j.Removes {
		if _, err := s.rel(p); err != nil {
			return err
		}
		if err := s.root.Remove(p); err != nil && !errors.Is(err, fs.ErrNotExist) {
			return err
		}
		dirs[path.Dir(p)] = true
	}
	for d := range dirs {
		if err := s.syncDir(d); err != nil && !errors.Is(err, fs.ErrNotExist) {
			return err // a folder that is gone has nothing to sync
		}
	}
	return nil
}

func (s *site) syncDir(d string) error {
	f, err := s.root.Open(d)
	if err != nil {
		return err
	}
	err = f.Sync()
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	return err
}

// txn is a set of site files replaced together (see the top of the file).
type txn struct {
	s         *site
	name      string // the journal's name: unit-<serial> or fleet
	j         journal
	aborted   bool
	journaled bool // the journal is in place: the next build finishes it
}

func (s *site) begin(name string) *txn { return &txn{s: s, name: name} }

// create starts the file rel of the transaction, buffered for writes in
// small pieces; its commit adds it to the transaction.
func (t *txn) create(rel string) (*atomicFile, error) {
	a, err := t.createUnbuffered(rel)
	if err == nil {
		a.w = bufio.NewWriterSize(a.f, 256<<10)
	}
	return a, err
}

func (t *txn) createUnbuffered(rel string) (*atomicFile, error) {
	if _, err := t.s.rel(rel); err != nil {
		return nil, err
	}
	if err := t.s.root.MkdirAll(path.Dir(rel), 0o755); err != nil {
		return nil, siteErr(err)
	}
	// The folder may have been made just now: check the path again.
	if _, err := t.s.rel(rel); err != nil {
		return nil, err
	}
	tmp := path.Join(path.Dir(rel), "."+path.Base(rel)+"."+t.s.id+tempSuffix)
	f, err := t.s.root.OpenFile(tmp, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
	if err != nil {
		return nil, siteErr(err)
	}
	return &atomicFile{t: t, f: f, h: sha256.New(), rel: rel, tmp: tmp}, nil
}

// put writes the file rel whole.
func (t *txn) put(rel string, data []byte) (render.ManifestEntry, error) {
	a, err := t.createUnbuffered(rel)
	if err != nil {
		return render.ManifestEntry{}, err
	}
	if _, err := a.Write(data); err != nil {
		a.abort()
		return render.ManifestEntry{}, siteErr(err)
	}
	return a.commit()
}

// remove adds the removal of the site file rel.
func (t *txn) remove(rel string) { t.j.Removes = append(t.j.Removes, rel) }

// commit syncs the journal into place, carries it out and drops it. An
// error before the journal is in place leaves the site as it was; after
// it, the next build finishes the commit.
func (t *txn) commit() error {
	if len(t.j.Renames) == 0 && len(t.j.Removes) == 0 {
		return nil
	}
	// Every path is checked before the journal is in place: a journal
	// that could not be carried out would stop every later start.
	for _, p := range t.j.Removes {
		if _, err := t.s.rel(p); err != nil {
			t.abort()
			return err
		}
	}
	for _, r := range t.j.Renames {
		if _, err := t.s.rel(r.Final); err != nil {
			t.abort()
			return err
		}
	}
	data, err := json.Marshal(t.j)
	if err != nil {
		return err
	}
	jrel := path.Join(stateDir, "pending", t.name+"."+t.s.id+".json")
	jtmp := path.Join(stateDir, "pending", "."+t.name+".json."+t.s.id+tempSuffix)
	if err := t.s.writeSynced(jtmp, data); err != nil {
		t.s.root.Remove(jtmp)
		t.abort()
		return siteErr(err)
	}
	if err := t.s.root.Rename(jtmp, jrel); err != nil {
		t.s.root.Remove(jtmp)
		t.abort()
		return siteErr(err)
	}
	t.journaled = true // from here on the temporaries belong to the journal
	if err := t.s.syncDir(path.Dir(jrel)); err != nil {
		return siteErr(err) // the journal may be in place: the next build finishes
	}
	if err := t.s.apply(t.j); err != nil {
		return siteErr(err)
	}
	return siteErr(t.s.root.Remove(jrel))
}

// abort removes the transaction's temporary files; nothing final changed.
// Once the journal is in place it does nothing.
func (t *txn) abort() {
	if t.aborted || t.journaled {
		return
	}
	t.aborted = true
	for _, r := range t.j.Renames {
		t.s.root.Remove(r.Tmp)
	}
}

func (s *site) writeSynced(rel string, data []byte) error {
	f, err := s.root.OpenFile(rel, os.O_WRONLY|os.O_CREATE|os.O_TRUNC, 0o644)
	if err != nil {
		return err
	}
	_, err = f.Write(data)
	if err == nil {
		err = f.Sync()
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	return err
}

// atomicFile is a file of a transaction, written under its temporary
// name; it counts its size and SHA-256 for the manifest as it goes.
type atomicFile struct {
	t      *txn
	f      *os.File
	w      *bufio.Writer // nil: writes go straight to f
	h      hash.Hash
	n      int64
	rel    string
	tmp    string
	closed bool
}

func (a *atomicFile) Write(p []byte) (int, error) {
	a.h.Write(p) // a hash never fails
	a.n += int64(len(p))
	if a.w == nil {
		return a.f.Write(p)
	}
	return a.w.Write(p)
}

// commit flushes, syncs and closes the file and adds its rename to the
// transaction; it returns the file's manifest entry.
func (a *atomicFile) commit() (render.ManifestEntry, error) {
	a.closed = true
	var err error
	if a.w != nil {
		err = a.w.Flush()
	}
	if err == nil {
		err = a.f.Sync()
	}
	if cerr := a.f.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		a.t.s.root.Remove(a.tmp)
		return render.ManifestEntry{}, siteErr(err)
	}
	a.t.j.Renames = append(a.t.j.Renames, renameOp{Tmp: a.tmp, Final: a.rel})
	return render.ManifestEntry{Path: a.rel, Size: a.n, SHA256: hex.EncodeToString(a.h.Sum(nil))}, nil
}

// abort drops a file not committed; it does nothing after commit.
func (a *atomicFile) abort() {
	if a.closed {
		return
	}
	a.closed = true
	a.f.Close()
	a.t.s.root.Remove(a.tmp)
}

// recordedInput is an input as the unit's record keeps it: with its stat.
type recordedInput struct {
	Path   string          `json:"path"`
	Size   int64           `json:"size"`
	SHA256 string          `json:"sha256"`
	Stat   ingest.FileStat `json:"stat"`
}

func recordInputs(ins []ingest.InputFile) []recordedInput {
	out := make([]recordedInput, len(ins))
	for i, in := range ins {
		out[i] = recordedInput(in)
	}
	return out
}

// current says whether the unit's record st still describes unit u of
// archive a: built by this tool version, not damaged or stale, from the
// same runs and documents, every input unchanged (ingest.Recheck: by
// content where the stat cannot tell), every absent file still absent,
// and its outputs in place. refreshed is the record to write when inputs
// were found unchanged by their content but with a new stat (so that the
// next build can trust the stat again); nil when there is none.
func (s *site) current(a *ingest.Archive, u *ingest.Unit, st *unitState) (ok bool, refreshed *unitState) {
	if st == nil || st.Damaged || st.Summary.Stale != "" || st.ToolVersion != render.Version || len(st.Runs) != len(u.Runs) {
		return false, nil
	}
	for i, r := range u.Runs {
		if st.Runs[i] != r.Dir {
			return false, nil
		}
	}
	if !slices.Equal(st.Documents, unitDocuments(a, u.Runs)) {
		return false, nil
	}
	var renewed []recordedInput
	for i, in := range st.Inputs {
		now, same := a.Recheck(ingest.InputFile(in))
		if !same {
			return false, nil
		}
		if now.Stat != in.Stat {
			if renewed == nil {
				renewed = slices.Clone(st.Inputs)
			}
			renewed[i] = recordedInput(now)
		}
	}
	for _, p := range st.Absent {
		if a.Readable(p) {
			return false, nil
		}
	}
	if len(st.Folders) != len(u.Runs) {
		return false, nil
	}
	for _, f := range st.Folders {
		if now, ok := a.FolderListing(f.Path); !ok || now != f.SHA256 {
			return false, nil
		}
	}
	approvals := a.Approvals[u.Serial]
	if len(approvals) != len(st.Approvals) {
		return false, nil
	}
	for i, ap := range approvals {
		if now := a.Documents[ap.File]; now.Path != st.Approvals[i].Path || now.SHA256 != st.Approvals[i].SHA256 {
			return false, nil
		}
	}
	for _, o := range st.Outputs {
		fi, err := s.root.Lstat(o.Path)
		if err != nil || !fi.Mode().IsRegular() || fi.Size() != o.Size {
			return false, nil
		}
	}
	if renewed != nil {
		r := *st
		r.Inputs = renewed
		refreshed = &r
	}
	return true, refreshed
}

// unitDocuments lists the YAML documents runs depend on, sorted, each
// once.
func unitDocuments(a *ingest.Archive, runs []*ingest.Run) []string {
	var docs []string
	for _, r := range runs {
		docs = append(docs, ingest.RunDocuments(a, r)...)
	}
	slices.Sort(docs)
	return slices.Compact(docs)
}

// readState returns the unit's recorded state; nil, nil when it has none.
// Its Summary is the head the record keeps (see readSummary).
func (s *site) readState(serial string) (*unitState, error) {
	data, err := s.root.ReadFile(s.statePath(serial))
	if errors.Is(err, fs.ErrNotExist) {
		return nil, nil
	}
	if err != nil {
		return nil, err
	}
	var st unitState
	if err := json.Unmarshal(data, &st); err != nil {
		return nil, fmt.Errorf("%s: %w", filepath.Join(s.dir, s.statePath(serial)), err)
	}
	st.Summary, st.SummaryRecord = st.SummaryRecord.Summary(), render.SummaryRecord{}
	return &st, nil
}

// readSummary returns the unit's whole summary, as the fleet pages need
// it. A site of 0.3.0 or before kept it in the record: head is the
// record's summary, used when there is no summary file.
func (s *site) readSummary(serial string, head reduce.UnitSummary) (reduce.UnitSummary, error) {
	data, err := s.root.ReadFile(s.summaryPath(serial))
	if errors.Is(err, fs.ErrNotExist) {
		return head, nil
	}
	if err != nil {
		return head, err
	}
	var sum render.SummaryRecord
	if err := json.Unmarshal(data, &sum); err != nil {
		return head, fmt.Errorf("%s: %w", filepath.Join(s.dir, s.summaryPath(serial)), err)
	}
	return sum.Summary(), nil
}

// writeUnit replaces the unit's files with files (by name within its
// folder), its manifest and its state with st, as one commit: old outputs
// that are not written again are removed, anything else in the folder is
// left alone. A file in the way that gtpack did not write stops the unit.
// st.Outputs is set to what was written, the unit's manifest.json (which
// lists the others and st.Inputs) included.
func (s *site) writeUnit(old, st *unitState, files map[string][]byte) error {
	owned := map[string]bool{}
	if old != nil {
		for _, o := range old.Outputs {
			owned[o.Path] = true
		}
	}
	names := make([]string, 0, len(files))
	for n := range files {
		names = append(names, n)
	}
	sort.Strings(names)
	t := s.begin("unit-" + st.Serial)
	st.Outputs = nil
	written := map[string]bool{}
	put := func(n string, data []byte) error {
		rel := path.Join(unitDir(st.Serial), n)
		if err := s.notAPersonsFile(rel, owned); err != nil {
			return err
		}
		e, err := t.put(rel, data)
		if err != nil {
			return err
		}
		st.Outputs = append(st.Outputs, e)
		written[rel] = true
		return nil
	}
	for _, n := range names {
		if n == render.UnitManifestName {
			t.abort()
			return fmt.Errorf("internal: a unit file is named %s", n)
		}
		if err := put(n, files[n]); err != nil {
			t.abort()
			return err
		}
	}
	man, err := render.UnitManifestJSON(st.Serial, string(st.Summary.Verdict), manifestEntries(st.Inputs), manifestEntries(st.Approvals), st.Outputs)
	if err == nil {
		err = put(render.UnitManifestName, man)
	}
	if err != nil {
		t.abort()
		return err
	}
	for p := range owned {
		if !written[p] {
			t.remove(p)
		}
	}
	sort.Strings(t.j.Removes)
	if err := t.putState(st, true); err != nil {
		t.abort()
		return err
	}
	return t.commit()
}

// manifestEntries are the inputs as the manifest lists them.
func manifestEntries(inputs []recordedInput) []render.ManifestEntry {
	out := make([]render.ManifestEntry, len(inputs))
	for i, in := range inputs {
		out[i] = render.ManifestEntry{Path: in.Path, Size: in.Size, SHA256: in.SHA256}
	}
	return out
}

// writeStale writes the record and summary of a unit whose acceptance
// run was refused, with the files of its last build. A unit of a site of
// 0.3.0 or before has no manifest in its folder: one is written from its
// record (builtVerdict is the verdict of its files), so that the site's
// manifest can list it.
func (s *site) writeStale(st *unitState, builtVerdict reduce.Verdict) error {
	t := s.begin("unit-" + st.Serial)
	rel := path.Join(unitDir(st.Serial), render.UnitManifestName)
	if !st.Summary.NoReport && !slices.ContainsFunc(st.Outputs, func(e render.ManifestEntry) bool { return e.Path == rel }) {
		man, err := render.UnitManifestJSON(st.Serial, string(builtVerdict), manifestEntries(st.Inputs), manifestEntries(st.Approvals), st.Outputs)
		if err != nil {
			return err
		}
		owned := map[string]bool{}
		if err := s.notAPersonsFile(rel, owned); err != nil {
			return err
		}
		e, err := t.put(rel, man)
		if err != nil {
			t.abort()
			return err
		}
		st.Outputs = append(slices.Clone(st.Outputs), e)
	}
	if err := t.putState(st, true); err != nil {
		t.abort()
		return err
	}
	return t.commit()
}

// writeStateOnly replaces the unit's record, and its summary when
// withSummary is set (st.Summary is then the whole summary), and nothing
// else.
func (s *site) writeStateOnly(st *unitState, withSummary bool) error {
	t := s.begin("unit-" + st.Serial)
	if err := t.putState(st, withSummary); err != nil {
		t.abort()
		return err
	}
	return t.commit()
}

// putState adds the unit's record to the transaction, after its summary
// when withSummary is set; commits put them last, after the files the
// record lists. The record keeps the summary's head only.
func (t *txn) putState(st *unitState, withSummary bool) error {
	if withSummary {
		data, err := json.Marshal(render.SummaryRecordOf(st.Summary))
		if err != nil {
			return err
		}
		if _, err := t.put(t.s.summaryPath(st.Serial), data); err != nil {
			return err
		}
	}
	rec := *st
	head := st.Summary
	head.Limits, head.Boresight, head.RangeChecks = nil, nil, nil
	rec.SummaryRecord = render.SummaryRecordOf(head)
	data, err := json.Marshal(&rec)
	if err != nil {
		return err
	}
	_, err = t.put(t.s.statePath(st.Serial), data)
	return err
}

// notAPersonsFile refuses to write rel over a file gtpack did not write.
func (s *site) notAPersonsFile(rel string, owned map[string]bool) error {
	if owned[rel] {
		return nil
	}
	if _, err := s.root.Lstat(rel); err == nil {
		return &siteError{fmt.Errorf("%s: this file was not written by gtpack, and gtpack does not overwrite it; move it out of the site and build again", filepath.Join(s.dir, rel))}
	}
	return nil
}

// removeUnitsExcept removes, for every unit state for which keep is
// false, the files gtpack wrote for the unit and then its state; the
// unit's folder goes only when nothing else is left in it. It returns the
// serials removed.
func (s *site) removeUnitsExcept(keep func(serial string) bool) ([]string, error) {
	serials, err := s.serials()
	if err != nil {
		return nil, err
	}
	var removed []string
	for _, serial := range serials {
		if keep(serial) {
			continue
		}
		st, err := s.readState(serial)
		if err != nil {
			return removed, err
		}
		t := s.begin("unit-" + serial)
		if st != nil {
			for _, o := range st.Outputs {
				t.remove(o.Path)
			}
		}
		t.remove(s.summaryPath(serial))
		t.remove(s.statePath(serial))
		if err := t.commit(); err != nil {
			return removed, err
		}
		s.root.Remove(unitDir(serial)) // only when empty: a person's files keep it
		removed = append(removed, serial)
	}
	return removed, nil
}

// personsFiles lists the files of the site that gtpack did not write,
// outside .gtpack/: everything at the top and under units/ that is not a
// recorded output. Of the units' folders it looks into those of the
// serials in units (a shard or --only build looks only at its own) and
// those that no unit state names.
func (s *site) personsFiles(owned map[string]bool, units map[string]bool) []string {
	known := map[string]bool{}
	if serials, err := s.serials(); err == nil {
		for _, serial := range serials {
			known[serial] = true
		}
	}
	var out []string
	fs.WalkDir(s.root.FS(), ".", func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return nil
		}
		if p == stateDir {
			return fs.SkipDir
		}
		if d.IsDir() {
			if parts := strings.Split(p, "/"); len(parts) == 2 && parts[0] == "units" {
				if known[parts[1]] && !units[parts[1]] {
					return fs.SkipDir
				}
			}
			return nil
		}
		if !owned[p] {
			out = append(out, p)
		}
		return nil
	})
	sort.Strings(out)
	return out
}

// serials lists the serial numbers of the site's unit states, sorted.
func (s *site) serials() ([]string, error) {
	entries, err := fs.ReadDir(s.root.FS(), path.Join(stateDir, "units"))
	if err != nil {
		return nil, err
	}
	var out []string
	for _, e := range entries {
		if serial, ok := strings.CutSuffix(e.Name(), ".json"); ok && e.Type().IsRegular() && !strings.HasPrefix(serial, ".") {
			out = append(out, serial)
		}
	}
	sort.Strings(out)
	return out, nil
}

// eachState calls fn with the state of every serial, with its whole
// summary, in the order given. The states are read and decoded on every
// core, a few ahead of fn; none is kept after fn returns, so that the
// fleet stage's memory does not grow with the number of units (the
// summaries of 10,000 units are some 300 MB of JSON).
func (s *site) eachState(serials []string, fn func(*unitState) error) error {
	type result struct {
		st  *unitState
		err error
	}
	type job struct {
		serial string
		out    chan result
	}
	workers := max(1, runtime.NumCPU())
	jobs := make(chan job)
	queue := make(chan chan result, 2*workers) // in serial order
	done := make(chan struct{})
	defer close(done)
	for range workers {
		go func() {
			for j := range jobs {
				st, err := s.readState(j.serial)
				if err == nil && st == nil {
					err = fmt.Errorf("%s: the unit's record is gone", filepath.Join(s.dir, s.statePath(j.serial)))
				}
				if err == nil {
					st.Summary, err = s.readSummary(j.serial, st.Summary)
				}
				j.out <- result{st, err}
			}
		}()
	}
	go func() {
		defer close(queue)
		defer close(jobs)
		for _, serial := range serials {
			out := make(chan result, 1)
			select {
			case queue <- out:
			case <-done:
				return
			}
			select {
			case jobs <- job{serial, out}:
			case <-done:
				return
			}
		}
	}()
	var err error
	for out := range queue {
		r := <-out
		if err = r.err; err == nil {
			err = fn(r.st)
		}
		if err != nil {
			break
		}
	}
	return err // done is closed: the sender and the workers stop
}

// writeFleet writes the fleet pages and the manifest from the states of
// serials alone, in one pass over them in serial order: each state is
// handed to the fleet statistics (reduce.FleetBuilder keeps a small record
// of it), to results.csv and to manifest.json, and dropped. The fleet pages
// follow from the finished statistics; the manifest, which lists them,
// comes last, and all of them with the fleet stamp are one commit. notices
// are shown on the overview and kept in fleet.json (a build that could not
// write every unit says so there).
func writeFleet(s *site, serials []string, notices []string) (err error) {
	signed := s.signed()
	defer func() {
		if err == nil && signed && !s.signed() {
			s.said = append(s.said, fmt.Sprintf("removed %s: the package changed since it was signed; gtpack sign %s --key FILE signs it again", render.SignatureName, s.dir))
		}
	}()
	digest, err := s.statesDigest()
	if err != nil {
		return err
	}
	// The fleet pages gtpack wrote before; only those may be replaced.
	owned := map[string]bool{}
	if old, ok := s.readFleetStamp(); ok {
		for _, o := range old.Outputs {
			owned[o.Path] = true
		}
	}
	t := s.begin("fleet")
	defer func() {
		if err != nil {
			t.abort()
		}
	}()
	create := func(name string) (*atomicFile, error) {
		if err := s.notAPersonsFile(name, owned); err != nil {
			return nil, err
		}
		return t.create(name)
	}
	fb := reduce.NewFleetBuilder()
	csvFile, err := create("results.csv")
	if err != nil {
		return err
	}
	defer csvFile.abort()
	manFile, err := create("manifest.json")
	if err != nil {
		return err
	}
	defer manFile.abort()
	csvW, err := render.NewResultsCSVWriter(csvFile)
	if err != nil {
		return err
	}
	man, err := render.NewManifestWriter(manFile, render.Version)
	if err != nil {
		return err
	}
	// Every file of the package, for SHA256SUMS: some 200 bytes a file,
	// four files a unit.
	var packaged []render.ManifestEntry
	err = s.eachState(serials, func(st *unitState) error {
		if err := fb.Add(st.Summary); err != nil {
			return fmt.Errorf("%s: %w", filepath.Join(s.dir, s.statePath(st.Serial)), err)
		}
		if err := csvW.Unit(&st.Summary); err != nil {
			return fmt.Errorf("results.csv: %w", err)
		}
		mu := render.ManifestUnit{Serial: st.Serial, Verdict: string(st.Summary.Verdict),
			InputsSHA256: render.ManifestInputsDigest(manifestEntries(st.Inputs))}
		rel := path.Join(unitDir(st.Serial), render.UnitManifestName)
		for _, o := range st.Outputs {
			if o.Path == rel {
				mu.Manifest = o
			}
		}
		if mu.Manifest.Path == "" && len(st.Outputs) > 0 {
			return fmt.Errorf("%s: the unit's record lists no %s; gtpack build --only %s makes it again", filepath.Join(s.dir, s.statePath(st.Serial)), rel, st.Serial)
		}
		if mu.Manifest.Path != "" {
			if err := man.Unit(mu); err != nil {
				return fmt.Errorf("manifest.json: %w", err)
			}
		}
		packaged = append(packaged, st.Outputs...)
		return nil
	})
	if err != nil {
		return err
	}
	fleet := fb.Finish()
	fleet.Notices = notices
	var outputs []render.ManifestEntry
	// Each page is written as soon as it is made; names in sorted order.
	pages := []struct {
		name  string
		write func(w io.Writer) error
	}{
		{"fleet.json", func(w io.Writer) error { return render.WriteFleetJSON(w, fleet) }},
		{"fleet.xlsx", writeBytes(func() ([]byte, error) { return render.FleetWorkbook(fleet) })},
		{"health.html", writeBytes(func() ([]byte, error) { return render.Health(fleet) })},
		{"index.html", writeBytes(func() ([]byte, error) { return render.Index(fleet) })},
	}
	for _, p := range pages {
		f, err := create(p.name)
		if err != nil {
			return err
		}
		if err := p.write(f); err != nil {
			f.abort()
			return siteErr(fmt.Errorf("%s: %w", p.name, err))
		}
		e, err := f.commit()
		if err != nil {
			return err
		}
		outputs = append(outputs, e)
	}
	if err := csvW.Flush(); err != nil {
		return siteErr(err)
	}
	e, err := csvFile.commit()
	if err != nil {
		return err
	}
	outputs = append(outputs, e)
	if err := man.Close(outputs); err != nil {
		return siteErr(err)
	}
	me, err := manFile.commit()
	if err != nil {
		return err
	}
	outputs = append(outputs, me)
	// SHA256SUMS lists every file of the package but itself and its
	// signature, which (written by gtpack sign) no longer holds for the
	// new list and goes with the old one.
	sums, err := render.SumsFile(append(packaged, outputs...))
	if err != nil {
		return err
	}
	if err := s.notAPersonsFile(render.SumsName, owned); err != nil {
		return err
	}
	se, err := t.put(render.SumsName, sums)
	if err != nil {
		return err
	}
	outputs = append(outputs, se)
	if old, ok := s.readFleetStamp(); ok {
		if sig, ok := old.signature(se); ok {
			outputs = append(outputs, sig) // the list it signs is unchanged
		}
	}
	// Fleet pages of an earlier build that are not written again go.
	written := map[string]bool{}
	for _, o := range outputs {
		written[o.Path] = true
	}
	for p := range owned {
		if !written[p] {
			t.remove(p)
		}
	}
	sort.Strings(t.j.Removes)
	if err := t.putFleetStamp(&fleetStamp{States: digest, Outputs: outputs}); err != nil {
		return err
	}
	return t.commit()
}

// putFleetStamp adds the fleet stamp to the transaction.
func (t *txn) putFleetStamp(st *fleetStamp) error {
	data, err := json.Marshal(st)
	if err != nil {
		return err
	}
	_, err = t.put(path.Join(stateDir, "fleet-stamp.json"), data)
	return err
}

// fleetStamp is what the fleet pages were last made from, kept in
// SITE/.gtpack/fleet-stamp.json: a digest of the unit states (see
// statesDigest) and the pages written, with their sizes. It is committed
// with the pages, so a fleet stage stopped before its end leaves the
// stamp of the one before it.
type fleetStamp struct {
	States  string                 `json:"states_sha256"`
	Outputs []render.ManifestEntry `json:"outputs"`
}

// signed says whether the fleet stamp records a signature gtpack sign
// wrote.
func (s *site) signed() bool {
	st, ok := s.readFleetStamp()
	return ok && slices.ContainsFunc(st.Outputs, func(e render.ManifestEntry) bool { return e.Path == render.SignatureName })
}

// signature is the SHA256SUMS.sig that gtpack sign wrote, when it signed
// the very SHA256SUMS sums.
func (st *fleetStamp) signature(sums render.ManifestEntry) (render.ManifestEntry, bool) {
	var sig, signed render.ManifestEntry
	for _, o := range st.Outputs {
		switch o.Path {
		case render.SignatureName:
			sig = o
		case render.SumsName:
			signed = o
		}
	}
	return sig, sig.Path != "" && signed == sums
}

func (s *site) readFleetStamp() (*fleetStamp, bool) {
	data, err := s.root.ReadFile(path.Join(stateDir, "fleet-stamp.json"))
	if err != nil {
		return nil, false
	}
	var st fleetStamp
	if json.Unmarshal(data, &st) != nil || len(st.Outputs) == 0 {
		return nil, false
	}
	return &st, true
}

// statesDigest is a SHA-256 over the tool version and the serial, size and
// modification time of every unit's summary (its record's, for a unit of
// an older site that has none): a unit built, rebuilt, made stale or
// removed changes it, since each of those writes or removes the summary
// with the record. A record written alone (new stats of unchanged inputs,
// index's damaged mark) leaves it, and so the fleet pages, as they are.
func (s *site) statesDigest() (string, error) {
	serials, err := s.serials()
	if err != nil {
		return "", err
	}
	h := sha256.New()
	fmt.Fprintf(h, "%s\n", render.Version)
	for _, serial := range serials {
		fi, err := s.root.Stat(s.summaryPath(serial))
		if errors.Is(err, fs.ErrNotExist) {
			fi, err = s.root.Stat(s.statePath(serial))
		}
		if err != nil {
			return "", err
		}
		fmt.Fprintf(h, "%s %d %d\n", serial, fi.Size(), fi.ModTime().UnixNano())
	}
	return hex.EncodeToString(h.Sum(nil)), nil
}

// fleetCurrent says whether the fleet pages in the site are those of its
// unit states as they are: the stamp of the last fleet stage matches them
// and its pages are in place, at their sizes. A build that changed no unit
// then leaves the fleet pages alone (they would come out byte for byte the
// same).
func (s *site) fleetCurrent() bool {
	st, ok := s.readFleetStamp()
	if !ok {
		return false
	}
	if d, err := s.statesDigest(); err != nil || d != st.States {
		return false
	}
	for _, o := range st.Outputs {
		fi, err := s.root.Lstat(o.Path)
		if err != nil || !fi.Mode().IsRegular() || fi.Size() != o.Size {
			return false
		}
	}
	return true
}

// writeBytes writes a page its renderer returns whole.
func writeBytes(make func() ([]byte, error)) func(w io.Writer) error {
	return func(w io.Writer) error {
		data, err := make()
		if err != nil {
			return err
		}
		_, err = w.Write(data)
		return err
	}
}

// hasPending says whether a commit of this build stopped half-way (its
// journal is still in .gtpack/pending/).
func (s *site) hasPending() bool {
	entries, err := fs.ReadDir(s.root.FS(), path.Join(stateDir, "pending"))
	if err != nil {
		return true
	}
	for _, e := range entries {
		if strings.HasSuffix(e.Name(), "."+s.id+".json") {
			return true
		}
	}
	return false
}

// outputCheck is what checkOutputs found of one unit ("" when its files
// are as recorded), and whether its record already says it is damaged.
type outputCheck struct {
	why     string
	damaged bool
	err     error
}

// checkAll reads every unit's record and checks its outputs
// (checkOutputs), on every core: reading back and hashing the files is
// most of what gtpack index does (some 1.5 GB/s a core). The records are
// not kept: at 10,000 units they would be some 100 MB.
func (s *site) checkAll(serials []string) []outputCheck {
	out := make([]outputCheck, len(serials))
	next := make(chan int)
	var wg sync.WaitGroup
	for range max(1, runtime.NumCPU()) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				c := &out[i]
				var st *unitState
				if st, c.err = s.readState(serials[i]); c.err == nil {
					c.why = s.checkOutputs(st)
					c.damaged = st != nil && st.Damaged
				}
			}
		}()
	}
	for i := range serials {
		next <- i
	}
	close(next)
	wg.Wait()
	return out
}

// checkOutputs reads back every file recorded for the unit and says what
// is not as recorded ("" when all is).
func (s *site) checkOutputs(st *unitState) string {
	if st == nil {
		return "it has no state"
	}
	for _, o := range st.Outputs {
		if _, err := s.rel(o.Path); err != nil {
			return err.Error()
		}
		f, err := s.root.Open(o.Path)
		if errors.Is(err, fs.ErrNotExist) {
			return o.Path + " is missing"
		}
		if err != nil {
			return err.Error()
		}
		h := sha256.New()
		n, err := io.Copy(h, f)
		f.Close()
		if err != nil {
			return fmt.Sprintf("%s: %v", o.Path, err)
		}
		if n != o.Size || hex.EncodeToString(h.Sum(nil)) != o.SHA256 {
			return o.Path + " is not the file gtpack wrote (its size or SHA-256 differs)"
		}
	}
	return ""
}

// dropFleet removes the fleet pages the fleet stamp records, then the
// stamp (removals need no space on a full disk), and returns the pages
// removed. A build stopped between the two leaves a stamp that names
// missing pages, which the next build writes again.
func (s *site) dropFleet() []string {
	st, ok := s.readFleetStamp()
	if !ok {
		return nil
	}
	var out []string
	for _, o := range st.Outputs {
		if _, err := s.rel(o.Path); err != nil {
			return out
		}
		if err := s.root.Remove(o.Path); err != nil && !errors.Is(err, fs.ErrNotExist) {
			return out
		}
		out = append(out, o.Path)
	}
	s.root.Remove(path.Join(stateDir, "fleet-stamp.json"))
	return out
}
