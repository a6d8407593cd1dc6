package ingest

import (
	"bytes"
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"unicode/utf8"

	"gtpack.example/gtpack/ingest/touchstone"
)

var touchstoneExt = regexp.MustCompile(`(?i)\.(s\d+p|ts)$`)

// Inspect reads one input file the way the tool does and returns a text
// description and a JSON-ready value of what it found. The kind is told by
// the file: .sNp/.ts is Touchstone (JSON: NetworkJSON); .csv is elements
// (header row,col,...), a reference table (frequency_ghz,gain_dbi,...) or a
// trace; a .yaml is a run when named run.yaml, else a station, reference or
// spec by its folder (stations/, references/, specs/); .md is notes. A reference's
// table_file is read relative to the reference, inside the folder above
// references/ (the archive root). A refused file is the error, with its
// file and line. The limits of a build hold (limits.go): a file larger
// than its size limit is refused before it is read.
func Inspect(path string) (string, any, error) {
	if _, err := os.Stat(path); err != nil {
		return "", nil, err
	}
	data, why := readBounded(path, filepath.ToSlash(path))
	if why != "" {
		return "", nil, Problemf(path, 0, "file %s", why)
	}
	base := filepath.Base(path)
	folder := filepath.Base(filepath.Dir(path))
	lower := strings.ToLower(base)
	switch {
	case touchstoneExt.MatchString(base):
		n, err := ReadTouchstone(bytes.NewReader(data), path)
		if err != nil {
			return "", nil, err
		}
		return describeNetwork(path, n), NetworkJSON(n), nil
	case strings.HasSuffix(lower, ".csv"):
		return inspectCSV(path, data)
	case strings.HasSuffix(lower, ".md"):
		if !utf8.Valid(data) {
			return "", nil, Problemf(path, 0, "notes are not UTF-8 text; expected a Markdown file")
		}
		text := strings.TrimPrefix(string(data), "\ufeff")
		return fmt.Sprintf("%s: notes, %d bytes of Markdown\n%s", path, len(text), text), map[string]any{"kind": "notes", "markdown": text}, nil
	case strings.HasSuffix(lower, ".yaml") || strings.HasSuffix(lower, ".yml"):
		switch {
		case base == "run.yaml":
			r, err := ParseRun(data, path)
			if err != nil {
				return "", nil, err
			}
			// The beams as a build resolves them: against the beam_plan of
			// the spec in the archive around the run, with the files
			// found in the run's folder.
			specFile := ""
			if root := archiveRootOf(filepath.Dir(path)); root != "" {
				sp := filepath.Join(root, "specs", r.Product+".yaml")
				if sdata, why := readBounded(sp, filepath.ToSlash(sp)); why == "" {
					if spec, err := ParseSpec(sdata, sp); err == nil {
						specFile = sp
						resolveBeams("", spec, r)
					}
				}
			}
			if specFile == "" {
				resolveBeams("", nil, r)
			}
			return describeRun(r, specFile), runJSON(r), nil
		case folder == "stations":
			s, err := ParseStation(data, path)
			if err != nil {
				return "", nil, err
			}
			return describeStation(s), stationJSON(s), nil
		case folder == "references":
			r, tableLine, err := parseReference(data, path)
			if err != nil {
				return "", nil, err
			}
			if r.TableFile != "" {
				root := filepath.Dir(filepath.Dir(path))
				fsys := newArchiveFS(root)
				rel := joinRel("references", r.TableFile)
				tdata, _, p := fsys.read(rel, path, tableLine)
				if p != nil {
					return "", nil, p
				}
				table, err := readReferenceTable(bytes.NewReader(tdata), filepath.Join(root, filepath.FromSlash(rel)))
				if err != nil {
					return "", nil, err
				}
				r.Table = table
			}
			return describeReference(r), referenceJSON(r), nil
		case folder == "specs":
			s, err := ParseSpec(data, path)
			if err != nil {
				return "", nil, err
			}
			return describeSpec(s), specJSON(s), nil
		}
		return "", nil, Problemf(path, 0, "cannot tell what this YAML file is; expected run.yaml or a file in a stations/, references/ or specs/ folder")
	}
	return "", nil, Problemf(path, 0, "unknown kind of input; expected a Touchstone file (.sNp, .ts), a CSV file (.csv) or a YAML file of the archive")
}

