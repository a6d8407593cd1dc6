package ingest

import (
	"bytes"
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// dialectWriter writes one trace in the ordinary dialects of instruments
// and spreadsheets with Python's csv module (a writer other than ours),
// from the numbers' text as WriteTrace writes it: the value is in
// spec["values"], the frequency text per unit in spec["freqs"][unit].
const dialectWriter = `
import csv, json, sys
spec = json.load(open(sys.argv[1]))
out = sys.argv[2]
values = spec["values"]
def rows(unit, col):
    return [[f, v] for f, v in zip(spec["freqs"][unit], values)]
def comma(rs):
    return [[x.replace(".", ",") for x in r] for r in rs]
for name in spec["dialects"]:
    path = out + "/" + name + ".csv"
    enc = "utf-8-sig" if name == "excel-bom" else "utf-8"
    with open(path, "w", newline="", encoding=enc) as f:
        if name == "contract":
            w = csv.writer(f, lineterminator="\n")
            w.writerow(["frequency_ghz", "noise_density_dbm_hz"]); w.writerows(rows("ghz", 1))
        elif name in ("excel", "excel-bom"):
            w = csv.writer(f)
            w.writerow(["frequency_ghz", "noise_density_dbm_hz"]); w.writerows(rows("ghz", 1))
        elif name == "hash-comments":
            f.write("# exported by a synthetic analyser\n\n# trace 1\n")
            w = csv.writer(f, lineterminator="\n")
            w.writerow(["frequency_ghz", "noise_density_dbm_hz"]); w.writerows(rows("ghz", 1))
        elif name == "quoted":
            w = csv.writer(f, dialect="unix")
            w.writerow(["frequency_ghz", "noise_density_dbm_hz"]); w.writerows(rows("ghz", 1))
        elif name == "units-row":
            w = csv.writer(f)
            w.writerow(["Frequency", "Noise density"]); w.writerow(["GHz", "dBm/Hz"]); w.writerows(rows("ghz", 1))
        elif name == "bang-comments":
            f.write("! synthetic noise analyser export\r\n! trace 1\r\n")
            w = csv.writer(f)
            w.writerow(["frequency_mhz", "noise_density_dbm_hz"]); w.writerows(rows("mhz", 1))
        elif name == "semicolon-decimal-comma":
            w = csv.writer(f, delimiter=";")
            w.writerow(["Frequency (GHz)", "Noise (dBm/Hz)"]); w.writerows(comma(rows("ghz", 1)))
        elif name == "trailing-comma":
            w = csv.writer(f, lineterminator="\n")
            w.writerow(["frequency_hz", "noise_density_dbm_hz", ""]); w.writerows([r + [""] for r in rows("hz", 1)])
        elif name == "preamble":
            w = csv.writer(f)
            w.writerow(["Instrument", "synthetic analyser"]); w.writerow(["Date", "2026-02-02"]); w.writerow(["Points", str(len(values))])
            w.writerow(["frequency_ghz", "noise_density_dbm_hz"]); w.writerows(rows("ghz", 1))
        elif name == "tab":
            w = csv.writer(f, dialect="excel-tab")
            w.writerow(["frequency_ghz", "noise_density_dbm_hz"]); w.writerows(rows("ghz", 1))
        elif name == "freq_mhz":
            w = csv.writer(f, lineterminator="\n")
            w.writerow(["freq_mhz", "noise_density_dbm_hz"]); w.writerows(rows("mhz", 1))
`

// python3 is Debian's Python, which has the csv module (and, with
// python3-jsonschema, jsonschema). Tests that need it skip with the reason
// when it is missing, and fail under CI=true.
func needPython(t *testing.T, module string) string {
	t.Helper()
	const python = "/usr/bin/python3"
	if err := exec.Command(python, "-c", "import "+module).Run(); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("%s (python3 module %s) is required in CI: %v", python, module, err)
		}
		t.Skipf("python3 module %s not available at %s: %v", module, python, err)
	}
	return python
}

// The twelve dialects of issue 16, each with the csv: mapping it needs
// ("" for none) and, without one, what the refusal says to change.
var dialects = []struct {
	name, mapping, refusal string
}{
	{"contract", "", ""},
	{"excel", "", ""},
	{"excel-bom", "", ""},
	{"hash-comments", "", ""},
	{"quoted", "", ""},
	{"units-row", "units_row: true", "add csv: {units_row: true}"},
	{"bang-comments", "", ""},
	{"semicolon-decimal-comma", `decimal: ","`, `add csv: {delimiter: ";", decimal: ","}`},
	{"trailing-comma", "", ""},
	{"preamble", "skip_lines: 3", "add csv: {skip_lines: 3}"},
	{"tab", "", ""},
	{"freq_mhz", "", ""},
}

