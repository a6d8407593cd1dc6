package reduce

import (
	"fmt"
	"math"
	"slices"
	"strings"
	"time"

	"gtpack.example/gtpack/ingest"
)

// Input is everything ReduceUnit needs for one unit's acceptance run.
type Input struct {
	Run       *ingest.Run
	Data      *ingest.RunData   // may have nil entries for refused files
	Station   *ingest.Station   // nil when unknown/refused
	Reference *ingest.Reference // nil when unknown/refused
	Spec      *ingest.Spec      // nil when unknown/refused
	Problems  []*ingest.Problem // what ingest refused for this run
	History   []HistoryEntry    // earlier runs, filled by the caller
	Lab       *ingest.Lab       // the issuing laboratory; nil when not stated
}

// ReduceUnit reduces one unit's acceptance run: range loss, gain and G/T
// of every beam with their budgets, the limits and the verdict, scan
// behaviour and element state. It never panics and reduces everything that
// can be reduced; what could not be is listed in Problems, and then the
// verdict is incomplete.
func ReduceUnit(in Input) (u *Unit) {
	u = &Unit{
		Beams:    []Beam{},
		Limits:   []LimitResult{},
		Flags:    []Flag{},
		Problems: []ingest.Problem{},
		History:  append([]HistoryEntry{}, in.History...),
		Inputs:   []ingest.InputFile{},
	}
	for _, p := range in.Problems {
		if p != nil {
			u.Problems = append(u.Problems, *p)
		}
	}
	// causes: what ingest refused, by pointer, so that what follows from
	// it is named under it (see explain).
	var causes map[*ingest.Problem]int
	for i, p := range in.Problems {
		if p != nil {
			if causes == nil {
				causes = map[*ingest.Problem]int{}
			}
			if _, seen := causes[p]; !seen {
				causes[p] = i
			}
		}
	}
	defer func() {
		if r := recover(); r != nil {
			file := ""
			if in.Run != nil {
				file = in.Run.File
			}
			u.Problems = append(u.Problems, ingest.Problem{File: file,
				Message: fmt.Sprintf("internal error while reducing this run (%v): results are partial", r)})
			u.Verdict = VerdictIncomplete
		}
	}()
	c := &consequences{u: u, index: causes}
	reduceInto(u, in, c)
	c.write()
	return u
}

// consequences holds what follows from a problem (a beam without G/T, a
// limit that cannot judge it), to be said once, under that problem, and
// never as a problem of its own against another file: "...; so: beam b00
// has no G/T; limit "G/T at boresight" cannot judge beam b00".
type consequences struct {
	u     *Unit
	index map[*ingest.Problem]int // ingest's problems, by pointer, to their place in u.Problems
	of    map[int][]string
}

// explain notes text under problem i; false when i is not a problem.
func (c *consequences) explain(i int, text string) bool {
	if i < 0 || i >= len(c.u.Problems) {
		return false
	}
	if c.of == nil {
		c.of = map[int][]string{}
	}
	for _, t := range c.of[i] {
		if t == text {
			return true
		}
	}
	c.of[i] = append(c.of[i], text)
	return true
}

// cause returns the place of ingest's problem p, -1 when p is nil or not
// among the unit's problems.
func (c *consequences) cause(p *ingest.Problem) int {
	if p == nil {
		return -1
	}
	if i, ok := c.index[p]; ok {
		return i
	}
	return -1
}

// at returns the first problem at file and line (line > 0), or -1.
func (c *consequences) at(file string, line int) int {
	if line <= 0 {
		return -1
	}
	for i, p := range c.u.Problems {
		if p.File == file && p.Line == line {
			return i
		}
	}
	return -1
}

// write appends each problem's consequences to its message.
func (c *consequences) write() {
	for i, texts := range c.of {
		c.u.Problems[i].Message += " (so: " + strings.Join(texts, "; ") + ")"
	}
}