func inspectCSV(path string, data []byte) (string, any, error) {
	c := newCSVReader(data, path, nil)
	if ln := c.peekLine(); ln != nil {
		c.delim = detectDelimiter(ln)
	}
	header, _, err := c.next()
	if err == nil && len(header) > 0 {
		switch strings.ToLower(header[0]) {
		case "row":
			els, err := ReadElements(bytes.NewReader(data), path)
			if err != nil {
				return "", nil, err
			}
			return describeElements(path, els), elementsJSON(els), nil
		case "frequency_ghz":
			if len(header) == 3 && strings.EqualFold(header[1], "gain_dbi") {
				table, err := readReferenceTable(bytes.NewReader(data), path)
				if err != nil {
					return "", nil, err
				}
				var b strings.Builder
				fmt.Fprintf(&b, "%s: reference gain table, %d points\n", path, len(table))
				writeTable(&b, table)
				return b.String(), map[string]any{"kind": "reference-table", "table": tableJSON(table)}, nil
			}
		}
	}
	t, err := ReadTrace(bytes.NewReader(data), path)
	if err != nil {
		return "", nil, err
	}
	var b strings.Builder
	fmt.Fprintf(&b, "%s: trace CSV, value column %q, %d points from %s to %s\n", path, t.Column, len(t.FrequencyHz), ghzText(t.FrequencyHz[0]), ghzText(t.FrequencyHz[len(t.FrequencyHz)-1]))
	fmt.Fprintf(&b, "%14s  %s\n", "frequency_ghz", t.Column)
	for i, f := range t.FrequencyHz {
		fmt.Fprintf(&b, "%14.9f  %.10g\n", f/1e9, t.Values[i])
	}
	return b.String(), traceJSON{Kind: "trace", File: t.File, Column: t.Column, FrequencyHz: t.FrequencyHz, Values: t.Values}, nil
}

func paren(s string) string {
	if s == "" {
		return ""
	}
	return " (" + s + ")"
}

func ghzText(hz float64) string {
	return fmt.Sprintf("%.6g GHz", hz/1e9)
}

func describeNetwork(path string, n *touchstone.Network) string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s: Touchstone version %d, %d port(s), %s parameters in %s, %d frequencies", path, n.Version, n.Ports, n.Parameter, n.Format, len(n.FrequencyHz))
	if len(n.FrequencyHz) > 0 {
		fmt.Fprintf(&b, " from %s to %s", ghzText(n.FrequencyHz[0]), ghzText(n.FrequencyHz[len(n.FrequencyHz)-1]))
	}
	b.WriteString("\n")
	fmt.Fprintf(&b, "reference impedance (ohm): %v\n", n.Z0)
	if len(n.Noise) > 0 {
		fmt.Fprintf(&b, "noise parameters: %d frequencies\n", len(n.Noise))
	}
	if n.Ports >= 2 {
		b.WriteString("as a transmission file: S21 in dB, |S22|\n")
		for k, f := range n.FrequencyHz {
			s21, s22 := cmplx.Abs(n.At(k, 1, 0)), cmplx.Abs(n.At(k, 1, 1))
			fmt.Fprintf(&b, "%14.9f  %10.4f dB  %.4f\n", f/1e9, 20*math.Log10(s21), s22)
		}
	} else {
		b.WriteString("one port only: not usable as a transmission file (needs at least 2 ports)\n")
	}
	return b.String()
}

type traceJSON struct {
	Kind        string    `json:"kind"`
	File        string    `json:"file"`
	Column      string    `json:"column"`
	FrequencyHz []float64 `json:"frequency_hz"`
	Values      []float64 `json:"values"`
}

type elementJSON struct {
	Row         int     `json:"row"`
	Col         int     `json:"col"`
	AmplitudeDB float64 `json:"amplitude_db"`
	PhaseDeg    float64 `json:"phase_deg"`
}

func elementsJSON(els []Element) any {
	out := make([]elementJSON, len(els))
	for i, e := range els {
		out[i] = elementJSON{e.Row, e.Col, e.AmplitudeDB, e.PhaseDeg}
	}
	return map[string]any{"kind": "elements", "elements": out}
}

func describeElements(path string, els []Element) string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s: elements, %d elements\n", path, len(els))
	fmt.Fprintf(&b, "%5s %5s %12s %10s\n", "row", "col", "amplitude_db", "phase_deg")
	for _, e := range els {
		fmt.Fprintf(&b, "%5d %5d %12.4g %10.4g\n", e.Row, e.Col, e.AmplitudeDB, e.PhaseDeg)
	}
	return b.String()
}

type stationTermJSON struct {
	Name         string   `json:"name"`
	AppliesTo    []string `json:"applies_to"`
	ValueDB      float64  `json:"value_db"`
	Distribution string   `json:"distribution"`
	CoverageK    float64  `json:"coverage_k,omitempty"`
}

