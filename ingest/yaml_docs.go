package ingest

import (
	"fmt"
	"strings"

	"gopkg.in/yaml.v3"
)

// ParseStation reads stations/<id>.yaml. name is the file name used in
// problems (and stored as Station.File).
func ParseStation(data []byte, name string) (*Station, error) {
	p := &yparser{file: name}
	m := p.document(data, "station").expect(stationFields...)
	if m == nil {
		return nil, p.err()
	}
	s := &Station{File: name}
	s.Schema = m.schema()
	s.ID, _ = m.ident("id")
	if m.has("description") {
		s.Description, _ = m.str("description")
	}
	if v, ok := m.num("receiver_match"); ok {
		if v < 0 || v >= 1 {
			m.invalid("receiver_match", "%v is outside [0, 1)", v)
		}
		s.ReceiverMatch = v
	}
	s.DriftToleranceDB, _ = m.positive("drift_tolerance_db")
	if m.has("check_units") {
		if list, ok := m.strList("check_units"); ok {
			for _, serial := range list {
				if err := CheckIdentifier(serial); err != nil {
					m.invalid("check_units", "%q: %v", serial, err)
					continue
				}
				s.CheckUnits = append(s.CheckUnits, serial)
			}
		}
	}
	s.MethodToleranceDB, _ = m.positive("method_tolerance_db")
	if n := m.value("csv_formats"); n != nil {
		if n.Kind != yaml.MappingNode {
			m.bad("csv_formats", n)
		} else if formats := p.mapping(n, "station csv_formats"); formats != nil {
			s.CSVFormats = map[string]*CSVFormat{}
			for i := 0; i+1 < len(n.Content); i += 2 {
				k := resolve(n.Content[i])
				if k == nil || k.Kind != yaml.ScalarNode || formats.keys[k.Value] != k {
					continue
				}
				if err := CheckIdentifier(k.Value); err != nil {
					p.errf(k.Line, "station csv_formats: name %v", err)
					continue
				}
				v := resolve(n.Content[i+1])
				if v == nil || v.Kind != yaml.MappingNode {
					p.errf(k.Line, "station csv_formats: %s is %s; expected %s", k.Value, kindName(n.Content[i+1]), "a csv: mapping {delimiter, decimal, comment, skip_lines, units_row, frequency_column, frequency_unit, value_column}")
					continue
				}
				if f := m.csvFormat(v, fmt.Sprintf("station csv format %q", k.Value)); f != nil {
					s.CSVFormats[k.Value] = f
				}
			}
		}
	}
	if items, ok := m.seq("uncertainty"); ok {
		names := map[string]int{}
		for i, it := range items {
			t, ok := parseTerm(p, it, i)
			if !ok {
				continue
			}
			if first, dup := names[t.Name]; dup {
				p.errf(t.Line, "station uncertainty term %q is repeated (first on line %d); expected each term once", t.Name, first)
				continue
			}
			names[t.Name] = t.Line
			s.Uncertainty = append(s.Uncertainty, t)
		}
	}
	if err := p.err(); err != nil {
		return nil, err
	}
	return s, nil
}

func parseTerm(p *yparser, n *yaml.Node, i int) (UncertaintyTerm, bool) {
	before := len(p.probs)
	what := fmt.Sprintf("uncertainty term %d", i+1)
	m := p.mapping(n, what).named("name", "uncertainty term %q").expect(termFields...)
	if m == nil {
		return UncertaintyTerm{}, false
	}
	t := UncertaintyTerm{Line: m.node.Line}
	t.Name, _ = m.str("name")
	t.AppliesTo, _ = m.strList("applies_to", "gain", "gt")
	if v, ok := m.num("value_db"); ok {
		if v < 0 {
			m.invalid("value_db", "%v is negative", v)
		}
		t.ValueDB = v
	}
	t.Distribution, _ = m.oneOf("distribution", distributions...)
	if m.has("coverage_k") {
		if t.Distribution != "" && t.Distribution != "normal" {
			m.invalid("coverage_k", "is given for a %s term", t.Distribution)
		} else {
			t.CoverageK, _ = m.positive("coverage_k")
		}
	} else if t.Distribution == "normal" {
		p.errf(m.node.Line, "%s: missing key \"coverage_k\" for a normal term; expected the coverage factor of value_db, above 0", m.what)
	}
	return t, len(p.probs) == before
}

