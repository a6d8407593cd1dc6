package ingest

import (
	"fmt"
	"regexp"
	"strconv"
	"strings"

	"gopkg.in/yaml.v3"
)

var sParameterRe = regexp.MustCompile(`^S([1-9])([1-9])$`)

// sParameterPorts returns the one-based port numbers of "S21" and the like.
func sParameterPorts(s string) (i, j int, ok bool) {
	m := sParameterRe.FindStringSubmatch(s)
	if m == nil {
		return 0, 0, false
	}
	i, _ = strconv.Atoi(m[1])
	j, _ = strconv.Atoi(m[2])
	return i, j, true
}

// ParseRun reads a run.yaml. Paths (range_reference, transmission, noise
// files, elements, notes) are returned as written, relative to the run's
// folder; Open turns them into archive-relative paths. Run.File is name.
// The beams are as the file writes them: Open resolves them against the
// spec's beam_plan.
//
// Required keys: schema, serial, product, station, reference, started
// (RFC 3339), operator, ambient_c, range_reference.pre. beams is a list of
// at least one beam, each with an id; without a beam_plan in the spec a
// beam needs theta_deg, transmission and noise too (resolveBeams checks
// it). Optional: firmware, range_reference.post, range_reference.parameter
// (S21 when absent; it applies to every Touchstone transmission file of
// the run), phi_deg (0), polarization, passive_gain_dbi, elements, notes,
// customer. A data file may be {file, csv} (noise entries carry csv:
// beside file) to read an instrument's CSV layout.
//
// Extension of the contract: a beam's `noise:` is either one mapping
// {file, quantity, ...} or a list of such mappings, for a beam measured in
// both noise forms.
func ParseRun(data []byte, name string) (*Run, error) {
	r, err := parseRun(data, name)
	if err != nil {
		return nil, err
	}
	return r, nil
}

// parseRun is ParseRun that also returns what it could read of a refused
// run.yaml (nil when its structure cannot be read: broken YAML, not a
// mapping), so that check can still read the data files it names.
func parseRun(data []byte, name string) (*Run, error) {
	p := &yparser{file: name}
	m := p.document(data, "run").expect(runFields...)
	if m == nil {
		return nil, p.err()
	}
	r := &Run{File: name, KeyLines: map[string]int{}, RangeParameter: "S21"}
	for _, k := range []string{"serial", "product", "station", "reference", "started", "elements", "notes", "beams"} {
		if m.has(k) {
			r.KeyLines[k] = m.line(k)
		}
	}
	r.Schema = m.schema()
	r.Serial, _ = m.ident("serial")
	r.Product, _ = m.ident("product")
	r.Station, _ = m.ident("station")
	r.Reference, _ = m.ident("reference")
	r.Started, _ = m.instant("started")
	r.Operator, _ = m.str("operator")
	if v, ok := m.num("ambient_c"); ok {
		if v < minAmbientC || v > maxAmbientC {
			m.invalid("ambient_c", "%v is outside %d..%d", v, minAmbientC, maxAmbientC)
		}
		r.AmbientC = v
	}
	if m.has("firmware") {
		r.Firmware, _ = m.str("firmware")
	}
	if rr := m.sub("range_reference", "run range_reference"); rr != nil {
		rr.expect(rangeReferenceFields...)
		r.RangePre, r.RangePreCSV = rr.fileRef("pre")
		r.KeyLines["range_reference.pre"] = rr.line("pre")
		if rr.has("post") {
			r.RangePost, r.RangePostCSV = rr.fileRef("post")
			r.KeyLines["range_reference.post"] = rr.line("post")
		}
		if rr.has("parameter") {
			if s, ok := rr.str("parameter"); ok {
				if i, j, ok := sParameterPorts(s); !ok || i == j {
					rr.invalid("parameter", "%q is not a transmission parameter", s)
				} else {
					r.RangeParameter = s
				}
			}
		}
	}
	r.noBeams = !m.has("beams")
	if items, ok := m.seq("beams"); ok {
		if len(items) == 0 {
			m.invalid("beams", "is an empty list")
		}
		if len(items) > MaxRunBeams {
			// The beams past the limit are not read: the run is refused,
			// and each of them would only add a problem.
			p.errf(items[MaxRunBeams].Line, "run: beam %d of the %d listed from line %d is past the limit of a run; expected at most %d beams (each has its own sheet and charts; see the README's limits)",
				MaxRunBeams+1, len(items), m.line("beams"), MaxRunBeams)
			items = items[:MaxRunBeams]
		}
		r.Beams = parseBeams(p, items, "run", beamFields)
		for i, b := range r.Beams {
			key := fmt.Sprintf("beams[%d]", i)
			if b.given&keyTransmission != 0 {
				r.KeyLines[key+".transmission"] = b.lines.transmission
			}
			for k, l := range b.lines.noise {
				r.KeyLines[fmt.Sprintf("%s.noise[%d].file", key, k)] = l
			}
		}
	}
	if m.has("elements") {
		r.Elements, _ = m.str("elements")
	}
	if m.has("notes") {
		r.Notes, _ = m.str("notes")
	}
	r.Customer = m.customer("customer")
	return r, p.err()
}

