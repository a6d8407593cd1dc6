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
		if err := w.Unit(u); err != nil {
			t.Fatal(err)
		}
	}
	if err := w.Close(outputs); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// inputsDigest is inputs_sha256 written out: SHA-256 of the lines
// "<sha256> <path>\n" of the entries given, in the order given.
func inputsDigest(es ...ManifestEntry) string {
	var lines string
	for _, e := range es {
		lines += e.SHA256 + " " + e.Path + "\n"
	}
	s := sha256.Sum256([]byte(lines))
	return hex.EncodeToString(s[:])
}

func TestManifestRoundTrip(t *testing.T) {
	sum := sha256.Sum256([]byte("abc"))
	if hex.EncodeToString(sum[:]) != hashABC {
		t.Fatal("crypto/sha256 disagrees with FIPS 180-2 B.1")
	}
	station := ManifestEntry{Path: "stations/range-b.yaml", Size: 3, SHA256: hashABC}
	run17 := ManifestEntry{Path: "2026/11/KP16-00017/run.yaml", Size: 0, SHA256: hashEmpty}
	data17 := ManifestEntry{Path: "2026/11/KP16-00017/b00.s2p", Size: 3, SHA256: hashABC}
	out := func(serial, name string) ManifestEntry {
		return ManifestEntry{Path: "units/" + serial + "/" + name, Size: 1200, SHA256: hashABC}
	}

	// A unit's manifest: every input, the shared station included, and
	// its files, each in path order; inputs_sha256 over the inputs.
	um, err := UnitManifestJSON("KP16-00017", "pass", []ManifestEntry{run17, station, data17}, nil,
		[]ManifestEntry{out("KP16-00017", "result.json"), out("KP16-00017", "KP16-00017.xlsx")})
	if err != nil {
		t.Fatal(err)
	}
	back, err := ParseUnitManifest("units/KP16-00017/manifest.json", um)
	if err != nil {
		t.Fatalf("%v\n%s", err, um)
	}
	wantUnit := &UnitManifest{Schema: 3, ToolVersion: Version, Serial: "KP16-00017", Verdict: "pass",
		InputsSHA256: inputsDigest(data17, run17, station),
		Inputs:       []ManifestEntry{data17, run17, station},
		Outputs:      []ManifestEntry{out("KP16-00017", "KP16-00017.xlsx"), out("KP16-00017", "result.json")}}
	if !reflect.DeepEqual(back, wantUnit) {
		t.Errorf("unit manifest round trip:\n got %+v\nwant %+v", back, wantUnit)
	}
	if !bytes.HasSuffix(um, []byte("}\n")) {
		t.Error("unit manifest lacks the final newline")
	}

	// The site's manifest: each unit's manifest, and the fleet pages.
	fleet := []ManifestEntry{
		{Path: "index.html", Size: 900, SHA256: hashEmpty},
		{Path: "fleet.xlsx", Size: 5000, SHA256: hashABC},
	}
	units := []ManifestUnit{
		{Serial: "KP16-00003", Verdict: "fail", InputsSHA256: hashABC, Manifest: out("KP16-00003", "manifest.json")},
		{Serial: "KP16-00017", Verdict: "pass", InputsSHA256: inputsDigest(data17, run17, station), Manifest: out("KP16-00017", "manifest.json")},
	}
	data := writeManifest(t, units, fleet)
	if again := writeManifest(t, units, fleet); !bytes.Equal(data, again) || !bytes.HasSuffix(data, []byte("}\n")) {
		t.Fatal("manifest.json is not stable or lacks the final newline")
	}
	m, err := ParseManifest(data)
	if err != nil {
		t.Fatalf("%v\n%s", err, data)
	}
	want := &Manifest{Schema: 3, ToolVersion: Version, Units: units, Outputs: []ManifestEntry{fleet[1], fleet[0]}}
	if !reflect.DeepEqual(m, want) {
		t.Errorf("round trip:\n got %+v\nwant %+v", m, want)
	}
	if !strings.Contains(string(data), `"sha256": "`+hashABC+`"`) {
		t.Error("hash not written as given")
	}
	// No unit at all is still a valid manifest.
	empty := writeManifest(t, nil, nil)
	if m, err := ParseManifest(empty); err != nil || len(m.Units) != 0 {
		t.Errorf("empty manifest: %v %+v\n%s", err, m, empty)
	}
	// Serials must increase.
	w, _ := NewManifestWriter(io.Discard, Version)
	if err := w.Unit(units[1]); err != nil {
		t.Fatal(err)
	}
	for _, u := range []ManifestUnit{units[0], units[1], {}} {
		if err := w.Unit(u); err == nil {
			t.Errorf("unit %q after %q accepted", u.Serial, units[1].Serial)
		}
	}
}

