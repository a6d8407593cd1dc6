package demo

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"gtpack.example/gtpack/ingest"
	"gtpack.example/gtpack/ingest/touchstone"
)

// Write writes the archive into dir (created; refuses a non-empty dir) and
// returns the model truth.
func Write(dir string, o Options) (*Truth, error) {
	t, err := Plan(o)
	if err != nil {
		return nil, err
	}
	if err := WriteTruth(dir, t); err != nil {
		return nil, err
	}
	return t, nil
}

// WriteTruth writes the archive of a planned model into dir (created;
// refuses a non-empty dir). A test may change the model between Plan and
// WriteTruth, for example zero the noise sigmas; the files follow the
// model as it is then.
func WriteTruth(dir string, t *Truth) error {
	if err := prepareDir(dir); err != nil {
		return err
	}
	w := &writer{root: dir, t: t}
	w.file("stations/"+t.Station+".yaml", w.stationYAML())
	w.file("references/"+t.Reference+".yaml", w.referenceYAML())
	w.file("specs/"+t.Product+".yaml", w.specYAML())
	w.file("lab.yaml", w.labYAML())
	for i := range t.Runs {
		w.run(&t.Runs[i])
		if w.err != nil {
			break
		}
	}
	w.file("README.md", w.readme())
	return w.err
}

// prepareDir creates dir, or accepts it when it exists and is empty.
func prepareDir(dir string) error {
	entries, err := os.ReadDir(dir)
	switch {
	case errors.Is(err, os.ErrNotExist):
		return os.MkdirAll(dir, 0o755)
	case err != nil:
		return fmt.Errorf("demo: %w", err)
	case len(entries) > 0:
		return fmt.Errorf("demo: %s is not empty; expected a new or empty folder", dir)
	}
	return nil
}

// writer writes the files of one archive and keeps the first error.
type writer struct {
	root string
	t    *Truth
	err  error
}

func (w *writer) file(rel string, data []byte) {
	if w.err != nil {
		return
	}
	path := filepath.Join(w.root, filepath.FromSlash(rel))
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		w.err = fmt.Errorf("demo: %w", err)
		return
	}
	if err := os.WriteFile(path, data, 0o644); err != nil {
		w.err = fmt.Errorf("demo: %w", err)
	}
}

// num formats a YAML or CSV number with the fewest digits that read back
// to the same value.
func num(x float64) string { return strconv.FormatFloat(x, 'f', -1, 64) }

func (w *writer) stationYAML() []byte {
	t := w.t
	var b bytes.Buffer
	fmt.Fprintf(&b, "schema: 1\n")
	fmt.Fprintf(&b, "id: %s\n", t.Station)
	fmt.Fprintf(&b, "description: Compact range with a serrated-edge reflector, 8-18 GHz feed (synthetic demo station)\n")
	fmt.Fprintf(&b, "receiver_match: %s\n", num(t.ReceiverMatch))
	fmt.Fprintf(&b, "drift_tolerance_db: %s\n", num(t.DriftToleranceDB))
	fmt.Fprintf(&b, "method_tolerance_db: %s\n", num(t.MethodToleranceDB))
	if t.CheckUnit != "" {
		fmt.Fprintf(&b, "check_units: [%s]             # measured now and then: range health charts its G/T\n", t.CheckUnit)
	}
	b.WriteString(`csv_formats:                  # how this range's noise figure analyser exports a trace
  ` + nfaFormat + `:
    delimiter: ";"
    decimal: ","
    skip_lines: 3                 # the analyser's preamble
    units_row: true               # the frequency unit is in the row under the header
    frequency_column: Frequency
    value_column: NF sys
`)
	b.WriteString(`uncertainty:
  - name: Noise receiver calibration
    applies_to: [gt]
    value_db: 0.20
    distribution: normal
    coverage_k: 2
  - name: Quiet-zone amplitude ripple
    applies_to: [gain, gt]
    value_db: 0.10
    distribution: rectangular
  - name: Alignment of the unit on the positioner
    applies_to: [gain, gt]
    value_db: 0.05
    distribution: rectangular
  - name: Repeatability of the mounting
    applies_to: [gain, gt]
    value_db: 0.06
    distribution: normal
    coverage_k: 2
`)
	return b.Bytes()
}

