package ingest

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"math/big"
	"math/bits"
	"math/cmplx"
	"path"
	"slices"
	"strconv"
	"strings"
	"sync"
)

// This file reads Touchstone files, versions 1 and 2, into a Network.
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

// maxTouchstonePorts bounds the port count so that a corrupt header cannot
// ask for gigabytes; the largest real files seen have a few dozen ports.
const maxTouchstonePorts = 1000

// ReadTouchstone reads a Touchstone file (version 1 or 2). name is the file's name as it should
// appear in errors; its extension (.sNp / .ts) gives the port count for version 1.
// Errors are *Problem with File and Line.
func ReadTouchstone(r io.Reader, name string) (*Network, error) {
	buf := tsBufferPool.Get().(*tsBuffers)
	buf.br.Reset(r)
	t := &tsReader{
		name:     name,
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
	tsBufferPool.Put(buf)
	if err != nil {
		var p *Problem
		if errors.As(err, &p) {
			return nil, p
		}
		return nil, Problemf(name, t.line, "%v", err)
	}
	return n, nil
}

// tsBuffers is the scratch memory of one read, none of which the result
// holds: kept in tsBufferPool for the next read, so that reading many files
// does not allocate (and collect) a 256 KiB buffer each time. A quarter
// of a megabyte takes a typical file in a few reads.
type tsBuffers struct {
	br       *bufio.Reader
	lineVals []float64
	rec      []float64
	pairs    []complex128
}

var tsBufferPool = sync.Pool{New: func() any {
	return &tsBuffers{br: bufio.NewReaderSize(nil, 256*1024)}
}}

type tsReader struct {
	name string
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

func (t *tsReader) errf(line int, format string, args ...any) error {
	return Problemf(t.name, line, format, args...)
}

// nextLine returns the next line without its line ending, or ok false at the
// end of the input.
func (t *tsReader) nextLine() (line []byte, ok bool, err error) {
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

func tsTrimSpace(b []byte) []byte {
	i, j := 0, len(b)
	for i < j && tsSpaceTab[b[i]] {
		i++
	}
	for j > i && tsSpaceTab[b[j-1]] {
		j--
	}
	return b[i:j]
}

// tsPortsFromName returns N of a .sNp name, or 0.
func tsPortsFromName(name string) int {
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

func (t *tsReader) read() (*Network, error) {
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
			b := tsTrimSpace(raw)
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
		b := tsTrimSpace(raw)
		if len(b) == 0 {
			continue
		}
		if t.ended {
			return nil, t.errf(t.line, "content after [End]")
		}
		if t.inInfo {
			if b[0] == '[' && tsKeywordName(b) == "end information" {
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

func tsKeywordName(b []byte) string {
	end := bytes.IndexByte(b, ']')
	if end < 0 {
		return ""
	}
	return strings.ToLower(strings.Join(strings.Fields(string(b[1:end])), " "))
}

func (t *tsReader) keyword(b []byte) error {
	end := bytes.IndexByte(b, ']')
	if end < 0 {
		return t.errf(t.line, "keyword %q has no closing ']'", tsClip(string(b)))
	}
	kw := tsKeywordName(b)
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
			return 0, t.errf(t.line, "[%s] needs a whole number, found %q", kw, tsClip(a))
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
			return t.errf(t.line, "[Version] %s is not supported: expected 2.0 or 2.1", tsClip(a))
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
		if v < 1 || v > maxTouchstonePorts {
			return t.errf(t.line, "[Number of Ports] %d is out of range: expected 1 to %d", v, maxTouchstonePorts)
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
			return t.errf(t.line, "[Two-Port Data Order] %s: expected 12_21 or 21_12", tsClip(a))
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
		if v > MaxTracePoints {
			return pointLimit(t.name, t.line, v, "[Number of Frequencies]")
		}
		t.nfreq, t.nfreqLine = v, t.line
	case "number of noise frequencies":
		v, err := count()
		if err != nil {
			return err
		}
		if v > MaxTracePoints {
			return pointLimit(t.name, t.line, v, "[Number of Noise Frequencies]")
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
			return t.errf(t.line, "[Matrix Format] %s: expected Full, Lower or Upper", tsClip(a))
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
		return t.errf(t.line, "unknown keyword [%s]", tsClip(kw))
	}
	return nil
}

func (t *tsReader) referenceValues(b []byte) error {
	for _, f := range bytes.Fields(b) {
		if len(t.reference) == t.ports {
			return t.errf(t.line, "[Reference] at line %d has more than the %d values of %d ports", t.refLine, t.ports, t.ports)
		}
		v, ok := tsParseNumber(f)
		if !ok || v <= 0 {
			return t.errf(t.line, "reference impedance %q is not a positive number", tsClip(string(f)))
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
func (t *tsReader) option(b []byte) error {
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
				z, ok := tsParseImpedance(toks[i+1])
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
					return t.errf(t.line, "option line: reference resistance %s is not positive", tsFormatImpedance(z))
				}
			}
		default:
			return t.errf(t.line, "option line: unknown option %q: expected a frequency unit (Hz, kHz, MHz, GHz), a parameter (S, Y, Z, H, G), a format (DB, MA, RI) or R n", tsClip(tok))
		}
		if err != nil {
			return err
		}
	}
	return nil
}

// tsParseImpedance reads a reference resistance: a number, or a complex
// value written "(a+bj)" as some writers do.
func tsParseImpedance(s string) (complex128, bool) {
	if v, ok := tsParseNumber([]byte(s)); ok {
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

func tsFormatImpedance(z complex128) string {
	if imag(z) == 0 {
		return strconv.FormatFloat(real(z), 'g', -1, 64)
	}
	return strconv.FormatComplex(z, 'g', -1, 128)
}

func tsClip(s string) string {
	if len(s) > 40 {
		return s[:40] + "..."
	}
	return s
}

// tsParseNumber parses a whole token as a decimal number as Touchstone
// writes them: sign, digits, point and exponent only (no hex, no inf, no
// nan, no digit separators).
func tsParseNumber(b []byte) (float64, bool) {
	v, n, ok := tsScan(b)
	return v, ok && n == len(b)
}

var tsSpaceTab = [256]bool{' ': true, '\t': true, '\r': true, '\n': true, '\v': true, '\f': true}

// tsFields splits a data line the way tsScanLine does: at ASCII white
// space only (bytes.Fields would also split at Unicode spaces such as
// U+3000, and disagree with the scanner about which token is which).
func tsFields(line []byte) [][]byte {
	return bytes.FieldsFunc(line, func(r rune) bool { return r < 0x80 && tsSpaceTab[r] })
}

// tsField is the n-th field of tsFields, or the whole line when there are
// fewer.
func tsField(line []byte, n int) []byte {
	if f := tsFields(line); n < len(f) {
		return f[n]
	}
	return line
}

var tsPow10 = [...]float64{1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10,
	1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22}

// tsScan reads the number at the start of b, up to the next white space,
// and returns it with the length of the token. ok is false when the token
// is not a finite decimal number.
//
// The common case (a mantissa below 2^53 and a power of ten up to 22) is
// computed directly: both are exact in a float64, so one multiplication or
// division rounds correctly (Clinger's fast path). Longer mantissas go to
// strconv.ParseFloat, which rounds correctly too.
func tsScan(b []byte) (v float64, n int, ok bool) {
	i := 0
	neg := false
	if len(b) > 0 && (b[0] == '+' || b[0] == '-') {
		neg = b[0] == '-'
		i++
	}
	// More than 19 digits may overflow mant; then the slow path parses the
	// token again.
	start := i
	mant, i := tsDigits(b, i, 0)
	nd := i - start
	exp := 0
	if i < len(b) && b[i] == '.' {
		i++
		fs := i
		mant, i = tsDigits(b, i, mant)
		nd += i - fs
		exp = fs - i
	}
	good := nd > 0
	if good && i < len(b) && (b[i] == 'e' || b[i] == 'E') {
		i++
		eneg := false
		if i < len(b) && (b[i] == '+' || b[i] == '-') {
			eneg = b[i] == '-'
			i++
		}
		e, ed := 0, 0
		for ; i < len(b) && b[i]-'0' <= 9; i++ {
			if e < 100000 {
				e = e*10 + int(b[i]-'0')
			}
			ed++
		}
		if ed == 0 {
			good = false
		}
		if eneg {
			e = -e
		}
		exp += e
	}
	trunc := nd > 19
	end := i
	for end < len(b) && !tsSpaceTab[b[end]] {
		end++
	}
	if !good || end != i {
		return 0, end, false
	}
	if !trunc && mant <= 1<<53 && exp >= -22 && exp <= 22 {
		v = float64(mant)
		if exp > 0 {
			v *= tsPow10[exp]
		} else if exp < 0 {
			v /= tsPow10[-exp]
		}
		if neg {
			v = -v
		}
		return v, end, true
	}
	if !trunc {
		if v, ok := tsEiselLemire(mant, exp, neg); ok {
			return v, end, true
		}
	}
	v, err := strconv.ParseFloat(string(b[:end]), 64)
	if err != nil && !(errors.Is(err, strconv.ErrRange) && v == 0) || math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, end, false // too large for a float64 (underflow to zero is kept)
	}
	return v, end, true
}

// The Eisel-Lemire algorithm turns a decimal mantissa (up to 19 digits) and
// power of ten into the correctly rounded float64, or reports that it
// cannot decide (then strconv.ParseFloat, which runs the same algorithm
// after parsing the text again, and a slower fallback, decides). It is what
// makes numbers printed with 17 significant digits fast. After D. Lemire,
// "Number parsing at a gigabyte per second", Software: Practice and
// Experience 51 (2021), and the Go standard library's strconv.

const tsPowMin, tsPowMax = -100, 50

var (
	tsPowOnce sync.Once
	// tsPowTab[q-tsPowMin] holds the 128 most significant bits of 10^q,
	// normalised so that the top bit is set, rounded down: {low, high}.
	tsPowTab [tsPowMax - tsPowMin + 1][2]uint64
)

func tsPowInit() {
	one := big.NewInt(1)
	for q := tsPowMin; q <= tsPowMax; q++ {
		p := new(big.Int).Exp(big.NewInt(10), big.NewInt(int64(tsAbs(q))), nil)
		var m *big.Int
		if q >= 0 {
			if l := p.BitLen(); l <= 128 {
				m = p.Lsh(p, uint(128-l))
			} else {
				m = p.Rsh(p, uint(l-128))
			}
		} else {
			// floor(2^(127+L) / 10^-q), L the bit length of 10^-q: in
			// [2^127, 2^128) since 10^-q is not a power of two.
			num := new(big.Int).Lsh(one, uint(127+p.BitLen()))
			m = num.Quo(num, p)
		}
		lo := new(big.Int).And(m, new(big.Int).SetUint64(math.MaxUint64))
		hi := new(big.Int).Rsh(m, 64)
		tsPowTab[q-tsPowMin] = [2]uint64{lo.Uint64(), hi.Uint64()}
	}
}

func tsAbs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

func tsEiselLemire(man uint64, exp10 int, neg bool) (float64, bool) {
	if man == 0 {
		if neg {
			return math.Copysign(0, -1), true
		}
		return 0, true
	}
	if exp10 < tsPowMin || exp10 > tsPowMax {
		return 0, false
	}
	tsPowOnce.Do(tsPowInit)
	pow := tsPowTab[exp10-tsPowMin]
	// Normalisation.
	clz := bits.LeadingZeros64(man)
	man <<= uint(clz)
	const bias = 1023
	retExp2 := uint64(217706*exp10>>16+64+bias) - uint64(clz)
	// Multiplication.
	xHi, xLo := bits.Mul64(man, pow[1])
	// Wider approximation.
	if xHi&0x1FF == 0x1FF && xLo+man < man {
		yHi, yLo := bits.Mul64(man, pow[0])
		mergedHi, mergedLo := xHi, xLo+yHi
		if mergedLo < xLo {
			mergedHi++
		}
		if mergedHi&0x1FF == 0x1FF && mergedLo+1 == 0 && yLo+man < man {
			return 0, false
		}
		xHi, xLo = mergedHi, mergedLo
	}
	// Shifting to 54 bits.
	msb := xHi >> 63
	retMantissa := xHi >> (msb + 9)
	retExp2 -= 1 ^ msb
	// Half-way ambiguity.
	if xLo == 0 && xHi&0x1FF == 0 && retMantissa&3 == 1 {
		return 0, false
	}
	// From 54 to 53 bits.
	retMantissa += retMantissa & 1
	retMantissa >>= 1
	if retMantissa>>53 > 0 {
		retMantissa >>= 1
		retExp2++
	}
	// Subnormal, infinite or NaN results are left to strconv.
	if retExp2-1 >= 0x7FF-1 {
		return 0, false
	}
	retBits := retExp2<<52 | retMantissa&(1<<52-1)
	if neg {
		retBits |= 1 << 63
	}
	return math.Float64frombits(retBits), true
}

// begin fixes what the data needs once the header is over.
func (t *tsReader) begin() error {
	if t.version == 0 {
		t.version = 1
	}
	if t.version == 1 {
		t.ports = tsPortsFromName(t.name)
		if t.ports == 0 {
			return t.errf(t.line, "cannot tell the port count: a version-1 file's name must end in .sNp (for example .s2p), found %q", tsClip(path.Base(t.name)))
		}
		if t.ports > maxTouchstonePorts {
			return t.errf(t.line, "%d ports is more than the %d supported", t.ports, maxTouchstonePorts)
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
				return t.errf(t.optionLine, "%c-parameters with the complex reference impedance %s cannot be converted to S: the wave definition is not stated; only S-parameters may have a complex reference", t.param, tsFormatImpedance(z))
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

func (t *tsReader) startRecords(length int) {
	t.recLen = length
	t.rec = t.rec[:0]
}

func (t *tsReader) describeRecord() string {
	if t.inNoise {
		return "a noise point has 5 values (frequency, minimum noise figure, |Gamma opt|, angle, Rn)"
	}
	pairs := (t.recLen - 1) / 2
	return fmt.Sprintf("a %d-port frequency point has %d values (the frequency and %d pairs)", t.ports, t.recLen, pairs)
}

// data takes one line of numbers. mayComment tells that the line may
// still hold a comment ("!" to the end), to be cut off if the numbers stop
// before its end.
func (t *tsReader) data(line []byte, mayComment bool) error {
	if t.net == nil {
		if err := t.begin(); err != nil {
			return err
		}
	}
	vals, bad := tsScanLine(line, t.lineVals[:0])
	if bad >= 0 && mayComment {
		if i := bytes.IndexByte(line, '!'); i >= 0 {
			line = tsTrimSpace(line[:i])
			vals, bad = tsScanLine(line, vals[:0])
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
		tok := tsField(line, bad)
		switch {
		case len(rec) == 0 && bad > 0:
			return t.tooMany(line, bad)
		case len(rec) == 0:
			return t.errf(t.line, "%q is not a number: expected a frequency (%s)", tsClip(string(tok)), t.describeRecord())
		default:
			return t.errf(t.line, "value %d on the line, %q, is not a number", bad+1, tsClip(string(tok)))
		}
	}
	if !continuing {
		t.recFirst = len(vals)
	}
	return nil
}

// tooMany reports a line that goes on after its point ended, used values
// of it being the point's.
func (t *tsReader) tooMany(line []byte, used int) error {
	return t.errf(t.line, "line has %d values but the point that began at line %d needed only %d of them: %s; a new point starts on a new line",
		len(tsFields(line)), t.recStart, used, t.describeRecord())
}

// checkFrequency runs before a new record starts with value f. It also
// notices the start of the noise block of a version-1 2-port file.
func (t *tsReader) checkFrequency(f float64) error {
	hz := f * t.unit
	if f < 0 {
		return t.errf(t.line, "frequency %s is negative", tsFmtNum(f))
	}
	if math.IsInf(hz, 0) {
		return t.errf(t.line, "frequency %s is too large", tsFmtNum(f))
	}
	if t.inNoise {
		if k := len(t.net.Noise); k > 0 && hz <= t.net.Noise[k-1].FrequencyHz {
			return t.errf(t.line, "noise frequency %s is not above the previous %s", tsFmtNum(f), tsFmtNum(t.net.Noise[k-1].FrequencyHz/t.unit))
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
	return t.errf(t.line, "frequency %s is not above the previous %s", tsFmtNum(f), tsFmtNum(t.net.FrequencyHz[k-1]/t.unit))
}

func tsFmtNum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// endRecord checks that no record is half read (before a keyword or at the
// end of the file).
func (t *tsReader) endRecord() error {
	if len(t.rec) == 0 {
		return nil
	}
	return t.errf(t.recStart, "the point that begins here has %d of its %d values: %s", len(t.rec), t.recLen, t.describeRecord())
}

// completeRecord takes the values v of a whole record (a frequency point
// or a noise point).
func (t *tsReader) completeRecord(v []float64) error {
	n := t.net
	if t.inNoise {
		var gamma [1]complex128
		tsPolarPairs(gamma[:], v[2:4], false)
		rn := v[4]
		if t.version == 1 {
			rn *= real(t.z0[0])
		}
		if len(n.Noise) >= MaxTracePoints {
			return pointLimit(t.name, t.recStart, len(n.Noise)+1, "noise point")
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
	if len(n.FrequencyHz) >= MaxTracePoints {
		return pointLimit(t.name, t.recStart, len(n.FrequencyHz)+1, "frequency point")
	}
	if (len(n.FrequencyHz)+1)*N*N > MaxNetworkValues {
		return t.errf(t.recStart, "frequency point %s of this %d-port file takes it past %s S-parameter values (ports squared times frequencies); expected at most %s, %s points of a %d-port file (the reader holds every value; see the README's limits)",
			groupDigits(int64(len(n.FrequencyHz)+1)), N, groupDigits(MaxNetworkValues), groupDigits(MaxNetworkValues), groupDigits(int64(MaxNetworkValues/(N*N))), N)
	}
	if len(n.FrequencyHz) == 0 && t.sizeHint > 0 && t.nfreq < 0 {
		// Estimate the point count from the size of this first point. The
		// estimate is bounded by the input's size: a point takes at least
		// two bytes a value.
		per := max(t.consumed-t.recByte, int64(2*len(v)))
		est := (t.sizeHint-t.recByte)/per + 1
		est = min(est+est/8, int64(MaxNetworkValues/(N*N)), MaxTracePoints) // points differ in length a little
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
			return t.errf(t.recStart, "%c-parameters at frequency %s: %v", t.param, tsFmtNum(v[0]), err)
		}
	}
	return nil
}

// pairsToComplex converts the pairs of vals (the numbers of record v after
// its frequency) into dst in the file's format. An error is a magnitude in
// dB too large for a float64, named with its record.
func (t *tsReader) pairsToComplex(dst []complex128, vals, v []float64) error {
	switch t.fmt {
	case 'R':
		for p := range dst {
			dst[p] = complex(vals[2*p], vals[2*p+1])
		}
	case 'M':
		tsPolarPairs(dst, vals, false)
	default:
		if !tsPolarPairs(dst, vals, true) {
			for p := range dst {
				if _, err := t.dbMagnitude(v, p); err != nil {
					return err
				}
			}
		}
	}
	return nil
}

// dbMagnitude is the linear magnitude of pair p of the record v (the
// frequency, then pairs) in DB format: 10^(dB/20). Finite numbers give
// finite RI and MA values; only a magnitude in dB can overflow.
func (t *tsReader) dbMagnitude(v []float64, p int) (float64, error) {
	db := v[1+2*p]
	mag := tsExp10DB(db)
	if mag > math.MaxFloat64 {
		return 0, t.errf(t.recStart, "value pair %d of the point at frequency %s: %s dB is too large", p+1, tsFmtNum(v[0]), tsFmtNum(db))
	}
	return mag, nil
}

func (t *tsReader) finish() (*Network, error) {
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
func (t *tsReader) toS(m []complex128) error {
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
		err = tsZToS(m, z0, &t.ws)
	case 'Y':
		err = tsYToS(m, z0, &t.ws)
	case 'H':
		if err = tsHToZ(m); err == nil {
			err = tsZToS(m, z0, &t.ws)
		}
	case 'G':
		if err = tsGToZ(m); err == nil {
			err = tsZToS(m, z0, &t.ws)
		}
	}
	return err
}

var tsErrSingular = errors.New("the matrix cannot be converted (it is singular)")

// tsZToS replaces Z (ohms) by S: with zn = D Z D, D = diag(1/sqrt(z0)),
// S = (zn - I)(zn + I)^-1, which for real positive z0 is both the
// power-wave form F (Z - Z0)(Z + Z0)^-1 F^-1 and the pseudo-wave form.
func tsZToS(m []complex128, z0 []float64, ws *[]complex128) error {
	N := len(z0)
	a, b := tsScratch(ws, N)
	for i := 0; i < N; i++ {
		for j := 0; j < N; j++ {
			zn := m[i*N+j] / complex(math.Sqrt(z0[i]*z0[j]), 0)
			a[i*N+j], b[i*N+j] = zn, zn
		}
		a[i*N+i]++
		b[i*N+i]--
	}
	// (zn + I) and (zn - I) commute, so S = (zn + I)^-1 (zn - I).
	if !tsSolve(a, b, N) {
		return tsErrSingular
	}
	copy(m, b)
	return nil
}

// tsYToS replaces Y (siemens) by S = (I - yn)(I + yn)^-1, yn = D^-1 Y D^-1.
func tsYToS(m []complex128, z0 []float64, ws *[]complex128) error {
	N := len(z0)
	a, b := tsScratch(ws, N)
	for i := 0; i < N; i++ {
		for j := 0; j < N; j++ {
			yn := m[i*N+j] * complex(math.Sqrt(z0[i]*z0[j]), 0)
			a[i*N+j], b[i*N+j] = yn, -yn
		}
		a[i*N+i]++
		b[i*N+i]++
	}
	if !tsSolve(a, b, N) {
		return tsErrSingular
	}
	copy(m, b)
	return nil
}

// tsHToZ replaces 2-port H by Z: z11 = det H / h22, z12 = h12 / h22,
// z21 = -h21 / h22, z22 = 1 / h22.
func tsHToZ(m []complex128) error {
	h11, h12, h21, h22 := m[0], m[1], m[2], m[3]
	if h22 == 0 {
		return tsErrSingular
	}
	m[0] = (h11*h22 - h12*h21) / h22
	m[1] = h12 / h22
	m[2] = -h21 / h22
	m[3] = 1 / h22
	return nil
}

// tsGToZ replaces 2-port G (the inverse of H) by Z: z11 = 1 / g11,
// z12 = -g12 / g11, z21 = g21 / g11, z22 = det G / g11.
func tsGToZ(m []complex128) error {
	g11, g12, g21, g22 := m[0], m[1], m[2], m[3]
	if g11 == 0 {
		return tsErrSingular
	}
	m[0] = 1 / g11
	m[1] = -g12 / g11
	m[2] = g21 / g11
	m[3] = (g11*g22 - g12*g21) / g11
	return nil
}

func tsScratch(ws *[]complex128, N int) (a, b []complex128) {
	if cap(*ws) < 2*N*N {
		*ws = make([]complex128, 2*N*N)
	}
	w := (*ws)[:2*N*N]
	return w[:N*N], w[N*N:]
}

// tsSolve overwrites b (N x N) with a^-1 b by Gaussian elimination with
// partial pivoting; a is destroyed. It reports false for a singular a.
func tsSolve(a, b []complex128, N int) bool {
	for c := 0; c < N; c++ {
		p, best := c, cmplx.Abs(a[c*N+c])
		for r := c + 1; r < N; r++ {
			if v := cmplx.Abs(a[r*N+c]); v > best {
				p, best = r, v
			}
		}
		if best == 0 || math.IsNaN(best) {
			return false
		}
		if p != c {
			for j := 0; j < N; j++ {
				a[c*N+j], a[p*N+j] = a[p*N+j], a[c*N+j]
				b[c*N+j], b[p*N+j] = b[p*N+j], b[c*N+j]
			}
		}
		inv := 1 / a[c*N+c]
		for r := 0; r < N; r++ {
			if r == c {
				continue
			}
			f := a[r*N+c] * inv
			if f == 0 {
				continue
			}
			for j := c; j < N; j++ {
				a[r*N+j] -= f * a[c*N+j]
			}
			for j := 0; j < N; j++ {
				b[r*N+j] -= f * b[c*N+j]
			}
		}
	}
	for r := 0; r < N; r++ {
		inv := 1 / a[r*N+r]
		for j := 0; j < N; j++ {
			b[r*N+j] *= inv
		}
	}
	for _, v := range b {
		if cmplx.IsNaN(v) || cmplx.IsInf(v) {
			return false
		}
	}
	return true
}

// tsNetworkJSON is the form NetworkJSON returns.
type tsNetworkJSON struct {
	Ports       int              `json:"ports"`
	FrequencyHz []float64        `json:"frequency_hz"`
	Z0          []float64        `json:"z0"`
	Z0Complex   [][2]float64     `json:"z0_complex,omitempty"`
	S           [][][][2]float64 `json:"s"`
}

// NetworkJSON is the `gtpack inspect --json` form of the contract:
// {"ports": N, "frequency_hz": [...], "z0": [...], "s": [[[[re, im], ...]...]...]}
// A complex reference impedance adds "z0_complex": [[re, im], ...].
func NetworkJSON(n *Network) any {
	out := tsNetworkJSON{Ports: n.Ports, FrequencyHz: n.FrequencyHz, Z0: n.Z0}
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