func TestManifestRefuses(t *testing.T) {
	ok := `{"schema": 3, "tool_version": "0.4.0", "outputs": [{"path": "index.html", "size": 3, "sha256": "` + hashABC + `"}],
"units": [{"serial": "S1", "inputs_sha256": "` + hashABC + `", "verdict": "pass",
"manifest": {"path": "units/S1/manifest.json", "size": 1, "sha256": "` + hashEmpty + `"}}]}`
	if _, err := ParseManifest([]byte(ok)); err != nil {
		t.Fatalf("valid manifest refused: %v", err)
	}
	tests := []struct {
		name, data string
		line       int
		want       string
	}{
		{"newer schema", strings.Replace(ok, `"schema": 3`, `"schema": 4`, 1), 0, "schema 4, expected 3"},
		{"older schema", strings.Replace(ok, `"schema": 3`, `"schema": 2`, 1), 0, "schema 2, expected 3"},
		{"no schema", strings.Replace(ok, `"schema": 3,`, ``, 1), 0, "schema 0"},
		{"upper-case hash", strings.Replace(ok, `"sha256": "ba78`, `"sha256": "BA78`, 1), 0, "64 lower-case hex"},
		{"unit manifest hash", strings.Replace(ok, `"sha256": "e3b0`, `"sha256": "e3b`, 1), 0, "units[0].manifest"},
		{"short hash", strings.Replace(ok, `"inputs_sha256": "ba78`, `"inputs_sha256": "78`, 1), 0, "inputs_sha256"},
		{"no path", strings.Replace(ok, `"path": "index.html"`, `"path": ""`, 1), 0, "has no path"},
		{"negative size", strings.Replace(ok, `"size": 3`, `"size": -3`, 1), 0, "size -3"},
		{"unknown field", strings.Replace(ok, `"schema": 3,`, `"schema": 3, "shared_inputs": [],`, 1), 0, "shared_inputs"},
		{"twice", strings.Replace(ok, `"units": [`, `"units": [{"serial": "S1", "inputs_sha256": "`+hashABC+`", "manifest": {"path": "m", "size": 1, "sha256": "`+hashABC+`"}},`, 1), 0, "listed twice"},
		{"syntax", "{\"schema\": 3,\n\"units\": [\n}", 3, "expected JSON"},
	}
	for _, tc := range tests {
		_, err := ParseManifest([]byte(tc.data))
		var p *ingest.Problem
		if !errors.As(err, &p) || p.File != "manifest.json" || p.Line != tc.line || !strings.Contains(p.Message, tc.want) {
			t.Errorf("%s: %v, want manifest.json line %d containing %q", tc.name, err, tc.line, tc.want)
		}
	}
	// A unit manifest whose inputs_sha256 is not that of its inputs.
	um, err := UnitManifestJSON("S1", "pass", []ManifestEntry{{Path: "a", Size: 3, SHA256: hashABC}}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	bad := bytes.Replace(um, []byte(`"sha256": "`+hashABC), []byte(`"sha256": "`+hashEmpty), 1)
	if _, err := ParseUnitManifest("units/S1/manifest.json", bad); err == nil || !strings.Contains(err.Error(), "not the digest") {
		t.Errorf("unit manifest with an input changed after its digest: %v", err)
	}
}

// SHA256SUMS as coreutils' sha256sum writes and reads it (GNU coreutils
// manual, "sha256sum invocation" / md5sum: "<hash>  <file>" in text
// mode, "<hash> *<file>" in binary mode).
func TestSums(t *testing.T) {
	files := []ManifestEntry{
		{Path: "units/S1/report.html", SHA256: hashABC},
		{Path: "index.html", SHA256: hashEmpty},
	}
	data, err := SumsFile(files)
	if err != nil {
		t.Fatal(err)
	}
	want := hashEmpty + "  index.html\n" + hashABC + "  units/S1/report.html\n"
	if string(data) != want {
		t.Errorf("SHA256SUMS:\n%s\nwant\n%s", data, want)
	}
	back, err := ParseSums([]byte(want + hashABC + " *binary.xlsx\n"))
	if err != nil || len(back) != 3 || back[2].Path != "binary.xlsx" || back[0].Path != "index.html" || back[0].SHA256 != hashEmpty {
		t.Errorf("ParseSums: %v %+v", err, back)
	}
	for _, bad := range []ManifestEntry{{Path: "../x", SHA256: hashABC}, {Path: "/etc/x", SHA256: hashABC}, {Path: "a\nb", SHA256: hashABC}, {Path: "a", SHA256: "00"}} {
		if _, err := SumsFile([]ManifestEntry{bad}); err == nil {
			t.Errorf("SumsFile accepted %+v", bad)
		}
	}
	if _, err := SumsFile([]ManifestEntry{files[0], files[0]}); err == nil {
		t.Error("SumsFile accepted a path twice")
	}
	for _, tc := range []struct{ data, want string }{
		{hashABC + " index.html\n", "SHA256SUMS:1: "},
		{hashABC + "  ../etc/passwd\n", "inside the package"},
		{want + hashABC + "  index.html\n", "listed twice (first at line 1)"},
		{"not a sum\n", "not a line of sha256sum"},
	} {
		_, err := ParseSums([]byte(tc.data))
		var p *ingest.Problem
		if !errors.As(err, &p) || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("ParseSums(%q): %v, want %q", tc.data, err, tc.want)
		}
	}
}