func stationJSON(s *Station) any {
	terms := make([]stationTermJSON, len(s.Uncertainty))
	for i, u := range s.Uncertainty {
		terms[i] = stationTermJSON{u.Name, u.AppliesTo, u.ValueDB, u.Distribution, u.CoverageK}
	}
	return struct {
		Kind              string            `json:"kind"`
		ID                string            `json:"id"`
		Description       string            `json:"description"`
		ReceiverMatch     float64           `json:"receiver_match"`
		DriftToleranceDB  float64           `json:"drift_tolerance_db"`
		MethodToleranceDB float64           `json:"method_tolerance_db"`
		Uncertainty       []stationTermJSON `json:"uncertainty"`
	}{"station", s.ID, s.Description, s.ReceiverMatch, s.DriftToleranceDB, s.MethodToleranceDB, terms}
}

func describeStation(s *Station) string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s: station %q%s\n", s.File, s.ID, paren(s.Description))
	fmt.Fprintf(&b, "receiver match |Gamma| %g, drift tolerance %g dB, method tolerance %g dB\n", s.ReceiverMatch, s.DriftToleranceDB, s.MethodToleranceDB)
	for _, u := range s.Uncertainty {
		fmt.Fprintf(&b, "  term %q: %g dB %s", u.Name, u.ValueDB, u.Distribution)
		if u.Distribution == "normal" {
			fmt.Fprintf(&b, " (k=%g)", u.CoverageK)
		}
		fmt.Fprintf(&b, ", applies to %s\n", strings.Join(u.AppliesTo, ", "))
	}
	return b.String()
}

type tablePointJSON struct {
	FrequencyHz           float64 `json:"frequency_hz"`
	GainDBi               float64 `json:"gain_dbi"`
	ExpandedUncertaintyDB float64 `json:"expanded_uncertainty_db"`
}

func tableJSON(t []ReferencePoint) []tablePointJSON {
	out := make([]tablePointJSON, len(t))
	for i, p := range t {
		out[i] = tablePointJSON{p.FrequencyHz, p.GainDBi, p.ExpandedUncertaintyDB}
	}
	return out
}

func writeTable(b *strings.Builder, t []ReferencePoint) {
	fmt.Fprintf(b, "%14s %10s %10s\n", "frequency_ghz", "gain_dbi", "U_db")
	for _, p := range t {
		fmt.Fprintf(b, "%14.9f %10.4f %10.4f\n", p.FrequencyHz/1e9, p.GainDBi, p.ExpandedUncertaintyDB)
	}
}

func referenceJSON(r *Reference) any {
	return struct {
		Kind        string           `json:"kind"`
		ID          string           `json:"id"`
		Description string           `json:"description"`
		GainKind    string           `json:"gain_kind"`
		Calibrated  string           `json:"calibrated"`
		Due         string           `json:"due"`
		Certificate string           `json:"certificate"`
		CoverageK   float64          `json:"coverage_k"`
		TableFile   string           `json:"table_file,omitempty"`
		Table       []tablePointJSON `json:"table"`
	}{"reference", r.ID, r.Description, r.GainKind, r.Calibrated.Format("2006-01-02"), r.Due.Format("2006-01-02"), r.Certificate, r.CoverageK, r.TableFile, tableJSON(r.Table)}
}

func describeReference(r *Reference) string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s: reference %q%s, %s gain, certificate %s\n", r.File, r.ID, paren(r.Description), r.GainKind, r.Certificate)
	fmt.Fprintf(&b, "calibrated %s, due %s, coverage k=%g\n", r.Calibrated.Format("2006-01-02"), r.Due.Format("2006-01-02"), r.CoverageK)
	if r.TableFile != "" {
		fmt.Fprintf(&b, "table from %s\n", r.TableFile)
	}
	writeTable(&b, r.Table)
	return b.String()
}

type limitJSON struct {
	Name     string `json:"name"`
	Quantity string `json:"quantity"`
	Beams    struct {
		IDs         []string `json:"ids,omitempty"`
		MinThetaDeg *float64 `json:"min_theta_deg,omitempty"`
		MaxThetaDeg *float64 `json:"max_theta_deg,omitempty"`
	} `json:"beams"`
	BandHz       [2]float64   `json:"band_hz"`
	Statistic    string       `json:"statistic"`
	Limit        [][2]float64 `json:"limit"`
	ScanExponent *float64     `json:"scan_exponent,omitempty"`
}

