package render

import (
	"bytes"
	"encoding/json"
	"fmt"
	"sort"

	"gtpack.example/gtpack/ingest"
)

// manifestSchema is the version of the manifest.json layout.
const manifestSchema = 1

// ManifestEntry is one file with its size and SHA-256 (lower-case hex).
type ManifestEntry struct {
	Path   string `json:"path"`
	Size   int64  `json:"size"`
	SHA256 string `json:"sha256"`
}

// ManifestUnit records what a unit's outputs were built from: the hash of
// its inputs lets an incremental build skip a unit whose inputs did not
// change.
type ManifestUnit struct {
	Serial       string   `json:"serial"`
	InputsSHA256 string   `json:"inputs_sha256"`
	Verdict      string   `json:"verdict"`
	Outputs      []string `json:"outputs"`
}

// Manifest is manifest.json: every input and output of a site.
type Manifest struct {
	Schema      int             `json:"schema"`
	ToolVersion string          `json:"tool_version"`
	Inputs      []ManifestEntry `json:"inputs"`
	Outputs     []ManifestEntry `json:"outputs"`
	Units       []ManifestUnit  `json:"units"`
}

// ManifestJSON returns manifest.json: inputs and outputs sorted by path,
// units by serial and each unit's outputs by path, indented, with a final
// newline. A zero Schema is written as the current one. m is not modified.
func ManifestJSON(m *Manifest) ([]byte, error) {
	if m == nil {
		return nil, fmt.Errorf("render: ManifestJSON of a nil manifest")
	}
	c := Manifest{Schema: m.Schema, ToolVersion: m.ToolVersion}
	if c.Schema == 0 {
		c.Schema = manifestSchema
	}
	c.Inputs = sortedEntries(m.Inputs)
	c.Outputs = sortedEntries(m.Outputs)
	c.Units = make([]ManifestUnit, len(m.Units))
	for i, u := range m.Units {
		u.Outputs = append([]string{}, u.Outputs...)
		sort.Strings(u.Outputs)
		c.Units[i] = u
	}
	sort.SliceStable(c.Units, func(a, b int) bool { return c.Units[a].Serial < c.Units[b].Serial })
	for i := 1; i < len(c.Units); i++ {
		if c.Units[i].Serial == c.Units[i-1].Serial {
			return nil, fmt.Errorf("render: manifest lists unit %q twice", c.Units[i].Serial)
		}
	}
	return encodeIndented(&c)
}

func sortedEntries(es []ManifestEntry) []ManifestEntry {
	out := append([]ManifestEntry{}, es...)
	sort.SliceStable(out, func(a, b int) bool { return out[a].Path < out[b].Path })
	return out
}

// ParseManifest reads a manifest.json, as an incremental build does with
// the previous one. It refuses a newer schema, an entry without a path, a
// hash that is not 64 hex digits and a serial listed twice.
func ParseManifest(data []byte) (*Manifest, error) {
	const file = "manifest.json"
	m := new(Manifest)
	dec := json.NewDecoder(bytes.NewReader(data))
	if err := dec.Decode(m); err != nil {
		return nil, jsonProblem(file, data, err)
	}
	if m.Schema < 1 || m.Schema > manifestSchema {
		return nil, ingest.Problemf(file, 0, "schema %d, expected %d", m.Schema, manifestSchema)
	}
	for _, list := range []struct {
		name string
		es   []ManifestEntry
	}{{"inputs", m.Inputs}, {"outputs", m.Outputs}} {
		for i, e := range list.es {
			if e.Path == "" {
				return nil, ingest.Problemf(file, 0, "%s[%d] has no path", list.name, i)
			}
			if !isSHA256Hex(e.SHA256) {
				return nil, ingest.Problemf(file, 0, "%s[%d] (%s): sha256 %q, expected 64 lower-case hex digits", list.name, i, e.Path, e.SHA256)
			}
			if e.Size < 0 {
				return nil, ingest.Problemf(file, 0, "%s[%d] (%s): size %d, expected >= 0", list.name, i, e.Path, e.Size)
			}
		}
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
