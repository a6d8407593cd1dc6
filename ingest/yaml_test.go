package ingest

import (
	"strings"
	"testing"
	"time"
)

// The valid documents below follow the examples of
// docs/archive-format.md (the project's contract); their numbers are
// demo data.

const stationYAML = `schema: 1
id: range-a
description: Compact range
receiver_match: 0.03
drift_tolerance_db: 0.25
method_tolerance_db: 0.30
uncertainty:
  - name: Noise receiver calibration
    applies_to: [gt]
    value_db: 0.20
    distribution: normal
    coverage_k: 2
  - name: Quiet-zone amplitude ripple
    applies_to: [gain, gt]
    value_db: 0.10
    distribution: rectangular
`

const referenceYAML = `schema: 1
id: horn-0042
description: Ku-band standard gain horn
gain_kind: realized
calibrated: 2026-02-10
due: 2027-02-10
certificate: LAB-26-0211
coverage_k: 2
table:
  - [10.0, 20.12, 0.30]
  - [10.7, 20.41, 0.30]
  - [11, 20.70, 0.32]
`

const specYAML = `schema: 1
product: KU-PANEL-16
title: Ku-band receive panel, acceptance
decision_rule: guarded
operating_antenna_k: 50
element_phase_rms_tolerance_deg: 8
limits:
  - name: G/T at boresight
    quantity: gt
    beams: {max_theta_deg: 0}
    band_ghz: [10.7, 12.75]
    statistic: min
    limit:
      - [10.7, 2.0]
      - [12.75, 2.6]
  - name: G/T scanned
    quantity: gt
    beams: {min_theta_deg: 1, max_theta_deg: 60}
    band_ghz: [10.7, 12.75]
    statistic: min
    limit: [[10.7, 2.0], [12.75, 2.6]]
    scan_exponent: 1.3
  - name: Gain by id
    quantity: gain
    beams: {ids: [b00, b30]}
    band_ghz: [10.7, 12.75]
    statistic: mean
    limit: [[10.7, 30]]
`

const runYAML = `schema: 1
serial: KP16-00017
product: KU-PANEL-16
station: range-b
reference: horn-0042
started: 2026-11-03T09:15:00Z
operator: AB
ambient_c: 22.8
firmware: 3.4.1
range_reference:
  pre: ref-pre.s2p
  post: ref-post.s2p
  parameter: S21
beams:
  - id: b00
    theta_deg: 0
    phi_deg: 0
    polarization: RHCP
    transmission: b00.s2p
    noise:
      file: b00-noise.csv
      quantity: noise-density-dbm-hz
      noise_bandwidth_hz: 1.0e6
      integration_s: 0.01
    passive_gain_dbi: 30.2
  - id: b30
    theta_deg: 30
    transmission: b30.s2p
    noise:
      - file: b30-noise.csv
        quantity: noise-density-dbm-hz
      - file: b30-nf.csv
        quantity: system-noise-figure-db
elements: elements.csv
notes: notes.md
`

// yamlCase changes one piece of a valid document and expects exactly one
// problem at line containing want.
type yamlCase struct {
	name     string
	old, new string
	line     int
	want     string
}

func mutate(t *testing.T, doc, old, new string) string {
	t.Helper()
	if old == "" {
		return new
	}
	if !strings.Contains(doc, old) {
		t.Fatalf("test document does not contain %q", old)
	}
	return strings.Replace(doc, old, new, 1)
}

func runYAMLCases(t *testing.T, doc, file string, parse func([]byte, string) error, cases []yamlCase) {
	t.Helper()
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			in := mutate(t, doc, c.old, c.new)
			err := parse([]byte(in), file)
			probs := Problems(err)
			if len(probs) != 1 {
				t.Fatalf("got %d problems, want 1: %v", len(probs), err)
			}
			p := probs[0]
			if p.File != file || p.Line != c.line || !strings.Contains(p.Message, c.want) {
				t.Errorf("got %q, want %s:%d containing %q", p.Error(), file, c.line, c.want)
			}
		})
	}
}