func specJSON(s *Spec) any {
	limits := make([]limitJSON, len(s.Limits))
	for i, l := range s.Limits {
		j := limitJSON{Name: l.Name, Quantity: l.Quantity, BandHz: l.BandHz, Statistic: l.Statistic, ScanExponent: l.ScanExponent}
		j.Beams.IDs, j.Beams.MinThetaDeg, j.Beams.MaxThetaDeg = l.Beams.IDs, l.Beams.MinThetaDeg, l.Beams.MaxThetaDeg
		for _, p := range l.Points {
			j.Limit = append(j.Limit, [2]float64{p.FrequencyHz, p.Value})
		}
		limits[i] = j
	}
	return struct {
		Kind                        string      `json:"kind"`
		Product                     string      `json:"product"`
		Title                       string      `json:"title"`
		DecisionRule                string      `json:"decision_rule"`
		OperatingAntennaK           *float64    `json:"operating_antenna_k,omitempty"`
		ElementPhaseRMSToleranceDeg *float64    `json:"element_phase_rms_tolerance_deg,omitempty"`
		Limits                      []limitJSON `json:"limits"`
	}{"spec", s.Product, s.Title, s.DecisionRule, s.OperatingAntennaK, s.ElementPhaseRMSToleranceDeg, limits}
}

func describeSpec(s *Spec) string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s: spec for %s%s, decision rule %s\n", s.File, s.Product, paren(s.Title), s.DecisionRule)
	if s.OperatingAntennaK != nil {
		fmt.Fprintf(&b, "projected G/T at antenna temperature %g K\n", *s.OperatingAntennaK)
	}
	if s.ElementPhaseRMSToleranceDeg != nil {
		fmt.Fprintf(&b, "element phase rms tolerance %g deg\n", *s.ElementPhaseRMSToleranceDeg)
	}
	for _, l := range s.Limits {
		fmt.Fprintf(&b, "  limit %q: %s %s over %s to %s, %d point(s)", l.Name, l.Statistic, l.Quantity, ghzText(l.BandHz[0]), ghzText(l.BandHz[1]), len(l.Points))
		if l.ScanExponent != nil {
			fmt.Fprintf(&b, ", scan exponent %g", *l.ScanExponent)
		}
		b.WriteString("\n")
	}
	return b.String()
}

type noiseJSON struct {
	File             string   `json:"file"`
	Quantity         string   `json:"quantity"`
	NoiseBandwidthHz *float64 `json:"noise_bandwidth_hz,omitempty"`
	IntegrationS     *float64 `json:"integration_s,omitempty"`
}

type beamJSON struct {
	ID             string      `json:"id"`
	ThetaDeg       float64     `json:"theta_deg"`
	PhiDeg         float64     `json:"phi_deg"`
	Polarization   string      `json:"polarization,omitempty"`
	Transmission   string      `json:"transmission"`
	Noise          []noiseJSON `json:"noise"`
	PassiveGainDBi *float64    `json:"passive_gain_dbi,omitempty"`
	FromPlan       bool        `json:"from_plan,omitempty"`
}

func runJSON(r *Run) any {
	beams := make([]beamJSON, len(r.Beams))
	for i, b := range r.Beams {
		bj := beamJSON{ID: b.ID, ThetaDeg: b.ThetaDeg, PhiDeg: b.PhiDeg, Polarization: b.Polarization, Transmission: b.Transmission, PassiveGainDBi: b.PassiveGainDBi, FromPlan: b.FromPlan}
		for _, n := range b.Noise {
			bj.Noise = append(bj.Noise, noiseJSON{n.File, n.Quantity, n.NoiseBandwidthHz, n.IntegrationS})
		}
		beams[i] = bj
	}
	type rangeRef struct {
		Pre       string `json:"pre"`
		Post      string `json:"post,omitempty"`
		Parameter string `json:"parameter"`
	}
	return struct {
		Kind           string     `json:"kind"`
		Serial         string     `json:"serial"`
		Product        string     `json:"product"`
		Station        string     `json:"station"`
		Reference      string     `json:"reference"`
		Started        string     `json:"started"`
		Operator       string     `json:"operator"`
		AmbientC       float64    `json:"ambient_c"`
		Firmware       string     `json:"firmware,omitempty"`
		RangeReference rangeRef   `json:"range_reference"`
		Beams          []beamJSON `json:"beams"`
		Elements       string     `json:"elements,omitempty"`
		Notes          string     `json:"notes,omitempty"`
	}{"run", r.Serial, r.Product, r.Station, r.Reference, r.Started.Format("2006-01-02T15:04:05Z07:00"), r.Operator, r.AmbientC, r.Firmware,
		rangeRef{r.RangePre, r.RangePost, r.RangeParameter}, beams, r.Elements, r.Notes}
}