// ParseReference reads references/<id>.yaml. An inline `table:` is read
// here; a `table_file:` is only recorded (as written, relative to the
// reference's folder) and read by Open, which knows the archive root.
func ParseReference(data []byte, name string) (*Reference, error) {
	r, _, err := parseReference(data, name)
	return r, err
}

// parseReference also returns the line of table_file.
func parseReference(data []byte, name string) (*Reference, int, error) {
	p := &yparser{file: name}
	m := p.document(data, "reference").expect(referenceFields...)
	if m == nil {
		return nil, 0, p.err()
	}
	r := &Reference{File: name}
	r.Schema = m.schema()
	r.ID, _ = m.ident("id")
	if m.has("description") {
		r.Description, _ = m.str("description")
	}
	r.GainKind, _ = m.oneOf("gain_kind", "realized", "gain")
	var calOK, dueOK bool
	r.Calibrated, calOK = m.date("calibrated")
	r.Due, dueOK = m.date("due")
	if calOK && dueOK && r.Due.Before(r.Calibrated) {
		m.invalid("due", "%s is before calibrated %s", r.Due.Format("2006-01-02"), r.Calibrated.Format("2006-01-02"))
	}
	r.Certificate, _ = m.str("certificate")
	r.CoverageK, _ = m.positive("coverage_k")
	tableLine := 0
	switch {
	case m.has("table") && m.has("table_file"):
		p.errf(m.line("table_file"), "reference: both table and table_file are given; expected one of them")
	case m.has("table_file"):
		r.TableFile, _ = m.str("table_file")
		tableLine = m.line("table_file")
	case m.has("table"):
		if rows, ok := m.seq("table"); ok {
			r.Table = parseReferenceRows(p, rows, m.line("table"))
		}
	default:
		p.errf(m.node.Line, "reference: missing key \"table\" or \"table_file\"; expected the calibration table inline or as a CSV file")
	}
	if m.has("csv") {
		if !m.has("table_file") {
			m.invalid("csv", "is given without table_file")
		} else if n := m.value("csv"); n.Kind != yaml.MappingNode {
			p.errf(n.Line, "reference: csv is %s; expected a csv: mapping of table_file (a name refers to a station's csv_formats, and a reference antenna belongs to no station)", kindName(n))
		} else {
			r.TableCSV = m.csvFormat(n, "reference csv")
		}
	}
	if err := p.err(); err != nil {
		return nil, 0, err
	}
	return r, tableLine, nil
}

func parseReferenceRows(p *yparser, rows []*yaml.Node, line int) []ReferencePoint {
	const expect = "a row [frequency_ghz, gain_dbi, expanded_uncertainty_db]"
	if len(rows) == 0 {
		p.errf(line, "reference: table is empty; expected at least one %s", expect)
		return nil
	}
	var out []ReferencePoint
	for i, row := range rows {
		v, ok := p.numbers(row, 3, fmt.Sprintf("reference: table row %d", i+1), expect)
		if !ok {
			return nil
		}
		f := ghz(resolve(row).Content[0], v[0])
		pt := ReferencePoint{FrequencyHz: f, GainDBi: v[1], ExpandedUncertaintyDB: v[2], Line: resolve(row).Line}
		switch {
		case f <= 0:
			p.errf(pt.Line, "reference: table row %d: frequency %v GHz is not above 0; expected a positive frequency", i+1, v[0])
			return nil
		case len(out) > 0 && f <= out[len(out)-1].FrequencyHz:
			p.errf(pt.Line, "reference: table row %d: frequency %v GHz is not above the previous %v GHz; expected strictly increasing frequencies", i+1, v[0], out[len(out)-1].FrequencyHz/1e9)
			return nil
		case v[2] < 0:
			p.errf(pt.Line, "reference: table row %d: expanded uncertainty %v dB is negative; expected >= 0", i+1, v[2])
			return nil
		}
		out = append(out, pt)
	}
	return out
}

