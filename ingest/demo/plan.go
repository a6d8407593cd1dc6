package demo

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"time"
)

// Options says what Write synthesizes. Zero fields take their defaults.
type Options struct {
	Units  int   // default 8
	Seed   int64 // default 1
	Beams  int   // beams per run, default 16 (at most 16)
	Points int   // frequency points per file, default 801
	// ExplicitBeams writes every beam of every run.yaml in full, as
	// archives did before beam plans; by default the runs name the spec's
	// beam_plan (each beam by id, with the unit's own passive gain).
	ExplicitBeams bool
}

// Limits of the options: more beams than the scenario's 16 beam states
// would need invented states; fewer than 11 points make no band.
const (
	maxBeams  = 16
	minPoints = 11
	maxPoints = 100001
	maxUnits  = 100000
)

func (o Options) withDefaults() (Options, error) {
	if o.Units == 0 {
		o.Units = 8
	}
	if o.Seed == 0 {
		o.Seed = 1
	}
	if o.Beams == 0 {
		o.Beams = 16
	}
	if o.Points == 0 {
		o.Points = 801
	}
	switch {
	case o.Units < 1 || o.Units > maxUnits:
		return o, fmt.Errorf("demo: %d units; expected 1 to %d", o.Units, maxUnits)
	case o.Beams < 1 || o.Beams > maxBeams:
		return o, fmt.Errorf("demo: %d beams; expected 1 to %d", o.Beams, maxBeams)
	case o.Points < minPoints || o.Points > maxPoints:
		return o, fmt.Errorf("demo: %d points; expected %d to %d", o.Points, minPoints, maxPoints)
	}
	return o, nil
}

// beamState is one of the scenario's scan states.
type beamState struct{ theta, phi float64 }

// The 16 beams: two polarizations times these eight scan states.
var beamStates = []beamState{{0, 0}, {20, 0}, {40, 0}, {60, 0}, {20, 90}, {40, 90}, {60, 90}, {50, 45}}

var polarizations = []string{"H", "V"}

// Roles of the first eight units; later units are normal, with an
// occasional marginal or element-fault unit.
var firstRoles = []string{
	RoleNormal, RoleElementFault, RoleRetest, RoleMarginal,
	RoleRangeDrift, RoleElementFault, RoleOutlier, RoleNormal,
}

func roleOf(i int) string {
	if i < len(firstRoles) {
		return firstRoles[i]
	}
	switch {
	case i%20 == 11:
		return RoleElementFault
	case i%10 == 5:
		return RoleMarginal
	}
	return RoleNormal
}

var operators = []string{"JK", "MB", "TS"}

// Scenario constants (all invented).
const (
	company      = "Quarrydown Arrays"
	productCode  = "QK-256"
	productTitle = "Ku-band receive panel QK-256, acceptance"
	serialPrefix = "QDA-26-"
	stationID    = "chamber-2"
	referenceID  = "horn-r7"
	startHz      = 10.7e9
	stopHz       = 12.75e9
	centreHz     = 11.725e9

	elementRows     = 16
	elementCols     = 16
	elementSpacingM = 0.0115
	// Steering state of the element table (the array's calibration beam).
	elementThetaDeg = 20.0
	elementPhiDeg   = 30.0
	lightSpeed      = 299792458.0
)

// firstDay is the day of the first run; runs follow on consecutive days.
var firstDay = time.Date(2026, time.February, 2, 0, 0, 0, 0, time.UTC)

// rngFor returns a generator for one purpose, so that what one part of the
// model draws does not shift another's numbers.
func rngFor(seed int64, purpose, a, b uint64) *rand.Rand {
	s2 := purpose*0x9E3779B97F4A7C15 ^ (a+1)*0xBF58476D1CE4E5B9 ^ (b+1)*0x94D049BB133111EB
	return rand.New(rand.NewPCG(uint64(seed), s2))
}

const (
	purposeUnit uint64 = iota + 1
	purposeRun
	purposeElements
	purposeFile
)

func round(x float64, decimals int) float64 {
	v, _ := strconv.ParseFloat(strconv.FormatFloat(x, 'f', decimals, 64), 64)
	return v
}

