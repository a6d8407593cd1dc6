// Package touchstone reads and writes Touchstone files, versions 1 and 2
// (the Touchstone File Format Specification 2.0 and 2.1, which describes
// version 1 too).
//
// Opinions, in a few lines:
//   - The reader streams: one line at a time through a bufio.Reader, numbers
//     counted rather than trusted to a line layout, so that data wrapped
//     over several lines reads the same as data on one line. What it does
//     insist on is that a frequency point starts on a new line, so that a
//     file with the wrong port count is caught at the line that shows it.
//   - Everything becomes S-parameters. Y, Z, H and G are converted with the
//     per-port real reference impedances (for real, positive references the
//     power-wave and pseudo-wave definitions give the same S).
//   - Whatever the file leaves open is refused by name rather than guessed:
//     mixed-mode data, declared counts that the data does not meet, noise
//     declared but absent, conversions that need a complex reference.
//   - The second and later option lines are ignored, as the specification
//     says. Comments ("!" to end of line) may hold any bytes.
//   - Lenient only where nothing is lost: version-2 data without a
//     [Network Data] line (the specification's own example 2 omits it) or
//     without [Number of Frequencies]; a complex reference impedance kept
//     for S-parameters (Network.Z0Complex). Vendor comments (a simulator's
//     "Port Impedance" lines) are comments: the reference impedances are
//     the option line's R or [Reference].
//   - Numbers are read exactly: each is the float64 nearest its decimal
//     text, as strconv.ParseFloat gives it, so RI data written with the
//     shortest round-trip digits (as Write writes) reads back bit for bit.
//
// It opens no files: the caller hands it a reader and the file's name.
package touchstone

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"io/fs"
	"math"
	"math/cmplx"
	"path"
	"slices"
	"strconv"
	"strings"
	"sync"
)

// Network is the content of one Touchstone file, always as S-parameters.
type Network struct {
	Ports       int
	FrequencyHz []float64
	// Z0 is the reference impedance of each port in ohms.
	Z0 []float64
	// Z0Complex is set only when a port's reference impedance is complex
	// (an option line such as "R (50+50j)"); Z0 then holds the real parts.
	// Such files are read for S-parameters only.
	Z0Complex []complex128
	// S holds one Ports x Ports matrix per frequency, row-major:
	// S[(k*Ports+i)*Ports+j] is S_(i+1)(j+1) at FrequencyHz[k].
	S []complex128
	// Noise holds the two-port noise parameters, when the file has them.
	Noise []NoisePoint
	// Version is the Touchstone version of the file: 1 or 2.
	Version int
	// Parameter is what the file stored (S, Y, Z, H or G) before conversion.
	Parameter string
	// Format is the number format of the file: DB, MA or RI.
	Format string
}

// At returns S_(i+1)(j+1) at frequency index k (i, j zero-based).
func (n *Network) At(k, i, j int) complex128 {
	return n.S[(k*n.Ports+i)*n.Ports+j]
}

// Param returns S_ij over frequency, with i and j one-based port numbers.
func (n *Network) Param(i, j int) []complex128 {
	out := make([]complex128, len(n.FrequencyHz))
	for k := range out {
		out[k] = n.At(k, i-1, j-1)
	}
	return out
}

// NoisePoint is one line of a two-port noise-parameter block.
type NoisePoint struct {
	FrequencyHz      float64
	MinNoiseFigureDB float64
	// GammaOpt is the optimum source reflection coefficient.
	GammaOpt complex128
	// EffectiveNoiseResistanceOhm is Rn in ohms (version 1 files store it
	// normalised to the reference resistance; it is scaled back here).
	EffectiveNoiseResistanceOhm float64
}

// Error is a refusal of a file's content: the line that shows the fault
// (0 when it concerns the file as a whole) and what was expected.
type Error struct {
	Line int
	Msg  string
}

func (e *Error) Error() string {
	if e.Line > 0 {
		return fmt.Sprintf("line %d: %s", e.Line, e.Msg)
	}
	return e.Msg
}

// Limits bound what Read holds of one file, so that a corrupt or hostile
// file is refused at the line that passes a bound instead of taking the
// memory it asks for. A zero field is no bound.
type Limits struct {
	Points int // frequency points of the network data; noise points
	Values int // S-parameter values: ports squared times frequency points
}

// maxPorts bounds the port count so that a corrupt header cannot
// ask for gigabytes; the largest real files seen have a few dozen ports.
const maxPorts = 1000

