package main

import (
	"bufio"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"hash"
	"io"
	"io/fs"
	"os"
	"path"
	"path/filepath"
	"runtime"
	"sort"
	"strings"
	"sync"

	"gtpack.example/gtpack/ingest"
	"gtpack.example/gtpack/reduce"
	"gtpack.example/gtpack/render"
)

// The build keeps, beside the site, one small state file per unit under
// SITE/.gtpack/units/. It records what the unit was built from (file sizes
// and modification times, the tool version), what was written, and the
// unit's summary for the fleet pages. A unit's state is written after all
// of its outputs, so a build killed at any moment leaves either a complete
// record or none, and the next build redoes the unit. The state folder is a
// build cache, not part of the package: manifest.json does not list it.
const stateDir = ".gtpack"

// tempSuffix marks a file being written; leftovers of a killed build are
// removed when the site is opened.
const tempSuffix = ".gtpack-tmp"

type site struct {
	dir string
}

// fileStamp is how the build tells whether an input changed without
// reading it.
type fileStamp struct {
	Path    string `json:"path"`
	Size    int64  `json:"size"` // -1: missing
	ModTime int64  `json:"mod_time_ns"`
}

type unitState struct {
	Serial      string                 `json:"serial"`
	ToolVersion string                 `json:"tool_version"`
	Stamps      []fileStamp            `json:"stamps"`
	Inputs      []ingest.InputFile     `json:"inputs"`
	Outputs     []render.ManifestEntry `json:"outputs"`
	Summary     reduce.UnitSummary     `json:"summary"`
}

func openSite(dir string) (*site, error) {
	if err := os.MkdirAll(filepath.Join(dir, stateDir, "units"), 0o755); err != nil {
		return nil, err
	}
	s := &site{dir: dir}
	// Remove half-written files of an interrupted build.
	err := filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if !d.IsDir() && strings.HasSuffix(d.Name(), tempSuffix) {
			return os.Remove(p)
		}
		return nil
	})
	return s, err
}

func (s *site) statePath(serial string) string {
	return filepath.Join(s.dir, stateDir, "units", serial+".json")
}

func (s *site) unitDir(serial string) string {
	return filepath.Join(s.dir, "units", serial)
}

// stampFiles stats every file the unit's runs depend on.
func stampFiles(a *ingest.Archive, runs []*ingest.Run) []fileStamp {
	seen := map[string]bool{}
	var stamps []fileStamp
	for _, r := range runs {
		for _, p := range ingest.RunFiles(a, r) {
			if seen[p] {
				continue
			}
			seen[p] = true
			st := fileStamp{Path: p, Size: -1}
			if fi, err := os.Stat(filepath.Join(a.Root, filepath.FromSlash(p))); err == nil {
				st.Size, st.ModTime = fi.Size(), fi.ModTime().UnixNano()
			}
			stamps = append(stamps, st)
		}
	}
	sort.Slice(stamps, func(i, j int) bool { return stamps[i].Path < stamps[j].Path })
	return stamps
}

// upToDate returns the unit's recorded state when its inputs and the tool
// are unchanged and its outputs are still in place.
func (s *site) upToDate(serial string, stamps []fileStamp) (*unitState, bool) {
	st, err := s.readState(s.statePath(serial))
	if err != nil || st.ToolVersion != render.Version || len(st.Stamps) != len(stamps) {
		return nil, false
	}
	for i := range stamps {
		if st.Stamps[i] != stamps[i] {
			return nil, false
		}
	}
	for _, o := range st.Outputs {
		fi, err := os.Stat(filepath.Join(s.dir, filepath.FromSlash(o.Path)))
		if err != nil || fi.Size() != o.Size {
			return nil, false
		}
	}
	return st, true
}

func (s *site) readState(p string) (*unitState, error) {
	data, err := os.ReadFile(p)
	if err != nil {
		return nil, err
	}
	var st unitState
	if err := json.Unmarshal(data, &st); err != nil {
		return nil, fmt.Errorf("%s: %w", p, err)
	}
	return &st, nil
}

func (s *site) writeState(st *unitState) error {
	data, err := json.Marshal(st)
	if err != nil {
		return err
	}
	_, err = s.writeFile(path.Join(stateDir, "units", st.Serial+".json"), data)
	return err
}

// writeUnit writes the unit's files into its folder and removes files of
// an earlier build that are no longer written.
func (s *site) writeUnit(serial string, files map[string][]byte) ([]render.ManifestEntry, error) {
	dir := s.unitDir(serial)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, err
	}
	names := make([]string, 0, len(files))
	for n := range files {
		names = append(names, n)
	}
	sort.Strings(names)
	var entries []render.ManifestEntry
	for _, n := range names {
		e, err := s.writeFile(path.Join("units", serial, n), files[n])
		if err != nil {
			return nil, err
		}
		entries = append(entries, e)
	}
	old, err := os.ReadDir(dir)
	if err != nil {
		return nil, err
	}
	for _, e := range old {
		if _, keep := files[e.Name()]; !keep {
			if err := os.RemoveAll(filepath.Join(dir, e.Name())); err != nil {
				return nil, err
			}
		}
	}
	return entries, nil
}

