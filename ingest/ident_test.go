package ingest

import (
	"path"
	"strings"
	"testing"
)

// The rule is the contract's (docs/archive-format.md, "Archive layout").
func TestCheckIdentifier(t *testing.T) {
	cases := []struct {
		in   string
		want string // "" when valid; else a part of the message
	}{
		{"QDA-26-0001", ""},
		{"b00", ""},
		{"horn-r7", ""},
		{"KP16.v2", ""},
		{"00017", ""},
		{"a", ""},
		{"A_b.c-9", ""},
		{strings.Repeat("x", 64), ""},
		{"CONSOLE", ""}, // only the base before the first '.' is a device name
		{"COM0", ""},
		{"LPT10", ""},
		{"x.CON", ""},

		{"../../x", `"../../x" has "/" at character 3`},
		{"a/b", `"a/b" has "/" at character 2`},
		{`a\b`, `"a\\b" has "\\" at character 2`},
		{".", `"." starts with "."`},
		{"..", `".." starts with "."`},
		{"", "is empty"},
		{strings.Repeat("x", 65), "has 65 characters"},
		{"CON", `"CON" is the reserved device name CON`},
		{"aux", `"aux" is the reserved device name AUX`},
		{"Com1.txt", `"Com1.txt" is the reserved device name COM1`},
		{"lpt9", "reserved device name LPT9"},
		{"nul.tar.gz", "reserved device name NUL"},
		{"PRN.", `"PRN." ends with "."`},
		{"QDA-1.", `"QDA-1." ends with "."`},
		{"QDA-1 ", `"QDA-1 " has " " at character 6`},
		{" QDA-1", `" QDA-1" has " " at character 1`},
		{"-x", `"-x" starts with "-"`},
		{"_x", `"_x" starts with "_"`},
		{"a\x01b", `"a\x01b" has "\x01" at character 2`},
		{"QDA\u202e1-", `"QDA\u202e1-" has "\u202e" at character 4`},
		{"a\x00", `"a\x00" has "\x00" at character 2`},
		{"é1", `"é1" has "é" at character 1`},
		{"ab\xff", `"ab\xff" has "\xff" at character 3`},
		{"ab\ufffd", `has "�" at character 3`},
	}
	for _, c := range cases {
		err := CheckIdentifier(c.in)
		switch {
		case c.want == "" && err != nil:
			t.Errorf("%q: refused (%v); expected valid", c.in, err)
		case c.want != "" && err == nil:
			t.Errorf("%q: accepted; expected refused with %q", c.in, c.want)
		case c.want != "" && !strings.Contains(err.Error(), c.want):
			t.Errorf("%q: %q; expected it to contain %q", c.in, err, c.want)
		case c.want != "" && !strings.Contains(err.Error(), "expected"):
			t.Errorf("%q: %q does not say what is expected", c.in, err)
		}
	}
}

// Every identifier key of every document is checked, at its line.
func TestIdentifierKeys(t *testing.T) {
	parseRun := func(b []byte, n string) error { _, err := ParseRun(b, n); return err }
	runYAMLCases(t, runYAML, "run.yaml", parseRun, []yamlCase{
		{"serial path", "serial: KP16-00017", `serial: "../../x"`, 2, `run: serial "../../x" has "/" at character 3; expected 1 to 64 of A-Z a-z 0-9 . _ - starting with a letter or digit`},
		{"serial device", "serial: KP16-00017", "serial: aux", 2, `run: serial "aux" is the reserved device name AUX`},
		{"serial bidi", "serial: KP16-00017", `serial: "KP16\u202e-1"`, 2, `has "\u202e" at character 5`},
		{"product", "product: KU-PANEL-16", "product: KU PANEL", 3, `run: product "KU PANEL" has " " at character 3`},
		{"station", "station: range-b", "station: range/b", 4, `run: station "range/b" has "/"`},
		{"reference", "reference: horn-0042", "reference: horn-0042.", 5, `run: reference "horn-0042." ends with "."`},
		{"beam id", "  - id: b30", "  - id: .b30", 26, `beam ".b30": id ".b30" starts with "."`},
		{"beam case twin", "  - id: b30", "  - id: B00", 26, `run: beam id "B00" is the same beam as "b00" (line 15), regardless of case`},
	})
	parseStation := func(b []byte, n string) error { _, err := ParseStation(b, n); return err }
	runYAMLCases(t, stationYAML, "stations/x.yaml", parseStation, []yamlCase{
		{"station id", "id: range-a", "id: COM3", 2, `station: id "COM3" is the reserved device name COM3`},
	})
	parseRef := func(b []byte, n string) error { _, err := ParseReference(b, n); return err }
	runYAMLCases(t, referenceYAML, "references/x.yaml", parseRef, []yamlCase{
		{"reference id", "id: horn-0042", `id: "horn\t42"`, 2, `reference: id "horn\t42" has "\t" at character 5`},
	})
	parseSpec := func(b []byte, n string) error { _, err := ParseSpec(b, n); return err }
	runYAMLCases(t, specYAML, "specs/x.yaml", parseSpec, []yamlCase{
		{"spec product", "product: KU-PANEL-16", "product: " + strings.Repeat("K", 65), 2, "spec: product \"" + strings.Repeat("K", 65) + "\" has 65 characters"},
	})
}