// TestDialects reads each dialect, written by Python's csv module, and
// finds the trace of the contract's own form, bit for bit; the dialects
// that need a csv: mapping are refused without it, with the mapping that
// would read them in the message.
func TestDialects(t *testing.T) {
	python := needPython(t, "csv")
	rng := rand.New(rand.NewPCG(16, 4180))
	want := &Trace{File: "want.csv", Column: "noise_density_dbm_hz"}
	for k := 0; k < 201; k++ {
		want.FrequencyHz = append(want.FrequencyHz, 10.7e9+float64(k)*10.25e6)
		want.Values = append(want.Values, -137+0.1*rng.NormFloat64())
	}
	// The text of each number as WriteTrace writes it, per unit.
	spec := map[string]any{"values": []string{}, "freqs": map[string][]string{}}
	freqs := map[string][]string{}
	for _, unit := range []string{"hz", "mhz", "ghz"} {
		var b bytes.Buffer
		if err := WriteTrace(&b, want, unit); err != nil {
			t.Fatal(err)
		}
		var vals []string
		for _, ln := range strings.Split(strings.TrimSpace(b.String()), "\n")[1:] {
			f, v, _ := strings.Cut(ln, ",")
			freqs[unit] = append(freqs[unit], f)
			vals = append(vals, v)
		}
		spec["values"] = vals
	}
	spec["freqs"] = freqs
	var names []string
	for _, d := range dialects {
		names = append(names, d.name)
	}
	spec["dialects"] = names
	dir := t.TempDir()
	js, _ := json.Marshal(spec)
	specFile := filepath.Join(dir, "spec.json")
	os.WriteFile(specFile, js, 0o644)
	script := filepath.Join(dir, "write.py")
	os.WriteFile(script, []byte(dialectWriter), 0o644)
	if out, err := exec.Command(python, script, specFile, dir).CombinedOutput(); err != nil {
		t.Fatalf("python: %v\n%s", err, out)
	}
	for _, d := range dialects {
		t.Run(d.name, func(t *testing.T) {
			data, err := os.ReadFile(filepath.Join(dir, d.name+".csv"))
			if err != nil {
				t.Fatal(err)
			}
			var f *CSVFormat
			if d.mapping != "" {
				station := "schema: 1\nid: s\nreceiver_match: 0.03\ndrift_tolerance_db: 0.25\nmethod_tolerance_db: 0.3\nuncertainty: []\ncsv_formats:\n  x: {" + d.mapping + "}\n"
				st, err := ParseStation([]byte(station), "stations/s.yaml")
				if err != nil {
					t.Fatal(err)
				}
				f = st.CSVFormats["x"]
				// Without the mapping it is refused, saying which would read it.
				_, _, err = readTrace(data, d.name+".csv", traceSpec{quantity: "noise-density-dbm-hz", where: "the noise entry in run.yaml"})
				if err == nil || !strings.Contains(err.Error(), d.refusal) {
					t.Errorf("without a mapping: %v; want a refusal saying %q", err, d.refusal)
				} else {
					t.Logf("without a mapping: %v", err)
				}
			}
			got, _, err := readTrace(data, d.name+".csv", traceSpec{quantity: "noise-density-dbm-hz", format: f})
			if err != nil {
				t.Fatalf("%v\n%s", err, clip(string(data)))
			}
			if len(got.FrequencyHz) != len(want.FrequencyHz) {
				t.Fatalf("%d points, want %d", len(got.FrequencyHz), len(want.FrequencyHz))
			}
			for i := range want.FrequencyHz {
				if math.Float64bits(got.FrequencyHz[i]) != math.Float64bits(want.FrequencyHz[i]) || math.Float64bits(got.Values[i]) != math.Float64bits(want.Values[i]) {
					t.Fatalf("point %d: %v %v, want %v %v", i, got.FrequencyHz[i], got.Values[i], want.FrequencyHz[i], want.Values[i])
				}
			}
		})
	}
}

// The header-and-quantity rule and the plausibility ranges refuse with
// file and line.
func TestTraceQuantityRules(t *testing.T) {
	cases := []struct {
		name, data, quantity string
		line                 int
		want                 string
	}{
		{"header names another quantity", "frequency_ghz,noise_relative_kt0_db\n10.7,35.1\n", "noise-density-dbm-hz", 1, `value column "noise_relative_kt0_db" is the contract's name of noise-relative-kt0-db, but the YAML declares noise-density-dbm-hz`},
		{"transmission header in a noise file", "frequency_ghz,s21_db\n10.7,-9\n", "system-noise-figure-db", 1, "is the contract's name of a transmission in dB"},
		{"noise header in a transmission", "frequency_ghz,noise_density_dbm_hz\n10.7,-137\n", "s21", 1, "names it as a transmission"},
		{"density out of range", "frequency_ghz,noise\n10.7,-137\n10.8,35.2\n", "noise-density-dbm-hz", 3, "noise 35.2 at 10.8 GHz is outside -200 to -60 dBm/Hz"},
		{"relative out of range", "frequency_ghz,n\n10.7,-137\n", "noise-relative-kt0-db", 2, "outside -5 to 120 dB"},
		{"figure out of range", "frequency_ghz,n\n10.7,130\n", "system-noise-figure-db", 2, "outside -5 to 120 dB"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, _, err := readTrace([]byte(c.data), "f.csv", traceSpec{quantity: c.quantity})
			p := Problems(err)
			if len(p) != 1 || p[0].File != "f.csv" || p[0].Line != c.line || !strings.Contains(p[0].Message, c.want) {
				t.Errorf("got %v, want f.csv:%d containing %q", err, c.line, c.want)
			}
		})
	}
}