func (w *writer) referenceYAML() []byte {
	t := w.t
	var b bytes.Buffer
	b.WriteString("schema: 1\n")
	fmt.Fprintf(&b, "id: %s\n", t.Reference)
	b.WriteString("description: Ku-band standard gain horn, WR-75 waveguide input (synthetic demo reference)\n")
	b.WriteString("gain_kind: realized\n")
	b.WriteString("calibrated: 2026-01-15\n")
	b.WriteString("due: 2027-01-15\n")
	b.WriteString("certificate: QCL-26-0117\n")
	b.WriteString("coverage_k: 2\n")
	b.WriteString("table:                 # [frequency_ghz, gain_dbi, expanded_uncertainty_db]\n")
	for _, p := range t.ReferenceTable {
		fmt.Fprintf(&b, "  - [%s, %.2f, %.2f]\n", num(p.FrequencyHz/1e9), p.GainDBi, p.ExpandedUncertaintyDB)
	}
	return b.Bytes()
}

// The laboratory and the customer of the demo's scenario (invented).
const (
	demoLabName       = "Quarrydown Arrays acceptance test laboratory"
	demoLabContact    = "acceptance@quarrydown.example"
	demoReportPrefix  = "QDA-GT"
	demoCustomer      = "Tern Valley Satellite Services"
	demoOrder         = "TVS-PO-2026-014"
	demoLabAccredited = "not accredited (demonstration archive)"
)

var (
	demoLabAddress      = []string{"Unit 7, Quarry Road", "Stonebridge Industrial Park", "Stonebridge"}
	demoCustomerAddress = []string{"12 Harbour Lane", "Tern Valley"}
)

// labYAML is the issuing laboratory of the scenario.
func (w *writer) labYAML() []byte {
	var b bytes.Buffer
	b.WriteString("schema: 1\n")
	fmt.Fprintf(&b, "name: %s\n", demoLabName)
	fmt.Fprintf(&b, "address: [%s]\n", strings.Join(demoLabAddress, ", "))
	fmt.Fprintf(&b, "contact: %s\n", demoLabContact)
	fmt.Fprintf(&b, "accreditation: %s\n", demoLabAccredited)
	fmt.Fprintf(&b, "report_prefix: %s\n", demoReportPrefix)
	return b.Bytes()
}

func (w *writer) specYAML() []byte {
	t := w.t
	lo, hi := num(t.StartHz/1e9), num(t.StopHz/1e9)
	limit := func(v [2]float64) string {
		return fmt.Sprintf("[[%s, %s], [%s, %s]]", lo, num(v[0]), hi, num(v[1]))
	}
	var b bytes.Buffer
	b.WriteString("schema: 1\n")
	fmt.Fprintf(&b, "product: %s\n", t.Product)
	fmt.Fprintf(&b, "title: %s\n", t.ProductTitle)
	b.WriteString("decision_rule: guarded\n")
	fmt.Fprintf(&b, "customer:\n  name: %s\n  address: [%s]\n  order: %s\n", demoCustomer, strings.Join(demoCustomerAddress, ", "), demoOrder)
	fmt.Fprintf(&b, "operating_antenna_k: %s\n", num(t.OperatingAntennaK))
	fmt.Fprintf(&b, "element_phase_rms_tolerance_deg: %s\n", num(t.ElementToleranceDeg))
	b.WriteString("beam_plan:                  # the beams every unit is measured in\n")
	b.WriteString("  files:                    # where a run finds each beam's files ({beam} is the beam id)\n")
	b.WriteString("    transmission: \"{beam}.*\"\n")
	b.WriteString("    noise:\n")
	for _, q := range []string{QuantityNoiseDensity, QuantitySystemNF, QuantityNoiseRelative} {
		fmt.Fprintf(&b, "      - {file: \"{beam}-%s.csv\", quantity: %s, noise_bandwidth_hz: %s, integration_s: %s%s}\n",
			noiseColumns[q].suffix, q, num(t.NoiseBandwidthHz), num(t.IntegrationS), csvOf(q, ", csv: "))
	}
	b.WriteString("  beams:\n")
	if len(t.Runs) > 0 {
		for _, bm := range t.Runs[0].Beams {
			fmt.Fprintf(&b, "    - {id: %s, theta_deg: %s, phi_deg: %s, polarization: %s}\n", bm.ID, num(bm.ThetaDeg), num(bm.PhiDeg), bm.Polarization)
		}
	}
	b.WriteString("limits:\n")
	fmt.Fprintf(&b, `  - name: G/T at boresight
    quantity: gt
    beams: {max_theta_deg: 0}
    band_ghz: [%[1]s, %[2]s]
    statistic: min
    limit: %[3]s
  - name: G/T scanned
    quantity: gt
    beams: {min_theta_deg: 1, max_theta_deg: 60}
    band_ghz: [%[1]s, %[2]s]
    statistic: min
    limit: %[3]s
    scan_exponent: %[4]s
  - name: Gain at boresight
    quantity: gain
    beams: {max_theta_deg: 0}
    band_ghz: [%[1]s, %[2]s]
    statistic: mean
    limit: %[5]s
`, lo, hi, limit(t.GTLimitDB), num(t.SpecScanExponent), limit(t.GainLimitDB))
	return b.Bytes()
}