// Plan draws the model of a demo archive without writing anything.
func Plan(o Options) (*Truth, error) {
	o, err := o.withDefaults()
	if err != nil {
		return nil, err
	}
	t := &Truth{
		Options:      o,
		Company:      company,
		Product:      productCode,
		ProductTitle: productTitle,
		Station:      stationID,
		Reference:    referenceID,
		StartHz:      startHz,
		StopHz:       stopHz,
		CentreHz:     centreHz,

		S21NoiseDB:       0.03,
		S21PhaseNoiseDeg: 0.3,
		NoiseBandwidthHz: 2e6,
		IntegrationS:     1e-3,

		ReceiverMatch:       0.03,
		DriftToleranceDB:    0.25,
		MethodToleranceDB:   0.60,
		OperatingAntennaK:   50,
		ElementToleranceDeg: 6,
		GTLimitDB:           [2]float64{1.8, 3.3},
		GainLimitDB:         [2]float64{63.4, 64.2},
		SpecScanExponent:    1.5,
	}
	// Radiometer equation (Dicke 1946): relative sigma 1/sqrt(B*tau).
	t.NoiseTraceDB = 10 / math.Ln10 / math.Sqrt(t.NoiseBandwidthHz*t.IntegrationS)

	// Standard-gain horn table, 10.0 to 13.0 GHz: gain grows a little
	// slower than the aperture's 20*log10(f).
	for k := 0; k <= 12; k++ {
		f := 10.0 + 0.25*float64(k)
		g := 19.62 + 18.1*math.Log10(f/10) + 0.04*math.Sin(2.1*f)
		u := 0.30
		if f < 10.5 || f > 12.75 {
			u = 0.35
		}
		t.ReferenceTable = append(t.ReferenceTable, TablePoint{FrequencyHz: f * 1e9, GainDBi: round(g, 2), ExpandedUncertaintyDB: u})
	}

	n := o.Units
	retestUnit := -1
	for i := range n {
		if roleOf(i) == RoleRetest {
			retestUnit = i
			break
		}
	}
	totalRuns := n
	if retestUnit >= 0 {
		totalRuns++
	}
	perDay := (totalRuns + 329) / 330

	t.Units = make([]UnitTruth, n)
	t.Runs = make([]RunTruth, 0, totalRuns)
	units := make([]RunTruth, n) // per-unit parameters, one template each
	for i := range n {
		units[i] = t.unitModel(i)
		t.Units[i] = UnitTruth{Serial: units[i].Serial, Role: units[i].Role}
	}
	addRun := func(i int, retestFirst bool) {
		r := units[i] // copy of the unit's parameters
		r.Beams = append([]BeamTruth(nil), units[i].Beams...)
		r.Order = len(t.Runs)
		day, slot := r.Order/perDay, r.Order%perDay
		minutes := 8*60 + 30 + slot*(600/perDay)
		if perDay == 1 {
			minutes += (r.Order * 17) % 45
		}
		r.Started = firstDay.AddDate(0, 0, day).Add(time.Duration(minutes) * time.Minute)
		r.Dir = "runs/" + r.Serial + "/" + r.Started.Format("2006-01-02T1504")
		r.Operator = operators[day%len(operators)]
		t.runModel(&r, retestFirst)
		t.Units[i].Runs = append(t.Units[i].Runs, len(t.Runs))
		t.Runs = append(t.Runs, r)
	}
	// The retest comes a few units after the failed run.
	retestAfter := min(retestUnit+4, n-1)
	for i := range n {
		addRun(i, i == retestUnit)
		if retestUnit >= 0 && i == retestAfter {
			addRun(retestUnit, false)
		}
	}
	return t, nil
}

// unitModel draws the parameters that belong to the unit itself.
func (t *Truth) unitModel(i int) RunTruth {
	o := t.Options
	rng := rngFor(o.Seed, purposeUnit, uint64(i), 0)
	r := RunTruth{
		Serial:     fmt.Sprintf("%s%04d", serialPrefix, i+1),
		Role:       roleOf(i),
		Index:      i,
		CentreHz:   t.CentreHz,
		HalfSpanHz: (t.StopHz - t.StartHz) / 2,
	}
	// Draw every number in a fixed order, whatever the role, so that one
	// unit's parameters do not depend on another's role.
	passive := 30.0 + 0.07*rng.NormFloat64()
	r.PolarizationOffsetDB = round(-0.12+0.03*rng.NormFloat64(), 2)
	r.ScanExponent = 1.2 + 0.2*rng.Float64()
	lotDrift := 0.0
	if o.Units > 1 {
		// The planted slow drift of the receiver noise over the lot.
		lotDrift = 40 * float64(i) / float64(o.Units-1)
	}
	r.ReceiverNoiseCentreK = 105 + lotDrift + 3*rng.NormFloat64()
	r.ReceiverNoiseCurvature = 0.08 + 0.04*rng.Float64()
	r.ReceiverGainCentreDB = 35 + 0.15*rng.NormFloat64()
	r.ReceiverTiltDB = -0.3 + 0.1*rng.NormFloat64()
	r.ReceiverRippleDB = 0.15 + 0.15*rng.Float64()
	r.ReceiverRipplePeriodHz = 250e6 + 150e6*rng.Float64()
	r.ReceiverRipplePhaseRad = 2 * math.Pi * rng.Float64()
	offsets := make([]float64, maxBeams)
	for b := range offsets {
		offsets[b] = 0.08 * rng.NormFloat64()
	}
	blockRow, blockCol := 3+rng.IntN(8), 3+rng.IntN(8)
	blockErr := 38 + 6*rng.Float64()
	if rng.IntN(2) == 1 {
		blockErr = -blockErr
	}
	if r.Role == RoleElementFault {
		r.ElementBlock = &ElementBlock{FirstRow: blockRow, FirstCol: blockCol, Rows: 4, Cols: 4, PhaseErrorDeg: round(blockErr, 1)}
	}
	switch r.Role {
	case RoleMarginal:
		r.ReceiverNoiseCentreK += 35
	case RoleOutlier:
		r.ReceiverNoiseCentreK += 150
	}
	r.Firmware = "4.2.0"
	if i >= (o.Units+1)/2 {
		r.Firmware = "4.2.1"
	}

	// Element table steering gradient (same calibration beam for every
	// unit): -360 deg * d/lambda * sin(theta) * (cos phi, sin phi).
	dl := elementSpacingM * t.CentreHz / lightSpeed
	s := math.Sin(elementThetaDeg * math.Pi / 180)
	r.ElementStepColDeg = -360 * dl * s * math.Cos(elementPhiDeg*math.Pi/180)
	r.ElementStepRowDeg = -360 * dl * s * math.Sin(elementPhiDeg*math.Pi/180)

	// The passive gain carries the phase-error loss of the unit's planted
	// errors (Ruze), of which the block is by far the larger part.
	rms := elementErrorRMS(r.ElementBlock)
	passive -= 10 / math.Ln10 * math.Pow(rms*math.Pi/180, 2)
	r.PassiveGainCentreDBi = round(passive, 2)

	for b := range o.Beams {
		st := beamStates[b%len(beamStates)]
		pol := b / len(beamStates)
		bm := BeamTruth{
			ID:               fmt.Sprintf("b%02d", b),
			ThetaDeg:         st.theta,
			PhiDeg:           st.phi,
			Polarization:     polarizations[pol],
			Pol:              pol,
			ReceiverOffsetDB: offsets[b],
			NoisePoints:      o.Points,
		}
		switch {
		case st.theta == 0:
			bm.NoiseQuantities = []string{QuantityNoiseDensity, QuantitySystemNF}
			g := r.PassiveGainCentreDBi
			if pol == 1 {
				g += r.PolarizationOffsetDB
			}
			g = round(g, 2)
			bm.DeclaredPassiveGainDBi = &g
		case b%len(beamStates) == 7:
			bm.NoiseQuantities = []string{QuantitySystemNF}
		case pol == 1 && b%len(beamStates) == 2:
			bm.NoiseQuantities = []string{QuantityNoiseRelative}
			bm.NoisePoints = (o.Points + 1) / 2
		default:
			bm.NoiseQuantities = []string{QuantityNoiseDensity}
			if b%2 == 1 {
				bm.NoisePoints = (o.Points + 1) / 2
			}
		}
		r.Beams = append(r.Beams, bm)
	}
	return r
}

