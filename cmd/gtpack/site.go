package main

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
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
func stampFiles(a *ingest.Archive, u *ingest.Unit) []fileStamp {
	seen := map[string]bool{}
	var stamps []fileStamp
	for _, r := range u.Runs {
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
	return writeAtomic(s.statePath(st.Serial), data)
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
		if err := writeAtomic(filepath.Join(dir, n), files[n]); err != nil {
			return nil, err
		}
		entries = append(entries, manifestEntry(path.Join("units", serial, n), files[n]))
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

// states returns every unit state of the site, sorted by serial: those in
// known as they are, the others read from the site, two at a time.
func (s *site) states(known map[string]*unitState) ([]*unitState, error) {
	dir := filepath.Join(s.dir, stateDir, "units")
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil, err
	}
	var out []*unitState
	var toRead []string
	for _, e := range entries {
		serial, ok := strings.CutSuffix(e.Name(), ".json")
		if e.IsDir() || !ok {
			continue
		}
		if st := known[serial]; st != nil {
			out = append(out, st)
		} else {
			toRead = append(toRead, filepath.Join(dir, e.Name()))
		}
	}
	read := make([]*unitState, len(toRead))
	errs := make([]error, len(toRead))
	var wg sync.WaitGroup
	workers := min(runtime.NumCPU(), len(toRead))
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func(w int) {
			defer wg.Done()
			for i := w; i < len(toRead); i += workers {
				read[i], errs[i] = s.readState(toRead[i])
				if read[i] != nil {
					read[i].Stamps = nil // only the next build's change check needs them
				}
			}
		}(w)
	}
	wg.Wait()
	for i := range toRead {
		if errs[i] != nil {
			return nil, errs[i]
		}
		out = append(out, read[i])
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Serial < out[j].Serial })
	return out, nil
}

// writeFleet writes the fleet pages and the manifest from the units'
// states alone: it never needs every unit's full result in memory.
//
// known holds the states this build already has in memory.
func writeFleet(s *site, known map[string]*unitState) error {
	states, err := s.states(known)
	if err != nil {
		return err
	}
	summaries := make([]reduce.UnitSummary, len(states))
	for i, st := range states {
		summaries[i] = st.Summary
	}
	fleet := reduce.ComputeFleet(summaries)
	m := &render.Manifest{Schema: 1, ToolVersion: render.Version}
	// Each page is written as soon as it is made, so that a large fleet
	// never holds all of them in memory at once; names in sorted order.
	pages := []struct {
		name string
		make func() ([]byte, error)
	}{
		{"fleet.json", func() ([]byte, error) { return render.FleetJSON(fleet) }},
		{"fleet.xlsx", func() ([]byte, error) { return render.FleetWorkbook(fleet) }},
		{"index.html", func() ([]byte, error) { return render.Index(fleet) }},
		{"results.csv", func() ([]byte, error) { return render.ResultsCSV(summaries), nil }},
	}
	for _, p := range pages {
		data, err := p.make()
		if err != nil {
			return fmt.Errorf("%s: %w", p.name, err)
		}
		if err := writeAtomic(filepath.Join(s.dir, p.name), data); err != nil {
			return err
		}
		m.Outputs = append(m.Outputs, manifestEntry(p.name, data))
	}
	inputs := map[string]ingest.InputFile{}
	for _, st := range states {
		for _, in := range st.Inputs {
			inputs[in.Path] = in
		}
		m.Outputs = append(m.Outputs, st.Outputs...)
		mu := render.ManifestUnit{Serial: st.Serial, Verdict: st.Summary.Verdict, InputsSHA256: inputsDigest(st.Inputs)}
		for _, o := range st.Outputs {
			mu.Outputs = append(mu.Outputs, o.Path)
		}
		m.Units = append(m.Units, mu)
	}
	for _, in := range inputs {
		m.Inputs = append(m.Inputs, render.ManifestEntry{Path: in.Path, Size: in.Size, SHA256: in.SHA256})
	}
	manifest, err := render.ManifestJSON(m)
	if err != nil {
		return err
	}
	return writeAtomic(filepath.Join(s.dir, "manifest.json"), manifest)
}

// inputsDigest is one SHA-256 over a unit's inputs (path and content hash
// of each), so that a reader can tell at a glance whether two builds of a
// unit used the same data.
func inputsDigest(inputs []ingest.InputFile) string {
	sorted := append([]ingest.InputFile(nil), inputs...)
	sort.Slice(sorted, func(i, j int) bool { return sorted[i].Path < sorted[j].Path })
	var b bytes.Buffer
	for _, in := range sorted {
		fmt.Fprintf(&b, "%s %s\n", in.SHA256, in.Path)
	}
	sum := sha256.Sum256(b.Bytes())
	return hex.EncodeToString(sum[:])
}

func manifestEntry(p string, data []byte) render.ManifestEntry {
	sum := sha256.Sum256(data)
	return render.ManifestEntry{Path: p, Size: int64(len(data)), SHA256: hex.EncodeToString(sum[:])}
}

// writeAtomic writes data under a temporary name and renames it, so that a
// reader (or a killed build) never sees a half-written file under its
// final name.
func writeAtomic(p string, data []byte) error {
	tmp := p + tempSuffix
	if err := os.WriteFile(tmp, data, 0o644); err != nil {
		return err
	}
	if err := os.Rename(tmp, p); err != nil {
		os.Remove(tmp)
		return err
	}
	return nil
}
