package render

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"io"
	"path"
	"reflect"
	"sort"
	"strings"

	"gtpack.example/gtpack/ingest"
)

// manifestSchema is the version of the manifest.json layout. Schema 2:
// every unit lists its own inputs and outputs with their hashes, and the
// inputs many units share are listed once, in shared_inputs.
const manifestSchema = 2

// ManifestEntry is one file with its size and SHA-256 (lower-case hex).
type ManifestEntry struct {
	Path   string `json:"path"`
	Size   int64  `json:"size"`
	SHA256 string `json:"sha256"`
}

// ManifestUnit is one unit of manifest.json: what its outputs were built
// from. Inputs are the unit's own input files; SharedInputs names (by
// path) the files of Manifest.SharedInputs it also read. InputsSHA256 is
// ManifestInputsDigest of all of them, so that a reader can tell at a
// glance whether two builds of a unit used the same data.
type ManifestUnit struct {
	Serial       string          `json:"serial"`
	Verdict      string          `json:"verdict"`
	InputsSHA256 string          `json:"inputs_sha256"`
	Inputs       []ManifestEntry `json:"inputs"`
	SharedInputs []string        `json:"shared_inputs"`
	Outputs      []ManifestEntry `json:"outputs"`
}

// Manifest is manifest.json: every input and output of a site. Outputs
// are the fleet pages; each unit's files are in its ManifestUnit.
type Manifest struct {
	Schema       int             `json:"schema"`
	ToolVersion  string          `json:"tool_version"`
	Units        []ManifestUnit  `json:"units"`
	SharedInputs []ManifestEntry `json:"shared_inputs"`
	Outputs      []ManifestEntry `json:"outputs"`
}

// ManifestInputsDigest is one SHA-256 over a unit's inputs: the lines
// "<sha256> <path>\n" in path order.
func ManifestInputsDigest(inputs []ManifestEntry) string {
	sorted := sortedEntries(inputs)
	h := sha256.New()
	for _, in := range sorted {
		fmt.Fprintf(h, "%s %s\n", in.SHA256, in.Path)
	}
	return hex.EncodeToString(h.Sum(nil))
}

// ManifestWriter writes manifest.json one unit at a time, so that a site
// of any size never holds it whole: the schema and tool version, then the
// units in serial order, then the shared inputs and the fleet outputs, all
// indented like the other JSON files, with a final newline.
//
// Which inputs are shared: a unit's inputs outside the folder of its
// run.yaml (stations, references, specs, and any other file a run reads
// from outside its folder) are listed once in shared_inputs, at the first
// unit (in serial order) that read them; a later unit that read another
// version of one (another size or hash, as after a build of some units
// only) lists that file among its own inputs instead. The map of shared
// files is the only thing the writer keeps, and it grows with the
// archive's shared files, not with its units.
type ManifestWriter struct {
	w      io.Writer
	buf    []byte
	shared map[string]ManifestEntry
	last   string
	units  int
}

// NewManifestWriter starts manifest.json on w.
func NewManifestWriter(w io.Writer, toolVersion string) (*ManifestWriter, error) {
	m := &ManifestWriter{w: w, shared: map[string]ManifestEntry{}}
	b := fmt.Appendf(nil, "{\n  \"schema\": %d,\n  \"tool_version\": ", manifestSchema)
	b = appendJSONString(b, toolVersion)
	b = append(b, ",\n  \"units\": ["...)
	_, err := w.Write(b)
	return m, err
}

// Unit writes one unit: every input it read and every output written for
// it, in any order. Serials must increase from one call to the next.
func (m *ManifestWriter) Unit(serial, verdict string, inputs, outputs []ManifestEntry) error {
	if serial == "" {
		return fmt.Errorf("render: manifest: a unit without serial")
	}
	if m.units > 0 && serial <= m.last {
		return fmt.Errorf("render: manifest: unit %q after %q, expected increasing serials", serial, m.last)
	}
	u := ManifestUnit{Serial: serial, Verdict: verdict, InputsSHA256: ManifestInputsDigest(inputs),
		Inputs: []ManifestEntry{}, SharedInputs: []string{}}
	runDir, found := "", false
	for _, in := range inputs {
		if path.Base(in.Path) == "run.yaml" {
			runDir, found = path.Dir(in.Path), true
			break
		}
	}
	for _, in := range sortedEntries(inputs) {
		own := !found || runDir == "." || strings.HasPrefix(in.Path, runDir+"/")
		if !own {
			s, seen := m.shared[in.Path]
			if !seen {
				m.shared[in.Path] = in
				s = in
			}
			if s == in {
				u.SharedInputs = append(u.SharedInputs, in.Path)
				continue
			}
		}
		u.Inputs = append(u.Inputs, in)
	}
	u.Outputs = sortedEntries(outputs)
	b := m.buf[:0]
	if m.units > 0 {
		b = append(b, ',')
	}
	b = appendNewline(b, 2)
	b, err := appendJSON(b, reflect.ValueOf(&u), 2)
	if err != nil {
		return err
	}
	m.buf = b
	m.last = serial
	m.units++
	_, err = m.w.Write(b)
	return err
}

