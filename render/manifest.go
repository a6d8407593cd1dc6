package render

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"io"
	"sort"

	"gtpack.example/gtpack/ingest"
)

// manifestSchema is the version of the manifest.json layout. Schema 3:
// each unit folder has its own manifest.json (UnitManifest) listing every
// input of the unit, shared documents included, and the unit's other
// files; the site's manifest.json lists each unit with the size and
// SHA-256 of its unit manifest, and the fleet pages. One changed unit
// rewrites its own manifest and a top level of a few hundred bytes a
// unit. (Schema 2 listed every unit's files in the one manifest.json, and
// the shared inputs once in shared_inputs.)
const manifestSchema = 3

// UnitManifestName is the name of a unit's manifest in its folder.
const UnitManifestName = "manifest.json"

// ManifestEntry is one file with its size and SHA-256 (lower-case hex):
// ingest's InputFile, whose stat no manifest writes (its JSON tag is "-").
type ManifestEntry = ingest.InputFile

// UnitManifest is units/<serial>/manifest.json: what the unit's files
// were built from. Inputs are archive-relative, Outputs site-relative.
// InputsSHA256 is ManifestInputsDigest of the inputs, so that a reader
// can tell at a glance whether two builds of a unit used the same data.
type UnitManifest struct {
	Schema       int             `json:"schema"`
	ToolVersion  string          `json:"tool_version"`
	Serial       string          `json:"serial"`
	Verdict      string          `json:"verdict"`
	InputsSHA256 string          `json:"inputs_sha256"`
	Inputs       []ManifestEntry `json:"inputs"`
	// Approvals are the serial's approval files (archive-relative) the
	// report's issue state comes from; not inputs, and not in the digest.
	Approvals []ManifestEntry `json:"approvals,omitempty"`
	Outputs   []ManifestEntry `json:"outputs"`
}

// ManifestUnit is one unit of the site's manifest.json.
type ManifestUnit struct {
	Serial       string        `json:"serial"`
	Verdict      string        `json:"verdict"`
	InputsSHA256 string        `json:"inputs_sha256"`
	Manifest     ManifestEntry `json:"manifest"`
}

// Manifest is the site's manifest.json: every unit's manifest and the
// fleet pages (Outputs).
type Manifest struct {
	Schema      int             `json:"schema"`
	ToolVersion string          `json:"tool_version"`
	Units       []ManifestUnit  `json:"units"`
	Outputs     []ManifestEntry `json:"outputs"`
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

// UnitManifestJSON is a unit's manifest.json, indented like the other
// JSON files, with a final newline; inputs and outputs in path order.
func UnitManifestJSON(serial, verdict string, inputs, approvals, outputs []ManifestEntry) ([]byte, error) {
	if serial == "" {
		return nil, fmt.Errorf("render: manifest: a unit without serial")
	}
	m := UnitManifest{Schema: manifestSchema, ToolVersion: Version, Serial: serial, Verdict: verdict,
		InputsSHA256: ManifestInputsDigest(inputs), Inputs: sortedEntries(inputs), Outputs: sortedEntries(outputs)}
	if len(approvals) > 0 {
		m.Approvals = sortedEntries(approvals)
	}
	return appendIndented(nil, &m, 0, "\n")
}

// ManifestWriter writes the site's manifest.json one unit at a time, so
// that a site of any size never holds it whole: the schema and tool
// version, then the units in serial order, then the fleet outputs.
type ManifestWriter struct {
	w     io.Writer
	buf   []byte
	last  string
	units int
}

// NewManifestWriter starts manifest.json on w.
func NewManifestWriter(w io.Writer, toolVersion string) (*ManifestWriter, error) {
	m := &ManifestWriter{w: w}
	b := fmt.Appendf(nil, "{\n  \"schema\": %d,\n  \"tool_version\": ", manifestSchema)
	v, err := json.Marshal(toolVersion)
	if err != nil {
		return nil, err
	}
	b = append(b, v...)
	b = append(b, ",\n  \"units\": ["...)
	_, err = w.Write(b)
	return m, err
}

// Unit writes one unit: its verdict, the digest of its inputs and its
// unit manifest. Serials must increase from one call to the next.
func (m *ManifestWriter) Unit(u ManifestUnit) error {
	if u.Serial == "" {
		return fmt.Errorf("render: manifest: a unit without serial")
	}
	if m.units > 0 && u.Serial <= m.last {
		return fmt.Errorf("render: manifest: unit %q after %q, expected increasing serials", u.Serial, m.last)
	}
	b := m.buf[:0]
	if m.units > 0 {
		b = append(b, ',')
	}
	b = appendNewline(b, 2)
	b, err := appendIndented(b, &u, 2, "")
	if err != nil {
		return err
	}
	m.buf = b
	m.last = u.Serial
	m.units++
	_, err = m.w.Write(b)
	return err
}

// Close ends the manifest with the given outputs (the fleet pages),
// sorted by path.
func (m *ManifestWriter) Close(outputs []ManifestEntry) error {
	b := m.buf[:0]
	if m.units > 0 {
		b = appendNewline(b, 1)
	}
	b = append(b, "],\n  \"outputs\": "...)
	b, err := appendIndented(b, sortedEntries(outputs), 1, "")
	if err != nil {
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

// ParseManifest reads a site's manifest.json. It refuses another schema,
// an entry without a path, a hash that is not 64 hex digits and a serial
// listed twice.
func ParseManifest(data []byte) (*Manifest, error) {
	const file = "manifest.json"
	m := new(Manifest)
	if err := decodeManifest(file, data, m, &m.Schema); err != nil {
		return nil, err
	}
	if err := checkEntries(file, "outputs", m.Outputs); err != nil {
		return nil, err
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
		if err := checkEntries(file, fmt.Sprintf("units[%d].manifest", i), []ManifestEntry{u.Manifest}); err != nil {
			return nil, err
		}
	}
	return m, nil
}

// ParseUnitManifest reads a unit's manifest.json; file names it in the
// problems. It refuses what ParseManifest refuses, and inputs_sha256 that
// is not the digest of the inputs listed.
func ParseUnitManifest(file string, data []byte) (*UnitManifest, error) {
	m := new(UnitManifest)
	if err := decodeManifest(file, data, m, &m.Schema); err != nil {
		return nil, err
	}
	if m.Serial == "" {
		return nil, ingest.Problemf(file, 0, "no serial")
	}
	if err := checkEntries(file, "inputs", m.Inputs); err != nil {
		return nil, err
	}
	if err := checkEntries(file, "outputs", m.Outputs); err != nil {
		return nil, err
	}
	if err := checkEntries(file, "approvals", m.Approvals); err != nil {
		return nil, err
	}
	if d := ManifestInputsDigest(m.Inputs); d != m.InputsSHA256 {
		return nil, ingest.Problemf(file, 0, "inputs_sha256 %q is not the digest of the inputs listed (%s)", m.InputsSHA256, d)
	}
	return m, nil
}

func decodeManifest(file string, data []byte, v any, schema *int) error {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if err := dec.Decode(v); err != nil {
		return jsonProblem(file, data, err)
	}
	if *schema != manifestSchema {
		return ingest.Problemf(file, 0, "schema %d, expected %d", *schema, manifestSchema)
	}
	return nil
}

func checkEntries(file, where string, es []ManifestEntry) error {
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