// ParseSpec reads specs/<product>.yaml.
func ParseSpec(data []byte, name string) (*Spec, error) {
	p := &yparser{file: name}
	m := p.document(data, "spec").expect(specFields...)
	if m == nil {
		return nil, p.err()
	}
	s := &Spec{File: name}
	s.Schema = m.schema()
	s.Product, _ = m.ident("product")
	if m.has("title") {
		s.Title, _ = m.str("title")
	}
	s.DecisionRule, _ = m.oneOf("decision_rule", "simple", "guarded")
	s.Customer = m.customer("customer")
	if m.has("operating_antenna_k") {
		if v, ok := m.positive("operating_antenna_k"); ok {
			s.OperatingAntennaK = &v
		}
	}
	if m.has("element_phase_rms_tolerance_deg") {
		if v, ok := m.positive("element_phase_rms_tolerance_deg"); ok {
			s.ElementPhaseRMSToleranceDeg = &v
		}
	}
	if bp := m.sub("beam_plan", "spec beam_plan"); bp != nil {
		s.BeamPlan = parseBeamPlan(p, bp.expect(beamPlanFields...))
	}
	if items, ok := m.seq("limits"); ok {
		if len(items) == 0 {
			m.invalid("limits", "is an empty list")
		}
		names := map[string]int{}
		for i, it := range items {
			l, ok := parseLimit(p, it, i)
			if !ok {
				continue
			}
			if first, dup := names[l.Name]; dup {
				p.errf(l.Line, "spec: limit %q is repeated (first on line %d); expected each limit name once", l.Name, first)
				continue
			}
			names[l.Name] = l.Line
			s.Limits = append(s.Limits, l)
		}
	}
	if err := p.err(); err != nil {
		return nil, err
	}
	return s, nil
}

func parseLimit(p *yparser, n *yaml.Node, i int) (Limit, bool) {
	before := len(p.probs)
	m := p.mapping(n, fmt.Sprintf("limit %d", i+1)).named("name", "limit %q").expect(limitFields...)
	if m == nil {
		return Limit{}, false
	}
	l := Limit{Line: m.node.Line}
	l.Name, _ = m.str("name")
	l.Quantity, _ = m.oneOf("quantity", "gt", "gain")
	if b := m.sub("beams", m.what+" beams"); b != nil {
		l.Beams = parseSelector(b)
	}
	if bn := m.value("band_ghz"); bn != nil {
		if band, ok := p.numbers(bn, 2, m.what+": band_ghz", m.fields["band_ghz"].expect); ok {
			if band[0] <= 0 || band[0] >= band[1] {
				m.invalid("band_ghz", "[%v, %v] does not have 0 < low < high", band[0], band[1])
			} else {
				l.BandHz = [2]float64{ghz(bn.Content[0], band[0]), ghz(bn.Content[1], band[1])}
			}
		}
	}
	l.Statistic, _ = m.oneOf("statistic", "min", "mean")
	if rows, ok := m.seq("limit"); ok {
		if len(rows) == 0 {
			m.invalid("limit", "is an empty list")
		}
		for j, row := range rows {
			v, ok := p.numbers(row, 2, fmt.Sprintf("%s: limit point %d", m.what, j+1), "a point [frequency_ghz, value]")
			if !ok {
				break
			}
			f := ghz(resolve(row).Content[0], v[0])
			if f <= 0 {
				p.errf(resolve(row).Line, "%s: limit point %d: frequency %v GHz is not above 0; expected a positive frequency", m.what, j+1, v[0])
				break
			}
			if k := len(l.Points); k > 0 && f <= l.Points[k-1].FrequencyHz {
				p.errf(resolve(row).Line, "%s: limit point %d: frequency %v GHz is not above the previous %v GHz; expected strictly increasing frequencies", m.what, j+1, v[0], l.Points[k-1].FrequencyHz/1e9)
				break
			}
			l.Points = append(l.Points, LimitPoint{FrequencyHz: f, Value: v[1]})
		}
	}
	if m.has("scan_exponent") {
		if v, ok := m.num("scan_exponent"); ok {
			if v < 0 {
				m.invalid("scan_exponent", "%v is negative", v)
			} else {
				l.ScanExponent = &v
			}
		}
	}
	return l, len(p.probs) == before
}

