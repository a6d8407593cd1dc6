package ingest

import (
	"encoding/json"
	"math"
	"path/filepath"
	"strings"
	"testing"
)

func TestInspect(t *testing.T) {
	g := func(p string) string { return filepath.Join(goodRoot, p) }
	cases := []struct {
		path  string
		text  []string // must appear in the text
		check func(t *testing.T, v map[string]any)
	}{
		{g("stations/range-a.yaml"), []string{`station "range-a"`, `term "Noise receiver calibration": 0.2 dB normal (k=2)`}, func(t *testing.T, v map[string]any) {
			if v["kind"] != "station" || v["receiver_match"] != 0.03 || len(v["uncertainty"].([]any)) != 2 {
				t.Errorf("%v", v)
			}
		}},
		{g("references/horn-02.yaml"), []string{`reference "horn-02"`, "table from tables/horn-02.csv"}, func(t *testing.T, v map[string]any) {
			table := v["table"].([]any)
			if v["kind"] != "reference" || v["calibrated"] != "2026-03-01" || len(table) != 3 || table[1].(map[string]any)["frequency_hz"] != 12e9 {
				t.Errorf("%v", v)
			}
		}},
		{g("specs/KU-TEST.yaml"), []string{"spec for KU-TEST", `limit "Gain scanned": mean gain over 10.7 GHz to 12.7 GHz`}, func(t *testing.T, v map[string]any) {
			l := v["limits"].([]any)
			if v["kind"] != "spec" || v["operating_antenna_k"] != 50.0 || len(l) != 2 || l[0].(map[string]any)["band_hz"].([]any)[0] != 10.7e9 {
				t.Errorf("%v", v)
			}
		}},
		{g("units/KT-0002/run.yaml"), []string{"run of KT-0002", "noise b00-nf.csv (system-noise-figure-db)"}, func(t *testing.T, v map[string]any) {
			beams := v["beams"].([]any)
			if v["kind"] != "run" || v["started"] != "2026-11-04T08:00:00Z" || len(beams) != 2 || len(beams[0].(map[string]any)["noise"].([]any)) != 2 {
				t.Errorf("%v", v)
			}
		}},
		{g("units/KT-0002/b00-nf.csv"), []string{`trace CSV, value column "nf_db", 5 points from 10.7 GHz to 12.7 GHz`}, func(t *testing.T, v map[string]any) {
			if v["kind"] != "trace" || v["frequency_hz"].([]any)[0] != 10.7e9 || v["values"].([]any)[4] != 1.95 {
				t.Errorf("%v", v)
			}
		}},
		{g("units/KT-0001/2026-11-03/elements.csv"), []string{"elements, 4 elements"}, func(t *testing.T, v map[string]any) {
			if v["kind"] != "elements" || len(v["elements"].([]any)) != 4 {
				t.Errorf("%v", v)
			}
		}},
		{g("references/tables/horn-02.csv"), []string{"reference gain table, 3 points"}, func(t *testing.T, v map[string]any) {
			if v["kind"] != "reference-table" || len(v["table"].([]any)) != 3 {
				t.Errorf("%v", v)
			}
		}},
		{g("units/KT-0001/2026-11-03/notes.md"), []string{"notes, ", "Retest after connector change"}, func(t *testing.T, v map[string]any) {
			if v["kind"] != "notes" || !strings.HasPrefix(v["markdown"].(string), "# Retest") {
				t.Errorf("%v", v)
			}
		}},
		{g("units/KT-0002/b20.s2p"), []string{"Touchstone version 1, 2 port(s), S parameters in MA, 5 frequencies"}, func(t *testing.T, v map[string]any) {
			// Magnitude-angle to real-imaginary: m*cos(a), m*sin(a)
			// (general knowledge); S21 at 10.7 GHz is 0.33 at 10 degrees.
			s := v["s"].([]any)
			s21 := s[0].([]any)[1].([]any)[0].([]any)
			re, im := s21[0].(float64), s21[1].(float64)
			if v["ports"] != 2.0 || len(s) != 5 || math.Abs(re-0.33*math.Cos(10*math.Pi/180)) > 1e-12 || math.Abs(im-0.33*math.Sin(10*math.Pi/180)) > 1e-12 {
				t.Errorf("ports %v, S21 %v", v["ports"], s21)
			}
		}},
	}
	for _, c := range cases {
		t.Run(filepath.Base(c.path), func(t *testing.T) {
			text, val, err := Inspect(c.path)
			if err != nil {
				t.Fatal(err)
			}
			for _, want := range c.text {
				if !strings.Contains(text, want) {
					t.Errorf("text lacks %q:\n%s", want, text)
				}
			}
			b, err := json.Marshal(val)
			if err != nil {
				t.Fatal(err)
			}
			var v map[string]any
			if err := json.Unmarshal(b, &v); err != nil {
				t.Fatal(err)
			}
			c.check(t, v)
		})
	}

	bad := []struct {
		path, want string
	}{
		{filepath.Join(brokenRoot, "units/BRK-TEXT/b00.csv"), `b00.csv:4: s21_db "n/a"`},
		{filepath.Join(brokenRoot, "units/BRK-UNKNOWN-KEY/run.yaml"), `run.yaml:9: run: unknown key "humidity_pct"`},
		{filepath.Join(brokenRoot, "units/BRK-EMPTY/b00-noise.csv"), "b00-noise.csv: file is empty"},
		{filepath.Join(goodRoot, "units/KT-0001/2026-11-03"), "is a directory"},
		{filepath.Join(goodRoot, ".scratch/run.yaml"), `unknown key "this"`},
		{filepath.Join(goodRoot, "nothing.yaml"), "no such file"},
	}
	for _, c := range bad {
		if _, _, err := Inspect(c.path); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("Inspect(%s) = %v, want an error containing %q", c.path, err, c.want)
		}
	}
	// A YAML file outside the known folders, a file of unknown kind.
	root := writeArchive(t, map[string]string{"misc/x.yaml": "schema: 1\n", "misc/x.txt": "hello"})
	for _, p := range []string{"misc/x.yaml", "misc/x.txt"} {
		if _, _, err := Inspect(filepath.Join(root, p)); err == nil || !strings.Contains(err.Error(), "expected") {
			t.Errorf("Inspect(%s) = %v", p, err)
		}
	}
}