// archiveRootOf is the nearest folder at or above dir that holds specs/,
// "" when there is none.
func archiveRootOf(dir string) string {
	for i := 0; i < 32; i++ {
		if st, err := os.Stat(filepath.Join(dir, "specs")); err == nil && st.IsDir() {
			return dir
		}
		up := filepath.Dir(dir)
		if up == dir {
			break
		}
		dir = up
	}
	return ""
}

func csvText(c *CSVRef) string {
	switch {
	case c == nil:
		return ""
	case c.Name != "":
		return ", csv " + c.Name
	}
	return ", csv mapping"
}

func describeRun(r *Run, specFile string) string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s: run of %s (%s), started %s by %s at %g degC\n", r.File, r.Serial, r.Product, r.Started.Format("2006-01-02T15:04:05Z07:00"), r.Operator, r.AmbientC)
	fmt.Fprintf(&b, "station %s, reference %s\n", r.Station, r.Reference)
	fmt.Fprintf(&b, "range reference: pre %s", r.RangePre)
	if r.RangePost != "" {
		fmt.Fprintf(&b, ", post %s", r.RangePost)
	}
	fmt.Fprintf(&b, " (%s)\n", r.RangeParameter)
	switch {
	case specFile != "" && r.noBeams:
		fmt.Fprintf(&b, "beams: every beam of the beam_plan in %s\n", specFile)
	case specFile != "":
		fmt.Fprintf(&b, "beams: as run.yaml lists them, each of the beam_plan in %s inheriting from it\n", specFile)
	}
	for _, bm := range r.Beams {
		from := ""
		if bm.FromPlan {
			from = " (plan)"
		}
		tr := bm.Transmission
		if tr == "" {
			tr = "(none found)"
		}
		fmt.Fprintf(&b, "  beam %s%s: theta %g deg, phi %g deg", bm.ID, from, bm.ThetaDeg, bm.PhiDeg)
		if bm.Polarization != "" {
			fmt.Fprintf(&b, ", polarization %s", bm.Polarization)
		}
		if bm.PassiveGainDBi != nil {
			fmt.Fprintf(&b, ", passive gain %g dBi", *bm.PassiveGainDBi)
		}
		fmt.Fprintf(&b, "\n    transmission %s%s\n", tr, csvText(bm.TransmissionCSV))
		for _, n := range bm.Noise {
			fmt.Fprintf(&b, "    noise %s (%s%s)\n", n.File, n.Quantity, csvText(n.CSV))
		}
	}
	for _, kp := range r.resolved {
		fmt.Fprintf(&b, "problem: %s\n", kp.p.Error())
	}
	if r.Elements != "" {
		fmt.Fprintf(&b, "elements %s\n", r.Elements)
	}
	if r.Notes != "" {
		fmt.Fprintf(&b, "notes %s\n", r.Notes)
	}
	return b.String()
}

// networkJSON is the form NetworkJSON returns.
type networkJSON struct {
	Ports       int              `json:"ports"`
	FrequencyHz []float64        `json:"frequency_hz"`
	Z0          []float64        `json:"z0"`
	Z0Complex   [][2]float64     `json:"z0_complex,omitempty"`
	S           [][][][2]float64 `json:"s"`
}

// NetworkJSON is the `gtpack inspect --json` form of the contract:
// {"ports": N, "frequency_hz": [...], "z0": [...], "s": [[[[re, im], ...]...]...]}
// A complex reference impedance adds "z0_complex": [[re, im], ...].
func NetworkJSON(n *touchstone.Network) any {
	out := networkJSON{Ports: n.Ports, FrequencyHz: n.FrequencyHz, Z0: n.Z0}
	if out.FrequencyHz == nil {
		out.FrequencyHz = []float64{}
	}
	if out.Z0 == nil {
		out.Z0 = []float64{}
	}
	for _, z := range n.Z0Complex {
		out.Z0Complex = append(out.Z0Complex, [2]float64{real(z), imag(z)})
	}
	N := n.Ports
	out.S = make([][][][2]float64, len(n.FrequencyHz))
	for k := range out.S {
		mat := make([][][2]float64, N)
		for i := range mat {
			row := make([][2]float64, N)
			for j := range row {
				idx := (k*N+i)*N + j
				if idx < len(n.S) {
					row[j] = [2]float64{real(n.S[idx]), imag(n.S[idx])}
				}
			}
			mat[i] = row
		}
		out.S[k] = mat
	}
	return out
}
