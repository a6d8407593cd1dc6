package ingest

import (
	"fmt"
	"regexp"
	"strconv"
	"strings"

	"gopkg.in/yaml.v3"
)

// Noise quantities a beam's noise trace may hold.
var noiseQuantities = []string{"noise-density-dbm-hz", "noise-relative-kt0-db", "system-noise-figure-db"}

// Sane ambient range of a test range in degrees Celsius: anything outside
// is a typing mistake (a kelvin value, a missing minus sign, a stray digit).
const (
	minAmbientC = -40
	maxAmbientC = 70
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
//
// Required keys: schema, serial, product, station, reference, started
// (RFC 3339), operator, ambient_c, range_reference.pre, beams (at least
// one), and per beam id, theta_deg, transmission and noise. Optional:
// firmware, range_reference.post, range_reference.parameter (S21 when
// absent; it applies to every Touchstone transmission file of the run),
// phi_deg (0), polarization, passive_gain_dbi, elements, notes.
//
// Extension of the contract: a beam's `noise:` is either one mapping
// {file, quantity, ...} or a list of such mappings, for a beam measured in
// both noise forms.
func ParseRun(data []byte, name string) (*Run, error) {
	p := &yparser{file: name}
	m := p.document(data, "run").expect(
		field{"schema", true, "schema: 1"},
		field{"serial", true, "the unit's serial number"},
		field{"product", true, "the product code of a spec in specs/"},
		field{"station", true, "the id of a station in stations/"},
		field{"reference", true, "the id of a reference antenna in references/"},
		field{"started", true, "the start time in RFC 3339, e.g. 2026-11-03T09:15:00Z"},
		field{"operator", true, "the operator's initials or name"},
		field{"ambient_c", true, fmt.Sprintf("the ambient temperature in degrees Celsius, %d to %d", minAmbientC, maxAmbientC)},
		field{"firmware", false, "free text"},
		field{"range_reference", true, "a mapping {pre: FILE, post: FILE, parameter: S21}"},
		field{"beams", true, "a list of beams (id, theta_deg, phi_deg, transmission, noise)"},
		field{"elements", false, "an elements CSV file relative to this folder"},
		field{"notes", false, "a Markdown file relative to this folder"},
		field{"customer", false, "who this run is for, when not the spec's customer: {name, address: [lines], order}"},
	)
	if m == nil {
		return nil, p.err()
	}
	r := &Run{File: name, KeyLines: map[string]int{}, RangeParameter: "S21"}
	for _, k := range []string{"serial", "product", "station", "reference", "started", "elements", "notes"} {
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
		rr.expect(
			field{"pre", true, "the reference-antenna measurement before the unit, a Touchstone or CSV file"},
			field{"post", false, "the reference-antenna measurement after the unit"},
			field{"parameter", false, "the transmission parameter, S21 (default) or another Sij"},
		)
		r.RangePre, _ = rr.str("pre")
		r.KeyLines["range_reference.pre"] = rr.line("pre")
		if rr.has("post") {
			r.RangePost, _ = rr.str("post")
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
		// By the id in lower case: b00 and B00 would be one file name on
		// a system that ignores case, so they are one beam.
		ids := map[string]*Beam{}
		for i, it := range items {
			b, ok := parseBeam(p, it, i, r.KeyLines)
			if !ok {
				continue
			}
			if first, dup := ids[strings.ToLower(b.ID)]; dup {
				if first.ID == b.ID {
					p.errf(b.Line, "run: beam id %q is repeated (first on line %d); expected each beam id once", b.ID, first.Line)
				} else {
					p.errf(b.Line, "run: beam id %q is the same beam as %q (line %d), regardless of case; expected each beam id once, in one spelling", b.ID, first.ID, first.Line)
				}
				continue
			}
			ids[strings.ToLower(b.ID)] = &b
			r.Beams = append(r.Beams, b)
		}
	}
	if m.has("elements") {
		r.Elements, _ = m.str("elements")
	}
	if m.has("notes") {
		r.Notes, _ = m.str("notes")
	}
	r.Customer = m.customer("customer")
	if err := p.err(); err != nil {
		return nil, err
	}
	return r, nil
}

func parseBeam(p *yparser, n *yaml.Node, i int, lines map[string]int) (Beam, bool) {
	before := len(p.probs)
	m := p.mapping(n, fmt.Sprintf("beam %d", i+1)).named("id", "beam %q").expect(
		field{"id", true, "the beam's identifier, e.g. b00"},
		field{"theta_deg", true, "the scan angle from boresight in degrees, 0 <= theta < 90"},
		field{"phi_deg", false, "the scan plane in degrees"},
		field{"polarization", false, "free text"},
		field{"transmission", true, "a Touchstone or CSV file relative to this folder"},
		field{"noise", true, "a mapping {file, quantity, noise_bandwidth_hz, integration_s} or a list of them"},
		field{"passive_gain_dbi", false, "the passive gain in dBi"},
	)
	if m == nil {
		return Beam{}, false
	}
	b := Beam{Line: m.node.Line}
	b.ID, _ = m.ident("id")
	if v, ok := m.num("theta_deg"); ok {
		if v < 0 || v >= 90 {
			m.invalid("theta_deg", "%v is outside [0, 90)", v)
		}
		b.ThetaDeg = v
	}
	if m.has("phi_deg") {
		b.PhiDeg, _ = m.num("phi_deg")
	}
	if m.has("polarization") {
		b.Polarization, _ = m.str("polarization")
	}
	b.Transmission, _ = m.str("transmission")
	key := fmt.Sprintf("beams[%d]", i)
	lines[key+".transmission"] = m.line("transmission")
	if m.has("passive_gain_dbi") {
		b.PassiveGainDBi = m.numPtr("passive_gain_dbi")
	}
	if nn := m.value("noise"); nn != nil {
		var list []*yaml.Node
		switch nn.Kind {
		case yaml.MappingNode:
			list = []*yaml.Node{nn}
		case yaml.SequenceNode:
			list = nn.Content
			if len(list) == 0 {
				m.invalid("noise", "is an empty list")
			}
		default:
			m.bad("noise", nn)
		}
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
			lines[fmt.Sprintf("%s.noise[%d].file", key, len(b.Noise))] = ni.fileLine
			b.Noise = append(b.Noise, ni.NoiseInput)
		}
	}
	return b, len(p.probs) == before
}

type noiseEntry struct {
	NoiseInput
	fileLine int
}

func parseNoise(p *yparser, n *yaml.Node, beam string, j int) (noiseEntry, bool) {
	before := len(p.probs)
	m := p.mapping(n, fmt.Sprintf("%s noise %d", beam, j+1)).expect(
		field{"file", true, "a trace CSV relative to this folder"},
		field{"quantity", true, "noise-density-dbm-hz, noise-relative-kt0-db or system-noise-figure-db"},
		field{"noise_bandwidth_hz", false, "the receiver's noise bandwidth in Hz, above 0"},
		field{"integration_s", false, "the integration time per point in seconds, above 0"},
	)
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
	return e, len(p.probs) == before
}