func reduceInto(u *Unit, in Input, cons *consequences) {
	run := in.Run
	if run == nil {
		u.Problems = append(u.Problems, ingest.Problem{Message: "no run description: nothing to reduce"})
		u.Verdict = VerdictIncomplete
		return
	}
	// addProblem records a problem unless one about the same file is
	// already listed (ingest's refusal of a file says it first).
	named := map[string]bool{}
	for _, p := range u.Problems {
		named[p.File] = true
	}
	addProblem := func(p *ingest.Problem, dedupe bool) {
		if p == nil || (dedupe && p.File != "" && named[p.File]) {
			return
		}
		named[p.File] = true
		u.Problems = append(u.Problems, *p)
	}
	u.Serial, u.Product, u.Run = run.Serial, run.Product, run.Dir
	u.Started = run.Started.UTC()
	u.Operator, u.AmbientC, u.Firmware = run.Operator, run.AmbientC, run.Firmware
	if l := in.Lab; l != nil {
		u.Lab = &LabInfo{Name: l.Name, Address: l.Address, Contact: l.Contact, Accreditation: l.Accreditation}
	}
	customer := run.Customer
	if customer == nil && in.Spec != nil {
		customer = in.Spec.Customer
	}
	if customer != nil {
		u.Customer = &CustomerInfo{Name: customer.Name, Address: customer.Address, Order: customer.Order}
	}
	data := in.Data
	if data == nil {
		addProblem(ingest.Problemf(run.File, 0, "the run's data files were not read: no beam can be reduced"), false)
		data = &ingest.RunData{}
	}
	causeOf := func(key string) int { return cons.cause(data.Causes[key]) }
	// The discovery problem at a run.yaml key (an unknown station), or -1.
	keyCause := func(key string) int { return cons.at(run.File, run.KeyLines[key]) }
	// explainOr says text under the cause, or adds p when there is none.
	explainOr := func(cause int, text string, p *ingest.Problem, dedupe bool) {
		if !cons.explain(cause, text) {
			addProblem(p, dedupe)
		}
	}
	u.Notes = data.Notes
	u.Inputs = append(u.Inputs, data.Inputs...)

	ctx := &beamContext{run: run, referenceK: ExpandedCoverageK, rlCause: -1}
	ctx.ambientK = run.AmbientC + CelsiusOffsetK
	ctx.ambientOK = ctx.ambientK > 0 && !math.IsNaN(ctx.ambientK) && !math.IsInf(ctx.ambientK, 0)
	if !ctx.ambientOK {
		addProblem(ingest.Problemf(run.File, 0, "ambient_c %g is below absolute zero: no ambient term", run.AmbientC), false)
	}

	if st := in.Station; st != nil {
		u.Station = StationInfo{ID: st.ID, Description: st.Description, ReceiverMatch: st.ReceiverMatch,
			DriftToleranceDB: st.DriftToleranceDB, MethodToleranceDB: st.MethodToleranceDB}
		ctx.haveStation = true
		ctx.receiverMatch = math.Abs(st.ReceiverMatch)
		ctx.methodTolDB = st.MethodToleranceDB
		if ctx.receiverMatch >= 1 || math.IsNaN(ctx.receiverMatch) {
			addProblem(ingest.Problemf(st.File, 0, "receiver_match %g is not below 1: no mismatch terms", st.ReceiverMatch), false)
			ctx.haveStation = false
		}
		ctx.stationGain, ctx.stationGT = stationTerms(st, func(p *ingest.Problem) { addProblem(p, false) })
	} else {
		u.Station = StationInfo{ID: run.Station}
		explainOr(keyCause("station"), "no receiver match, tolerances or station terms in the budgets",
			ingest.Problemf(run.File, 0, "station %q is unknown or was refused: no receiver match, "+
				"tolerances or station terms in the budgets", run.Station), false)
	}

	if ref := in.Reference; ref != nil {
		u.Reference = ReferenceInfo{ID: ref.ID, Description: ref.Description, Certificate: ref.Certificate,
			Calibrated: ref.Calibrated, Due: ref.Due, GainKind: ref.GainKind}
		ctx.certificate = ref.Certificate
		if ref.CoverageK > 0 && !math.IsInf(ref.CoverageK, 0) {
			ctx.referenceK = ref.CoverageK
		} else {
			addProblem(ingest.Problemf(ref.File, 0, "reference %s: coverage_k %g is not positive; k = 2 is assumed",
				ref.ID, ref.CoverageK), false)
		}
		if ReferenceExpired(run.Started, ref.Due) {
			u.Reference.Expired = true
			u.Flags = append(u.Flags, Flag{Kind: "reference-expired", Message: fmt.Sprintf(
				"reference %s was due for calibration on %s; the run started on %s",
				ref.ID, formatDate(ref.Due), formatDate(run.Started))})
		}
		pre, post := data.RangePre, data.RangePost
		if pre == nil && run.RangePre != "" {
			explainOr(causeOf("range_reference.pre"), "the pre reference measurement is not used",
				ingest.Problemf(run.RangePre, 0, "the pre reference measurement was refused or is missing"), true)
		}
		if post == nil && run.RangePost != "" {
			explainOr(causeOf("range_reference.post"), "the post reference measurement is not used",
				ingest.Problemf(run.RangePost, 0, "the post reference measurement was refused or is missing"), true)
		}
		if pre == nil && post == nil {
			ctx.rlCause = causeOf("range_reference.pre")
			if ctx.rlCause < 0 {
				ctx.rlCause = causeOf("range_reference.post")
			}
			explainOr(ctx.rlCause, "no range loss, so no gain and no G/T",
				ingest.Problemf(run.File, 0, "no usable reference measurement: no range loss, so no gain and no G/T"), false)
		}
		rl, probs, flags := ComputeRangeLoss(ref, pre, post)
		for _, p := range probs {
			addProblem(p, false)
		}
		u.Flags = append(u.Flags, flags...)
		if rl != nil {
			// method.md section 13: a range loss no antenna range has is a
			// wrong file or parameter, not a measurement.
			for i, v := range rl.RangeLossDB {
				if v < minPlausibleRangeLossDB || v > maxPlausibleRangeLossDB {
					addProblem(ingest.Problemf(joinList(rl.Files), 0, "range loss %.1f dB at %s is outside %g to %g dB, which no antenna range produces (method.md section 13): the reference measurement is refused; expected the reference antenna's transmission in the range (is it the right file and parameter?)",
						v, formatGHz(rl.FrequencyHz[i]), minPlausibleRangeLossDB, maxPlausibleRangeLossDB), false)
					ctx.rlCause = len(u.Problems) - 1
					rl = nil
					break
				}
			}
		}
		ctx.rl = rl
		u.RangeCheck = RangeCheckOf(run, in.Station, ref, rl)
		if rl != nil {
			if rl.ReferenceMatch == nil && ctx.haveStation {
				u.Flags = append(u.Flags, Flag{Kind: "budget", Message: fmt.Sprintf(
					"%s holds no reflection coefficient of the reference antenna: its mismatch term is left out of the budgets",
					joinList(rl.Files))})
			}
			if rl.DriftDB != nil && in.Station != nil && in.Station.DriftToleranceDB > 0 {
				worst, at := 0.0, 0.0
				for i, d := range rl.DriftDB {
					if d > worst {
						worst, at = d, rl.FrequencyHz[i]
					}
				}
				if worst > in.Station.DriftToleranceDB {
					u.Flags = append(u.Flags, Flag{Kind: "drift", Message: fmt.Sprintf(
						"range loss changed by up to %.3f dB between pre and post (at %s), more than the station's tolerance %.3f dB",
						worst, formatGHz(at), in.Station.DriftToleranceDB)})
				}
			}
		}
	} else {
		u.Reference = ReferenceInfo{ID: run.Reference}
		ctx.rlCause = keyCause("reference")
		explainOr(ctx.rlCause, "no range loss, so no gain and no G/T",
			ingest.Problemf(run.File, 0, "reference %q is unknown or was refused: no range loss, so no gain and no G/T",
				run.Reference), false)
	}

	if sp := in.Spec; sp != nil {
		u.DecisionRule, u.SpecTitle = sp.DecisionRule, sp.Title
		if u.DecisionRule != ruleSimple {
			u.DecisionRule = ruleGuarded // EvaluateLimits applies guarded to anything else, with a problem
		}
		ctx.operatingK = sp.OperatingAntennaK
	} else {
		explainOr(keyCause("product"), "nothing can be judged",
			ingest.Problemf(run.File, 0, "spec for product %q is unknown or was refused: nothing can be judged",
				run.Product), false)
	}

	var noMatch []string
	beamCause := map[string]int{} // the problem a beam's missing results follow from
	for i := range run.Beams {
		var bd *ingest.BeamData
		if i < len(data.Beams) {
			bd = &data.Beams[i]
		}
		rb := &run.Beams[i]
		b, out := reduceBeam(ctx, rb, bd)
		// A refused file of the beam is said by ingest; what follows from
		// it for the beam is said under it.
		key := fmt.Sprintf("beams[%d]", i)
		bcause := -1
		note := func(c int, text string) bool {
			// Said under its cause, the beam's consequence is short.
			switch {
			case strings.Contains(text, ": no G/T, because"), strings.Contains(text, "has no noise trace: no G/T"):
				text = fmt.Sprintf("beam %s has no G/T", rb.ID)
			case strings.Contains(text, "names no transmission file"):
				text = fmt.Sprintf("beam %s has no gain", rb.ID)
			}
			if cons.explain(c, text) {
				if bcause < 0 {
					bcause = c
				}
				return true
			}
			return false
		}
		for _, p := range out.refused {
			c := -1
			text := ""
			if p.File == rb.Transmission {
				c, text = causeOf(key+".transmission"), fmt.Sprintf("beam %s has no gain", rb.ID)
			}
			for k, n := range rb.Noise {
				if c < 0 && p.File == n.File {
					c, text = causeOf(fmt.Sprintf("%s.noise[%d].file", key, k)), fmt.Sprintf("beam %s: its %s trace is not used", rb.ID, n.Quantity)
				}
			}
			if !note(c, text) {
				addProblem(p, true)
			}
		}
		for _, p := range out.problems {
			if p.File == run.File && p.Line == rb.Line && strings.HasPrefix(p.Message, "beam "+rb.ID) {
				// The beam's own consequences: no transmission, no noise,
				// no G/T. Their cause is a refused file of the beam, what
				// resolving it against the plan found missing, or the range.
				c := bcause
				for _, k := range []string{".transmission", ".noise", ".theta_deg"} {
					if c < 0 {
						c = causeOf(key + k)
					}
				}
				if c < 0 && strings.Contains(p.Message, "there is no range loss") {
					c = ctx.rlCause
				}
				if note(c, p.Message) {
					continue
				}
			}
			addProblem(p, false)
		}
		if bcause < 0 && out.noGT {
			bcause = ctx.rlCause
		}
		beamCause[rb.ID] = bcause
		u.Flags = append(u.Flags, out.flags...)
		if out.noAUTMatch && ctx.haveStation {
			noMatch = append(noMatch, b.ID)
		}
		if b.Projection != nil && !b.Projection.Usable() {
			u.Flags = append(u.Flags, Flag{Kind: "projection", Beam: b.ID, Message: b.Projection.Assumptions})
		}
		u.Beams = append(u.Beams, b)
	}
	if len(run.Beams) == 0 {
		addProblem(ingest.Problemf(run.File, 0, "the run has no beams"), false)
	}
	for _, b := range u.Beams {
		for i, v := range b.GTdBPerK {
			if v < minPlausibleGTdBPerK || v > maxPlausibleGTdBPerK {
				u.Flags = append(u.Flags, Flag{Kind: "implausible", Beam: b.ID, Message: fmt.Sprintf(
					"G/T %.1f dB/K at %s is outside %g to %g dB/K, which is implausible for an antenna (method.md section 13): check the declared noise quantity and the files",
					v, formatGHz(b.FrequencyHz[i]), minPlausibleGTdBPerK, maxPlausibleGTdBPerK)})
				break
			}
		}
	}
	if len(noMatch) > 0 {
		u.Flags = append(u.Flags, Flag{Kind: "budget", Message: fmt.Sprintf(
			"the transmission files of beam(s) %s hold no reflection coefficient of the AUT: "+
				"its mismatch term is left out of their gain budgets", strings.Join(noMatch, ", "))})
	}

	var limits []ingest.Limit
	if in.Spec != nil {
		limits = in.Spec.Limits
		res, probs := EvaluateLimits(in.Spec, u.Beams)
		u.Limits = res
		for _, p := range probs {
			// "limit X cannot judge beam b00: the beam has no G/T" follows
			// from the beam's cause, when it has one.
			if _, rest, ok := strings.Cut(p.Message, " cannot judge beam "); ok {
				id, why, _ := strings.Cut(rest, ":")
				if c, ok := beamCause[id]; ok && strings.HasPrefix(strings.TrimSpace(why), "the beam has no") &&
					cons.explain(c, strings.TrimSuffix(p.Message, ":"+why)) {
					continue
				}
			}
			// A limit that selects none of the run's beams is about the
			// run (its beams), not the spec.
			if strings.HasSuffix(p.Message, "selects no beam of this run") && p.File == in.Spec.File {
				p = ingest.Problemf(run.File, run.KeyLines["beams"], "%s (%s:%d); expected the run to measure a beam it selects", p.Message, p.File, p.Line)
			}
			addProblem(p, false)
		}
	}
	u.Scan = ScanBehaviour(u.Beams, limits)
	if len(data.Elements) > 0 {
		var tol *float64
		if in.Spec != nil {
			tol = in.Spec.ElementPhaseRMSToleranceDeg
		}
		u.Elements = AnalyseElements(data.Elements, tol)
		if e := u.Elements; e != nil && e.Flagged {
			u.Flags = append(u.Flags, Flag{Kind: "elements", Message: fmt.Sprintf(
				"residual element phase rms %.1f deg is above the spec's tolerance", e.RMSResidualDeg)})
		}
	}
	u.Verdict = unitVerdict(u)
	if st := in.Station; st != nil && slices.Contains(st.CheckUnits, u.Serial) {
		u.CheckUnit = true
	}
	if c := u.RangeCheck; c != nil {
		c.Beam, c.GTdBPerK = boresightGTAt(u.Beams, c.FrequencyHz)
	}
}