// commonCases apply to every kind of document.
var commonCases = []yamlCase{
	{"empty file", "", " \n", 0, "file is empty"},
	// yaml.v3 gives the line of its parser's context, which is not always
	// the faulty line; this case is one where it is.
	{"not yaml", "", "schema: 1\nid: x\n bad: 3\n", 3, "not valid YAML: mapping values are not allowed"},
	{"a list", "", "- schema: 1\n", 1, "found a list"},
	{"only a comment", "", "# nothing yet\n", 0, "holds no YAML document"},
	{"two documents", "", "schema: 1\n---\nschema: 1\n", 2, "a second YAML document starts here"},
	{"a scalar", "", "hello\n", 1, `found "hello"`},
	{"schema 2", "schema: 1\n", "schema: 2\n", 1, "schema 2 is not supported; this version of the tool reads schema 1"},
	{"schema text", "schema: 1\n", "schema: one\n", 1, `schema is "one"; expected schema: 1`},
}

func TestParseStation(t *testing.T) {
	s, err := ParseStation([]byte(stationYAML), "stations/range-a.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if s.ID != "range-a" || s.ReceiverMatch != 0.03 || s.DriftToleranceDB != 0.25 || s.MethodToleranceDB != 0.30 || s.Schema != 1 || s.File != "stations/range-a.yaml" {
		t.Errorf("station %+v", s)
	}
	if len(s.Uncertainty) != 2 {
		t.Fatalf("terms %+v", s.Uncertainty)
	}
	u0, u1 := s.Uncertainty[0], s.Uncertainty[1]
	if u0.Name != "Noise receiver calibration" || u0.Distribution != "normal" || u0.CoverageK != 2 || u0.ValueDB != 0.2 || len(u0.AppliesTo) != 1 || u0.AppliesTo[0] != "gt" || u0.Line != 8 {
		t.Errorf("term 0 %+v", u0)
	}
	if u1.Distribution != "rectangular" || u1.CoverageK != 0 || len(u1.AppliesTo) != 2 || u1.Line != 13 {
		t.Errorf("term 1 %+v", u1)
	}
	parse := func(b []byte, n string) error { _, err := ParseStation(b, n); return err }
	cases := append([]yamlCase{
		{"unknown key", "id: range-a\n", "id: range-a\nlocation: hall 2\n", 3, `unknown key "location"`},
		{"unknown key in term", "    coverage_k: 2\n", "    coverage_k: 2\n    unit: dB\n", 13, `uncertainty term "Noise receiver calibration": unknown key "unit"`},
		{"duplicate key", "id: range-a\n", "id: range-a\nid: range-b\n", 3, `key "id" is repeated (first on line 2)`},
		{"missing id", "id: range-a\n", "", 1, `missing required key "id"`},
		{"null id", "id: range-a\n", "id:\n", 2, `id has no value`},
		{"receiver match 1", "receiver_match: 0.03", "receiver_match: 1.0", 4, "1 is outside [0, 1)"},
		{"receiver match text", "receiver_match: 0.03", "receiver_match: low", 4, `receiver_match is "low"; expected`},
		{"receiver match quoted", "receiver_match: 0.03", `receiver_match: "0.03"`, 4, `receiver_match is "0.03"`},
		{"negative drift", "drift_tolerance_db: 0.25", "drift_tolerance_db: -0.25", 5, "-0.25 is not above 0"},
		{"nan tolerance", "method_tolerance_db: 0.30", "method_tolerance_db: .nan", 6, "method_tolerance_db is \".nan\""},
		{"distribution", "distribution: normal", "distribution: gaussian", 11, `"gaussian" is not allowed; expected normal, rectangular, u-shaped or triangular`},
		{"applies_to", "applies_to: [gt]", "applies_to: [phase]", 9, `applies_to item "phase" is not allowed`},
		{"applies_to scalar", "applies_to: [gt]", "applies_to: gt", 9, `applies_to is "gt"; expected a list`},
		{"coverage 0", "coverage_k: 2", "coverage_k: 0", 12, "0 is not above 0"},
		{"coverage on rectangular", "distribution: rectangular\n", "distribution: rectangular\n    coverage_k: 2\n", 17, "is given for a rectangular term"},
		{"normal without coverage", "    coverage_k: 2\n", "", 8, `missing key "coverage_k" for a normal term`},
		{"negative value", "value_db: 0.20", "value_db: -0.2", 10, "-0.2 is negative"},
		{"repeated term", "name: Quiet-zone amplitude ripple", "name: Noise receiver calibration", 13, `term "Noise receiver calibration" is repeated (first on line 8)`},
		{"term not a mapping", "  - name: Quiet-zone amplitude ripple\n    applies_to: [gain, gt]\n    value_db: 0.10\n    distribution: rectangular\n", "  - ripple\n", 13, "uncertainty term 2: found \"ripple\""},
	}, commonCases...)
	runYAMLCases(t, stationYAML, "stations/range-a.yaml", parse, cases)
}

