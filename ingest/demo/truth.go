package demo

import (
	"math"
	"time"

	"gonum.org/v1/gonum/interp"
)

// Physical constants of the model (method.md section 2).
const (
	// BoltzmannJPerK is k, exact since the 2019 SI revision.
	BoltzmannJPerK = 1.380649e-23
	// T0K is the reference temperature of the noise-figure definition.
	T0K = 290.0
	// celsiusToKelvin is the offset of the Celsius scale.
	celsiusToKelvin = 273.15
)

// Roles of a unit in the scenario: what was planted in it.
const (
	RoleNormal       = "normal"
	RoleElementFault = "element-phase-fault" // a block of elements with a large phase error
	RoleRetest       = "retest"              // first run fails (cable not seated), retest passes
	RoleMarginal     = "marginal"            // receiver noise a little high: close to the limit
	RoleRangeDrift   = "range-drift"         // the range loss drifts over the station tolerance
	RoleOutlier      = "outlier"             // a degraded LNA chain: far below the fleet
	RoleCheck        = "check-unit"          // the range's golden unit, measured now and then
)

// CheckUnitSerial is the serial of the scenario's check unit (the station's
// golden unit).
const CheckUnitSerial = "QDA-GOLD-01"

// Truth is the model behind a demo archive: every parameter the files were
// synthesized from, so that a test can compare what the tool reduces with
// what was planted. Frequencies are in Hz, gains in dB(i), temperatures
// in K.
type Truth struct {
	// Options are the options with their defaults applied.
	Options Options

	Company      string
	Product      string
	ProductTitle string
	Station      string
	Reference    string
	// CheckUnit is the station's check unit ("" when the options leave it
	// out); RangeStepDB is the planted range event: the range loss steps up
	// by that much from run RangeStepFrom (in test order, from 0) on.
	CheckUnit     string
	RangeStepDB   float64
	RangeStepFrom int

	// StartHz, StopHz and Points describe the transmission grid;
	// CentreHz is the frequency the declared passive gain holds at.
	StartHz  float64
	StopHz   float64
	CentreHz float64

	// ReferenceTable is the reference antenna's calibration table as
	// written; the true reference gain is its linear interpolation.
	ReferenceTable []TablePoint

	// Measurement noise (standard deviations per frequency point, white):
	// S21NoiseDB on |S21| of every transmission file (reference and unit),
	// S21PhaseNoiseDeg on its phase, NoiseTraceDB on every noise trace.
	// Zero them (then call WriteTruth) for a noise-free archive.
	S21NoiseDB       float64
	S21PhaseNoiseDeg float64
	NoiseTraceDB     float64
	// NoiseBandwidthHz and IntegrationS are what the runs declare for the
	// noise traces; NoiseTraceDB is set to 4.343/sqrt(B*tau) from them.
	NoiseBandwidthHz float64
	IntegrationS     float64

	// Station and spec settings written to the archive.
	ReceiverMatch       float64
	DriftToleranceDB    float64
	MethodToleranceDB   float64
	OperatingAntennaK   float64
	ElementToleranceDeg float64
	// Limits are the spec's lower limits at StartHz and StopHz: G/T (both
	// boresight and scanned, dB/K), boresight gain (dBi, band mean) and the
	// scan exponent of the scanned G/T limit.
	GTLimitDB        [2]float64
	GainLimitDB      [2]float64
	SpecScanExponent float64

	Units []UnitTruth // by serial
	Runs  []RunTruth  // in test order
}

// TablePoint is one row of the reference antenna's table.
type TablePoint struct {
	FrequencyHz           float64
	GainDBi               float64
	ExpandedUncertaintyDB float64
}

// UnitTruth is one serial number of the scenario.
type UnitTruth struct {
	Serial string
	Role   string
	// Runs indexes Truth.Runs, oldest first; the last is the acceptance run.
	Runs []int
}