// QDA-1 and qda-1 are one unit: the spelling of the first run.yaml path
// stands, the other run is refused at its serial line, naming the first
// file, and stays with the unit.
func TestOpenSerialCaseTwins(t *testing.T) {
	f := baseArchive(t)
	f["u/a/run.yaml"] = strings.Replace(f["u/a/run.yaml"], "serial: KT-0001", "serial: QDA-1", 1)
	f["u/b/run.yaml"] = strings.ReplaceAll(strings.Replace(strings.Replace(f["u/a/run.yaml"], "serial: QDA-1", "serial: qda-1", 1),
		"2026-11-01T", "2026-11-05T", 1), "pre: ", "pre: ../a/")
	if f["u/b/run.yaml"] == f["u/a/run.yaml"] {
		t.Fatal("test archive: the second run is not changed")
	}
	for _, lean := range []bool{false, true} {
		a, err := open(writeArchive(t, f), lean)
		if err != nil {
			t.Fatal(err)
		}
		if len(a.Units) != 1 {
			t.Fatalf("lean %v: %d units, want 1", lean, len(a.Units))
		}
		u := a.Units[0]
		if u.Serial != "QDA-1" || len(u.Runs) != 1 || u.Runs[0].File != "u/a/run.yaml" || len(u.Refused) != 1 {
			t.Fatalf("lean %v: unit %+v, want QDA-1 with u/a/run.yaml and u/b/run.yaml refused", lean, u)
		}
		rr := u.Refused[0]
		if rr.File != "u/b/run.yaml" || rr.Dir != "u/b" || rr.Serial != "qda-1" || rr.Started.IsZero() || u.AcceptanceRefused() != rr {
			t.Errorf("lean %v: refused run %+v", lean, rr)
		}
		if len(a.Problems) != 1 || len(rr.Problems) != 1 || *rr.Problems[0] != *a.Problems[0] {
			t.Fatalf("lean %v: problems %v (of the run %v), want one", lean, a.Problems, rr.Problems)
		}
		p := a.Problems[0]
		want := `serial "qda-1" is the same unit as "QDA-1" in u/a/run.yaml, regardless of case; expected one spelling`
		if p.File != "u/b/run.yaml" || p.Line != 2 || !strings.Contains(p.Message, want) {
			t.Errorf("lean %v: got %q, want u/b/run.yaml:2 containing %q", lean, p.Error(), want)
		}
	}

	// A refused run of the other spelling does not take the name: the good
	// run's spelling stands even when the broken file's path sorts first.
	g := baseArchive(t)
	g["u/b/run.yaml"] = strings.Replace(g["u/a/run.yaml"], "serial: KT-0001", "serial: QDA-1", 1)
	g["u/a/run.yaml"] = strings.Replace(g["u/a/run.yaml"], "serial: KT-0001", "serial: qda-1", 1) + "colour: red\n"
	a, err := Open(writeArchive(t, g))
	if err != nil {
		t.Fatal(err)
	}
	if len(a.Units) != 1 || a.Units[0].Serial != "QDA-1" || len(a.Units[0].Runs) != 1 || len(a.Units[0].Refused) != 1 {
		t.Fatalf("units %+v", a.Units)
	}
	var twin bool
	for _, p := range a.Problems {
		twin = twin || (p.File == "u/a/run.yaml" && p.Line == 2 && strings.Contains(p.Message, `same unit as "QDA-1" in u/b/run.yaml`))
	}
	if !twin || len(a.Units[0].Refused[0].Problems) != 2 {
		t.Errorf("problems %v; expected the unknown key and the case twin at u/a/run.yaml:2", a.Problems)
	}
}

// A station, reference or spec whose id differs from an earlier one only
// in case is refused at its id line; a run naming it is told it was
// refused.
func TestOpenDocumentCaseTwins(t *testing.T) {
	cases := []struct {
		name, file, old, new string
		line                 int
		want                 string
	}{
		{"station", "stations/range-a.yaml", "id: range-a", "id: Range-A", 2, `station id "Range-A" is the same as "range-a" in stations/range-a.yaml, regardless of case`},
		{"reference", "references/horn-01.yaml", "id: horn-01", "id: HORN-01", 2, `reference id "HORN-01" is the same as "horn-01" in references/horn-01.yaml, regardless of case`},
		{"spec", "specs/KU-TEST.yaml", "product: KU-TEST", "product: ku-test", 2, `spec for product "ku-test" is the same product as "KU-TEST" in specs/KU-TEST.yaml, regardless of case`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f := baseArchive(t)
			twin := path.Dir(c.file) + "/zz-twin.yaml" // sorts after the first
			f[twin] = mutate(t, f[c.file], c.old, c.new)
			a, err := Open(writeArchive(t, f))
			if err != nil {
				t.Fatal(err)
			}
			if len(a.Problems) != 1 {
				t.Fatalf("problems %v, want one", a.Problems)
			}
			if p := a.Problems[0]; p.File != twin || p.Line != c.line || !strings.Contains(p.Message, c.want) {
				t.Errorf("got %q, want %s:%d containing %q", p.Error(), twin, c.line, c.want)
			}
			if len(a.Units) != 1 || len(a.Units[0].Runs) != 1 {
				t.Errorf("the run of the first spelling is not kept: %+v", a.Units)
			}
		})
	}
}