// parseBeams reads a list of beams (a run's, or a beam plan's: what names
// the owner in messages), each id once regardless of case: b00 and B00
// would be one file name on a system that ignores case. A beam with a
// problem is kept when its id could be read, so that a refused run.yaml
// still names its files (parseRun's partial run); the problem refuses the
// document.
func parseBeams(p *yparser, items []*yaml.Node, owner string, fields []field) []Beam {
	var out []Beam
	ids := map[string]*Beam{}
	for i, it := range items {
		b, _ := parseBeam(p, it, i, fields)
		if b.ID == "" {
			continue
		}
		if first, dup := ids[strings.ToLower(b.ID)]; dup {
			if first.ID == b.ID {
				p.errf(b.Line, "%s: beam id %q is repeated (first on line %d); expected each beam id once", owner, b.ID, first.Line)
			} else {
				p.errf(b.Line, "%s: beam id %q is the same beam as %q (line %d), regardless of case; expected each beam id once, in one spelling", owner, b.ID, first.ID, first.Line)
			}
			continue
		}
		out = append(out, b)
		ids[strings.ToLower(b.ID)] = &out[len(out)-1]
	}
	// ids points into out, which append may have moved: only lines and ids
	// were read through it.
	return out
}

// beamKeys are the keys a beam entry sets, as bits.
type beamKeys uint8

const (
	keyTheta beamKeys = 1 << iota
	keyPhi
	keyPolarization
	keyTransmission
	keyNoise
	keyPassiveGain
)

func parseBeam(p *yparser, n *yaml.Node, i int, fields []field) (Beam, bool) {
	before := len(p.probs)
	m := p.mapping(n, fmt.Sprintf("beam %d", i+1)).named("id", "beam %q").expect(fields...)
	if m == nil {
		return Beam{}, false
	}
	b := Beam{Line: m.node.Line}
	b.ID, _ = m.ident("id")
	if m.has("theta_deg") {
		b.given |= keyTheta
		if v, ok := m.num("theta_deg"); ok {
			if v < 0 || v >= 90 {
				m.invalid("theta_deg", "%v is outside [0, 90)", v)
			}
			b.ThetaDeg = v
		}
	}
	if m.has("phi_deg") {
		b.given |= keyPhi
		b.PhiDeg, _ = m.num("phi_deg")
	}
	if m.has("polarization") {
		b.given |= keyPolarization
		b.Polarization, _ = m.str("polarization")
	}
	if m.has("transmission") {
		b.given |= keyTransmission
		b.Transmission, b.TransmissionCSV = m.fileRef("transmission")
		b.lines.transmission = m.line("transmission")
	}
	if m.has("passive_gain_dbi") {
		b.given |= keyPassiveGain
		b.PassiveGainDBi = m.numPtr("passive_gain_dbi")
	}
	if m.has("noise") {
		b.given |= keyNoise
		b.Noise, b.lines.noise = parseNoiseList(p, m, "noise")
	}
	return b, len(p.probs) == before
}

// parseNoiseList reads a noise: value, one mapping or a list of them, each
// quantity once; it returns the entries and the line of each file.
func parseNoiseList(p *yparser, m *ymap, key string) ([]NoiseInput, []int) {
	nn := m.value(key)
	var list []*yaml.Node
	switch nn.Kind {
	case yaml.MappingNode:
		list = []*yaml.Node{nn}
	case yaml.SequenceNode:
		list = nn.Content
		if len(list) == 0 {
			m.invalid(key, "is an empty list")
		}
	default:
		m.bad(key, nn)
	}
	var out []NoiseInput
	var lines []int
	quantities := map[string]int{}
	for j, q := range list {
		ni, ok := parseNoise(p, q, m.what, j)
		if !ok {
			continue
		}
		if first, dup := quantities[ni.Quantity]; dup {
			p.errf(ni.Line, "%s: noise quantity %s is repeated (first on line %d); expected one trace per noise form", m.what, ni.Quantity, first)
			continue
		}
		quantities[ni.Quantity] = ni.Line
		out = append(out, ni.NoiseInput)
		lines = append(lines, ni.fileLine)
	}
	return out, lines
}

type noiseEntry struct {
	NoiseInput
	fileLine int
}

