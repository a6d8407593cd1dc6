package ingest

import (
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"gopkg.in/yaml.v3"
)

// jsonschemaCheck validates each instance against its kind's schema with
// python3-jsonschema (Draft 2020-12) and prints one line per instance:
// "ok" or the first error.
const jsonschemaCheck = `
import json, sys
from jsonschema import Draft202012Validator
job = json.load(open(sys.argv[1]))
validators = {k: Draft202012Validator(s) for k, s in job["schemas"].items()}
for kind in job["schemas"]:
    Draft202012Validator.check_schema(job["schemas"][kind])
for item in job["instances"]:
    errs = sorted(validators[item["kind"]].iter_errors(item["doc"]), key=lambda e: list(e.path))
    print("ok" if not errs else "error: " + errs[0].message.replace("\n", " "))
`

type schemaInstance struct {
	Kind string `json:"kind"`
	Doc  any    `json:"doc"`
	name string
}

// yamlToJSON is a YAML document as the JSON value a YAML editor checks
// (yaml.v3 keeps timestamps as text).
func yamlToJSON(t *testing.T, data []byte) any {
	t.Helper()
	var doc yaml.Node
	if err := yaml.Unmarshal(data, &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Content) == 0 {
		return nil
	}
	return nodeJSON(doc.Content[0])
}

// nodeJSON is a YAML node as JSON by the YAML 1.2 core schema: numbers,
// booleans and null by their tags, every other scalar (a date too) text.
func nodeJSON(n *yaml.Node) any {
	n = resolve(n)
	switch n.Kind {
	case yaml.MappingNode:
		m := map[string]any{}
		for i := 0; i+1 < len(n.Content); i += 2 {
			m[n.Content[i].Value] = nodeJSON(n.Content[i+1])
		}
		return m
	case yaml.SequenceNode:
		l := []any{}
		for _, c := range n.Content {
			l = append(l, nodeJSON(c))
		}
		return l
	}
	switch n.Tag {
	case "!!int", "!!float", "!!bool":
		var v any
		if n.Decode(&v) == nil {
			return v
		}
	case "!!null":
		return nil
	}
	return n.Value
}

func runJSONSchema(t *testing.T, items []schemaInstance) []string {
	t.Helper()
	python := needPython(t, "jsonschema")
	job := map[string]any{"schemas": map[string]json.RawMessage{}, "instances": items}
	for _, k := range SchemaKinds {
		s, err := Schema(k)
		if err != nil {
			t.Fatal(err)
		}
		job["schemas"].(map[string]json.RawMessage)[k] = s
	}
	dir := t.TempDir()
	js, err := json.Marshal(job)
	if err != nil {
		t.Fatal(err)
	}
	os.WriteFile(filepath.Join(dir, "job.json"), js, 0o644)
	os.WriteFile(filepath.Join(dir, "check.py"), []byte(jsonschemaCheck), 0o644)
	out, err := exec.Command(python, filepath.Join(dir, "check.py"), filepath.Join(dir, "job.json")).CombinedOutput()
	if err != nil {
		t.Fatalf("jsonschema: %v\n%s", err, out)
	}
	lines := strings.Split(strings.TrimSpace(string(out)), "\n")
	if len(lines) != len(items) {
		t.Fatalf("jsonschema printed %d lines for %d documents:\n%s", len(lines), len(items), out)
	}
	return lines
}

// kindOfPath is the YAML kind of an archive file by its place.
func kindOfPath(rel string) string {
	switch {
	case filepath.Base(rel) == "run.yaml":
		return "run"
	case rel == "lab.yaml":
		return "lab"
	case strings.HasPrefix(rel, "stations/"):
		return "station"
	case strings.HasPrefix(rel, "references/") && strings.HasSuffix(rel, ".yaml"):
		return "reference"
	case strings.HasPrefix(rel, "specs/"):
		return "spec"
	case strings.HasPrefix(rel, "approvals/"):
		return "approval"
	}
	return ""
}

// TestSchemasValidateArchives: every YAML of sample-archive and
// testdata/good validates against its kind's schema.
func TestSchemasValidateArchives(t *testing.T) {
	var items []schemaInstance
	for _, root := range []string{"../sample-archive", "../testdata/good"} {
		filepath.WalkDir(root, func(p string, d os.DirEntry, err error) error {
			if err != nil || d.IsDir() || !strings.HasSuffix(p, ".yaml") {
				return err
			}
			rel, _ := filepath.Rel(root, p)
			rel = filepath.ToSlash(rel)
			if strings.HasPrefix(rel, ".") {
				return nil
			}
			kind := kindOfPath(rel)
			if kind == "" {
				t.Errorf("%s: no kind", p)
				return nil
			}
			data, _ := os.ReadFile(p)
			items = append(items, schemaInstance{Kind: kind, Doc: yamlToJSON(t, data), name: p})
			return nil
		})
	}
	if len(items) < 15 {
		t.Fatalf("only %d documents", len(items))
	}
	for i, res := range runJSONSchema(t, items) {
		if res != "ok" {
			t.Errorf("%s (%s): %s", items[i].name, items[i].Kind, res)
		}
	}
}