// boresightGTAt is the G/T of the beam nearest boresight at the grid
// point nearest f (a check unit's G/T over time); nil when no beam has one.
func boresightGTAt(beams []Beam, f float64) (string, *float64) {
	best := -1
	for i := range beams {
		b := &beams[i]
		if len(b.GTdBPerK) == 0 || len(b.GTdBPerK) != len(b.FrequencyHz) {
			continue
		}
		if best < 0 || math.Abs(b.ThetaDeg) < math.Abs(beams[best].ThetaDeg) {
			best = i
		}
	}
	if best < 0 {
		return "", nil
	}
	b := &beams[best]
	k := 0
	for i, x := range b.FrequencyHz {
		if math.Abs(x-f) < math.Abs(b.FrequencyHz[k]-f) {
			k = i
		}
	}
	if !finite(b.GTdBPerK[k]) {
		return "", nil
	}
	v := b.GTdBPerK[k]
	return b.ID, &v
}

// unitVerdict is the worst verdict of the limits, or incomplete when a
// problem was met or nothing was judged.
func unitVerdict(u *Unit) Verdict {
	if len(u.Problems) > 0 || len(u.Limits) == 0 {
		return VerdictIncomplete
	}
	v := VerdictPass
	for _, l := range u.Limits {
		v = WorseVerdict(v, l.Verdict)
	}
	return v
}