// Read reads a Touchstone file, version 1 or 2. name is the file's name:
// its extension (.sNp) gives a version-1 file's port count. Every refusal
// is an *Error with the line that shows it.
func Read(r io.Reader, name string, lim Limits) (*Network, error) {
	buf := bufferPool.Get().(*buffers)
	buf.br.Reset(r)
	t := &reader{
		name:     name,
		lim:      lim,
		br:       buf.br,
		lineVals: buf.lineVals[:0],
		rec:      buf.rec[:0],
		pairs:    buf.pairs,
		unit:     1e9,
		param:    'S',
		format:   "MA",
		order:    "21_12",
		matrix:   "full",
	}
	// The input's size, when it tells it, lets the arrays be sized once
	// after the first point instead of growing by copying.
	switch v := r.(type) {
	case interface{ Len() int }:
		t.sizeHint = int64(v.Len())
	case interface{ Stat() (fs.FileInfo, error) }:
		if st, err := v.Stat(); err == nil && st.Mode().IsRegular() {
			t.sizeHint = st.Size()
		}
	}
	n, err := t.read()
	buf.br.Reset(nil) // no reference to r is kept
	if cap(t.lineVals) <= 1<<16 && cap(t.rec) <= 1<<16 && cap(t.pairs) <= 1<<16 {
		buf.lineVals, buf.rec, buf.pairs = t.lineVals[:0], t.rec[:0], t.pairs
	}
	bufferPool.Put(buf)
	if err != nil {
		return nil, err
	}
	return n, nil
}

// buffers is the scratch memory of one read, none of which the result
// holds: kept in bufferPool for the next read, so that reading many files
// does not allocate (and collect) a 256 KiB buffer each time. A quarter
// of a megabyte takes a typical file in a few reads.
type buffers struct {
	br       *bufio.Reader
	lineVals []float64
	rec      []float64
	pairs    []complex128
}

var bufferPool = sync.Pool{New: func() any {
	return &buffers{br: bufio.NewReaderSize(nil, 256*1024)}
}}

type reader struct {
	name string
	lim  Limits
	br   *bufio.Reader
	long []byte // a line longer than the bufio buffer, assembled
	line int
	// consumed counts the bytes read so far; sizeHint is the input's size
	// or 0.
	consumed, sizeHint int64
	recByte            int64 // consumed before the record's first line

	version     int // 0 until known: 1, or 2 after [Version]
	ports       int
	optionLine  int // line of the first option line, 0 if none yet
	unit        float64
	param       byte   // S, Y, Z, H, G
	format      string // DB, MA, RI
	r           []complex128
	order       string // 21_12 or 12_21, 2-port only
	orderSet    bool   // [Two-Port Data Order] seen
	matrix      string // full, lower, upper
	reference   []float64
	refLine     int
	refPending  bool // [Reference] seen, values still to come
	nfreq       int  // declared [Number of Frequencies], -1 if none
	nfreqLine   int
	nnoise      int // declared [Number of Noise Frequencies], -1 if none
	nnoiseLine  int
	sectionData bool // [Network Data] seen (version 2)
	inNoise     bool // reading noise records
	noiseLine   int  // line of [Noise Data] or of the first noise record
	ended       bool // [End] seen
	inInfo      bool // between [Begin Information] and [End Information]

	// the record being assembled
	rec      []float64
	recLen   int
	recStart int // line where the record began
	recFirst int // values on the record's first line
	recLines int // lines the record has spanned so far

	z0       []complex128
	net      *Network
	dataLine int          // line of the first network data
	fmt      byte         // t.format's first letter once the data begins
	full     bool         // t.matrix is "full", once the data begins
	swap21   bool         // a 2-port file in the order 21_12, once the data begins
	pairs    []complex128 // the values of one point as complex numbers
	lineVals []float64    // the numbers of the current line
	ws       []complex128 // scratch matrices for conversion
}

func (t *reader) errf(line int, format string, args ...any) error {
	return &Error{Line: line, Msg: fmt.Sprintf(format, args...)}
}

// over reports whether n passes the bound max of Limits (0: none).
func over(n, max int) bool { return max > 0 && n > max }

// pointLimit is the refusal of point n (1-based) past the bound of
// points, at line; what names the point ("frequency point", "noise
// point") or the keyword that declares n points.
func (t *reader) pointLimit(line, n int, what string) error {
	return t.errf(line, "%s %s is past the limit of a trace; expected at most %s points (about the most a network analyser sweeps; see the README's limits)",
		what, grouped(n), grouped(t.lim.Points))
}

// grouped is n in digits grouped by threes: 1,048,576.
func grouped(n int) string {
	s := strconv.Itoa(n)
	neg := ""
	if n < 0 {
		neg, s = "-", s[1:]
	}
	for i := len(s) - 3; i > 0; i -= 3 {
		s = s[:i] + "," + s[i:]
	}
	return neg + s
}

// nextLine returns the next line, its line ending included, or ok false at the
// end of the input.
func (t *reader) nextLine() (line []byte, ok bool, err error) {
	b, err := t.br.ReadSlice('\n')
	if err == bufio.ErrBufferFull {
		t.long = append(t.long[:0], b...)
		for err == bufio.ErrBufferFull {
			b, err = t.br.ReadSlice('\n')
			t.long = append(t.long, b...)
		}
		b = t.long
	}
	if err != nil && err != io.EOF {
		return nil, false, t.errf(t.line+1, "cannot read: %v", err)
	}
	if len(b) == 0 && err == io.EOF {
		return nil, false, nil
	}
	t.line++
	t.consumed += int64(len(b))
	return b, true, nil
}

