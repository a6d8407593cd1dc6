package ingest

import (
	"fmt"

	"gopkg.in/yaml.v3"
)

// Distributions a station's uncertainty term may declare.
var distributions = []string{"normal", "rectangular", "u-shaped", "triangular"}

// ParseStation reads stations/<id>.yaml. name is the file name used in
// problems (and stored as Station.File).
func ParseStation(data []byte, name string) (*Station, error) {
	p := &yparser{file: name}
	m := p.document(data, "station").expect(
		field{"schema", true, "schema: 1"},
		field{"id", true, "the station's identifier, as runs name it"},
		field{"description", false, "free text"},
		field{"receiver_match", true, "the receiver port's residual |Gamma|, 0 <= value < 1"},
		field{"drift_tolerance_db", true, "the allowed |pre - post| range-loss change in dB, above 0"},
		field{"method_tolerance_db", true, "the allowed difference between the two noise forms in dB, above 0"},
		field{"uncertainty", true, "a list of uncertainty terms (name, applies_to, value_db, distribution, coverage_k)"},
	)
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
	s.MethodToleranceDB, _ = m.positive("method_tolerance_db")
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
	m := p.mapping(n, what).named("name", "uncertainty term %q").expect(
		field{"name", true, "the term's name"},
		field{"applies_to", true, "a list of gain and/or gt"},
		field{"value_db", true, "the term's value in dB, >= 0 (half-width, or expanded at coverage_k for normal)"},
		field{"distribution", true, "normal, rectangular, u-shaped or triangular"},
		field{"coverage_k", false, "the coverage factor of a normal term's value_db, above 0 (normal terms only)"},
	)
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
	m := p.document(data, "reference").expect(
		field{"schema", true, "schema: 1"},
		field{"id", true, "the reference antenna's identifier, as runs name it"},
		field{"description", false, "free text"},
		field{"gain_kind", true, "realized or gain"},
		field{"calibrated", true, "the calibration date, YYYY-MM-DD"},
		field{"due", true, "the date the calibration is due, YYYY-MM-DD, not before calibrated"},
		field{"certificate", true, "the calibration certificate's number"},
		field{"coverage_k", true, "the coverage factor of the table's expanded uncertainties, above 0"},
		field{"table", false, "a list of [frequency_ghz, gain_dbi, expanded_uncertainty_db] rows, frequencies strictly increasing"},
		field{"table_file", false, "a CSV file (frequency_ghz,gain_dbi,uncertainty_db) relative to this file's folder"},
	)
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
	m := p.document(data, "spec").expect(
		field{"schema", true, "schema: 1"},
		field{"product", true, "the product code runs refer to"},
		field{"title", false, "free text"},
		field{"decision_rule", true, "simple or guarded"},
		field{"limits", true, "a list of limits (name, quantity, beams, band_ghz, statistic, limit)"},
		field{"operating_antenna_k", false, "the antenna temperature in K the projected G/T is stated at, above 0"},
		field{"element_phase_rms_tolerance_deg", false, "the allowed rms of the residual element phase in degrees, above 0"},
		field{"customer", false, "who the units are tested for: {name, address: [lines], order}"},
	)
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
	m := p.mapping(n, fmt.Sprintf("limit %d", i+1)).named("name", "limit %q").expect(
		field{"name", true, "the limit's name"},
		field{"quantity", true, "gt (dB/K) or gain (dBi)"},
		field{"beams", true, "{ids: [..]} or {min_theta_deg: .., max_theta_deg: ..}"},
		field{"band_ghz", true, "[low, high] in GHz with 0 < low < high"},
		field{"statistic", true, "min or mean"},
		field{"limit", true, "a list of [frequency_ghz, value] points, frequencies strictly increasing"},
		field{"scan_exponent", false, "the exponent n of limit(f) + 10*n*log10(cos theta), >= 0"},
	)
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
	b.expect(
		field{"ids", false, "a list of beam ids"},
		field{"min_theta_deg", false, "a scan angle in degrees, 0 <= theta < 90"},
		field{"max_theta_deg", false, "a scan angle in degrees, 0 <= theta < 90"},
	)
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