// TestSchemasAgreeWithReader: on good documents and on broken ones, the
// strict reader and the schema say the same (valid or not).
func TestSchemasAgreeWithReader(t *testing.T) {
	read := func(kind string, data []byte) error {
		var err error
		switch kind {
		case "run":
			_, err = ParseRun(data, "run.yaml")
		case "station":
			_, err = ParseStation(data, "stations/s.yaml")
		case "reference":
			_, err = ParseReference(data, "references/r.yaml")
		case "spec":
			_, err = ParseSpec(data, "specs/p.yaml")
		case "lab":
			_, err = ParseLab(data, "lab.yaml")
		case "approval":
			_, err = ParseApproval(data, "approvals/S-1/a.yaml")
		}
		return err
	}
	base := map[string]string{}
	for kind, p := range map[string]string{
		"run": "../testdata/good/units/KT-0002/run.yaml", "station": "../sample-archive/stations/chamber-2.yaml",
		"reference": "../testdata/good/references/horn-02.yaml", "spec": "../sample-archive/specs/QK-256.yaml",
		"lab": "../sample-archive/lab.yaml",
	} {
		data, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		base[kind] = string(data)
	}
	base["approval"] = "schema: 1\nserial: S-1\ninputs_sha256: " + strings.Repeat("ab", 32) + "\nverdict: pass\napproved_by: A. Example\ndate: 2026-11-04T10:00:00Z\n"
	cases := []struct{ kind, name, old, new string }{
		{"run", "as it is", "", ""},
		{"run", "unknown key", "operator: AB", "operator: AB\nhumidity_pct: 40"},
		{"run", "theta out of range", "theta_deg: 20", "theta_deg: 95"},
		{"run", "theta typo", "theta_deg: 20", "theta: 20"},
		{"run", "ambient kelvin", "ambient_c: 21.0", "ambient_c: 294.2"},
		{"run", "bad quantity", "quantity: noise-relative-kt0-db", "quantity: noise-k"},
		{"run", "serial missing", "serial: KT-0002\n", ""},
		{"run", "started a date", "started: 2026-11-04T08:00:00Z", "started: 2026-11-04"},
		{"run", "parameter S11", "parameter: S21", "parameter: S11"},
		{"run", "empty beams", "beams:\n", "beams: []\nx:\n"},
		{"run", "csv by name", "quantity: noise-relative-kt0-db", "quantity: noise-relative-kt0-db\n      csv: nfa-export"},
		{"run", "csv bad delimiter", "quantity: noise-relative-kt0-db", "quantity: noise-relative-kt0-db\n      csv: {delimiter: \"|\"}"},
		{"run", "csv column zero", "quantity: noise-relative-kt0-db", "quantity: noise-relative-kt0-db\n      csv: {value_column: 0}"},
		{"run", "transmission with csv", "transmission: b00.csv", "transmission: {file: b00.csv, csv: {decimal: \",\"}}"},
		{"run", "transmission mapping without file", "transmission: b00.csv", "transmission: {csv: {decimal: \",\"}}"},
		{"station", "as it is", "", ""},
		{"station", "match 1", "receiver_match: 0.03", "receiver_match: 1"},
		{"station", "normal without k", "    coverage_k: 2\n  - name: Quiet", "  - name: Quiet"},
		{"station", "rectangular with k", "distribution: rectangular", "distribution: rectangular\n    coverage_k: 2"},
		{"station", "csv format bad key", "decimal: \",\"", "decimal: \",\"\n    sep: x"},
		{"station", "csv skip negative", "skip_lines: 3", "skip_lines: -1"},
		{"reference", "as it is", "", ""},
		{"reference", "gain kind", "gain_kind: gain", "gain_kind: directivity"},
		{"reference", "no table", "table_file: tables/horn-02.csv", "x: 1"},
		{"reference", "due typo", "due:", "due_date:"},
		{"spec", "as it is", "", ""},
		{"spec", "decision rule", "decision_rule: guarded", "decision_rule: strict"},
		{"spec", "selector both", "beams: {max_theta_deg: 0}", "beams: {max_theta_deg: 0, ids: [b00]}"},
		{"spec", "selector empty", "beams: {max_theta_deg: 0}", "beams: {}"},
		{"spec", "plan beam without theta", "- {id: b00, theta_deg: 0, phi_deg: 0, polarization: H}", "- {id: b00, phi_deg: 0, polarization: H}"},
		{"spec", "plan unknown key", "  files:", "  extra: 1\n  files:"},
		{"lab", "as it is", "", ""},
		{"lab", "bad prefix", "report_prefix: QDA-GT", "report_prefix: QDA GT"},
		{"approval", "as it is", "", ""},
		{"approval", "short hash", "inputs_sha256: ab", "inputs_sha256: zz"},
		{"approval", "verdict incomplete", "verdict: pass", "verdict: incomplete"},
	}
	var items []schemaInstance
	var readerOK []bool
	for _, c := range cases {
		doc := base[c.kind]
		if c.old != "" {
			if !strings.Contains(doc, c.old) {
				t.Fatalf("%s %s: %q not in the document", c.kind, c.name, c.old)
			}
			doc = strings.Replace(doc, c.old, c.new, 1)
		}
		err := read(c.kind, []byte(doc))
		readerOK = append(readerOK, err == nil)
		items = append(items, schemaInstance{Kind: c.kind, Doc: yamlToJSON(t, []byte(doc)), name: c.kind + " " + c.name})
	}
	for i, res := range runJSONSchema(t, items) {
		if (res == "ok") != readerOK[i] {
			t.Errorf("%s: reader ok %v, schema %s", items[i].name, readerOK[i], res)
		}
	}
}