func trimSpace(b []byte) []byte {
	i, j := 0, len(b)
	for i < j && spaceTab[b[i]] {
		i++
	}
	for j > i && spaceTab[b[j-1]] {
		j--
	}
	return b[i:j]
}

// portsFromName returns N of a .sNp name, or 0.
func portsFromName(name string) int {
	ext := strings.ToLower(path.Ext(strings.ReplaceAll(name, "\\", "/")))
	if len(ext) < 4 || ext[1] != 's' || ext[len(ext)-1] != 'p' {
		return 0
	}
	n, err := strconv.Atoi(ext[2 : len(ext)-1])
	if err != nil || n < 1 || ext[2] == '+' || ext[2] == '-' {
		return 0
	}
	return n
}

func (t *reader) read() (*Network, error) {
	t.nfreq, t.nnoise = -1, -1
	for {
		raw, ok, err := t.nextLine()
		if err != nil {
			return nil, err
		}
		if !ok {
			break
		}
		if t.line == 1 {
			raw = bytes.TrimPrefix(raw, []byte("\xef\xbb\xbf"))
		}
		if t.net != nil && !t.ended && !t.inInfo {
			// A data line, the common case, is read first as it is: a
			// comment in it, which the scan cannot take for a number,
			// is looked for only when the scan stops early.
			b := trimSpace(raw)
			if len(b) > 0 && (b[0]-'0' <= 9 || b[0] == '-' || b[0] == '+' || b[0] == '.') {
				if err := t.data(b, true); err != nil {
					return nil, err
				}
				continue
			}
		}
		if i := bytes.IndexByte(raw, '!'); i >= 0 {
			raw = raw[:i]
		}
		b := trimSpace(raw)
		if len(b) == 0 {
			continue
		}
		if t.ended {
			return nil, t.errf(t.line, "content after [End]")
		}
		if t.inInfo {
			if b[0] == '[' && keywordName(b) == "end information" {
				t.inInfo = false
			}
			continue
		}
		switch {
		case b[0] == '[':
			if err := t.keyword(b); err != nil {
				return nil, err
			}
		case b[0] == '#':
			if err := t.option(b); err != nil {
				return nil, err
			}
		case t.refPending:
			if err := t.referenceValues(b); err != nil {
				return nil, err
			}
		default:
			if err := t.data(b, false); err != nil {
				return nil, err
			}
		}
	}
	return t.finish()
}

func keywordName(b []byte) string {
	end := bytes.IndexByte(b, ']')
	if end < 0 {
		return ""
	}
	return strings.ToLower(strings.Join(strings.Fields(string(b[1:end])), " "))
}

