package render

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"io"
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

// writeManifest writes a manifest of the given units through the writer.
func writeManifest(t *testing.T, units []ManifestUnit, outputs []ManifestEntry) []byte {
	t.Helper()
	var buf bytes.Buffer
	w, err := NewManifestWriter(&buf, Version)
	if err != nil {
		t.Fatal(err)
	}
	for _, u := range units {
		if err := w.Unit(u.Serial, u.Verdict, u.Inputs, u.Outputs); err != nil {
			t.Fatal(err)
		}
	}
	if err := w.Close(outputs); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

func TestManifestRoundTrip(t *testing.T) {
	sum := sha256.Sum256([]byte("abc"))
	if hex.EncodeToString(sum[:]) != hashABC {
		t.Fatal("crypto/sha256 disagrees with FIPS 180-2 B.1")
	}
	station := ManifestEntry{Path: "stations/range-b.yaml", Size: 3, SHA256: hashABC}
	stationV2 := ManifestEntry{Path: "stations/range-b.yaml", Size: 0, SHA256: hashEmpty}
	run17 := ManifestEntry{Path: "2026/11/KP16-00017/run.yaml", Size: 0, SHA256: hashEmpty}
	data17 := ManifestEntry{Path: "2026/11/KP16-00017/b00.s2p", Size: 3, SHA256: hashABC}
	run3 := ManifestEntry{Path: "2026/11/KP16-00003/run.yaml", Size: 3, SHA256: hashABC}
	run20 := ManifestEntry{Path: "2026/12/KP16-00020/run.yaml", Size: 3, SHA256: hashABC}
	out := func(serial, name string) ManifestEntry {
		return ManifestEntry{Path: "units/" + serial + "/" + name, Size: 1200, SHA256: hashABC}
	}
	fleet := []ManifestEntry{
		{Path: "index.html", Size: 900, SHA256: hashEmpty},
		{Path: "fleet.xlsx", Size: 5000, SHA256: hashABC},
	}
	// Units in serial order with their inputs in any order: KP16-00017
	// shares the station's version of KP16-00003; KP16-00020 read another
	// version of it, which it lists as its own.
	units := []ManifestUnit{
		{Serial: "KP16-00003", Verdict: "fail", Inputs: []ManifestEntry{station, run3}},
		{Serial: "KP16-00017", Verdict: "pass", Inputs: []ManifestEntry{run17, station, data17},
			Outputs: []ManifestEntry{out("KP16-00017", "result.json"), out("KP16-00017", "KP16-00017.xlsx")}},
		{Serial: "KP16-00020", Verdict: "pass", Inputs: []ManifestEntry{stationV2, run20}},
	}
	data := writeManifest(t, units, fleet)
	if again := writeManifest(t, units, fleet); !bytes.Equal(data, again) || !bytes.HasSuffix(data, []byte("}\n")) {
		t.Fatal("manifest.json is not stable or lacks the final newline")
	}
	back, err := ParseManifest(data)
	if err != nil {
		t.Fatalf("%v\n%s", err, data)
	}
	// inputs_sha256: SHA-256 of "<sha256> <path>\n" lines in path order.
	digest := func(es ...ManifestEntry) string {
		var lines string
		for _, e := range es {
			lines += e.SHA256 + " " + e.Path + "\n"
		}
		s := sha256.Sum256([]byte(lines))
		return hex.EncodeToString(s[:])
	}
	want := &Manifest{
		Schema:       2,
		ToolVersion:  Version,
		SharedInputs: []ManifestEntry{station},
		Outputs:      []ManifestEntry{fleet[1], fleet[0]},
		Units: []ManifestUnit{
			{Serial: "KP16-00003", Verdict: "fail", InputsSHA256: digest(run3, station),
				Inputs: []ManifestEntry{run3}, SharedInputs: []string{station.Path}, Outputs: []ManifestEntry{}},
			{Serial: "KP16-00017", Verdict: "pass", InputsSHA256: digest(data17, run17, station),
				Inputs: []ManifestEntry{data17, run17}, SharedInputs: []string{station.Path},
				Outputs: []ManifestEntry{out("KP16-00017", "KP16-00017.xlsx"), out("KP16-00017", "result.json")}},
			{Serial: "KP16-00020", Verdict: "pass", InputsSHA256: digest(run20, stationV2),
				Inputs: []ManifestEntry{run20, stationV2}, SharedInputs: []string{}, Outputs: []ManifestEntry{}},
		},
	}
	if !reflect.DeepEqual(back, want) {
		t.Errorf("round trip:\n got %+v\nwant %+v", back, want)
	}
	if !strings.Contains(string(data), `"sha256": "`+hashABC+`"`) {
		t.Error("hash not written as given")
	}
	// No unit at all is still a valid manifest.
	empty := writeManifest(t, nil, nil)
	if m, err := ParseManifest(empty); err != nil || len(m.Units) != 0 || len(m.SharedInputs) != 0 {
		t.Errorf("empty manifest: %v %+v\n%s", err, m, empty)
	}
	// Serials must increase.
	w, _ := NewManifestWriter(io.Discard, Version)
	if err := w.Unit("B", "pass", nil, nil); err != nil {
		t.Fatal(err)
	}
	for _, s := range []string{"A", "B", ""} {
		if err := w.Unit(s, "pass", nil, nil); err == nil {
			t.Errorf("unit %q after B accepted", s)
		}
	}
}

func TestManifestRefuses(t *testing.T) {
	ok := `{"schema": 2, "tool_version": "0.1.0", "shared_inputs": [{"path": "a", "size": 3, "sha256": "` + hashABC + `"}],
"outputs": [], "units": [{"serial": "S1", "inputs_sha256": "` + hashABC + `", "verdict": "pass", "inputs": [],
"shared_inputs": ["a"], "outputs": [{"path": "units/S1/result.json", "size": 1, "sha256": "` + hashEmpty + `"}]}]}`
	if _, err := ParseManifest([]byte(ok)); err != nil {
		t.Fatalf("valid manifest refused: %v", err)
	}
	tests := []struct {
		name, data string
		line       int
		want       string
	}{
		{"newer schema", strings.Replace(ok, `"schema": 2`, `"schema": 3`, 1), 0, "schema 3, expected 2"},
		{"older schema", strings.Replace(ok, `"schema": 2`, `"schema": 1`, 1), 0, "schema 1, expected 2"},
		{"no schema", strings.Replace(ok, `"schema": 2,`, ``, 1), 0, "schema 0"},
		{"upper-case hash", strings.Replace(ok, `"sha256": "ba78`, `"sha256": "BA78`, 1), 0, "64 lower-case hex"},
		{"unit output hash", strings.Replace(ok, `"sha256": "e3b0`, `"sha256": "e3b`, 1), 0, "units[0].outputs[0]"},
		{"short hash", strings.Replace(ok, `"inputs_sha256": "ba78`, `"inputs_sha256": "78`, 1), 0, "inputs_sha256"},
		{"no path", strings.Replace(ok, `"path": "a"`, `"path": ""`, 1), 0, "has no path"},
		{"negative size", strings.Replace(ok, `"size": 3`, `"size": -3`, 1), 0, "size -3"},
		{"unknown shared input", strings.Replace(ok, `"shared_inputs": ["a"]`, `"shared_inputs": ["b"]`, 1), 0, `shared input "b"`},
		{"twice", strings.Replace(ok, `"units": [`, `"units": [{"serial": "S1", "inputs_sha256": "`+hashABC+`"},`, 1), 0, "listed twice"},
		{"syntax", "{\"schema\": 2,\n\"units\": [\n}", 3, "expected JSON"},
	}
	for _, tc := range tests {
		_, err := ParseManifest([]byte(tc.data))
		var p *ingest.Problem
		if !errors.As(err, &p) || p.File != "manifest.json" || p.Line != tc.line || !strings.Contains(p.Message, tc.want) {
			t.Errorf("%s: %v, want manifest.json line %d containing %q", tc.name, err, tc.line, tc.want)
		}
	}
}