// elementErrorRMS is the expected rms of the planted element phase errors:
// the random part (elementRandomDeg) and the block.
func elementErrorRMS(b *ElementBlock) float64 {
	ms := elementRandomDeg * elementRandomDeg
	if b != nil {
		frac := float64(b.Rows*b.Cols) / float64(elementRows*elementCols)
		ms += frac * b.PhaseErrorDeg * b.PhaseErrorDeg
	}
	return math.Sqrt(ms)
}

// elementRandomDeg is the standard deviation of the random element phase
// errors of every unit.
const elementRandomDeg = 2.5

// runModel draws what belongs to one run: the day's ambient, range state
// and drift, and the planted faults of the run.
func (t *Truth) runModel(r *RunTruth, retestFirst bool) {
	rng := rngFor(t.Options.Seed, purposeRun, uint64(r.Order), 0)
	r.AmbientC = round(20+5*rng.Float64(), 1)
	r.RangeLossCentreDB = 50.8 + 0.03*rng.NormFloat64()
	r.QuietZoneRippleDB = 0.05
	r.QuietZoneRipplePeriodHz = 37e6
	r.QuietZoneRipplePhaseRad = 1.1
	r.DriftDB = 0.01 + 0.03*rng.Float64()
	if rng.IntN(2) == 1 {
		r.DriftDB = -r.DriftDB
	}
	r.DriftSlope = 0.2 * rng.NormFloat64()
	r.ElementErrorRMSDeg = elementErrorRMS(r.ElementBlock)
	r.Faults = nil
	if r.ElementBlock != nil {
		b := r.ElementBlock
		r.Faults = append(r.Faults, fmt.Sprintf("element phase error %+.1f deg on rows %d-%d, cols %d-%d",
			b.PhaseErrorDeg, b.FirstRow, b.FirstRow+b.Rows-1, b.FirstCol, b.FirstCol+b.Cols-1))
	}
	switch r.Role {
	case RoleRangeDrift:
		r.DriftDB, r.DriftSlope = 0.40, 0.1
		r.Faults = append(r.Faults, "range loss drifts 0.40 dB between the reference measurements")
	case RoleMarginal:
		r.Faults = append(r.Faults, "receiver noise temperature 35 K above the lot")
	case RoleOutlier:
		r.Faults = append(r.Faults, "degraded LNA chain: receiver noise temperature 150 K above the lot")
	}
	if retestFirst {
		// The declared passive gain stays the unit's own (measured before
		// the cable was fitted), so this run's projection is off too.
		r.PassiveGainCentreDBi = round(r.PassiveGainCentreDBi-1.8, 2)
		r.Faults = append(r.Faults, "subarray feed cable not seated: passive gain 1.8 dB low on every beam")
	} else if r.Role == RoleRetest {
		r.Firmware = "4.2.1"
	}
}