// touchstoneVariant is one way of writing a Touchstone file; the files of
// an archive cycle through them so that the reader meets every one.
type touchstoneVariant struct {
	version int
	format  string
	unit    string
	ext     string
}

var touchstoneVariants = []touchstoneVariant{
	{1, "DB", "GHz", ".s2p"},
	{1, "MA", "MHz", ".s2p"},
	{1, "RI", "Hz", ".s2p"},
	{2, "DB", "GHz", ".ts"},
	{2, "RI", "GHz", ".s2p"},
	{2, "MA", "MHz", ".ts"},
}

var traceUnits = []string{"ghz", "mhz", "hz"}

func variantOf(order, file int) touchstoneVariant {
	return touchstoneVariants[(order*5+file)%len(touchstoneVariants)]
}

// Fixed electrical properties of the range and the units (not parameters
// a test compares against: they cancel, or only shape the files).
const (
	referenceDelayS = 37.9e-9
	unitDelayS      = 41.3e-9
	feedMatch       = 0.10   // |S11| at the range input
	feedDelayS      = 4.0e-9 // of the S11 phase rotation
	hornMatch       = 0.06   // |S22| of the reference horn
	unitIsolationDB = 80     // |S21| - |S12| of the active unit
)

// run writes one run's folder.
func (w *writer) run(r *RunTruth) {
	t := w.t
	freqs := t.FrequenciesHz(t.Options.Points)
	preV, postV := variantOf(r.Order, 0), variantOf(r.Order, 1)
	pre, post := "ref-pre"+preV.ext, "ref-post"+postV.ext
	w.touchstone(r, pre, preV, 0, w.referenceNetwork(r, freqs, r.RangeLossPreDB, 0))
	w.touchstone(r, post, postV, 1, w.referenceNetwork(r, freqs, r.RangeLossPostDB, 1))
	for b := range r.Beams {
		bm := &r.Beams[b]
		v := variantOf(r.Order, 2+b)
		bm.TransmissionFile = bm.ID + v.ext
		w.touchstone(r, bm.TransmissionFile, v, 2+b, w.unitNetwork(r, b, freqs))
		bm.NoiseFiles = bm.NoiseFiles[:0]
		nf := t.FrequenciesHz(bm.NoisePoints)
		for q, quantity := range bm.NoiseQuantities {
			name, trace := w.noiseTrace(r, b, q, quantity, nf)
			bm.NoiseFiles = append(bm.NoiseFiles, name)
			var buf bytes.Buffer
			unit := traceUnits[(r.Order+b+q)%len(traceUnits)]
			if quantity == QuantitySystemNF {
				unit = "ghz"
			}
			if err := ingest.WriteTrace(&buf, trace, unit); err != nil && w.err == nil {
				w.err = fmt.Errorf("demo: %s/%s: %w", r.Dir, name, err)
			}
			data := buf.Bytes()
			if quantity == QuantitySystemNF {
				data = w.analyserExport(r, data)
			}
			w.file(r.Dir+"/"+name, data)
		}
	}
	w.file(r.Dir+"/elements.csv", elementsCSV(w.elementTable(r)))
	w.file(r.Dir+"/notes.md", w.notes(r))
	w.file(r.Dir+"/run.yaml", w.runYAML(r, pre, post))
}