func (t *reader) keyword(b []byte) error {
	end := bytes.IndexByte(b, ']')
	if end < 0 {
		return t.errf(t.line, "keyword %q has no closing ']'", clip(string(b)))
	}
	kw := keywordName(b)
	args := strings.Fields(string(b[end+1:]))
	if t.refPending && kw != "" {
		return t.errf(t.line, "[Reference] at line %d gives %d of the %d reference impedances before [%s]",
			t.refLine, len(t.reference), t.ports, kw)
	}
	if t.version == 0 && kw != "version" {
		return t.errf(t.line, "keyword [%s] in a version-1 file: a version-2 file starts with [Version] 2.0", kw)
	}
	if t.version == 1 {
		return t.errf(t.line, "keyword [%s] after version-1 data: [Version] must come first", kw)
	}
	switch kw {
	case "number of ports", "two-port data order", "number of frequencies", "number of noise frequencies", "reference", "matrix format":
		if t.net != nil {
			return t.errf(t.line, "[%s] after the network data began (line %d): it belongs in the header", kw, t.dataLine)
		}
	}
	oneArg := func() (string, error) {
		if len(args) != 1 {
			return "", t.errf(t.line, "[%s] takes one value, found %d", kw, len(args))
		}
		return args[0], nil
	}
	count := func() (int, error) {
		a, err := oneArg()
		if err != nil {
			return 0, err
		}
		v, err := strconv.Atoi(a)
		if err != nil || v < 0 {
			return 0, t.errf(t.line, "[%s] needs a whole number, found %q", kw, clip(a))
		}
		return v, nil
	}
	needPorts := func() error {
		if t.ports == 0 {
			return t.errf(t.line, "[%s] before [Number of Ports]", kw)
		}
		return nil
	}
	switch kw {
	case "version":
		if t.version != 0 {
			return t.errf(t.line, "second [Version]")
		}
		a, err := oneArg()
		if err != nil {
			return err
		}
		if a != "2.0" && a != "2.1" {
			return t.errf(t.line, "[Version] %s is not supported: expected 2.0 or 2.1", clip(a))
		}
		t.version = 2
	case "number of ports":
		if t.ports != 0 {
			return t.errf(t.line, "second [Number of Ports]")
		}
		v, err := count()
		if err != nil {
			return err
		}
		if v < 1 || v > maxPorts {
			return t.errf(t.line, "[Number of Ports] %d is out of range: expected 1 to %d", v, maxPorts)
		}
		t.ports = v
	case "two-port data order":
		if err := needPorts(); err != nil {
			return err
		}
		a, err := oneArg()
		if err != nil {
			return err
		}
		if a != "12_21" && a != "21_12" {
			return t.errf(t.line, "[Two-Port Data Order] %s: expected 12_21 or 21_12", clip(a))
		}
		if t.ports != 2 {
			return t.errf(t.line, "[Two-Port Data Order] in a %d-port file: it applies to 2 ports only", t.ports)
		}
		t.order, t.orderSet = a, true
	case "number of frequencies":
		v, err := count()
		if err != nil {
			return err
		}
		if v < 1 {
			return t.errf(t.line, "[Number of Frequencies] must be at least 1")
		}
		if over(v, t.lim.Points) {
			return t.pointLimit(t.line, v, "[Number of Frequencies]")
		}
		t.nfreq, t.nfreqLine = v, t.line
	case "number of noise frequencies":
		v, err := count()
		if err != nil {
			return err
		}
		if over(v, t.lim.Points) {
			return t.pointLimit(t.line, v, "[Number of Noise Frequencies]")
		}
		t.nnoise, t.nnoiseLine = v, t.line
	case "reference":
		if err := needPorts(); err != nil {
			return err
		}
		if t.refLine != 0 {
			return t.errf(t.line, "second [Reference] (the first is at line %d)", t.refLine)
		}
		t.refLine, t.refPending = t.line, true
		if len(args) > 0 {
			return t.referenceValues(b[end+1:])
		}
	case "matrix format":
		a, err := oneArg()
		if err != nil {
			return err
		}
		m := strings.ToLower(a)
		if m != "full" && m != "lower" && m != "upper" {
			return t.errf(t.line, "[Matrix Format] %s: expected Full, Lower or Upper", clip(a))
		}
		t.matrix = m
	case "mixed-mode order":
		return t.errf(t.line, "mixed-mode data is not supported ([Mixed-Mode Order])")
	case "network data":
		if err := needPorts(); err != nil {
			return err
		}
		if t.sectionData || t.net != nil {
			return t.errf(t.line, "second [Network Data]")
		}
		t.sectionData = true
	case "noise data":
		if err := needPorts(); err != nil {
			return err
		}
		if t.ports != 2 {
			return t.errf(t.line, "[Noise Data] in a %d-port file: noise parameters are for 2 ports only", t.ports)
		}
		if t.net == nil {
			return t.errf(t.line, "[Noise Data] before any network data")
		}
		if err := t.endRecord(); err != nil {
			return err
		}
		if t.inNoise {
			return t.errf(t.line, "second [Noise Data]")
		}
		t.inNoise, t.noiseLine = true, t.line
		t.startRecords(5)
	case "end":
		if err := t.endRecord(); err != nil {
			return err
		}
		t.ended = true
	case "begin information":
		t.inInfo = true
	case "end information":
		return t.errf(t.line, "[End Information] without [Begin Information]")
	default:
		return t.errf(t.line, "unknown keyword [%s]", clip(kw))
	}
	return nil
}

func (t *reader) referenceValues(b []byte) error {
	for _, f := range bytes.Fields(b) {
		if len(t.reference) == t.ports {
			return t.errf(t.line, "[Reference] at line %d has more than the %d values of %d ports", t.refLine, t.ports, t.ports)
		}
		v, ok := parseNumber(f)
		if !ok || v <= 0 {
			return t.errf(t.line, "reference impedance %q is not a positive number", clip(string(f)))
		}
		t.reference = append(t.reference, v)
	}
	if len(t.reference) == t.ports {
		t.refPending = false
	}
	return nil
}

