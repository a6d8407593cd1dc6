package ingest

import (
	"fmt"
	"path"
	"strings"
	"time"

	"gopkg.in/yaml.v3"
)

// Lab is lab.yaml: the laboratory that issues the reports.
type Lab struct {
	File          string
	Schema        int
	Name          string
	Address       []string
	Contact       string
	Accreditation string
	// ReportPrefix starts every report number:
	// <ReportPrefix>-<serial>-R<revision>.
	ReportPrefix string
}

// Customer is who the work is done for: a spec's customer, or a run's,
// which overrides it.
type Customer struct {
	Name    string
	Address []string
	Order   string
}

// Approval is one file of approvals/<serial>/: a person's approval of the
// report of the unit's inputs (by their inputs_sha256) and verdict.
type Approval struct {
	File         string
	Line         int // the line of approved_by, where problems about it point
	Schema       int
	Serial       string
	InputsSHA256 string
	Verdict      string
	ApprovedBy   string
	Role         string
	Date         time.Time
	Comment      string
}

// ParseLab reads lab.yaml.
func ParseLab(data []byte, name string) (*Lab, error) {
	p := &yparser{file: name}
	m := p.document(data, "lab").expect(
		field{"schema", true, "schema: 1"},
		field{"name", true, "the laboratory's name"},
		field{"address", true, "the laboratory's address, a list of lines"},
		field{"contact", false, "an address or telephone number for questions about reports"},
		field{"accreditation", false, "free text: the accreditation body and number"},
		field{"report_prefix", true, "the start of every report number, e.g. EATL-GT (1 to 64 of A-Z a-z 0-9 . _ -)"},
	)
	if m == nil {
		return nil, p.err()
	}
	l := &Lab{File: name}
	l.Schema = m.schema()
	l.Name, _ = m.str("name")
	l.Address, _ = m.lines("address")
	if m.has("contact") {
		l.Contact, _ = m.str("contact")
	}
	if m.has("accreditation") {
		l.Accreditation, _ = m.str("accreditation")
	}
	l.ReportPrefix, _ = m.ident("report_prefix")
	if err := p.err(); err != nil {
		return nil, err
	}
	return l, nil
}

// customerFields are the keys of a customer: mapping.
var customerFields = []field{
	{"name", true, "the customer's name"},
	{"address", false, "the customer's address, a list of lines"},
	{"order", false, "the customer's order or contract reference"},
}

// customer reads the customer: mapping of a spec or a run.
func (m *ymap) customer(key string) *Customer {
	c := m.sub(key, "customer")
	if c == nil {
		return nil
	}
	c = c.expect(customerFields...)
	if c == nil {
		return nil
	}
	out := &Customer{}
	out.Name, _ = c.str("name")
	if c.has("address") {
		out.Address, _ = c.lines("address")
	}
	if c.has("order") {
		out.Order, _ = c.str("order")
	}
	return out
}

// lines reads a list of text lines (an address), or one line.
func (m *ymap) lines(key string) ([]string, bool) {
	n := m.value(key)
	if n == nil {
		return nil, false
	}
	if n.Kind == yaml.ScalarNode {
		s, ok := m.str(key)
		if !ok {
			return nil, false
		}
		return []string{s}, true
	}
	items, ok := m.seq(key)
	if !ok {
		return nil, false
	}
	var out []string
	for _, it := range items {
		it = resolve(it)
		if it.Kind != yaml.ScalarNode || it.Tag == "!!null" || strings.TrimSpace(it.Value) == "" || strings.ContainsAny(it.Value, "\r\n") {
			m.p.errf(it.Line, "%s: %s item is %s; expected a line of text", m.what, key, kindName(it))
			return nil, false
		}
		out = append(out, it.Value)
	}
	if len(out) == 0 {
		m.invalid(key, "is an empty list")
		return nil, false
	}
	return out, true
}

// Verdicts an approval may name: those of an issuable unit.
var approvableVerdicts = []string{"pass", "conditional-pass", "conditional-fail", "fail"}

// ParseApproval reads approvals/<serial>/<name>.yaml. The serial it names
// must be the folder's.
func ParseApproval(data []byte, name string) (*Approval, error) {
	p := &yparser{file: name}
	m := p.document(data, "approval").expect(
		field{"schema", true, "schema: 1"},
		field{"serial", true, "the unit's serial number (the folder's name)"},
		field{"inputs_sha256", true, "the unit's inputs_sha256, 64 lower-case hex digits, as its report and manifest show it"},
		field{"verdict", true, "the verdict approved: pass, conditional-pass, conditional-fail or fail"},
		field{"approved_by", true, "the name of the person who approves"},
		field{"role", false, "the person's role, e.g. Quality engineer"},
		field{"date", true, "when it was approved, RFC 3339, e.g. 2026-11-04T10:00:00Z"},
		field{"comment", false, "free text"},
	)
	if m == nil {
		return nil, p.err()
	}
	a := &Approval{File: name, Line: m.line("approved_by")}
	a.Schema = m.schema()
	if serial, ok := m.ident("serial"); ok {
		a.Serial = serial
		if dir := path.Base(path.Dir(name)); dir != serial {
			p.errf(m.line("serial"), "approval: serial %q is not the folder's %q; expected approvals/<serial>/ to hold that serial's approvals", serial, dir)
		}
	}
	if h, ok := m.str("inputs_sha256"); ok {
		if !isLowerHex64(h) {
			m.invalid("inputs_sha256", "%q is not 64 lower-case hex digits", h)
		}
		a.InputsSHA256 = h
	}
	a.Verdict, _ = m.oneOf("verdict", approvableVerdicts...)
	if by, ok := m.str("approved_by"); ok {
		if strings.ContainsAny(by, "\r\n") {
			m.invalid("approved_by", "holds a line break")
		}
		a.ApprovedBy = by
	}
	if m.has("role") {
		a.Role, _ = m.str("role")
	}
	a.Date, _ = m.instant("date")
	if m.has("comment") {
		a.Comment, _ = m.str("comment")
	}
	if err := p.err(); err != nil {
		return nil, err
	}
	return a, nil
}

func isLowerHex64(s string) bool {
	if len(s) != 64 {
		return false
	}
	for i := 0; i < len(s); i++ {
		if c := s[i]; !('0' <= c && c <= '9' || 'a' <= c && c <= 'f') {
			return false
		}
	}
	return true
}

// ApprovalYAML is the text of an approval file as gtpack approve writes
// it; ParseApproval reads it back as a.
func ApprovalYAML(a *Approval) []byte {
	var b strings.Builder
	q := func(s string) string {
		out, _ := yaml.Marshal(s)
		return strings.TrimSuffix(string(out), "\n")
	}
	fmt.Fprintf(&b, "schema: 1\nserial: %s\ninputs_sha256: %s\nverdict: %s\napproved_by: %s\n", a.Serial, a.InputsSHA256, a.Verdict, q(a.ApprovedBy))
	if a.Role != "" {
		fmt.Fprintf(&b, "role: %s\n", q(a.Role))
	}
	fmt.Fprintf(&b, "date: %s\n", a.Date.UTC().Format(time.RFC3339))
	if a.Comment != "" {
		fmt.Fprintf(&b, "comment: %s\n", q(a.Comment))
	}
	return []byte(b.String())
}