func (w *writer) touchstone(r *RunTruth, name string, v touchstoneVariant, file int, n *touchstone.Network) {
	if w.err != nil {
		return
	}
	what := "reference horn " + w.t.Reference
	if file >= 2 {
		bm := r.Beams[file-2]
		what = fmt.Sprintf("beam %s (%s, theta %s deg, phi %s deg)", bm.ID, bm.Polarization, num(bm.ThetaDeg), num(bm.PhiDeg))
	} else if file == 0 {
		what += ", before the unit"
	} else {
		what += ", after the unit"
	}
	var buf bytes.Buffer
	err := touchstone.Write(&buf, n, touchstone.Format{
		Version:       v.version,
		Parameter:     "S",
		Format:        v.format,
		FrequencyUnit: v.unit,
		R:             50,
		Comments: []string{
			fmt.Sprintf("%s %s %s, %s", w.t.Company, w.t.Product, r.Serial, what),
			fmt.Sprintf("station %s, %s", w.t.Station, r.Started.Format("2006-01-02T15:04:05Z")),
			"synthetic demo data: invented company and product, from a physical model with seeded noise",
		},
	})
	if err != nil {
		w.err = fmt.Errorf("demo: %s/%s: %w", r.Dir, name, err)
		return
	}
	w.file(r.Dir+"/"+name, buf.Bytes())
}

// noisy returns the generator of one file's measurement noise.
func (w *writer) noisy(r *RunTruth, file, trace int) *rand.Rand {
	return rngFor(w.t.Options.Seed, purposeFile, uint64(r.Order), uint64(file*8+trace))
}

func newNetwork(freqs []float64) *touchstone.Network {
	return &touchstone.Network{
		Ports:       2,
		FrequencyHz: append([]float64(nil), freqs...),
		Z0:          []float64{50, 50},
		S:           make([]complex128, 4*len(freqs)),
	}
}

func polar(db, rad float64) complex128 { return cmplx.Rect(math.Pow(10, db/20), rad) }

// referenceNetwork is the reference horn in the range: S21 = G_ref - RL.
func (w *writer) referenceNetwork(r *RunTruth, freqs []float64, rl func(float64) float64, file int) *touchstone.Network {
	t := w.t
	rng := w.noisy(r, file, 0)
	n := newNetwork(freqs)
	phase0 := 2 * math.Pi * rng.Float64()
	for k, f := range freqs {
		db := t.ReferenceGainDBi(f) - rl(f) + t.S21NoiseDB*rng.NormFloat64()
		ph := -2*math.Pi*f*referenceDelayS + phase0 + t.S21PhaseNoiseDeg*math.Pi/180*rng.NormFloat64()
		s21 := polar(db, ph)
		n.S[4*k+0] = complex(feedMatch, 0) * cmplx.Rect(1, -2*math.Pi*f*feedDelayS+0.3)
		n.S[4*k+1] = s21 // reciprocal
		n.S[4*k+2] = s21
		n.S[4*k+3] = complex(hornMatch, 0) * cmplx.Rect(1, -2*math.Pi*f*1.5e-9+1.0)
	}
	return n
}