// option reads the option line: # [unit] [parameter] [format] [R n...],
// any order, any case, any part missing.
func (t *reader) option(b []byte) error {
	if t.optionLine != 0 {
		return nil // only the first option line counts
	}
	if t.net != nil {
		return t.errf(t.line, "option line after the network data began (line %d): the data was read with the default options", t.dataLine)
	}
	t.optionLine = t.line
	toks := strings.Fields(strings.ToLower(string(b[1:])))
	seen := map[string]bool{}
	set := func(what string) error {
		if seen[what] {
			return t.errf(t.line, "option line gives the %s twice", what)
		}
		seen[what] = true
		return nil
	}
	for i := 0; i < len(toks); i++ {
		tok := toks[i]
		var err error
		switch tok {
		case "hz", "khz", "mhz", "ghz":
			err = set("frequency unit")
			t.unit = map[string]float64{"hz": 1, "khz": 1e3, "mhz": 1e6, "ghz": 1e9}[tok]
		case "s", "y", "z", "h", "g":
			err = set("parameter")
			t.param = tok[0] - 'a' + 'A'
		case "db", "ma", "ri":
			err = set("format")
			t.format = strings.ToUpper(tok)
		case "r":
			err = set("reference resistance")
			t.r = t.r[:0]
			for i+1 < len(toks) {
				z, ok := parseImpedance(toks[i+1])
				if !ok {
					break
				}
				t.r = append(t.r, z)
				i++
			}
			if len(t.r) == 0 {
				return t.errf(t.line, "option line: R must be followed by the reference resistance in ohms")
			}
			for _, z := range t.r {
				if real(z) <= 0 || math.IsInf(real(z), 0) || math.IsInf(imag(z), 0) {
					return t.errf(t.line, "option line: reference resistance %s is not positive", formatImpedance(z))
				}
			}
		default:
			return t.errf(t.line, "option line: unknown option %q: expected a frequency unit (Hz, kHz, MHz, GHz), a parameter (S, Y, Z, H, G), a format (DB, MA, RI) or R n", clip(tok))
		}
		if err != nil {
			return err
		}
	}
	return nil
}

// parseImpedance reads a reference resistance: a number, or a complex
// value written "(a+bj)" as some writers do.
func parseImpedance(s string) (complex128, bool) {
	if v, ok := parseNumber([]byte(s)); ok {
		return complex(v, 0), true
	}
	if len(s) < 3 || s[0] != '(' || s[len(s)-1] != ')' {
		return 0, false
	}
	in := strings.ReplaceAll(s[1:len(s)-1], "j", "i")
	if strings.ContainsAny(in, "nN") { // no inf, no nan
		return 0, false
	}
	c, err := strconv.ParseComplex(in, 128)
	if err != nil || cmplx.IsNaN(c) || cmplx.IsInf(c) {
		return 0, false
	}
	return c, true
}

func formatImpedance(z complex128) string {
	if imag(z) == 0 {
		return strconv.FormatFloat(real(z), 'g', -1, 64)
	}
	return strconv.FormatComplex(z, 'g', -1, 128)
}

func clip(s string) string {
	if len(s) > 40 {
		return s[:40] + "..."
	}
	return s
}

// fields splits a data line the way scanLine does: at ASCII white
// space only (bytes.Fields would also split at Unicode spaces such as
// U+3000, and disagree with the scanner about which token is which).
func fields(line []byte) [][]byte {
	return bytes.FieldsFunc(line, func(r rune) bool { return r < 0x80 && spaceTab[r] })
}

// field is the n-th field of fields, or the whole line when there are
// fewer.
func field(line []byte, n int) []byte {
	if f := fields(line); n < len(f) {
		return f[n]
	}
	return line
}

// begin fixes what the data needs once the header is over.
func (t *reader) begin() error {
	if t.version == 0 {
		t.version = 1
	}
	if t.version == 1 {
		t.ports = portsFromName(t.name)
		if t.ports == 0 {
			return t.errf(t.line, "cannot tell the port count: a version-1 file's name must end in .sNp (for example .s2p), found %q", clip(path.Base(t.name)))
		}
		if t.ports > maxPorts {
			return t.errf(t.line, "%d ports is more than the %d supported", t.ports, maxPorts)
		}
	} else {
		if t.ports == 0 {
			return t.errf(t.line, "network data before [Number of Ports]")
		}
		if t.refPending {
			return t.errf(t.line, "[Reference] at line %d gives %d of the %d reference impedances", t.refLine, len(t.reference), t.ports)
		}
		if t.ports == 2 && !t.orderSet {
			// S21 and S12 would be a guess: the specification makes the
			// keyword required for version-2 2-port files.
			return t.errf(t.line, "a version-2 2-port file needs [Two-Port Data Order] (12_21 or 21_12) before its data")
		}
	}
	// The reference impedance of each port.
	t.z0 = make([]complex128, t.ports)
	r := t.r
	if len(r) == 0 {
		r = []complex128{50}
	}
	switch {
	case t.version == 2 && t.reference != nil:
		for i, v := range t.reference {
			t.z0[i] = complex(v, 0)
		}
	case len(r) == 1:
		for i := range t.z0 {
			t.z0[i] = r[0]
		}
	case len(r) == t.ports:
		copy(t.z0, r)
	default:
		return t.errf(t.optionLine, "option line gives %d reference resistances for %d ports: expected 1 or %d", len(r), t.ports, t.ports)
	}
	if t.param != 'S' {
		if (t.param == 'H' || t.param == 'G') && t.ports != 2 {
			return t.errf(t.optionLine, "%c-parameters in a %d-port file: H and G are defined for 2 ports only", t.param, t.ports)
		}
		for _, z := range t.z0 {
			if imag(z) != 0 {
				return t.errf(t.optionLine, "%c-parameters with the complex reference impedance %s cannot be converted to S: the wave definition is not stated; only S-parameters may have a complex reference", t.param, formatImpedance(z))
			}
		}
		if t.version == 1 && len(r) > 1 {
			return t.errf(t.optionLine, "%c-parameters in a version-1 file with one reference resistance per port: their normalisation is not defined", t.param)
		}
	}
	n := &Network{Ports: t.ports, Version: t.version, Parameter: string(t.param), Format: t.format}
	n.Z0 = make([]float64, t.ports)
	for i, z := range t.z0 {
		n.Z0[i] = real(z)
		if imag(z) != 0 && n.Z0Complex == nil {
			n.Z0Complex = make([]complex128, t.ports)
			copy(n.Z0Complex, t.z0)
		}
	}
	t.net, t.dataLine = n, t.line
	t.fmt = t.format[0]
	t.full = t.matrix == "full"
	t.swap21 = t.ports == 2 && t.order == "21_12"
	np := t.ports * t.ports
	if t.matrix != "full" {
		np = t.ports * (t.ports + 1) / 2
	}
	t.startRecords(1 + 2*np)
	if t.nfreq > 0 {
		// Trust the declared count only as far as a modest allocation:
		// a corrupt header must not reserve gigabytes.
		c := min(t.nfreq, 1<<16/(t.ports*t.ports)+1)
		if t.sizeHint > 0 {
			// A point takes at least two bytes a value.
			c = min(c, int(t.sizeHint/int64(2*(1+2*t.ports*t.ports)))+1)
		}
		n.FrequencyHz = make([]float64, 0, c)
		n.S = make([]complex128, 0, c*t.ports*t.ports)
	}
	return nil
}