func parseNoise(p *yparser, n *yaml.Node, beam string, j int) (noiseEntry, bool) {
	before := len(p.probs)
	m := p.mapping(n, fmt.Sprintf("%s noise %d", beam, j+1)).expect(noiseFields...)
	if m == nil {
		return noiseEntry{}, false
	}
	e := noiseEntry{NoiseInput: NoiseInput{Line: m.node.Line}, fileLine: m.line("file")}
	e.File, _ = m.str("file")
	e.Quantity, _ = m.oneOf("quantity", noiseQuantities...)
	if m.has("noise_bandwidth_hz") {
		if v, ok := m.positive("noise_bandwidth_hz"); ok {
			e.NoiseBandwidthHz = &v
		}
	}
	if m.has("integration_s") {
		if v, ok := m.positive("integration_s"); ok {
			e.IntegrationS = &v
		}
	}
	if m.has("csv") {
		e.CSV = m.csvRef("csv", true)
	}
	return e, len(p.probs) == before
}

// fileRef reads a data file given as its name or as {file, csv}.
func (m *ymap) fileRef(key string) (string, *CSVRef) {
	n := m.value(key)
	if n == nil {
		return "", nil
	}
	if n.Kind != yaml.MappingNode {
		s, _ := m.str(key)
		return s, nil
	}
	f := m.p.mapping(n, m.what+" "+key).expect(fileRefFields...)
	if f == nil {
		return "", nil
	}
	s, _ := f.str("file")
	var ref *CSVRef
	if f.has("csv") {
		ref = f.csvRef("csv", true)
	}
	return s, ref
}

// csvRef reads a csv: value: a mapping, or (when byName) the name of one
// of the station's csv_formats.
func (m *ymap) csvRef(key string, byName bool) *CSVRef {
	n := m.value(key)
	if n == nil {
		return nil
	}
	if n.Kind == yaml.ScalarNode && byName {
		name, ok := m.ident(key)
		if !ok {
			return nil
		}
		return &CSVRef{Name: name, Line: n.Line}
	}
	if n.Kind != yaml.MappingNode {
		m.bad(key, n)
		return nil
	}
	f := m.csvFormat(n, m.what+" csv")
	if f == nil {
		return nil
	}
	return &CSVRef{Format: f, Line: n.Line}
}

// csvFormat reads a csv: mapping.
func (m *ymap) csvFormat(n *yaml.Node, what string) *CSVFormat {
	c := m.p.mapping(n, what).expect(csvFields...)
	if c == nil {
		return nil
	}
	before := len(m.p.probs)
	f := &CSVFormat{Line: n.Line}
	if c.has("delimiter") {
		if s, ok := c.oneOf("delimiter", ",", ";", "tab"); ok {
			f.Delimiter = s[0]
			if s == "tab" {
				f.Delimiter = '\t'
			}
		}
	}
	if c.has("decimal") {
		if s, ok := c.oneOf("decimal", ".", ","); ok {
			f.Decimal = s[0]
		}
	}
	if f.Delimiter == ',' && f.Decimal == ',' {
		c.invalid("decimal", `"," is the delimiter too`)
	}
	if c.has("comment") {
		if s, ok := c.str("comment"); ok {
			f.Comment = strings.TrimSpace(s)
		}
	}
	if c.has("skip_lines") {
		if v, ok := c.integer("skip_lines"); ok {
			if v < 0 {
				c.invalid("skip_lines", "%d is negative", v)
			} else {
				f.SkipLines = v
			}
		}
	}
	if c.has("units_row") {
		f.UnitsRow, _ = c.boolean("units_row")
	}
	f.FrequencyColumn = c.column("frequency_column")
	f.ValueColumn = c.column("value_column")
	f.UncertaintyColumn = c.column("uncertainty_column")
	if c.has("frequency_unit") {
		f.FrequencyUnit, _ = c.oneOf("frequency_unit", "hz", "khz", "mhz", "ghz")
	}
	if len(m.p.probs) > before {
		return nil
	}
	return f
}

// column reads a CSV column: header text, or a whole number from 1.
func (m *ymap) column(key string) CSVColumn {
	n := m.value(key)
	if n == nil {
		return CSVColumn{}
	}
	if n.Kind == yaml.ScalarNode && n.Tag == "!!int" {
		v, ok := m.integer(key)
		if ok && v < 1 {
			m.invalid(key, "%d is below 1", v)
			return CSVColumn{}
		}
		return CSVColumn{Number: v}
	}
	s, _ := m.str(key)
	return CSVColumn{Name: s}
}

// integer reads a whole number.
func (m *ymap) integer(key string) (int, bool) {
	n := m.value(key)
	if n == nil {
		return 0, false
	}
	if n.Kind == yaml.ScalarNode && n.Tag == "!!int" {
		var v int
		if err := n.Decode(&v); err == nil && v >= -1<<30 && v <= 1<<30 {
			return v, true
		}
	}
	m.bad(key, n)
	return 0, false
}

// boolean reads true or false.
func (m *ymap) boolean(key string) (bool, bool) {
	n := m.value(key)
	if n == nil {
		return false, false
	}
	if n.Kind == yaml.ScalarNode && n.Tag == "!!bool" {
		var v bool
		if err := n.Decode(&v); err == nil {
			return v, true
		}
	}
	m.bad(key, n)
	return false, false
}