// unitNetwork is the unit under test in the range: S21 = G_aut - RL.
func (w *writer) unitNetwork(r *RunTruth, b int, freqs []float64) *touchstone.Network {
	t := w.t
	rng := w.noisy(r, 2+b, 0)
	n := newNetwork(freqs)
	phase0 := 2 * math.Pi * rng.Float64()
	match0 := 2 * math.Pi * rng.Float64()
	for k, f := range freqs {
		db := r.S21DB(b, f) + t.S21NoiseDB*rng.NormFloat64()
		ph := -2*math.Pi*f*unitDelayS + phase0 + t.S21PhaseNoiseDeg*math.Pi/180*rng.NormFloat64()
		s21 := polar(db, ph)
		n.S[4*k+0] = complex(feedMatch, 0) * cmplx.Rect(1, -2*math.Pi*f*feedDelayS+0.3)
		n.S[4*k+1] = polar(db-unitIsolationDB, ph+0.7)
		n.S[4*k+2] = s21
		g := 0.16 + 0.04*math.Sin(2*math.Pi*f/900e6)
		n.S[4*k+3] = cmplx.Rect(g, -2*math.Pi*f*1.2e-9+match0)
	}
	return n
}

var noiseColumns = map[string]struct{ column, suffix string }{
	QuantityNoiseDensity:  {"noise_density_dbm_hz", "noise"},
	QuantityNoiseRelative: {"noise_relative_kt0_db", "nrel"},
	QuantitySystemNF:      {"system_noise_figure_db", "nfsys"},
}

// noiseTrace synthesizes the q-th noise trace of beam b.
func (w *writer) noiseTrace(r *RunTruth, b, q int, quantity string, freqs []float64) (string, *ingest.Trace) {
	rng := w.noisy(r, 2+b, 1+q)
	c := noiseColumns[quantity]
	name := r.Beams[b].ID + "-" + c.suffix + ".csv"
	tr := &ingest.Trace{File: name, Column: c.column, FrequencyHz: freqs, Values: make([]float64, len(freqs))}
	for k, f := range freqs {
		var v float64
		switch quantity {
		case QuantityNoiseDensity:
			v = r.NoiseDensityDBmHz(b, f)
		case QuantityNoiseRelative:
			v = r.NoiseRelativeKT0DB(b, f)
		case QuantitySystemNF:
			v = r.SystemNoiseFigureDB(b, f)
		}
		tr.Values[k] = v + w.t.NoiseTraceDB*rng.NormFloat64()
	}
	return name, tr
}

// elementTable is the run's element state: the steering phase plane, the
// planted errors and a gentle amplitude taper. It also sets
// r.ElementErrorRMSDeg to the rms of the planted errors.
func (w *writer) elementTable(r *RunTruth) []ingest.Element {
	rng := rngFor(w.t.Options.Seed, purposeElements, uint64(r.Order), 0)
	offset := 360 * rng.Float64()
	els := make([]ingest.Element, 0, elementRows*elementCols)
	ss := 0.0
	for row := 1; row <= elementRows; row++ {
		for col := 1; col <= elementCols; col++ {
			e := elementRandomDeg * rng.NormFloat64()
			if r.ElementBlock.Contains(row, col) {
				e += r.ElementBlock.PhaseErrorDeg
			}
			ss += e * e
			dr, dc := float64(row)-8.5, float64(col)-8.5
			amp := -1.0*(dr*dr+dc*dc)/(2*7.5*7.5) + 0.2*rng.NormFloat64()
			ph := offset + r.ElementStepRowDeg*float64(row-1) + r.ElementStepColDeg*float64(col-1) + e
			els = append(els, ingest.Element{Row: row, Col: col, AmplitudeDB: round(amp, 3), PhaseDeg: round(wrap180(ph), 2)})
		}
	}
	r.ElementErrorRMSDeg = math.Sqrt(ss / float64(len(els)))
	return els
}

// wrap180 wraps degrees to (-180, 180].
func wrap180(x float64) float64 {
	x = math.Mod(x, 360)
	if x <= -180 {
		x += 360
	} else if x > 180 {
		x -= 360
	}
	return x
}

