package render

import (
	"archive/zip"
	"bytes"
	"encoding/binary"
	"encoding/xml"
	"fmt"
	"hash/crc32"
	"io"
	"math"
	"slices"
	"strconv"
	"sync"
	"time"

	"github.com/klauspost/compress/flate"
	"github.com/xuri/excelize/v2"
)

// The unit workbook is made in two parts. excelize makes what the units of
// one product and specification share, the skeleton: the sheets, their
// header rows, column formats and widths, panes, conditional formats,
// charts, styles and the document properties (with slots for the unit's
// title, subject and date). A skeleton depends only on the unit's shape
// (unitShape: its beams, their grids and columns, its number of limits),
// never on a measured value, so it is made once per shape and kept. Each
// unit then adds its cells, written straight into the skeleton's sheets
// (xlsxrows.go), fills the slots, and copies the skeleton's other parts
// already compressed. excelize's share of a unit workbook, most of it its
// charts, is so paid once per shape instead of once per unit; the bytes
// of a workbook do not depend on whether its skeleton was made for it or
// kept. It stays because a build without it costs more than the
// project's 5 % rule allows (DEVELOPERS.md, Measured).

// unitShape is everything of a unit that its workbook's skeleton depends
// on.
type unitShape struct {
	beams  []beamShape
	limits int
}

// beamShape is what a beam gives its sheet's skeleton and the Summary
// chart.
type beamShape struct {
	id         string
	theta, phi float64
	n          int           // frequency points
	lo, hi     float64       // the frequency axis, GHz: the band rounded out to 0.1 GHz
	cols       []sheetColumn // the frequency table's columns
	firstGrid  bool          // on the first beam's grid: a series of the Summary chart
}

// axis is the frequency axis of the beam's charts.
func (bm *beamShape) axis() chartX {
	return chartX{points: bm.n, numeric: true, min: bm.lo, max: bm.hi}
}

// bandEdge is the first (or, when last, the last) finite frequency of an
// ascending grid in GHz, rounded outwards to 0.1 GHz; 0 when there is
// none. Rounded, it is the same for units whose grids differ a little, so
// that they share a skeleton.
func bandEdge(hz []float64, last bool) float64 {
	for k := range hz {
		f := hz[k]
		if last {
			f = hz[len(hz)-1-k]
		}
		switch {
		case math.IsNaN(f) || math.IsInf(f, 0):
			continue
		case last:
			return math.Ceil(f/1e8) / 10
		default:
			return math.Floor(f/1e8) / 10
		}
	}
	return 0
}

// key is the shape as text, every field in full.
func (s *unitShape) key() string {
	b := strconv.AppendInt(nil, int64(s.limits), 10)
	for _, bm := range s.beams {
		b = append(b, '|')
		b = strconv.AppendQuote(b, bm.id)
		b = append(b, ' ')
		b = strconv.AppendFloat(b, bm.theta, 'g', -1, 64)
		b = append(b, ' ')
		b = strconv.AppendFloat(b, bm.phi, 'g', -1, 64)
		b = append(b, ' ')
		b = strconv.AppendInt(b, int64(bm.n), 10)
		b = strconv.AppendBool(append(b, ' '), bm.firstGrid)
		b = strconv.AppendFloat(append(b, ' '), bm.lo, 'g', -1, 64)
		b = strconv.AppendFloat(append(b, ' '), bm.hi, 'g', -1, 64)
		for _, c := range bm.cols {
			b = append(b, ' ')
			b = strconv.AppendQuote(b, c.header)
			b = strconv.AppendQuote(b, c.format)
			b = strconv.AppendFloat(b, c.width, 'g', -1, 64)
			b = strconv.AppendQuote(b, c.key)
			b = strconv.AppendBool(b, c.limit)
		}
	}
	return string(b)
}