// Close ends the manifest with the shared inputs and the given outputs
// (the fleet pages), each sorted by path.
func (m *ManifestWriter) Close(outputs []ManifestEntry) error {
	b := m.buf[:0]
	if m.units > 0 {
		b = appendNewline(b, 1)
	}
	b = append(b, "],\n  \"shared_inputs\": "...)
	shared := make([]ManifestEntry, 0, len(m.shared))
	for _, s := range m.shared {
		shared = append(shared, s)
	}
	b, err := appendJSON(b, reflect.ValueOf(sortedEntries(shared)), 1)
	if err != nil {
		return err
	}
	b = append(b, ",\n  \"outputs\": "...)
	if b, err = appendJSON(b, reflect.ValueOf(sortedEntries(outputs)), 1); err != nil {
		return err
	}
	b = append(b, "\n}\n"...)
	_, err = m.w.Write(b)
	return err
}

func sortedEntries(es []ManifestEntry) []ManifestEntry {
	out := append([]ManifestEntry{}, es...)
	sort.SliceStable(out, func(a, b int) bool { return out[a].Path < out[b].Path })
	return out
}

// ParseManifest reads a manifest.json. It refuses another schema, an entry
// without a path, a hash that is not 64 hex digits, a serial listed twice
// and a unit naming a shared input the manifest does not list.
func ParseManifest(data []byte) (*Manifest, error) {
	const file = "manifest.json"
	m := new(Manifest)
	dec := json.NewDecoder(bytes.NewReader(data))
	if err := dec.Decode(m); err != nil {
		return nil, jsonProblem(file, data, err)
	}
	if m.Schema != manifestSchema {
		return nil, ingest.Problemf(file, 0, "schema %d, expected %d", m.Schema, manifestSchema)
	}
	checkEntries := func(where string, es []ManifestEntry) error {
		for i, e := range es {
			if e.Path == "" {
				return ingest.Problemf(file, 0, "%s[%d] has no path", where, i)
			}
			if !isSHA256Hex(e.SHA256) {
				return ingest.Problemf(file, 0, "%s[%d] (%s): sha256 %q, expected 64 lower-case hex digits", where, i, e.Path, e.SHA256)
			}
			if e.Size < 0 {
				return ingest.Problemf(file, 0, "%s[%d] (%s): size %d, expected >= 0", where, i, e.Path, e.Size)
			}
		}
		return nil
	}
	if err := checkEntries("shared_inputs", m.SharedInputs); err != nil {
		return nil, err
	}
	if err := checkEntries("outputs", m.Outputs); err != nil {
		return nil, err
	}
	shared := make(map[string]bool, len(m.SharedInputs))
	for _, s := range m.SharedInputs {
		shared[s.Path] = true
	}
	seen := make(map[string]bool, len(m.Units))
	for i, u := range m.Units {
		if u.Serial == "" {
			return nil, ingest.Problemf(file, 0, "units[%d] has no serial", i)
		}
		if seen[u.Serial] {
			return nil, ingest.Problemf(file, 0, "units[%d]: serial %q listed twice", i, u.Serial)
		}
		seen[u.Serial] = true
		if !isSHA256Hex(u.InputsSHA256) {
			return nil, ingest.Problemf(file, 0, "units[%d] (%s): inputs_sha256 %q, expected 64 lower-case hex digits", i, u.Serial, u.InputsSHA256)
		}
		if err := checkEntries(fmt.Sprintf("units[%d].inputs", i), u.Inputs); err != nil {
			return nil, err
		}
		if err := checkEntries(fmt.Sprintf("units[%d].outputs", i), u.Outputs); err != nil {
			return nil, err
		}
		for _, p := range u.SharedInputs {
			if !shared[p] {
				return nil, ingest.Problemf(file, 0, "units[%d] (%s): shared input %q is not in shared_inputs", i, u.Serial, p)
			}
		}
	}
	return m, nil
}

func isSHA256Hex(s string) bool {
	if len(s) != 64 {
		return false
	}
	for i := 0; i < len(s); i++ {
		c := s[i]
		if !('0' <= c && c <= '9' || 'a' <= c && c <= 'f') {
			return false
		}
	}
	return true
}