func elementsCSV(els []ingest.Element) []byte {
	var b bytes.Buffer
	b.WriteString("row,col,amplitude_db,phase_deg\n")
	for _, e := range els {
		fmt.Fprintf(&b, "%d,%d,%.3f,%.2f\n", e.Row, e.Col, e.AmplitudeDB, e.PhaseDeg)
	}
	return b.Bytes()
}

// nfaFormat is the station's csv_formats name of the noise figure
// analyser's export, in which the system-noise-figure traces are written.
const nfaFormat = "nfa-export"

// csvOf is the csv: of a noise quantity's files after prefix, "" for the
// contract's form.
func csvOf(quantity, prefix string) string {
	if quantity == QuantitySystemNF {
		return prefix + nfaFormat
	}
	return ""
}

// analyserExport rewrites a trace CSV of the contract's form in GHz as the
// station's noise figure analyser exports it (nfaFormat): a preamble of
// three key;value lines, semicolons, decimal commas, a units row. The
// numbers are the same text, so they read back to the same values.
func (w *writer) analyserExport(r *RunTruth, contract []byte) []byte {
	lines := strings.Split(strings.TrimSuffix(string(contract), "\n"), "\n")
	var b bytes.Buffer
	fmt.Fprintf(&b, "Instrument;Noise figure analyser (synthetic)\nDate;%s\nPoints;%d\n", r.Started.Format("2006-01-02"), len(lines)-1)
	b.WriteString("Frequency;NF sys\nGHz;dB\n")
	for _, ln := range lines[1:] {
		f, v, _ := strings.Cut(ln, ",")
		b.WriteString(strings.Replace(f, ".", ",", 1) + ";" + strings.Replace(v, ".", ",", 1) + "\n")
	}
	return b.Bytes()
}

func (w *writer) runYAML(r *RunTruth, pre, post string) []byte {
	t := w.t
	var b bytes.Buffer
	b.WriteString("schema: 1\n")
	fmt.Fprintf(&b, "serial: %s\n", r.Serial)
	fmt.Fprintf(&b, "product: %s\n", t.Product)
	fmt.Fprintf(&b, "station: %s\n", t.Station)
	fmt.Fprintf(&b, "reference: %s\n", t.Reference)
	fmt.Fprintf(&b, "started: %s\n", r.Started.Format("2006-01-02T15:04:05Z"))
	fmt.Fprintf(&b, "operator: %s\n", r.Operator)
	fmt.Fprintf(&b, "ambient_c: %s\n", strconv.FormatFloat(r.AmbientC, 'f', 1, 64))
	fmt.Fprintf(&b, "firmware: %q\n", r.Firmware)
	b.WriteString("range_reference:\n")
	fmt.Fprintf(&b, "  pre: %s\n  post: %s\n  parameter: S21\n", pre, post)
	b.WriteString("beams:\n")
	if !t.Options.ExplicitBeams {
		// The spec's beam_plan says the rest of each beam.
		for _, bm := range r.Beams {
			if bm.DeclaredPassiveGainDBi != nil {
				fmt.Fprintf(&b, "  - {id: %s, passive_gain_dbi: %.2f}\n", bm.ID, *bm.DeclaredPassiveGainDBi)
			} else {
				fmt.Fprintf(&b, "  - {id: %s}\n", bm.ID)
			}
		}
		b.WriteString("elements: elements.csv\n")
		b.WriteString("notes: notes.md\n")
		return b.Bytes()
	}
	for _, bm := range r.Beams {
		fmt.Fprintf(&b, "  - id: %s\n", bm.ID)
		fmt.Fprintf(&b, "    theta_deg: %s\n", num(bm.ThetaDeg))
		fmt.Fprintf(&b, "    phi_deg: %s\n", num(bm.PhiDeg))
		fmt.Fprintf(&b, "    polarization: %s\n", bm.Polarization)
		fmt.Fprintf(&b, "    transmission: %s\n", bm.TransmissionFile)
		entry := func(indent string, q int) {
			fmt.Fprintf(&b, "file: %s\n", bm.NoiseFiles[q])
			fmt.Fprintf(&b, "%squantity: %s\n", indent, bm.NoiseQuantities[q])
			fmt.Fprintf(&b, "%snoise_bandwidth_hz: %s\n", indent, num(t.NoiseBandwidthHz))
			fmt.Fprintf(&b, "%sintegration_s: %s\n", indent, num(t.IntegrationS))
			if c := csvOf(bm.NoiseQuantities[q], ""); c != "" {
				fmt.Fprintf(&b, "%scsv: %s\n", indent, c)
			}
		}
		if len(bm.NoiseQuantities) == 1 {
			b.WriteString("    noise:\n      ")
			entry("      ", 0)
		} else {
			b.WriteString("    noise:\n")
			for q := range bm.NoiseQuantities {
				b.WriteString("      - ")
				entry("        ", q)
			}
		}
		if bm.DeclaredPassiveGainDBi != nil {
			fmt.Fprintf(&b, "    passive_gain_dbi: %.2f\n", *bm.DeclaredPassiveGainDBi)
		}
	}
	b.WriteString("elements: elements.csv\n")
	b.WriteString("notes: notes.md\n")
	return b.Bytes()
}