// unitSkeleton is excelize's part of the unit workbooks of one shape.
type unitSkeleton struct {
	parts []skeletonPart // sorted by name
	// sheetPart maps each sheet name to its zip part.
	sheetPart map[string]string
	// The styles the cells use.
	numStyles     map[string]int
	header, title int
	// The sheet names.
	summary, limits, uncertainty, flags, inputs string
	beams                                       []string
}

// skeletonPart is one zip part of a skeleton: the XML of the sheets and of
// the document properties, which each unit completes, and every other
// part as it is stored (compressed, with its checksum).
type skeletonPart struct {
	name   string
	xml    []byte // a sheet or docProps/core.xml; nil for the others
	method uint16
	stored []byte // the part as stored in the zip
	crc    uint32
	size   int
}

// The slots of docProps/core.xml that each unit fills.
const (
	slotTitle   = "gtpack-slot-title"
	slotSubject = "gtpack-slot-subject"
	slotStamp   = "gtpack-slot-stamp"
	corePart    = "docProps/core.xml"
)

// unitPrecision is how a unit workbook stores its numbers, in its
// description.
const unitPrecision = "values as result.json holds them (to 1e-6; frequencies to its hertz), shown rounded."

// unitFormats are the number formats of a unit workbook, made as styles in
// this order before anything else.
var unitFormats = []string{nfDB, nfGHz, nfDeg, nfTemp, nfDiv, nfInt}

// skeletons holds the skeletons made so far, by shape. A build sees a few
// shapes (one per product and specification); when more than
// maxSkeletons have been made, or they would hold more than
// maxSkeletonBytes, the store starts again. A skeleton takes some 4 kB a
// beam (67 kB for 16 beams, 0.85 MB for 256, measured), so that the store
// stays within a few megabytes even when every unit has a shape of its
// own with many beams.
var skeletons struct {
	sync.Mutex
	m     map[string]*unitSkeleton
	bytes int
}

const (
	maxSkeletons     = 32
	maxSkeletonBytes = 8 << 20
)

// size is about what the skeleton holds, in bytes.
func (sk *unitSkeleton) size() int {
	n := 0
	for _, p := range sk.parts {
		n += len(p.name) + len(p.xml) + len(p.stored) + 64
	}
	return n
}

// skeletonFor returns the skeleton of shape s, made when it is new. Two
// workers meeting a new shape at once both make it; they make the same.
func skeletonFor(s *unitShape) (*unitSkeleton, error) {
	k := s.key()
	skeletons.Lock()
	sk := skeletons.m[k]
	skeletons.Unlock()
	if sk != nil {
		return sk, nil
	}
	sk, err := buildSkeleton(s)
	if err != nil {
		return nil, err
	}
	size := sk.size()
	skeletons.Lock()
	if skeletons.m == nil || len(skeletons.m) >= maxSkeletons || skeletons.bytes+size > maxSkeletonBytes {
		skeletons.m, skeletons.bytes = map[string]*unitSkeleton{}, 0
	}
	if _, kept := skeletons.m[k]; !kept {
		skeletons.m[k] = sk
		skeletons.bytes += size
	}
	skeletons.Unlock()
	return sk, nil
}

// Columns of the tables below a header row that excelize writes.
var (
	limitsColumns = []xlColumn{
		{"Limit", "", 24}, {"Quantity", "", 9}, {"Beam", "", 9}, {"Statistic", "", 9},
		{"Worst margin (dB)", nfDB, 12}, {"At (GHz)", nfGHz, 12},
		{"Value (dB/K or dBi)", nfDB, 12}, {"Limit (dB/K or dBi)", nfDB, 12},
		{"U (dB)", nfDB, 9}, {"Verdict", "", 16},
	}
	uncertaintyColumns = []xlColumn{
		{"Beam", "", 9}, {"Budget", "", 8}, {"Frequency (GHz)", nfGHz, 14}, {"Chosen at", "", 30},
		{"Term", "", 34}, {"Source", "", 9}, {"Distribution", "", 12}, {"Divisor", nfDiv, 9},
		{"Value (dB)", nfDB, 11}, {"u (dB)", nfDB, 11},
	}
	flagsColumns = []xlColumn{
		{"Kind", "", 18}, {"Beam", "", 8}, {"File", "", 40}, {"Line", nfInt, 7}, {"Message", "", 90},
	}
	inputsColumns = []xlColumn{{"Path", "", 60}, {"Size (bytes)", nfInt, 13}, {"SHA-256", "", 70}}
)