// RunTruth is the model of one run: one unit measured on one day.
type RunTruth struct {
	Serial string
	Role   string
	// Order is the position in test order (0-based), Index the unit's
	// position by serial.
	Order int
	Index int
	// Dir is the run folder relative to the archive root, with '/'.
	Dir      string
	Started  time.Time
	Operator string
	Firmware string
	// AmbientC is the ambient temperature as written (T_A = AmbientC + 273.15).
	AmbientC float64
	// Faults describes, in words, what was planted in this run.
	Faults []string

	// Range: RL(f) = RangeLossCentreDB + 20*log10(f/CentreHz)
	//   + QuietZoneRippleDB*sin(2*pi*f/QuietZoneRipplePeriodHz + QuietZoneRipplePhaseRad)
	// during the unit's measurement; the reference was measured at
	// RL - d(f)/2 before and RL + d(f)/2 after, d(f) = DriftDB*(1 +
	// DriftSlope*x), x = (f - CentreHz)/half span, so that the mean of pre
	// and post is RL.
	CentreHz                float64
	HalfSpanHz              float64
	RangeLossCentreDB       float64
	QuietZoneRippleDB       float64
	QuietZoneRipplePeriodHz float64
	QuietZoneRipplePhaseRad float64
	DriftDB                 float64
	DriftSlope              float64

	// Passive gain at boresight of the first polarization:
	// G_p(f) = PassiveGainCentreDBi + 20*log10(f/CentreHz); the second
	// polarization adds PolarizationOffsetDB; a beam scanned to theta adds
	// 10*ScanExponent*log10(cos theta).
	PassiveGainCentreDBi float64
	PolarizationOffsetDB float64
	ScanExponent         float64

	// Receiver: T_e(f) = ReceiverNoiseCentreK*(1 + ReceiverNoiseCurvature*x^2);
	// G_rx(f) = ReceiverGainCentreDB + ReceiverTiltDB*x +
	// ReceiverRippleDB*sin(2*pi*(f - CentreHz)/ReceiverRipplePeriodHz +
	// ReceiverRipplePhaseRad) + the beam's ReceiverOffsetDB.
	ReceiverNoiseCentreK   float64
	ReceiverNoiseCurvature float64
	ReceiverGainCentreDB   float64
	ReceiverTiltDB         float64
	ReceiverRippleDB       float64
	ReceiverRipplePeriodHz float64
	ReceiverRipplePhaseRad float64

	// Elements: the planted phase errors (random plus a block fault).
	// ElementErrorRMSDeg is the rms of the planted errors; ElementBlock
	// is the faulty block, nil when there is none.
	ElementErrorRMSDeg float64
	ElementBlock       *ElementBlock
	// ElementStepRowDeg and ElementStepColDeg are the steering phase
	// gradient of the element table.
	ElementStepRowDeg float64
	ElementStepColDeg float64

	Beams []BeamTruth
}

// ElementBlock is a planted block of elements with a common phase error.
type ElementBlock struct {
	FirstRow, FirstCol int // element indexes as written (1-based)
	Rows, Cols         int
	PhaseErrorDeg      float64
}

// Contains reports whether the element (row, col) is in the block.
func (b *ElementBlock) Contains(row, col int) bool {
	return b != nil && row >= b.FirstRow && row < b.FirstRow+b.Rows && col >= b.FirstCol && col < b.FirstCol+b.Cols
}

// BeamTruth is one beam state of a run.
type BeamTruth struct {
	ID           string
	ThetaDeg     float64
	PhiDeg       float64
	Polarization string
	// Pol is the polarization index (0 or 1).
	Pol int
	// ReceiverOffsetDB is the beam state's change of the receive-chain
	// gain (it scales signal and noise alike).
	ReceiverOffsetDB float64
	// NoiseQuantities lists the noise traces written, in the order of the
	// run.yaml entries; NoisePoints is their number of points.
	NoiseQuantities []string
	NoisePoints     int
	// DeclaredPassiveGainDBi is passive_gain_dbi as written (the passive
	// gain at CentreHz), nil when the beam does not declare it.
	DeclaredPassiveGainDBi *float64
	// Files as written, relative to the run folder.
	TransmissionFile string
	NoiseFiles       []string
}

// Noise quantities of the archive contract.
const (
	QuantityNoiseDensity  = "noise-density-dbm-hz"
	QuantityNoiseRelative = "noise-relative-kt0-db"
	QuantitySystemNF      = "system-noise-figure-db"
)

// KT0DBmPerHz is 10*log10(k*T0) in dBm/Hz (about -173.975).
var KT0DBmPerHz = 10*math.Log10(BoltzmannJPerK*T0K) + 30

// FrequenciesHz returns a grid of n points from StartHz to StopHz.
func (t *Truth) FrequenciesHz(n int) []float64 {
	return grid(t.StartHz, t.StopHz, n)
}

func grid(start, stop float64, n int) []float64 {
	f := make([]float64, n)
	if n == 1 {
		f[0] = start
		return f
	}
	step := (stop - start) / float64(n-1)
	for k := range f {
		f[k] = start + float64(k)*step
	}
	f[n-1] = stop
	return f
}

// ReferenceGainDBi is the true gain of the reference antenna: the linear
// interpolation of its table (the reference is realized gain).
func (t *Truth) ReferenceGainDBi(fHz float64) float64 {
	xs := make([]float64, len(t.ReferenceTable))
	ys := make([]float64, len(t.ReferenceTable))
	for i, p := range t.ReferenceTable {
		xs[i], ys[i] = p.FrequencyHz, p.GainDBi
	}
	var pl interp.PiecewiseLinear
	if err := pl.Fit(xs, ys); err != nil {
		return math.NaN()
	}
	return pl.Predict(fHz)
}

// Acceptance returns the acceptance run of unit u (index into Units).
func (t *Truth) Acceptance(u int) *RunTruth {
	r := t.Units[u].Runs
	return &t.Runs[r[len(r)-1]]
}

// x is the position in the band, -1 at the lower edge and +1 at the upper.
func (r *RunTruth) x(fHz float64) float64 { return (fHz - r.CentreHz) / r.HalfSpanHz }