func (t *reader) startRecords(length int) {
	t.recLen = length
	t.rec = t.rec[:0]
}

func (t *reader) describeRecord() string {
	if t.inNoise {
		return "a noise point has 5 values (frequency, minimum noise figure, |Gamma opt|, angle, Rn)"
	}
	pairs := (t.recLen - 1) / 2
	return fmt.Sprintf("a %d-port frequency point has %d values (the frequency and %d pairs)", t.ports, t.recLen, pairs)
}

// data takes one line of numbers. mayComment tells that the line may
// still hold a comment ("!" to the end), to be cut off if the numbers stop
// before its end.
func (t *reader) data(line []byte, mayComment bool) error {
	if t.net == nil {
		if err := t.begin(); err != nil {
			return err
		}
	}
	vals, bad := scanLine(line, t.lineVals[:0])
	if bad >= 0 && mayComment {
		if i := bytes.IndexByte(line, '!'); i >= 0 {
			line = trimSpace(line[:i])
			vals, bad = scanLine(line, vals[:0])
		}
	}
	t.lineVals = vals
	continuing := len(t.rec) > 0
	if continuing {
		t.recLines++
	} else {
		t.recStart, t.recLines, t.recFirst = t.line, 1, 0
		t.recByte = t.consumed - int64(len(line))
	}
	rec := t.rec
	start := 0
	if len(rec) == 0 && bad < 0 && len(vals) == t.recLen && !t.inNoise {
		// The common line: one whole frequency point. The values go to
		// the network from where they are.
		if err := t.checkFrequency(vals[0]); err != nil {
			return err
		}
		if !t.inNoise {
			t.recFirst = len(vals)
			return t.completeRecord(vals)
		}
		// The frequency went down: the noise block of a version-1 file
		// starts here, with records of another length.
		rec = append(rec, vals[0])
		start = 1
	}
	for col := start; col < len(vals); col++ {
		v := vals[col]
		if len(rec) == 0 {
			if col > 0 {
				return t.tooMany(line, col)
			}
			if err := t.checkFrequency(v); err != nil {
				return err
			}
		}
		rec = append(rec, v)
		if len(rec) == t.recLen {
			err := t.completeRecord(rec)
			rec = rec[:0]
			t.rec = rec
			if err != nil {
				return err
			}
		}
	}
	t.rec = rec
	if bad >= 0 {
		tok := field(line, bad)
		switch {
		case len(rec) == 0 && bad > 0:
			return t.tooMany(line, bad)
		case len(rec) == 0:
			return t.errf(t.line, "%q is not a number: expected a frequency (%s)", clip(string(tok)), t.describeRecord())
		default:
			return t.errf(t.line, "value %d on the line, %q, is not a number", bad+1, clip(string(tok)))
		}
	}
	if !continuing {
		t.recFirst = len(vals)
	}
	return nil
}

// tooMany reports a line that goes on after its point ended, used values
// of it being the point's.
func (t *reader) tooMany(line []byte, used int) error {
	return t.errf(t.line, "line has %d values but the point that began at line %d needed only %d of them: %s; a new point starts on a new line",
		len(fields(line)), t.recStart, used, t.describeRecord())
}