// buildSkeleton makes the skeleton of shape s with excelize.
func buildSkeleton(s *unitShape) (*unitSkeleton, error) {
	b := newXLBookStamped(slotTitle, slotSubject, slotStamp, workbookEpoch, unitPrecision)
	for _, f := range unitFormats {
		b.numStyle(f)
	}
	for _, bm := range s.beams { // a format of the beam quantities not among them
		for _, c := range bm.cols {
			b.numStyle(c.format)
		}
	}
	sk := &unitSkeleton{header: b.header, title: b.title}
	sk.summary = b.addSheet("Summary")
	sk.beams = make([]string, len(s.beams))
	for i, bm := range s.beams {
		sk.beams[i] = b.addSheet("Beam " + bm.id)
	}
	sk.limits = b.addSheet("Limits")
	sk.uncertainty = b.addSheet("Uncertainty")
	sk.flags = b.addSheet("Flags")
	sk.inputs = b.addSheet("Inputs")

	gtValues := make([]string, len(s.beams))
	for i := range s.beams {
		gtValues[i] = beamSheetFrame(b, sk.beams[i], &s.beams[i])
	}
	summaryFrame(b, sk.summary, s, sk.beams, gtValues)
	b.table(sk.limits, 1, limitsColumns, true)
	if s.limits > 0 {
		verdict := b.colName(1 + slices.IndexFunc(limitsColumns, func(c xlColumn) bool { return c.header == "Verdict" }))
		b.verdictRules(sk.limits, fmt.Sprintf("%s2:%s%d", verdict, verdict, s.limits+1))
	}
	b.table(sk.uncertainty, 1, uncertaintyColumns, true)
	b.table(sk.flags, 1, flagsColumns, true)
	b.table(sk.inputs, 1, inputsColumns, true)
	sk.numStyles = b.numStyles
	if b.err != nil {
		return nil, b.err
	}

	// excelize's parts are kept, not written: b.bytes() returns nothing.
	var c partCollector
	b.f.SetZipWriter(func(io.Writer) excelize.ZipWriter { return &c })
	if _, err := b.bytes(); err != nil {
		return nil, err
	}
	if err := c.sorted(); err != nil {
		return nil, err
	}
	var err error
	if sk.sheetPart, err = sheetParts(c.entries); err != nil {
		return nil, err
	}
	sheets := map[string]bool{}
	for _, p := range sk.sheetPart {
		sheets[p] = true
	}
	// The shared parts are compressed once, at the best level.
	var z bytes.Buffer
	d, err := flate.NewWriter(&z, flate.BestCompression)
	if err != nil {
		return nil, err
	}
	for _, e := range c.entries {
		data := e.data.Bytes()
		p := skeletonPart{name: e.name}
		if sheets[e.name] || e.name == corePart {
			p.xml = data
		} else {
			p.crc, p.size, p.method, p.stored = crc32.ChecksumIEEE(data), len(data), zip.Store, data
			if len(data) >= 512 {
				z.Reset()
				d.Reset(&z)
				if _, err := d.Write(data); err != nil {
					return nil, err
				}
				if err := d.Close(); err != nil {
					return nil, err
				}
				p.method, p.stored = zip.Deflate, bytes.Clone(z.Bytes())
			}
		}
		sk.parts = append(sk.parts, p)
	}
	if len(sheets) != 5+len(s.beams) {
		return nil, fmt.Errorf("render: the workbook skeleton has %d sheet parts, not %d", len(sheets), 5+len(s.beams))
	}
	return sk, nil
}

// partCollector is the zip writer given to excelize for a skeleton: it
// keeps the parts.
type partCollector struct{ zipParts }