// ghz converts a GHz number node to Hz on its decimal text, so that 10.7
// becomes exactly the float64 nearest 10.7e9; fallback is v*1e9.
func ghz(n *yaml.Node, v float64) float64 {
	if n = resolve(n); n != nil {
		if f, err := parseScaled(n.Value, 9); err == nil {
			return f
		}
	}
	return v * 1e9
}

func parseSelector(b *ymap) BeamSelector {
	before := len(b.p.probs)
	b.expect(selectorFields...)
	var sel BeamSelector
	if len(b.p.probs) > before {
		return sel
	}
	hasIDs := b.has("ids")
	hasTheta := b.has("min_theta_deg") || b.has("max_theta_deg")
	switch {
	case hasIDs && hasTheta:
		b.p.errf(b.node.Line, "%s: both ids and a theta range are given; expected one of them", b.what)
		return sel
	case !hasIDs && !hasTheta:
		b.p.errf(b.node.Line, "%s: empty selector; expected {ids: [..]} or {min_theta_deg: .., max_theta_deg: ..}", b.what)
		return sel
	case hasIDs:
		sel.IDs, _ = b.strList("ids")
		return sel
	}
	for _, k := range []string{"min_theta_deg", "max_theta_deg"} {
		if !b.has(k) {
			continue
		}
		v, ok := b.num(k)
		if !ok {
			continue
		}
		if v < 0 || v >= 90 {
			b.invalid(k, "%v is outside [0, 90)", v)
			continue
		}
		if k == "min_theta_deg" {
			sel.MinThetaDeg = &v
		} else {
			sel.MaxThetaDeg = &v
		}
	}
	if sel.MinThetaDeg != nil && sel.MaxThetaDeg != nil && *sel.MinThetaDeg > *sel.MaxThetaDeg {
		b.invalid("max_theta_deg", "%v is below min_theta_deg %v", *sel.MaxThetaDeg, *sel.MinThetaDeg)
	}
	return sel
}

// parseBeamPlan reads a spec's beam_plan.
func parseBeamPlan(p *yparser, m *ymap) *BeamPlan {
	if m == nil {
		return nil
	}
	plan := &BeamPlan{Line: m.node.Line}
	if f := m.sub("files", "spec beam_plan files"); f != nil {
		f.expect(planFilesFields...)
		plan.FilesLine = f.node.Line
		if f.has("transmission") {
			plan.Transmission, plan.TransmissionCSV = f.fileRef("transmission")
		}
		if f.has("noise") {
			plan.Noise, _ = parseNoiseList(p, f, "noise")
			for _, n := range plan.Noise {
				if !strings.Contains(n.File, "{beam}") {
					p.errf(n.Line, "spec beam_plan files: noise file %q has no {beam}; expected a name with {beam} for the beam id, e.g. \"{beam}-noise.csv\"", n.File)
				}
			}
		}
		if plan.Transmission != "" && !strings.Contains(plan.Transmission, "{beam}") {
			p.errf(f.line("transmission"), "spec beam_plan files: transmission %q has no {beam}; expected a glob with {beam} for the beam id, e.g. \"{beam}.*\"", plan.Transmission)
		}
	}
	if items, ok := m.seq("beams"); ok {
		if len(items) == 0 {
			m.invalid("beams", "is an empty list")
		}
		if len(items) > MaxRunBeams {
			p.errf(items[MaxRunBeams].Line, "spec beam_plan: beam %d of the %d listed from line %d is past the limit of a run; expected at most %d beams (each has its own sheet and charts; see the README's limits)",
				MaxRunBeams+1, len(items), m.line("beams"), MaxRunBeams)
			items = items[:MaxRunBeams]
		}
		plan.Beams = parseBeams(p, items, "spec beam_plan", planBeamFields)
	}
	return plan
}