// removeUnitsExcept deletes the folders and states of units for which keep
// is false.
func (s *site) removeUnitsExcept(keep func(serial string) bool) error {
	var drop []string
	if entries, err := os.ReadDir(filepath.Join(s.dir, stateDir, "units")); err == nil {
		for _, e := range entries {
			if serial, ok := strings.CutSuffix(e.Name(), ".json"); ok && !keep(serial) {
				drop = append(drop, s.statePath(serial))
			}
		}
	}
	if entries, err := os.ReadDir(filepath.Join(s.dir, "units")); err == nil {
		for _, e := range entries {
			if !keep(e.Name()) {
				drop = append(drop, s.unitDir(e.Name()))
			}
		}
	}
	// States go first: a unit without a state is rebuilt or removed by the
	// next build, whatever moment this one is stopped at.
	for _, p := range drop {
		if err := os.RemoveAll(p); err != nil {
			return err
		}
	}
	return nil
}

// fleetState is the part of a unit state the fleet stage reads; the
// decoder skips the rest (the stamps).
type fleetState struct {
	Serial  string                 `json:"serial"`
	Inputs  []render.ManifestEntry `json:"inputs"` // ingest.InputFile has the same fields
	Outputs []render.ManifestEntry `json:"outputs"`
	Summary reduce.UnitSummary     `json:"summary"`
}

// serials lists the serial numbers of the site's unit states, sorted.
func (s *site) serials() ([]string, error) {
	entries, err := os.ReadDir(filepath.Join(s.dir, stateDir, "units"))
	if err != nil {
		return nil, err
	}
	var out []string
	for _, e := range entries {
		if serial, ok := strings.CutSuffix(e.Name(), ".json"); ok && !e.IsDir() {
			out = append(out, serial)
		}
	}
	sort.Strings(out)
	return out, nil
}