func TestParseReference(t *testing.T) {
	r, err := ParseReference([]byte(referenceYAML), "references/horn-0042.yaml")
	if err != nil {
		t.Fatal(err)
	}
	cal := time.Date(2026, 2, 10, 0, 0, 0, 0, time.UTC)
	if r.ID != "horn-0042" || r.GainKind != "realized" || !r.Calibrated.Equal(cal) || !r.Due.Equal(cal.AddDate(1, 0, 0)) || r.Certificate != "LAB-26-0211" || r.CoverageK != 2 || r.TableFile != "" {
		t.Errorf("reference %+v", r)
	}
	// GHz to Hz: 1 GHz = 1e9 Hz (SI Brochure, 9th ed., table 7); the text
	// is scaled, so 10.7 must be the float64 nearest 10.7e9 exactly.
	want := []ReferencePoint{{10.0e9, 20.12, 0.30, 10}, {10.7e9, 20.41, 0.30, 11}, {11e9, 20.70, 0.32, 12}}
	if len(r.Table) != 3 {
		t.Fatalf("table %+v", r.Table)
	}
	for i := range want {
		if r.Table[i] != want[i] {
			t.Errorf("row %d = %+v, want %+v", i, r.Table[i], want[i])
		}
	}
	withFile := strings.Replace(referenceYAML, "table:\n  - [10.0, 20.12, 0.30]\n  - [10.7, 20.41, 0.30]\n  - [11, 20.70, 0.32]\n", "table_file: tables/h.csv\n", 1)
	r2, line, err := parseReference([]byte(withFile), "references/horn-0042.yaml")
	if err != nil || r2.TableFile != "tables/h.csv" || line != 9 || r2.Table != nil {
		t.Errorf("table_file: %+v line %d err %v", r2, line, err)
	}
	parse := func(b []byte, n string) error { _, err := ParseReference(b, n); return err }
	cases := append([]yamlCase{
		{"unknown key", "certificate: LAB-26-0211\n", "certificate: LAB-26-0211\nlab: x\n", 8, `unknown key "lab"`},
		{"due before calibrated", "due: 2027-02-10", "due: 2026-01-10", 6, "due 2026-01-10 is before calibrated 2026-02-10"},
		{"date format", "calibrated: 2026-02-10", "calibrated: 10/02/2026", 5, `calibrated is "10/02/2026"; expected the calibration date, YYYY-MM-DD`},
		{"impossible date", "calibrated: 2026-02-10", "calibrated: 2026-02-30", 5, `calibrated is "2026-02-30"`},
		{"gain kind", "gain_kind: realized", "gain_kind: peak", 4, `"peak" is not allowed; expected realized or gain`},
		{"coverage negative", "coverage_k: 2", "coverage_k: -2", 8, "-2 is not above 0"},
		{"table decreasing", "[11, 20.70, 0.32]", "[10.5, 20.70, 0.32]", 12, "frequency 10.5 GHz is not above the previous 10.7 GHz"},
		{"table repeated frequency", "[11, 20.70, 0.32]", "[10.7, 20.70, 0.32]", 12, "is not above the previous"},
		{"table short row", "[10.7, 20.41, 0.30]", "[10.7, 20.41]", 11, "table row 2 is a list of 2; expected a row [frequency_ghz, gain_dbi, expanded_uncertainty_db]"},
		{"table text", "[10.7, 20.41, 0.30]", "[10.7, high, 0.30]", 11, `table row 2: item 2 is "high"`},
		{"table negative uncertainty", "[10.7, 20.41, 0.30]", "[10.7, 20.41, -0.30]", 11, "is negative"},
		{"table empty", "table:\n  - [10.0, 20.12, 0.30]\n  - [10.7, 20.41, 0.30]\n  - [11, 20.70, 0.32]\n", "table: []\n", 9, "table is empty"},
		{"table and file", "coverage_k: 2\n", "coverage_k: 2\ntable_file: t.csv\n", 9, "both table and table_file"},
		{"no table", "table:\n  - [10.0, 20.12, 0.30]\n  - [10.7, 20.41, 0.30]\n  - [11, 20.70, 0.32]\n", "", 1, `missing key "table" or "table_file"`},
	}, commonCases...)
	runYAMLCases(t, referenceYAML, "references/horn-0042.yaml", parse, cases)
}