// AmbientK is the chamber's antenna temperature T_A = T_amb.
func (r *RunTruth) AmbientK() float64 { return r.AmbientC + celsiusToKelvin }

// RangeLossDB is the range loss during the unit's measurement (the mean of
// the pre and post reference measurements).
func (r *RunTruth) RangeLossDB(fHz float64) float64 {
	return r.RangeLossCentreDB + 20*math.Log10(fHz/r.CentreHz) +
		r.QuietZoneRippleDB*math.Sin(2*math.Pi*fHz/r.QuietZoneRipplePeriodHz+r.QuietZoneRipplePhaseRad)
}

// RangeDriftDB is RL_post - RL_pre.
func (r *RunTruth) RangeDriftDB(fHz float64) float64 {
	return r.DriftDB * (1 + r.DriftSlope*r.x(fHz))
}

// RangeLossPreDB and RangeLossPostDB are the range loss when the reference
// antenna was measured before and after the unit.
func (r *RunTruth) RangeLossPreDB(fHz float64) float64 {
	return r.RangeLossDB(fHz) - r.RangeDriftDB(fHz)/2
}

// RangeLossPostDB: see RangeLossPreDB.
func (r *RunTruth) RangeLossPostDB(fHz float64) float64 {
	return r.RangeLossDB(fHz) + r.RangeDriftDB(fHz)/2
}

// PassiveGainDBi is G_p of beam b (index into Beams) at fHz.
func (r *RunTruth) PassiveGainDBi(b int, fHz float64) float64 {
	bm := &r.Beams[b]
	g := r.PassiveGainCentreDBi + 20*math.Log10(fHz/r.CentreHz)
	if bm.Pol == 1 {
		g += r.PolarizationOffsetDB
	}
	if bm.ThetaDeg != 0 {
		g += 10 * r.ScanExponent * math.Log10(math.Cos(bm.ThetaDeg*math.Pi/180))
	}
	return g
}

// ReceiverGainDB is G_rx of beam b at fHz.
func (r *RunTruth) ReceiverGainDB(b int, fHz float64) float64 {
	return r.ReceiverGainCentreDB + r.ReceiverTiltDB*r.x(fHz) +
		r.ReceiverRippleDB*math.Sin(2*math.Pi*(fHz-r.CentreHz)/r.ReceiverRipplePeriodHz+r.ReceiverRipplePhaseRad) +
		r.Beams[b].ReceiverOffsetDB
}

// ReceiverNoiseK is T_e at fHz (the same for every beam).
func (r *RunTruth) ReceiverNoiseK(fHz float64) float64 {
	x := r.x(fHz)
	return r.ReceiverNoiseCentreK * (1 + r.ReceiverNoiseCurvature*x*x)
}

// GainDBi is the unit's total realized gain G_aut = G_p*G_rx of beam b.
func (r *RunTruth) GainDBi(b int, fHz float64) float64 {
	return r.PassiveGainDBi(b, fHz) + r.ReceiverGainDB(b, fHz)
}

// GTdBPerK is the chamber G/T = G_p/(T_amb + T_e) of beam b.
func (r *RunTruth) GTdBPerK(b int, fHz float64) float64 {
	return r.PassiveGainDBi(b, fHz) - 10*math.Log10(r.AmbientK()+r.ReceiverNoiseK(fHz))
}

// OperatingGTdBPerK is G/T at the antenna temperature taK: G_p/(taK + T_e).
func (r *RunTruth) OperatingGTdBPerK(b int, fHz, taK float64) float64 {
	return r.PassiveGainDBi(b, fHz) - 10*math.Log10(taK+r.ReceiverNoiseK(fHz))
}

// S21DB is the unit's transmission |S21| in dB: G_aut - RL.
func (r *RunTruth) S21DB(b int, fHz float64) float64 {
	return r.GainDBi(b, fHz) - r.RangeLossDB(fHz)
}

// NoiseDensityDBmHz is the output noise density N_out = k(T_amb+T_e)G_rx
// of beam b, in dBm/Hz.
func (r *RunTruth) NoiseDensityDBmHz(b int, fHz float64) float64 {
	return 10*math.Log10(BoltzmannJPerK*(r.AmbientK()+r.ReceiverNoiseK(fHz))) + 30 + r.ReceiverGainDB(b, fHz)
}

// NoiseRelativeKT0DB is N_out above k*T0, in dB.
func (r *RunTruth) NoiseRelativeKT0DB(b int, fHz float64) float64 {
	return r.NoiseDensityDBmHz(b, fHz) - KT0DBmPerHz
}

// SystemNoiseFigureDB is NF_sys = N_rel - S21_sys,dB of beam b.
func (r *RunTruth) SystemNoiseFigureDB(b int, fHz float64) float64 {
	return r.NoiseRelativeKT0DB(b, fHz) - r.S21DB(b, fHz)
}

// Beam returns the index of the beam with id, or -1.
func (r *RunTruth) Beam(id string) int {
	for i := range r.Beams {
		if r.Beams[i].ID == id {
			return i
		}
	}
	return -1
}