func (w *writer) notes(r *RunTruth) []byte {
	t := w.t
	var b bytes.Buffer
	fmt.Fprintf(&b, "# Setup notes: %s, %s\n\n", r.Serial, r.Started.Format("2 January 2006"))
	fmt.Fprintf(&b, "- Range %s (compact range); reference horn %s measured before and after the unit.\n", t.Station, t.Reference)
	fmt.Fprintf(&b, "- Unit on the roll-over-azimuth positioner, transmit path terminated, 28 V from the bench supply; firmware %s.\n", r.Firmware)
	fmt.Fprintf(&b, "- Ambient %s °C at the start of the run; operator %s.\n", strconv.FormatFloat(r.AmbientC, 'f', 1, 64), r.Operator)
	fmt.Fprintf(&b, "- %d beams, %d points from %s to %s GHz.\n", len(r.Beams), t.Options.Points, num(t.StartHz/1e9), num(t.StopHz/1e9))
	switch {
	case r.Role == RoleRetest && len(r.Faults) > 0 && strings.Contains(strings.Join(r.Faults, " "), "cable"):
		b.WriteString("- Gain low on every beam. After the run the feed cable of subarray 3 was found half seated; unit sent back for rework.\n")
	case r.Role == RoleRetest:
		b.WriteString("- Retest after the feed cable of subarray 3 was reseated and the unit updated to firmware 4.2.1.\n")
	case r.Role == RoleRangeDrift:
		b.WriteString("- Chamber door opened during the run to fetch a cable; the reference was re-measured afterwards.\n")
	case r.Role == RoleOutlier:
		b.WriteString("- Supply current 0.4 A above the usual on this unit.\n")
	}
	b.WriteString("\n*Synthetic demo data: ")
	b.WriteString(t.Company)
	b.WriteString(" and its products are invented.*\n")
	return b.Bytes()
}