// eachState calls fn with the state of every serial, in the order given.
// The states are read and decoded on every core, a few ahead of fn; none
// is kept after fn returns, so that the fleet stage's memory does not grow
// with the number of units (the states of 10,000 units are some 400 MB of
// JSON).
func (s *site) eachState(serials []string, fn func(*fleetState) error) error {
	type result struct {
		st  *fleetState
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
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for j := range jobs {
				p := s.statePath(j.serial)
				var st fleetState
				data, err := os.ReadFile(p)
				if err == nil {
					if err = json.Unmarshal(data, &st); err != nil {
						err = fmt.Errorf("%s: %w", p, err)
					}
				}
				j.out <- result{&st, err}
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

// writeFleet writes the fleet pages and the manifest from the units'
// states alone, in one pass over the states in serial order: each state is
// handed to the fleet statistics (reduce.FleetBuilder keeps a small record
// of it), to results.csv and to manifest.json, and dropped. The fleet pages
// follow from the finished statistics; the manifest, which lists them,
// comes last.
func writeFleet(s *site) (err error) {
	serials, err := s.serials()
	if err != nil {
		return err
	}
	digest, err := s.statesDigest(serials)
	if err != nil {
		return err
	}
	fb := reduce.NewFleetBuilder()
	csvFile, err := createAtomic(s.dir, "results.csv")
	if err != nil {
		return err
	}
	defer csvFile.abort()
	manFile, err := createAtomic(s.dir, "manifest.json")
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
	err = s.eachState(serials, func(st *fleetState) error {
		if err := fb.Add(st.Summary); err != nil {
			return fmt.Errorf("%s: %w", s.statePath(st.Serial), err)
		}
		if err := csvW.Unit(&st.Summary); err != nil {
			return fmt.Errorf("results.csv: %w", err)
		}
		if err := man.Unit(st.Serial, st.Summary.Verdict, st.Inputs, st.Outputs); err != nil {
			return fmt.Errorf("manifest.json: %w", err)
		}
		return nil
	})
	if err != nil {
		return err
	}
	fleet := fb.Finish()
	var outputs []render.ManifestEntry
	// Each page is written as soon as it is made; names in sorted order.
	pages := []struct {
		name  string
		write func(w io.Writer) error
	}{
		{"fleet.json", func(w io.Writer) error { return render.WriteFleetJSON(w, fleet) }},
		{"fleet.xlsx", writeBytes(func() ([]byte, error) { return render.FleetWorkbook(fleet) })},
		{"index.html", writeBytes(func() ([]byte, error) { return render.Index(fleet) })},
	}
	for _, p := range pages {
		f, err := createAtomic(s.dir, p.name)
		if err != nil {
			return err
		}
		if err := p.write(f); err != nil {
			f.abort()
			return fmt.Errorf("%s: %w", p.name, err)
		}
		e, err := f.commit()
		if err != nil {
			return err
		}
		outputs = append(outputs, e)
	}
	if err := csvW.Flush(); err != nil {
		return err
	}
	e, err := csvFile.commit()
	if err != nil {
		return err
	}
	outputs = append(outputs, e)
	if err := man.Close(outputs); err != nil {
		return err
	}
	me, err := manFile.commit()
	if err != nil {
		return err
	}
	stamp, err := json.Marshal(fleetStamp{States: digest, Outputs: append(outputs, me)})
	if err != nil {
		return err
	}
	_, err = s.writeFile(path.Join(stateDir, "fleet-stamp.json"), stamp)
	return err
}

// fleetStamp is what the fleet pages were last made from, kept in
// SITE/.gtpack/fleet-stamp.json: a digest of the unit states (see statesDigest)
// and the pages written, with their sizes. It is written after
// manifest.json, so a fleet stage stopped before its end leaves the stamp
// of the one before it.
type fleetStamp struct {
	States  string                 `json:"states_sha256"`
	Outputs []render.ManifestEntry `json:"outputs"`
}

func (s *site) fleetStampPath() string {
	return filepath.Join(s.dir, stateDir, "fleet-stamp.json")
}

// statesDigest is a SHA-256 over the tool version and the serial, size and
// modification time of every unit state: a unit built, rebuilt or removed
// changes it.
func (s *site) statesDigest(serials []string) (string, error) {
	h := sha256.New()
	fmt.Fprintf(h, "%s\n", render.Version)
	for _, serial := range serials {
		fi, err := os.Stat(s.statePath(serial))
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
	data, err := os.ReadFile(s.fleetStampPath())
	if err != nil {
		return false
	}
	var st fleetStamp
	if json.Unmarshal(data, &st) != nil || len(st.Outputs) == 0 {
		return false
	}
	serials, err := s.serials()
	if err != nil {
		return false
	}
	if d, err := s.statesDigest(serials); err != nil || d != st.States {
		return false
	}
	for _, o := range st.Outputs {
		fi, err := os.Stat(filepath.Join(s.dir, filepath.FromSlash(o.Path)))
		if err != nil || fi.Size() != o.Size {
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

// atomicFile is a site file written under a temporary name and renamed
// when complete, so that a reader (or a killed build) never sees a
// half-written file under its final name. It counts the file's size and
// SHA-256 for the manifest as it goes. Every file of the site is written
// this way (createAtomic for a file made piece by piece, site.writeFile for
// one made whole).
type atomicFile struct {
	f         *os.File
	w         *bufio.Writer // nil: writes go straight to f
	h         hash.Hash
	n         int64
	rel, tmp  string
	finalPath string
	closed    bool
}

// createAtomic starts the file rel (slash-separated) of the site dir,
// buffered for writes in small pieces.
func createAtomic(dir, rel string) (*atomicFile, error) {
	a, err := createAtomicUnbuffered(dir, rel)
	if err == nil {
		a.w = bufio.NewWriterSize(a.f, 256<<10)
	}
	return a, err
}

func createAtomicUnbuffered(dir, rel string) (*atomicFile, error) {
	p := filepath.Join(dir, filepath.FromSlash(rel))
	f, err := os.Create(p + tempSuffix)
	if err != nil {
		return nil, err
	}
	return &atomicFile{f: f, h: sha256.New(), rel: rel, tmp: p + tempSuffix, finalPath: p}, nil
}

// writeFile writes the site file rel (slash-separated) whole and returns
// its manifest entry.
func (s *site) writeFile(rel string, data []byte) (render.ManifestEntry, error) {
	a, err := createAtomicUnbuffered(s.dir, rel)
	if err != nil {
		return render.ManifestEntry{}, err
	}
	if _, err := a.Write(data); err != nil {
		a.abort()
		return render.ManifestEntry{}, err
	}
	return a.commit()
}

func (a *atomicFile) Write(p []byte) (int, error) {
	a.h.Write(p) // a hash never fails
	a.n += int64(len(p))
	if a.w == nil {
		return a.f.Write(p)
	}
	return a.w.Write(p)
}

// commit flushes and closes the file, renames it to its final name and
// returns its manifest entry.
func (a *atomicFile) commit() (render.ManifestEntry, error) {
	a.closed = true
	var err error
	if a.w != nil {
		err = a.w.Flush()
	}
	if cerr := a.f.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Rename(a.tmp, a.finalPath)
	}
	if err != nil {
		os.Remove(a.tmp)
		return render.ManifestEntry{}, err
	}
	return render.ManifestEntry{Path: a.rel, Size: a.n, SHA256: hex.EncodeToString(a.h.Sum(nil))}, nil
}

// abort drops a file not committed; it does nothing after commit.
func (a *atomicFile) abort() {
	if a.closed {
		return
	}
	a.closed = true
	a.f.Close()
	os.Remove(a.tmp)
}