// checkFrequency runs before a new record starts with value f. It also
// notices the start of the noise block of a version-1 2-port file.
func (t *reader) checkFrequency(f float64) error {
	hz := f * t.unit
	if f < 0 {
		return t.errf(t.line, "frequency %s is negative", formatNum(f))
	}
	if math.IsInf(hz, 0) {
		return t.errf(t.line, "frequency %s is too large", formatNum(f))
	}
	if t.inNoise {
		if k := len(t.net.Noise); k > 0 && hz <= t.net.Noise[k-1].FrequencyHz {
			return t.errf(t.line, "noise frequency %s is not above the previous %s", formatNum(f), formatNum(t.net.Noise[k-1].FrequencyHz/t.unit))
		}
		return nil
	}
	k := len(t.net.FrequencyHz)
	if k == 0 || hz > t.net.FrequencyHz[k-1] {
		return nil
	}
	if t.version == 1 && t.ports == 2 {
		// Version 1: the noise block of a 2-port file starts where the
		// frequency stops increasing.
		t.inNoise, t.noiseLine = true, t.line
		t.startRecords(5)
		return nil
	}
	return t.errf(t.line, "frequency %s is not above the previous %s", formatNum(f), formatNum(t.net.FrequencyHz[k-1]/t.unit))
}

func formatNum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// endRecord checks that no record is half read (before a keyword or at the
// end of the file).
func (t *reader) endRecord() error {
	if len(t.rec) == 0 {
		return nil
	}
	return t.errf(t.recStart, "the point that begins here has %d of its %d values: %s", len(t.rec), t.recLen, t.describeRecord())
}

// completeRecord takes the values v of a whole record (a frequency point
// or a noise point).
func (t *reader) completeRecord(v []float64) error {
	n := t.net
	if t.inNoise {
		var gamma [1]complex128
		polarPairs(gamma[:], v[2:4], false)
		rn := v[4]
		if t.version == 1 {
			rn *= real(t.z0[0])
		}
		if over(len(n.Noise)+1, t.lim.Points) {
			return t.pointLimit(t.recStart, len(n.Noise)+1, "noise point")
		}
		n.Noise = append(n.Noise, NoisePoint{
			FrequencyHz:                 v[0] * t.unit,
			MinNoiseFigureDB:            v[1],
			GammaOpt:                    gamma[0],
			EffectiveNoiseResistanceOhm: rn,
		})
		if t.nnoise >= 0 && len(n.Noise) > t.nnoise {
			return t.errf(t.recStart, "noise point %d is more than the %d declared by [Number of Noise Frequencies] at line %d", len(n.Noise), t.nnoise, t.nnoiseLine)
		}
		return nil
	}
	if t.ports == 2 && !t.inNoise && t.recLines > 1 && t.recFirst == 3 {
		// A wrapped 2-port point whose first line is exactly a 1-port
		// point is a 1-port file under a 2-port name.
		return t.errf(t.recStart, "line has 3 values, a 1-port frequency point, where %s", t.describeRecord())
	}
	if t.nfreq >= 0 && len(n.FrequencyHz) >= t.nfreq {
		return t.errf(t.recStart, "frequency point %d is more than the %d declared by [Number of Frequencies] at line %d", len(n.FrequencyHz)+1, t.nfreq, t.nfreqLine)
	}
	N := t.ports
	if over(len(n.FrequencyHz)+1, t.lim.Points) {
		return t.pointLimit(t.recStart, len(n.FrequencyHz)+1, "frequency point")
	}
	if lim := t.lim.Values; over((len(n.FrequencyHz)+1)*N*N, lim) {
		return t.errf(t.recStart, "frequency point %s of this %d-port file takes it past %s S-parameter values (ports squared times frequencies); expected at most %s, %s points of a %d-port file (the reader holds every value; see the README's limits)",
			grouped(len(n.FrequencyHz)+1), N, grouped(lim), grouped(lim), grouped(lim/(N*N)), N)
	}
	if len(n.FrequencyHz) == 0 && t.sizeHint > 0 && t.nfreq < 0 {
		// Estimate the point count from the size of this first point. The
		// estimate is bounded by the input's size: a point takes at least
		// two bytes a value.
		per := max(t.consumed-t.recByte, int64(2*len(v)))
		est := (t.sizeHint-t.recByte)/per + 1
		est += est / 8 // points differ in length a little
		if t.lim.Values > 0 {
			est = min(est, int64(t.lim.Values/(N*N)))
		}
		if t.lim.Points > 0 {
			est = min(est, int64(t.lim.Points))
		}
		if est > 1 {
			n.FrequencyHz = make([]float64, 0, est)
			n.S = make([]complex128, 0, est*int64(N*N))
		}
	}
	n.FrequencyHz = append(n.FrequencyHz, v[0]*t.unit)
	base := len(n.S)
	// Every element of the new matrix is written below.
	if cap(n.S)-base < N*N {
		n.S = slices.Grow(n.S, N*N)
	}
	n.S = n.S[:base+N*N]
	m := n.S[base:]
	vals := v[1:]
	if t.full {
		// Each pair straight to its place in the matrix, row by row.
		m = m[:len(vals)/2]
		if err := t.pairsToComplex(m, vals, v); err != nil {
			return err
		}
		if t.swap21 {
			// The 2-port order S11 S21 S12 S22.
			m[1], m[2] = m[2], m[1]
		}
	} else {
		np := (len(v) - 1) / 2
		if cap(t.pairs) < np {
			t.pairs = make([]complex128, np)
		}
		pairs := t.pairs[:np]
		if err := t.pairsToComplex(pairs, vals, v); err != nil {
			return err
		}
		p := 0
		for i := 0; i < N; i++ {
			j0, j1 := 0, i
			if t.matrix == "upper" {
				j0, j1 = i, N-1
			}
			for j := j0; j <= j1; j++ {
				m[i*N+j] = pairs[p]
				m[j*N+i] = pairs[p]
				p++
			}
		}
	}
	if t.param != 'S' {
		if err := t.toS(m); err != nil {
			return t.errf(t.recStart, "%c-parameters at frequency %s: %v", t.param, formatNum(v[0]), err)
		}
	}
	return nil
}