// readme describes the archive: what is invented, how it was made and
// what was planted in it.
func (w *writer) readme() []byte {
	t := w.t
	o := t.Options
	var b bytes.Buffer
	fmt.Fprintf(&b, "# Demo archive: %s %s (synthetic)\n\n", t.Company, t.Product)
	fmt.Fprintf(&b, "Everything here is invented: the company %q, the product %s, the serial numbers,\n", t.Company, t.Product)
	fmt.Fprintf(&b, "the station %s, the reference horn %s and its certificate, the operators (initials only)\n", t.Station, t.Reference)
	b.WriteString("and every measurement. The files were synthesized from a physical model of a Ku-band\n")
	b.WriteString("receive panel in a compact range, with seeded measurement noise, by\n\n")
	fmt.Fprintf(&b, "    gtpack demo DIR --units %d --seed %d\n\n", o.Units, o.Seed)
	fmt.Fprintf(&b, "(package ingest/demo, Options{Units: %d, Seed: %d, Beams: %d, Points: %d}). The same\n", o.Units, o.Seed, o.Beams, o.Points)
	b.WriteString("options always give byte-identical files. The sample-archive folder of the gtpack source is\n")
	b.WriteString("this output for `--units 8 --seed 1`; a test (ingest/demo TestSampleArchive) checks it byte\n")
	b.WriteString("for byte; `rm -rf sample-archive && go run ./cmd/gtpack demo sample-archive --units 8 --seed 1`\n")
	b.WriteString("rewrites it.\n")
	b.WriteString("The `gtpack demo` command also approves some reports, as a laboratory would, into\n")
	b.WriteString("approvals/ (the first unit issued and co-signed, the first retested unit approved before\n")
	b.WriteString("its retest, so that the retest made that approval void, and the last unit issued);\n")
	b.WriteString("the others are drafts. A test of the command checks that folder too.\n\n")
	b.WriteString("## Model\n\n")
	b.WriteString("- Range loss about 50.8 dB at 11.725 GHz, rising as 20*log10(f), with a 0.05 dB quiet-zone\n")
	b.WriteString("  ripple common to the reference and the unit; the reference horn (realized gain, about 20 dBi)\n")
	b.WriteString("  is measured before and after the unit, and the range loss drifts between the two.\n")
	b.WriteString("- Passive gain about 30 dBi at boresight, rising as 20*log10(f); scan loss 10*n*log10(cos theta),\n")
	b.WriteString("  n between 1.2 and 1.4 per unit; the second polarization about 0.12 dB lower.\n")
	b.WriteString("- Receiver noise temperature T_e about 105 K at band centre, higher at the band edges, with a\n")
	b.WriteString("  planted slow rise of 40 K over the lot in test order; receive-chain gain about 35 dB with ripple.\n")
	b.WriteString("- Chamber antenna temperature = ambient (20-25 C). Output noise density N = k(T_amb + T_e)G_rx;\n")
	b.WriteString("  boresight beams also carry the system noise figure NF_sys = N/(kT0) - S21 (dB).\n")
	fmt.Fprintf(&b, "- Noise: %s dB on |S21|, %s deg on its phase, %.4f dB on the noise traces\n", num(t.S21NoiseDB), num(t.S21PhaseNoiseDeg), t.NoiseTraceDB)
	fmt.Fprintf(&b, "  (4.343/sqrt(B*tau) with B = %s Hz, tau = %s s); some noise traces are on a coarser grid.\n", num(t.NoiseBandwidthHz), num(t.IntegrationS))
	b.WriteString("- passive_gain_dbi on the boresight beams is the passive gain at 11.725 GHz (band centre).\n")
	if t.RangeStepDB != 0 {
		fmt.Fprintf(&b, "- Range event: from %s on (run %d in test order) the range loss is %s dB higher, in the reference\n", t.Runs[t.RangeStepFrom].Started.Format("2006-01-02 15:04"), t.RangeStepFrom+1, num(t.RangeStepDB))
		b.WriteString("  and the unit measurements alike (a moved feed): the units' G/T is unchanged, and health.html\n")
		b.WriteString("  shows those runs beyond the range chart's control limits.\n")
	}
	if t.CheckUnit != "" {
		fmt.Fprintf(&b, "- Check unit %s (the station's check_units), a unit of the lot's make, measured at 07:45\n", t.CheckUnit)
		b.WriteString("  every seven days over the production's span (at least three times); it is in no yield.\n")
	}
	b.WriteString("\n")
	b.WriteString("## Units\n\n")
	b.WriteString("| serial | run | started | role | planted |\n|---|---|---|---|---|\n")
	for _, r := range t.Runs {
		faults := strings.Join(r.Faults, "; ")
		if faults == "" {
			faults = "-"
		}
		fmt.Fprintf(&b, "| %s | %s | %s | %s | %s |\n", r.Serial, r.Dir, r.Started.Format("2006-01-02 15:04"), r.Role, faults)
	}
	b.WriteString("\nThe element tables of every run also carry random phase errors of 2.5 deg rms.\n")
	return b.Bytes()
}
