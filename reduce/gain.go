package reduce

import (
	"fmt"
	"gonum.org/v1/gonum/floats"
	"math"

	"gtpack.example/gtpack/ingest"
)

// GainDBi is the AUT's total realized gain by gain transfer (method.md
// section 3): G_aut = S21_aut,dB + RL.
func GainDBi(s21DB, rangeLossDB float64) float64 { return s21DB + rangeLossDB }

// beamContext is what every beam of a unit shares.
type beamContext struct {
	run *ingest.Run
	rl  *RangeLoss
	// rlCause is the unit problem the missing range loss follows from,
	// -1 when there is none (see consequences).
	rlCause int
	// referenceK is the coverage factor of the reference certificate.
	referenceK  float64
	certificate string
	// receiverMatch is the station's residual |Gamma| of the receiver
	// port; haveStation is false when the station is unknown.
	receiverMatch float64
	haveStation   bool
	methodTolDB   float64
	stationGain   []stationTerm
	stationGT     []stationTerm
	ambientK      float64
	ambientOK     bool
	operatingK    *float64
	// refMismatchDB is the half-width of the reference antenna's mismatch
	// term on the range-loss grid, computed once for all beams.
	refMismatchDB []float64
	// constantRows caches rows of n equal values (station terms, noise
	// scatter, ambient): beams share them, since results are read-only.
	constantRows map[constantKey][]float64
}

type constantKey struct {
	value float64
	n     int
}

// constantRow returns a shared row of n copies of v.
func (ctx *beamContext) constantRow(v float64, n int) []float64 {
	k := constantKey{v, n}
	if r, ok := ctx.constantRows[k]; ok {
		return r
	}
	if ctx.constantRows == nil {
		ctx.constantRows = map[constantKey][]float64{}
	}
	r := constantDB(v, n)
	ctx.constantRows[k] = r
	return r
}

// constantTerm is a budget row whose value is the same at every point.
func (ctx *beamContext) constantTerm(name string, source TermSource, distribution string, divisor, valueDB float64, n int) BudgetTerm {
	return BudgetTerm{Name: name, Source: source, Distribution: distribution, Divisor: divisor,
		ValueDB: ctx.constantRow(valueDB, n), StandardDB: ctx.constantRow(math.Abs(valueDB)/divisor, n)}
}

// stationTerm is a declared station term, checked.
type stationTerm struct {
	name, distribution string
	divisor, valueDB   float64
}

// beamOutcome is what reducing one beam yields besides the Beam.
type beamOutcome struct {
	problems []*ingest.Problem
	// refused echoes a refusal ingest has probably reported already; it
	// is listed only when no problem names that file yet.
	refused []*ingest.Problem
	flags   []Flag
	// noAUTMatch is true when the beam has gain but its transmission file
	// holds no AUT reflection coefficient (mismatch term left out).
	noAUTMatch bool
	// noGT: the beam has no G/T.
	noGT bool
}

// noiseUse is one checked noise trace of a beam.
type noiseUse struct {
	in    ingest.NoiseInput
	trace *ingest.Trace
}