// pairsToComplex converts the pairs of vals (the numbers of record v after
// its frequency) into dst in the file's format. An error is a magnitude in
// dB too large for a float64 (finite numbers give finite RI and MA
// values), named with its record.
func (t *reader) pairsToComplex(dst []complex128, vals, v []float64) error {
	switch t.fmt {
	case 'R':
		for p := range dst {
			dst[p] = complex(vals[2*p], vals[2*p+1])
		}
	case 'M':
		polarPairs(dst, vals, false)
	default:
		if p := polarPairs(dst, vals, true); p >= 0 {
			return t.errf(t.recStart, "value pair %d of the point at frequency %s: %s dB is too large", p+1, formatNum(v[0]), formatNum(vals[2*p]))
		}
	}
	return nil
}

func (t *reader) finish() (*Network, error) {
	if t.refPending {
		return nil, t.errf(t.refLine, "[Reference] gives %d of the %d reference impedances", len(t.reference), t.ports)
	}
	if t.inInfo {
		return nil, t.errf(t.line, "[Begin Information] without [End Information]")
	}
	if err := t.endRecord(); err != nil {
		return nil, err
	}
	n := t.net
	if n == nil || len(n.FrequencyHz) == 0 {
		return nil, t.errf(0, "no network data: the file has a header but no frequency points")
	}
	if t.nfreq >= 0 && len(n.FrequencyHz) != t.nfreq {
		return nil, t.errf(t.nfreqLine, "[Number of Frequencies] declares %d points but the file has %d", t.nfreq, len(n.FrequencyHz))
	}
	if t.version == 2 && t.nnoise >= 0 && !t.inNoise {
		return nil, t.errf(t.nnoiseLine, "[Number of Noise Frequencies] declares %d noise points but the file has no [Noise Data]", t.nnoise)
	}
	if t.version == 2 && t.inNoise && t.nnoise < 0 {
		return nil, t.errf(t.noiseLine, "[Noise Data] without [Number of Noise Frequencies]")
	}
	if t.nnoise >= 0 && len(n.Noise) != t.nnoise {
		return nil, t.errf(t.nnoiseLine, "[Number of Noise Frequencies] declares %d noise points but the file has %d", t.nnoise, len(n.Noise))
	}
	if t.inNoise && len(n.Noise) == 0 {
		return nil, t.errf(t.noiseLine, "[Noise Data] has no noise points")
	}
	return n, nil
}

// toS converts one matrix of Y, Z, H or G parameters, in place, to S with
// the ports' real reference impedances.
func (t *reader) toS(m []complex128) error {
	N := t.ports
	if t.version == 1 {
		// Version 1 stores Y, Z, H and G normalised to R (one value here).
		// For H and G that means the impedance-like element (h11, g22) in
		// units of R and the admittance-like one (h22, g11) in units of 1/R;
		// the other two are ratios. The specification's H and G examples
		// use R 1, where this makes no difference.
		r := complex(real(t.z0[0]), 0)
		switch t.param {
		case 'Z':
			for i := range m {
				m[i] *= r
			}
		case 'Y':
			for i := range m {
				m[i] /= r
			}
		case 'H':
			m[0] *= r
			m[3] /= r
		case 'G':
			m[0] /= r
			m[3] *= r
		}
	}
	z0 := make([]float64, N)
	for i, z := range t.z0 {
		z0[i] = real(z)
	}
	var err error
	switch t.param {
	case 'Z':
		err = zToS(m, z0, &t.ws)
	case 'Y':
		err = yToS(m, z0, &t.ws)
	case 'H':
		if err = hToZ(m); err == nil {
			err = zToS(m, z0, &t.ws)
		}
	case 'G':
		if err = gToZ(m); err == nil {
			err = zToS(m, z0, &t.ws)
		}
	}
	return err
}
