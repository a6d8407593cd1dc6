package render

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"reflect"
	"strings"
	"testing"

	"gtpack.example/gtpack/ingest"
)

// hashABC is SHA-256("abc"), the worked example of FIPS 180-2 appendix B.1;
// hashEmpty is SHA-256 of the empty string (general knowledge).
const (
	hashABC   = "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
	hashEmpty = "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855"
)

func TestManifestRoundTrip(t *testing.T) {
	sum := sha256.Sum256([]byte("abc"))
	if hex.EncodeToString(sum[:]) != hashABC {
		t.Fatal("crypto/sha256 disagrees with FIPS 180-2 B.1")
	}
	m := &Manifest{
		ToolVersion: Version,
		Inputs: []ManifestEntry{
			{Path: "stations/range-b.yaml", Size: 3, SHA256: hashABC},
			{Path: "2026/11/KP16-00017/run.yaml", Size: 0, SHA256: hashEmpty},
		},
		Outputs: []ManifestEntry{
			{Path: "units/KP16-00017/report.html", Size: 1200, SHA256: hashABC},
			{Path: "index.html", Size: 900, SHA256: hashEmpty},
			{Path: "fleet.xlsx", Size: 5000, SHA256: hashABC},
		},
		Units: []ManifestUnit{
			{Serial: "KP16-00017", InputsSHA256: hashABC, Verdict: "pass",
				Outputs: []string{"units/KP16-00017/result.json", "units/KP16-00017/KP16-00017.xlsx"}},
			{Serial: "KP16-00003", InputsSHA256: hashEmpty, Verdict: "fail", Outputs: nil},
		},
	}
	orig := m.Inputs[0]
	data, err := ManifestJSON(m)
	if err != nil {
		t.Fatal(err)
	}
	if m.Inputs[0] != orig || m.Units[0].Outputs[0] != "units/KP16-00017/result.json" || m.Schema != 0 {
		t.Error("ManifestJSON modified its argument")
	}
	again, _ := ManifestJSON(m)
	if !bytes.Equal(data, again) || !bytes.HasSuffix(data, []byte("}\n")) {
		t.Fatal("manifest.json is not stable or lacks the final newline")
	}
	back, err := ParseManifest(data)
	if err != nil {
		t.Fatal(err)
	}
	want := &Manifest{
		Schema:      1,
		ToolVersion: Version,
		Inputs:      []ManifestEntry{m.Inputs[1], m.Inputs[0]},
		Outputs:     []ManifestEntry{m.Outputs[2], m.Outputs[1], m.Outputs[0]},
		Units: []ManifestUnit{
			{Serial: "KP16-00003", InputsSHA256: hashEmpty, Verdict: "fail", Outputs: []string{}},
			{Serial: "KP16-00017", InputsSHA256: hashABC, Verdict: "pass",
				Outputs: []string{"units/KP16-00017/KP16-00017.xlsx", "units/KP16-00017/result.json"}},
		},
	}
	if !reflect.DeepEqual(back, want) {
		t.Errorf("round trip:\n got %+v\nwant %+v", back, want)
	}
	// Sorting the input first gives the same bytes: the output does not
	// depend on the order the build found things in.
	sorted, _ := ManifestJSON(want)
	if !bytes.Equal(sorted, data) {
		t.Error("manifest of the sorted lists differs")
	}
	if !strings.Contains(string(data), `"sha256": "`+hashABC+`"`) {
		t.Error("hash not written as given")
	}
}

func TestManifestRefuses(t *testing.T) {
	ok := `{"schema": 1, "tool_version": "0.1.0", "inputs": [{"path": "a", "size": 3, "sha256": "` + hashABC + `"}],
"outputs": [], "units": [{"serial": "S1", "inputs_sha256": "` + hashABC + `", "verdict": "pass", "outputs": []}]}`
	if _, err := ParseManifest([]byte(ok)); err != nil {
		t.Fatalf("valid manifest refused: %v", err)
	}
	tests := []struct {
		name, data string
		line       int
		want       string
	}{
		{"newer schema", strings.Replace(ok, `"schema": 1`, `"schema": 2`, 1), 0, "schema 2, expected 1"},
		{"no schema", strings.Replace(ok, `"schema": 1,`, ``, 1), 0, "schema 0"},
		{"upper-case hash", strings.Replace(ok, `"sha256": "ba78`, `"sha256": "BA78`, 1), 0, "64 lower-case hex"},
		{"short hash", strings.Replace(ok, `"inputs_sha256": "ba78`, `"inputs_sha256": "78`, 1), 0, "inputs_sha256"},
		{"no path", strings.Replace(ok, `"path": "a"`, `"path": ""`, 1), 0, "has no path"},
		{"negative size", strings.Replace(ok, `"size": 3`, `"size": -3`, 1), 0, "size -3"},
		{"twice", strings.Replace(ok, `"units": [`, `"units": [{"serial": "S1", "inputs_sha256": "`+hashABC+`"},`, 1), 0, "listed twice"},
		{"syntax", "{\"schema\": 1,\n\"inputs\": [\n}", 3, "expected JSON"},
	}
	for _, tc := range tests {
		_, err := ParseManifest([]byte(tc.data))
		var p *ingest.Problem
		if !errors.As(err, &p) || p.File != "manifest.json" || p.Line != tc.line || !strings.Contains(p.Message, tc.want) {
			t.Errorf("%s: %v, want manifest.json line %d containing %q", tc.name, err, tc.line, tc.want)
		}
	}
	dup := &Manifest{Units: []ManifestUnit{{Serial: "S"}, {Serial: "S"}}}
	if _, err := ManifestJSON(dup); err == nil {
		t.Error("ManifestJSON accepted a serial listed twice")
	}
}
