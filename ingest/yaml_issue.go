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
	m := p.document(data, "lab").expect(labFields...)
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

// ParseApproval reads approvals/<serial>/<name>.yaml. The serial it names
// must be the folder's.
func ParseApproval(data []byte, name string) (*Approval, error) {
	p := &yparser{file: name}
	m := p.document(data, "approval").expect(approvalFields...)
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