// Plausibility ranges of method.md section 13 (common practice).
const (
	minPlausibleRangeLossDB = 0.0
	maxPlausibleRangeLossDB = 150.0
	minPlausibleGTdBPerK    = -60.0
	maxPlausibleGTdBPerK    = 60.0
)

// ReferenceExpired reports whether a run started on a calendar day (UTC)
// after the reference's due date. A zero due date never expires.
func ReferenceExpired(started, due time.Time) bool {
	if due.IsZero() || started.IsZero() {
		return false
	}
	s, d := started.UTC(), due.UTC()
	sd := time.Date(s.Year(), s.Month(), s.Day(), 0, 0, 0, 0, time.UTC)
	dd := time.Date(d.Year(), d.Month(), d.Day(), 0, 0, 0, 0, time.UTC)
	return sd.After(dd)
}

func formatDate(t time.Time) string {
	if t.IsZero() {
		return ""
	}
	return t.UTC().Format("2006-01-02")
}

// stationTerms checks the station's declared terms and splits them by the
// quantity they apply to, in declared order.
func stationTerms(st *ingest.Station, problem func(*ingest.Problem)) (gain, gt []stationTerm) {
	for _, t := range st.Uncertainty {
		div, err := Divisor(t.Distribution, t.CoverageK)
		if err != nil {
			problem(ingest.Problemf(st.File, t.Line, "uncertainty term %q left out: %v", t.Name, err))
			continue
		}
		if math.IsNaN(t.ValueDB) || math.IsInf(t.ValueDB, 0) {
			problem(ingest.Problemf(st.File, t.Line, "uncertainty term %q left out: value_db is not a finite number", t.Name))
			continue
		}
		name := t.Name
		dist := strings.ToLower(t.Distribution)
		if dist == distributionNormal {
			name = fmt.Sprintf("%s (k = %g)", t.Name, t.CoverageK)
		}
		term := stationTerm{name: name, distribution: dist, divisor: div, valueDB: math.Abs(t.ValueDB)}
		used := false
		for _, a := range t.AppliesTo {
			switch Quantity(a) {
			case QuantityGain:
				gain = append(gain, term)
				used = true
			case QuantityGT:
				gt = append(gt, term)
				used = true
			}
		}
		if !used {
			problem(ingest.Problemf(st.File, t.Line, "uncertainty term %q applies to %v, neither gain nor gt: left out",
				t.Name, t.AppliesTo))
		}
	}
	return gain, gt
}