func TestParseSpec(t *testing.T) {
	s, err := ParseSpec([]byte(specYAML), "specs/KU-PANEL-16.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if s.Product != "KU-PANEL-16" || s.DecisionRule != "guarded" || s.OperatingAntennaK == nil || *s.OperatingAntennaK != 50 ||
		s.ElementPhaseRMSToleranceDeg == nil || *s.ElementPhaseRMSToleranceDeg != 8 || len(s.Limits) != 3 {
		t.Fatalf("spec %+v", s)
	}
	l0, l1, l2 := s.Limits[0], s.Limits[1], s.Limits[2]
	if l0.Name != "G/T at boresight" || l0.Quantity != "gt" || l0.Statistic != "min" || l0.Beams.MinThetaDeg != nil || l0.Beams.MaxThetaDeg == nil || *l0.Beams.MaxThetaDeg != 0 ||
		l0.BandHz != [2]float64{10.7e9, 12.75e9} || len(l0.Points) != 2 || l0.Points[1] != (LimitPoint{12.75e9, 2.6}) || l0.ScanExponent != nil || l0.Line != 8 {
		t.Errorf("limit 0 %+v", l0)
	}
	if *l1.Beams.MinThetaDeg != 1 || *l1.Beams.MaxThetaDeg != 60 || l1.ScanExponent == nil || *l1.ScanExponent != 1.3 || len(l1.Points) != 2 {
		t.Errorf("limit 1 %+v", l1)
	}
	if l2.Quantity != "gain" || l2.Statistic != "mean" || len(l2.Beams.IDs) != 2 || l2.Beams.IDs[1] != "b30" || l2.Points[0] != (LimitPoint{10.7e9, 30}) {
		t.Errorf("limit 2 %+v", l2)
	}
	noOptional := strings.Replace(strings.Replace(specYAML, "operating_antenna_k: 50\n", "", 1), "element_phase_rms_tolerance_deg: 8\n", "", 1)
	if s2, err := ParseSpec([]byte(noOptional), "s.yaml"); err != nil || s2.OperatingAntennaK != nil || s2.ElementPhaseRMSToleranceDeg != nil {
		t.Errorf("optional fields: %+v %v", s2, err)
	}
	parse := func(b []byte, n string) error { _, err := ParseSpec(b, n); return err }
	cases := append([]yamlCase{
		{"decision rule", "decision_rule: guarded", "decision_rule: strict", 4, `"strict" is not allowed; expected simple or guarded`},
		{"operating k", "operating_antenna_k: 50", "operating_antenna_k: 0", 5, "0 is not above 0"},
		{"phase tolerance", "element_phase_rms_tolerance_deg: 8", "element_phase_rms_tolerance_deg: -1", 6, "-1 is not above 0"},
		{"statistic", "statistic: min\n    limit:\n", "statistic: max\n    limit:\n", 12, `"max" is not allowed; expected min or mean`},
		{"quantity", "quantity: gt\n    beams: {max", "quantity: nf\n    beams: {max", 9, `"nf" is not allowed; expected gt (dB/K) or gain (dBi)`},
		{"band reversed", "band_ghz: [10.7, 12.75]\n    statistic: min\n    limit:\n", "band_ghz: [12.75, 10.7]\n    statistic: min\n    limit:\n", 11, "[12.75, 10.7] does not have 0 < low < high"},
		{"band equal", "band_ghz: [10.7, 12.75]\n    statistic: min\n    limit:\n", "band_ghz: [10.7, 10.7]\n    statistic: min\n    limit:\n", 11, "does not have 0 < low < high"},
		{"band one value", "band_ghz: [10.7, 12.75]\n    statistic: min\n    limit:\n", "band_ghz: [10.7]\n    statistic: min\n    limit:\n", 11, "band_ghz is a list of 1"},
		{"limit decreasing", "      - [12.75, 2.6]", "      - [10.2, 2.6]", 15, "limit point 2: frequency 10.2 GHz is not above the previous 10.7 GHz"},
		{"limit text", "      - [12.75, 2.6]", "      - [12.75, low]", 15, `limit point 2: item 2 is "low"`},
		{"theta 90", "max_theta_deg: 60", "max_theta_deg: 90", 18, "90 is outside [0, 90)"},
		{"theta negative", "{max_theta_deg: 0}", "{max_theta_deg: -1}", 10, "-1 is outside [0, 90)"},
		{"theta order", "{min_theta_deg: 1, max_theta_deg: 60}", "{min_theta_deg: 40, max_theta_deg: 20}", 18, "20 is below min_theta_deg 40"},
		{"empty selector", "{max_theta_deg: 0}", "{}", 10, "empty selector"},
		{"both selectors", "{max_theta_deg: 0}", "{max_theta_deg: 0, ids: [b00]}", 10, "both ids and a theta range"},
		{"selector key", "{max_theta_deg: 0}", "{max_theta: 0}", 10, `unknown key "max_theta"`},
		{"unknown key in limit", "    scan_exponent: 1.3\n", "    scan_exponent: 1.3\n    unit: dB\n", 23, `limit "G/T scanned": unknown key "unit"`},
		{"scan exponent negative", "scan_exponent: 1.3", "scan_exponent: -1", 22, "-1 is negative"},
		{"repeated limit", "name: Gain by id", "name: G/T scanned", 23, `limit "G/T scanned" is repeated (first on line 16)`},
		{"no limits", "", specYAML[:strings.Index(specYAML, "limits:")] + "limits: []\n", 7, "limits is an empty list"},
		{"missing band", "    band_ghz: [10.7, 12.75]\n    statistic: mean\n", "    statistic: mean\n", 23, `limit "Gain by id": missing required key "band_ghz"`},
	}, commonCases...)
	runYAMLCases(t, specYAML, "specs/KU-PANEL-16.yaml", parse, cases)
}

func TestParseRun(t *testing.T) {
	r, err := ParseRun([]byte(runYAML), "units/KP16-00017/run.yaml")
	if err != nil {
		t.Fatal(err)
	}
	started := time.Date(2026, 11, 3, 9, 15, 0, 0, time.UTC)
	if r.Serial != "KP16-00017" || r.Product != "KU-PANEL-16" || r.Station != "range-b" || r.Reference != "horn-0042" || !r.Started.Equal(started) ||
		r.Operator != "AB" || r.AmbientC != 22.8 || r.Firmware != "3.4.1" || r.RangePre != "ref-pre.s2p" || r.RangePost != "ref-post.s2p" ||
		r.RangeParameter != "S21" || r.Elements != "elements.csv" || r.Notes != "notes.md" || r.File != "units/KP16-00017/run.yaml" {
		t.Errorf("run %+v", r)
	}
	if len(r.Beams) != 2 {
		t.Fatalf("beams %+v", r.Beams)
	}
	b0, b1 := r.Beams[0], r.Beams[1]
	if b0.ID != "b00" || b0.ThetaDeg != 0 || b0.Polarization != "RHCP" || b0.Transmission != "b00.s2p" || b0.PassiveGainDBi == nil || *b0.PassiveGainDBi != 30.2 || b0.Line != 15 || len(b0.Noise) != 1 {
		t.Errorf("beam 0 %+v", b0)
	}
	n0 := b0.Noise[0]
	if n0.File != "b00-noise.csv" || n0.Quantity != "noise-density-dbm-hz" || n0.NoiseBandwidthHz == nil || *n0.NoiseBandwidthHz != 1e6 || n0.IntegrationS == nil || *n0.IntegrationS != 0.01 || n0.Line != 21 {
		t.Errorf("noise 0 %+v", n0)
	}
	if b1.ThetaDeg != 30 || b1.PhiDeg != 0 || b1.PassiveGainDBi != nil || len(b1.Noise) != 2 || b1.Noise[1].Quantity != "system-noise-figure-db" || b1.Noise[1].File != "b30-nf.csv" || b1.Noise[0].NoiseBandwidthHz != nil {
		t.Errorf("beam 1 %+v", b1)
	}
	wantLines := map[string]int{
		"serial": 2, "product": 3, "station": 4, "reference": 5, "started": 6,
		"range_reference.pre": 11, "range_reference.post": 12,
		"beams[0].transmission": 19, "beams[0].noise[0].file": 21,
		"beams[1].transmission": 28, "beams[1].noise[0].file": 30, "beams[1].noise[1].file": 32,
		"elements": 34, "notes": 35,
	}
	for k, v := range wantLines {
		if r.KeyLines[k] != v {
			t.Errorf("KeyLines[%q] = %d, want %d", k, r.KeyLines[k], v)
		}
	}
	// A serial that looks like a number stays text.
	if r2, err := ParseRun([]byte(strings.Replace(runYAML, "serial: KP16-00017", "serial: 00017", 1)), "run.yaml"); err != nil || r2.Serial != "00017" {
		t.Errorf("numeric serial: %v %v", r2, err)
	}
	// Other parameter, offset in started.
	if r3, err := ParseRun([]byte(strings.Replace(strings.Replace(runYAML, "parameter: S21", "parameter: S12", 1), "09:15:00Z", "10:15:00+01:00", 1)), "run.yaml"); err != nil || r3.RangeParameter != "S12" || !r3.Started.Equal(started) {
		t.Errorf("parameter/started: %+v %v", r3, err)
	}

	// What ParseRun cannot know (a beam's keys may come from the spec's
	// beam_plan) is found when the beams are resolved against the spec.
	parse := func(b []byte, n string) error {
		r, err := ParseRun(b, n)
		if err != nil {
			return err
		}
		resolveBeams(t.TempDir(), &Spec{File: "specs/KU-PANEL-16.yaml"}, r)
		var l ProblemList
		for _, kp := range r.resolved {
			l = append(l, kp.p)
		}
		if len(l) == 0 {
			return nil
		}
		return l
	}
	cases := append([]yamlCase{
		{"unknown key", "operator: AB\n", "operator: AB\noperater: AB\n", 8, `run: unknown key "operater"; expected one of ambient_c, beams,`},
		{"unknown beam key", "    passive_gain_dbi: 30.2\n", "    passive_gain_dbi: 30.2\n    gain: 1\n", 26, `beam "b00": unknown key "gain"`},
		{"unknown noise key", "      integration_s: 0.01\n", "      integration_s: 0.01\n      rbw_hz: 1\n", 25, `beam "b00" noise 1: unknown key "rbw_hz"`},
		{"unknown range key", "  parameter: S21\n", "  parameter: S21\n  cable: x\n", 14, `range_reference: unknown key "cable"`},
		{"negative bandwidth", "noise_bandwidth_hz: 1.0e6", "noise_bandwidth_hz: -1.0e6", 23, "noise_bandwidth_hz -1.0e6 is not above 0"},
		{"zero integration", "integration_s: 0.01", "integration_s: 0", 24, "integration_s 0 is not above 0"},
		{"theta 90", "theta_deg: 30", "theta_deg: 90", 27, "theta_deg 90 is outside [0, 90)"},
		{"theta negative", "theta_deg: 0", "theta_deg: -5", 16, "-5 is outside [0, 90)"},
		{"theta text", "theta_deg: 0", "theta_deg: zero", 16, `theta_deg is "zero"; expected the scan angle`},
		{"duplicate beam", "  - id: b30", "  - id: b00", 26, `beam id "b00" is repeated (first on line 15)`},
		{"noise quantity", "quantity: noise-density-dbm-hz\n      noise_bandwidth_hz", "quantity: noise-temperature-k\n      noise_bandwidth_hz", 22, `"noise-temperature-k" is not allowed; expected noise-density-dbm-hz, noise-relative-kt0-db or system-noise-figure-db`},
		{"noise quantity twice", "quantity: system-noise-figure-db", "quantity: noise-density-dbm-hz", 32, "noise quantity noise-density-dbm-hz is repeated (first on line 30)"},
		{"noise scalar", "    noise:\n      file: b00-noise.csv\n      quantity: noise-density-dbm-hz\n      noise_bandwidth_hz: 1.0e6\n      integration_s: 0.01\n", "    noise: b00-noise.csv\n", 20, `noise is "b00-noise.csv"; expected a mapping {file, quantity`},
		{"noise missing file", "      - file: b30-nf.csv\n        quantity", "      - quantity", 32, `beam "b30" noise 2: missing required key "file"`},
		{"started not rfc3339", "started: 2026-11-03T09:15:00Z", "started: 2026-11-03 09:15", 6, `started is "2026-11-03 09:15"; expected the start time in RFC 3339`},
		{"started date only", "started: 2026-11-03T09:15:00Z", "started: 2026-11-03", 6, `started is "2026-11-03"`},
		{"ambient kelvin", "ambient_c: 22.8", "ambient_c: 295.9", 8, "ambient_c 295.9 is outside -40..70"},
		{"ambient text", "ambient_c: 22.8", "ambient_c: warm", 8, `ambient_c is "warm"`},
		{"parameter reflection", "parameter: S21", "parameter: S11", 13, `parameter "S11" is not a transmission parameter`},
		{"parameter garbage", "parameter: S21", "parameter: gain", 13, `parameter "gain" is not a transmission parameter`},
		{"missing transmission", "    transmission: b30.s2p\n", "", 26, `beam b30 has no transmission; expected a Touchstone or CSV file`},
		{"missing theta", "    theta_deg: 30\n", "", 26, `beam b30 has no theta_deg; expected the scan angle`},
		{"missing pre", "  pre: ref-pre.s2p\n", "", 11, `range_reference: missing required key "pre"`},
		{"missing serial", "serial: KP16-00017\n", "", 1, `run: missing required key "serial"`},
		{"empty serial", "serial: KP16-00017", `serial: "  "`, 2, "serial is empty"},
		{"missing beams", "beams:\n  - id: b00\n    theta_deg: 0\n    phi_deg: 0\n    polarization: RHCP\n    transmission: b00.s2p\n    noise:\n      file: b00-noise.csv\n      quantity: noise-density-dbm-hz\n      noise_bandwidth_hz: 1.0e6\n      integration_s: 0.01\n    passive_gain_dbi: 30.2\n  - id: b30\n    theta_deg: 30\n    transmission: b30.s2p\n    noise:\n      - file: b30-noise.csv\n        quantity: noise-density-dbm-hz\n      - file: b30-nf.csv\n        quantity: system-noise-figure-db\n", "", 1, `run: no beams, and specs/KU-PANEL-16.yaml has no beam_plan`},
		{"beams a mapping", "", runYAML[:strings.Index(runYAML, "beams:")] + "beams: {id: b00}\n", 14, "beams is a mapping; expected a list"},
		{"range reference text", "range_reference:\n  pre: ref-pre.s2p\n  post: ref-post.s2p\n  parameter: S21\n", "range_reference: ref-pre.s2p\n", 10, `range_reference is "ref-pre.s2p"; expected a mapping`},
		{"passive gain text", "passive_gain_dbi: 30.2", "passive_gain_dbi: n/a", 25, `passive_gain_dbi is "n/a"`},
	}, commonCases...)
	runYAMLCases(t, runYAML, "units/KP16-00017/run.yaml", parse, cases)

	// Anchors and aliases are YAML; they are followed.
	aliased := strings.Replace(runYAML, "    noise:\n      - file: b30-noise.csv", "    noise:\n      - &n file: b30-noise.csv", 1)
	if _, err := ParseRun([]byte(aliased), "run.yaml"); err != nil {
		t.Errorf("anchor refused: %v", err)
	}
	// Several mistakes are all reported, each at its line.
	many := strings.Replace(strings.Replace(runYAML, "ambient_c: 22.8", "ambient_c: 99", 1), "theta_deg: 30", "theta_deg: 95", 1)
	probs := Problems(parse([]byte(many), "run.yaml"))
	if len(probs) != 2 || probs[0].Line != 8 || probs[1].Line != 27 {
		t.Errorf("two mistakes gave %v", probs)
	}
}

func FuzzParseRun(f *testing.F) {
	f.Add([]byte(runYAML))
	f.Add([]byte(strings.Replace(runYAML, "theta_deg: 30", "theta_deg: *a", 1)))
	f.Add([]byte("schema: 1\nbeams: [{id: a, noise: [{file: x}]}]\n"))
	f.Add([]byte("a: &a [*a]\n"))
	f.Add([]byte("- - - -\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		r, err := ParseRun(data, "run.yaml")
		if err != nil {
			for _, p := range Problems(err) {
				if p.File != "run.yaml" || p.Message == "" {
					t.Fatalf("problem %+v does not name the file", p)
				}
			}
			return
		}
		if r.Schema != SchemaVersion || len(r.Beams) == 0 || r.Serial == "" || r.RangePre == "" {
			t.Fatalf("accepted an incomplete run: %+v", r)
		}
		ids := map[string]bool{}
		for _, b := range r.Beams {
			if ids[b.ID] || b.ThetaDeg < 0 || b.ThetaDeg >= 90 || b.Transmission == "" || len(b.Noise) == 0 {
				t.Fatalf("accepted beam %+v", b)
			}
			ids[b.ID] = true
		}
	})
}

// FuzzParseDocs feeds the same bytes to the station, reference and spec
// parsers.
func FuzzParseDocs(f *testing.F) {
	f.Add([]byte(stationYAML))
	f.Add([]byte(referenceYAML))
	f.Add([]byte(specYAML))
	f.Add([]byte("schema: 1\ntable: [[1e999, 1, 1]]\n"))
	f.Add([]byte("limits: [{beams: {ids: [a, a]}, band_ghz: [.inf, 1]}]\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		if s, err := ParseStation(data, "s.yaml"); err == nil {
			if s.ReceiverMatch < 0 || s.ReceiverMatch >= 1 || !(s.DriftToleranceDB > 0) {
				t.Fatalf("accepted station %+v", s)
			}
		}
		if r, err := ParseReference(data, "r.yaml"); err == nil {
			for i := 1; i < len(r.Table); i++ {
				if r.Table[i].FrequencyHz <= r.Table[i-1].FrequencyHz {
					t.Fatalf("accepted a non-increasing table")
				}
			}
			if r.Due.Before(r.Calibrated) {
				t.Fatalf("accepted due before calibrated")
			}
		}
		if s, err := ParseSpec(data, "p.yaml"); err == nil {
			for _, l := range s.Limits {
				if !(l.BandHz[0] > 0 && l.BandHz[0] < l.BandHz[1]) || len(l.Points) == 0 {
					t.Fatalf("accepted limit %+v", l)
				}
			}
		}
	})
}