func (c *partCollector) Close() error { return nil }

// cells returns a book for a unit's cells: the skeleton's styles, no
// excelize file.
func (sk *unitSkeleton) cells() *xlBook {
	return &xlBook{numStyles: sk.numStyles, header: sk.header, title: sk.title}
}

// write writes the workbook of the skeleton with the tables of a unit
// (by sheet name), its title, subject and date.
func (sk *unitSkeleton) write(tables map[string]*bulkSheet, title, subject string, created time.Time) ([]byte, error) {
	size := 0
	for _, p := range sk.parts {
		size += len(p.stored) + len(p.xml)/4 + 128
	}
	var out bytes.Buffer
	out.Grow(size + bulkSize(tables))
	zw := zip.NewWriter(&out)
	release, err := useDeflater(zw)
	if err != nil {
		return nil, err
	}
	defer release()
	byPart := make(map[string]*bulkSheet, len(tables))
	for name, t := range tables {
		p, ok := sk.sheetPart[name]
		if !ok {
			return nil, fmt.Errorf("render: no sheet %q in the workbook skeleton", name)
		}
		byPart[p] = t
	}
	for _, p := range sk.parts {
		if p.xml == nil {
			w, err := zw.CreateRaw(rawHeader(p, created))
			if err != nil {
				return nil, err
			}
			if _, err := w.Write(p.stored); err != nil {
				return nil, err
			}
			continue
		}
		w, err := zw.CreateHeader(&zip.FileHeader{Name: p.name, Method: zip.Deflate, Modified: created})
		if err != nil {
			return nil, err
		}
		switch t := byPart[p.name]; {
		case p.name == corePart:
			var core []byte
			if core, err = fillCore(p.xml, title, subject, created.UTC().Format(time.RFC3339)); err == nil {
				_, err = w.Write(core)
			}
		case t != nil:
			err = writeBulkSheet(w, p.xml, t)
		default:
			_, err = w.Write(p.xml)
		}
		if err != nil {
			return nil, err
		}
	}
	if err := zw.Close(); err != nil {
		return nil, err
	}
	return out.Bytes(), nil
}

// rawHeader is the header of a part copied as stored, dated as
// zip.Writer.CreateHeader dates a part (the MS-DOS time and the extended
// timestamp), which CreateRaw leaves to its caller.
func rawHeader(p skeletonPart, modified time.Time) *zip.FileHeader {
	fh := &zip.FileHeader{
		Name: p.name, Method: p.method, CRC32: p.crc,
		CompressedSize64: uint64(len(p.stored)), UncompressedSize64: uint64(p.size),
		Modified: modified,
		// What CreateHeader sets: made by and needed to extract, version 2.0.
		CreatorVersion: 20, ReaderVersion: 20,
	}
	fh.ModifiedDate = uint16(modified.Day() + int(modified.Month())<<5 + (modified.Year()-1980)<<9)
	fh.ModifiedTime = uint16(modified.Second()/2 + modified.Minute()<<5 + modified.Hour()<<11)
	var extra [9]byte
	binary.LittleEndian.PutUint16(extra[0:], 0x5455) // extended timestamp
	binary.LittleEndian.PutUint16(extra[2:], 5)
	extra[4] = 1 // the modification time only
	binary.LittleEndian.PutUint32(extra[5:], uint32(modified.Unix()))
	fh.Extra = extra[:]
	return fh
}

// fillCore fills the slots of docProps/core.xml, each value escaped as
// encoding/xml escapes text.
func fillCore(core []byte, title, subject, stamp string) ([]byte, error) {
	for _, slot := range [][2]string{{slotTitle, title}, {slotSubject, subject}, {slotStamp, stamp}} {
		var b bytes.Buffer
		if err := xml.EscapeText(&b, []byte(slot[1])); err != nil {
			return nil, err
		}
		core = bytes.ReplaceAll(core, []byte(slot[0]), b.Bytes())
	}
	return core, nil
}