// reduceBeam computes one beam: the grid, gain, G/T in the forms the
// beam's noise traces allow, noise statistics, projection and budgets.
func reduceBeam(ctx *beamContext, rb *ingest.Beam, bd *ingest.BeamData) (Beam, beamOutcome) {
	var out beamOutcome
	runFile := ctx.run.File
	problem := func(file string, line int, format string, args ...any) {
		out.problems = append(out.problems, ingest.Problemf(file, line, format, args...))
	}
	b := Beam{ID: rb.ID, ThetaDeg: rb.ThetaDeg, PhiDeg: rb.PhiDeg, Polarization: rb.Polarization}
	if bd == nil {
		bd = &ingest.BeamData{}
	}

	tr := bd.Transmission
	switch {
	case tr == nil && rb.Transmission == "":
		problem(runFile, rb.Line, "beam %s names no transmission file: no gain and no noise-density G/T", rb.ID)
	case tr == nil:
		out.refused = append(out.refused, ingest.Problemf(rb.Transmission, 0,
			"transmission file of beam %s was refused: no gain and no noise-density G/T", rb.ID))
	default:
		if err := checkTrace(tr.FrequencyHz, tr.ParameterDB); err != nil {
			problem(tr.File, 0, "transmission of beam %s not used: %v", rb.ID, err)
			tr = nil
		}
	}

	// Noise traces: statistics for every usable one; the first of each
	// form is used for G/T.
	var density, figure *noiseUse
	if len(rb.Noise) == 0 {
		problem(runFile, rb.Line, "beam %s has no noise trace: no G/T for this beam", rb.ID)
	}
	for i, ni := range rb.Noise {
		var t *ingest.Trace
		if i < len(bd.Noise) {
			t = bd.Noise[i]
		}
		if t == nil {
			out.refused = append(out.refused, ingest.Problemf(ni.File, 0,
				"noise trace of beam %s was refused or is missing: not used", rb.ID))
			continue
		}
		switch ni.Quantity {
		case NoiseDensityDBmPerHz, NoiseRelativeKT0, SystemNoiseFigureDB:
		default:
			problem(runFile, ni.Line, "beam %s: noise quantity %q is not one of %s, %s, %s: trace not used",
				rb.ID, ni.Quantity, NoiseDensityDBmPerHz, NoiseRelativeKT0, SystemNoiseFigureDB)
			continue
		}
		if err := checkTrace(t.FrequencyHz, t.Values); err != nil {
			problem(ni.File, 0, "noise trace of beam %s not used: %v", rb.ID, err)
			continue
		}
		st := NoiseStatistics{
			File:            ni.File,
			Quantity:        ni.Quantity,
			ScatterDB:       SmoothedScatterDB(RobustScatterDB(t.Values), NoSmoothing),
			SmoothingPoints: NoSmoothing,
		}
		if ni.NoiseBandwidthHz != nil && ni.IntegrationS != nil {
			st.RadiometerDB = RadiometerDB(*ni.NoiseBandwidthHz, *ni.IntegrationS)
		}
		if len(t.Values) < 3 {
			problem(ni.File, 0, "noise trace of beam %s has %d points: its scatter cannot be estimated "+
				"(at least 3 needed), so the noise term of the budget is 0", rb.ID, len(t.Values))
		}
		b.Noise = append(b.Noise, st)
		u := &noiseUse{in: ni, trace: t}
		switch ni.Quantity {
		case NoiseDensityDBmPerHz, NoiseRelativeKT0:
			if density == nil {
				density = u
				continue
			}
		case SystemNoiseFigureDB:
			if figure == nil {
				figure = u
				continue
			}
		}
		out.flags = append(out.flags, Flag{Kind: "noise", Beam: rb.ID, Message: fmt.Sprintf(
			"%s is a second trace of the same noise form; only the first is used for G/T", ni.File)})
	}

	// The grid: the transmission's, else a noise trace's, restricted to
	// the span every input covers.
	var baseF []float64
	var baseFile string
	switch {
	case tr != nil:
		baseF, baseFile = tr.FrequencyHz, tr.File
	case figure != nil && ctx.rl != nil:
		baseF, baseFile = figure.trace.FrequencyHz, figure.in.File
	case density != nil:
		baseF, baseFile = density.trace.FrequencyHz, density.in.File
	case figure != nil:
		baseF, baseFile = figure.trace.FrequencyHz, figure.in.File
	default:
		return b, out
	}
	lo, hi := baseF[0], baseF[len(baseF)-1]
	spans := []string{}
	narrow := func(f []float64, name string) {
		if f[0] > lo*(1+gridTolerance) || f[len(f)-1] < hi*(1-gridTolerance) {
			spans = append(spans, fmt.Sprintf("%s (%s to %s)", name, formatGHz(f[0]), formatGHz(f[len(f)-1])))
		}
		lo, hi = math.Max(lo, f[0]), math.Min(hi, f[len(f)-1])
	}
	if ctx.rl != nil {
		narrow(ctx.rl.FrequencyHz, "the range loss")
	}
	for _, u := range []*noiseUse{density, figure} {
		if u != nil {
			narrow(u.trace.FrequencyHz, u.in.File)
		}
	}
	grid := make([]float64, 0, len(baseF))
	var dropped []float64
	for _, f := range baseF {
		if inSpan(f, lo, hi) {
			grid = append(grid, f)
		} else {
			dropped = append(dropped, f)
		}
	}
	if len(grid) == 0 {
		problem(baseFile, 0, "beam %s: no frequency of %s lies inside the span of %s: beam not reduced",
			rb.ID, baseFile, joinList(spans))
		return b, out
	}
	if len(dropped) > 0 {
		out.flags = append(out.flags, Flag{Kind: "grid", Beam: rb.ID, Message: fmt.Sprintf(
			"%s of %s lie outside the span of %s and are dropped (no extrapolation)",
			describeFrequencies(dropped), baseFile, joinList(spans))})
	}
	n := len(grid)
	b.FrequencyHz = grid
	onto := func(xs, ys []float64, what string) []float64 {
		if sameGrid(xs, grid) {
			// Shared with the input, not copied: results are read-only.
			return ys
		}
		// When every grid point is a point of xs the values are taken,
		// not interpolated (gonum returns the knot values there).
		if !knotsCover(xs, grid) {
			b.Interpolated = append(b.Interpolated, fmt.Sprintf("%s: interpolated from %d points onto the %d-point grid of %s",
				what, len(xs), n, baseFile))
		}
		return resampleDB(xs, ys, grid)
	}

	var autMatch []float64
	if tr != nil {
		b.S21DB = onto(tr.FrequencyHz, tr.ParameterDB, "S21 of "+tr.File)
		if len(tr.AntennaMatch) == len(tr.FrequencyHz) && allFinite(tr.AntennaMatch) {
			autMatch = onto(tr.FrequencyHz, tr.AntennaMatch, "|Gamma| of the AUT in "+tr.File)
		}
	}
	var refU, refMismatch []float64
	if rl := ctx.rl; rl != nil {
		// What was interpolated to make the range loss comes first.
		b.Interpolated = append(b.Interpolated, rl.Interpolated...)
		what := "range loss of " + joinList(rl.Files)
		b.RangeLossDB = onto(rl.FrequencyHz, rl.RangeLossDB, what)
		if rl.DriftDB != nil {
			b.RangeDriftDB = onto(rl.FrequencyHz, rl.DriftDB, "range drift of "+joinList(rl.Files))
		}
		refU = onto(rl.FrequencyHz, rl.ReferenceExpandedUDB, "reference gain uncertainty")
		if rl.ReferenceMatch != nil && ctx.haveStation {
			if ctx.refMismatchDB == nil {
				ctx.refMismatchDB = make([]float64, len(rl.ReferenceMatch))
				for i, g := range rl.ReferenceMatch {
					ctx.refMismatchDB[i] = MismatchHalfWidthDB(g, ctx.receiverMatch)
				}
			}
			refMismatch = onto(rl.FrequencyHz, ctx.refMismatchDB, "reference antenna mismatch (from its |Gamma|)")
		}
	}
	if b.S21DB != nil && b.RangeLossDB != nil {
		b.GainDBi = make([]float64, n)
		for i := range grid {
			b.GainDBi[i] = GainDBi(b.S21DB[i], b.RangeLossDB[i])
		}
		out.noAUTMatch = autMatch == nil
	}

	var nRel, nf []float64
	if density != nil {
		nRel = onto(density.trace.FrequencyHz, density.trace.Values, "noise of "+density.in.File)
		if density.in.Quantity == NoiseDensityDBmPerHz {
			for i := range nRel {
				nRel[i] = NoiseRelativeFromDensityDB(nRel[i])
			}
		}
	}
	if figure != nil {
		nf = onto(figure.trace.FrequencyHz, figure.trace.Values, "system noise figure of "+figure.in.File)
	}
	var gtDensity, gtFigure []float64
	if nRel != nil && b.GainDBi != nil {
		gtDensity = make([]float64, n)
		for i := range gtDensity {
			gtDensity[i] = GTNoiseDensity(b.GainDBi[i], nRel[i])
		}
	}
	if nf != nil && b.RangeLossDB != nil {
		gtFigure = make([]float64, n)
		for i := range gtFigure {
			gtFigure[i] = GTSystemNoiseFigure(b.RangeLossDB[i], nf[i])
		}
	}
	var scatterFile string
	var scatterDB float64
	scatterOf := func(file string) float64 {
		for _, s := range b.Noise {
			if s.File == file {
				return s.ScatterDB
			}
		}
		return 0
	}
	switch {
	case gtDensity != nil:
		b.GTdBPerK, b.GTForm, b.NoiseRelativeKT0DB = gtDensity, FormNoiseDensity, nRel
		scatterFile = density.in.File
		if gtFigure != nil {
			o := &OtherForm{Form: FormSystemNoiseFigure, GTdBPerK: gtFigure, DifferenceDB: make([]float64, n)}
			for i := range gtFigure {
				o.DifferenceDB[i] = gtDensity[i] - gtFigure[i]
				o.MaxAbsDifferenceDB = math.Max(o.MaxAbsDifferenceDB, math.Abs(o.DifferenceDB[i]))
			}
			if n > 0 {
				o.MeanDifferenceDB = floats.Sum(o.DifferenceDB) / float64(n)
			}
			b.OtherForm = o
			if ctx.methodTolDB > 0 && math.Abs(o.MeanDifferenceDB) > ctx.methodTolDB {
				out.flags = append(out.flags, Flag{Kind: "method", Beam: rb.ID, Message: fmt.Sprintf(
					"the two G/T forms differ by %.3f dB on average over the band (up to %.3f dB at one point), more than the station's method tolerance %.3f dB",
					o.MeanDifferenceDB, o.MaxAbsDifferenceDB, ctx.methodTolDB)})
			}
		}
	case gtFigure != nil:
		b.GTdBPerK, b.GTForm = gtFigure, FormSystemNoiseFigure
		scatterFile = figure.in.File
		if b.S21DB != nil {
			// NF_sys = N_out/(k*T0*|S21_sys|^2), so N_rel = NF_sys + S21,dB.
			b.NoiseRelativeKT0DB = make([]float64, n)
			for i := range nf {
				b.NoiseRelativeKT0DB[i] = nf[i] + b.S21DB[i]
			}
		}
	default:
		b.NoiseRelativeKT0DB = nRel
		if len(rb.Noise) > 0 {
			var why string
			switch {
			case ctx.rl == nil:
				why = "there is no range loss"
			case density != nil && b.S21DB == nil:
				why = "the noise-density form needs the transmission, which is missing"
			default:
				why = "no usable noise trace"
			}
			problem(runFile, rb.Line, "beam %s: no G/T, because %s", rb.ID, why)
		}
		out.noGT = true
	}
	if scatterFile != "" {
		scatterDB = scatterOf(scatterFile)
	}

	if b.GTdBPerK != nil && ctx.operatingK != nil && rb.PassiveGainDBi != nil && ctx.ambientOK {
		b.Projection = Project(&b, *rb.PassiveGainDBi, ctx.ambientK, *ctx.operatingK)
	}
	buildBudgets(ctx, &b, refU, refMismatch, autMatch, scatterFile, scatterDB)
	return b, out
}

func joinList(s []string) string {
	switch len(s) {
	case 0:
		return "the inputs"
	case 1:
		return s[0]
	}
	out := s[0]
	for i := 1; i < len(s)-1; i++ {
		out += ", " + s[i]
	}
	return out + " and " + s[len(s)-1]
}

// knotsCover reports whether every point of grid is (within the grid
// tolerance) a point of xs; both are increasing.
func knotsCover(xs, grid []float64) bool {
	j := 0
	for _, f := range grid {
		tol := gridTolerance * math.Abs(f)
		for j < len(xs) && xs[j] < f-tol {
			j++
		}
		if j == len(xs) || xs[j] > f+tol {
			return false
		}
	}
	return true
}
