package relations

import (
	"crypto/sha256"
	"encoding/binary"
	"encoding/gob"
	"encoding/hex"
	"fmt"
	"io"
	"math"

	"lidscope/accumulate"
	"lidscope/stats"
)

// accFormat tags the encoding of an accumulator; bump it whenever Acc or
// the mirror below changes.
const accFormat = "lidscope-relations-accumulator/1"

// accState is the exported mirror of Acc that Encode writes with gob. The
// derived structure (predictor and domain tables, cell membership) is not
// stored: DecodeAcc rebuilds it from the configuration and the layout, as
// New does, and checks every stored array against it.
type accState struct {
	Format     string
	Config     Config
	ConfigText string // Config.Text() when encoded: the decoded Config must give it again
	Layout     accumulate.Layout
	Responses  []string      // resolved responses (Config.Responses may be nil = auto)
	Clim       *climIdentity // anomaly mode: the climatology the anomalies were taken against

	Binned   []stats.Moments
	BinSteps []int32
	BinLast  []int32
	OutCnt   []int64

	JointM     []stats.Moments
	JointArea  []float64
	JointCount []int64
	JointTotal []float64

	OmegaM     []stats.Moments
	OmegaArea  []float64
	OmegaTotal []float64
	OmegaCount []int64
	OmegaOut   []int64

	Patches []patchState

	ThrN   int64
	ThrW   float64
	ThrOut int64

	Steps []stepState
}

type patchState struct {
	Sums       []flipState // per ΔT
	FSum       float64
	FSteps     int
	FMin, FMax float64
}

type flipState struct {
	InArea, InChanged, InToConv, InFromConv, InConvBefore, InConvAfter       float64
	OutArea, OutChanged, OutToConv, OutFromConv, OutConvBefore, OutConvAfter float64
}

// stepState is one stepRec; the co-moments of its (domain, regime,
// response) groups are flattened: N and W per group, and per group K
// means followed by the K×K co-moment matrix.
type stepState struct {
	Label       string
	Year, Month int
	TropMean    float64
	N           []int64
	W           []float64
	Moments     []float64
	Thr         []float64
}

// climIdentity identifies a climatology by a SHA-256 of its complete
// sufficient statistics (every cell, calendar month and variable), with
// its period for messages.
type climIdentity struct {
	SHA256      string
	Steps       int
	First, Last string
}

func (c climIdentity) String() string {
	return fmt.Sprintf("climatology of %s … %s (%d steps, sha256 %.12s)", c.First, c.Last, c.Steps, c.SHA256)
}

// identity fingerprints the climatology. It is computed afresh on every
// call (a few tenths of a second for the band of a 1° grid), so it always
// describes the current contents.
func (c *Climatology) identity() climIdentity {
	h := sha256.New()
	var buf [8]byte
	u64 := func(x uint64) {
		binary.LittleEndian.PutUint64(buf[:], x)
		h.Write(buf[:])
	}
	str := func(s string) {
		u64(uint64(len(s)))
		io.WriteString(h, s)
	}
	str("lidscope-climatology-fingerprint/1")
	u64(uint64(c.nv))
	u64(uint64(len(c.slot)))
	for _, q := range c.l.Quantities {
		str(q)
	}
	u64(uint64(c.steps))
	str(c.first)
	str(c.last)
	for i, s := range c.slot {
		if s < 0 {
			continue
		}
		u64(uint64(i))
		for _, t := range c.st[s] {
			for _, x := range [5]float64{t.N, t.T, t.X, t.Ctt, t.Ctx} {
				u64(math.Float64bits(x))
			}
		}
	}
	return climIdentity{SHA256: hex.EncodeToString(h.Sum(nil)), Steps: c.steps, First: c.first, Last: c.last}
}

// Fingerprint is the SHA-256 (hex) of the climatology's complete
// sufficient statistics: two climatologies with the same fingerprint give
// the same anomalies.
func (c *Climatology) Fingerprint() string { return c.identity().SHA256 }

// climIdentity returns the identity of the accumulator's climatology (nil
// in climatological mode).
func (a *Acc) climIdentity() *climIdentity {
	switch {
	case a.clim != nil:
		id := a.clim.identity()
		return &id
	case a.climID != nil:
		id := *a.climID
		return &id
	}
	return nil
}

// sameClimatology refuses to merge anomaly-mode accumulators whose
// anomalies were taken against different climatologies. Pieces of a
// record run separately each build the climatology of their own period;
// their anomalies differ from those of one pass over the whole record by
// the difference of the climatologies, which no merge can undo, so such
// pieces are refused rather than merged into a subtly different answer.
func (a *Acc) sameClimatology(b *Acc) error {
	if a.cfg.Mode != Anomaly || (a.clim != nil && a.clim == b.clim) {
		return nil
	}
	x, y := a.climIdentity(), b.climIdentity()
	if x == nil || y == nil {
		return fmt.Errorf("relations: cannot merge anomaly-mode accumulators: one has no climatology (the state is damaged)")
	}
	if x.SHA256 != y.SHA256 {
		return fmt.Errorf("relations: cannot merge anomaly-mode accumulators whose anomalies are against different climatologies (%s vs %s): "+
			"pieces run on their own each take the climatology of their own period, so the merged relationships would not be those of one run over the record; "+
			"run the whole record in one run, or build one climatology over the whole record and run every piece against it", x, y)
	}
	return nil
}

// Mode is the mode of the accumulator's configuration.
func (a *Acc) Mode() Mode { return a.cfg.Mode }

// Encode writes the complete accumulator (Go's encoding/gob of an exported
// mirror, tagged with a format string), so that runs over consecutive
// pieces of a record can be merged later (DecodeAcc, Merge) into what one
// pass gives. In anomaly mode the climatology itself is not written (it
// would be 40 bytes × 12 months × (quantities + 1) per band cell, about
// 55 MB on a 1° grid), only its fingerprint: the accumulated sums are
// already anomalies, and Merge needs only to know whether two pieces used
// the same climatology.
func (a *Acc) Encode(w io.Writer) error {
	s := accState{Format: accFormat, Config: a.cfg, ConfigText: a.cfg.Text(), Layout: a.l, Responses: a.resp, Clim: a.climIdentity(),
		OutCnt: a.outCnt, JointM: a.jointM, JointArea: a.jointArea, JointCount: a.jointCount, JointTotal: a.jointTotal,
		OmegaM: a.omegaM, OmegaArea: a.omegaArea, OmegaTotal: a.omegaTotal, OmegaCount: a.omegaCount, OmegaOut: a.omegaOut,
		ThrN: a.thrN, ThrW: a.thrW, ThrOut: a.thrOut}
	s.Binned = make([]stats.Moments, len(a.binned))
	s.BinSteps = make([]int32, len(a.binned))
	s.BinLast = make([]int32, len(a.binned))
	for i, b := range a.binned {
		s.Binned[i], s.BinSteps[i], s.BinLast[i] = b.m, b.steps, b.last
	}
	for _, p := range a.patches {
		ps := patchState{FSum: p.fSum, FSteps: p.fSteps, FMin: p.fMin, FMax: p.fMax}
		for _, f := range p.sums {
			ps.Sums = append(ps.Sums, flipState{f.inArea, f.inChanged, f.inToConv, f.inFromConv, f.inConvBefore, f.inConvAfter,
				f.outArea, f.outChanged, f.outToConv, f.outFromConv, f.outConvBefore, f.outConvAfter})
		}
		s.Patches = append(s.Patches, ps)
	}
	per := a.K + a.K*a.K
	s.Steps = make([]stepState, len(a.steps))
	for t, r := range a.steps {
		st := stepState{Label: r.label, Year: r.year, Month: r.month, TropMean: r.tropMean, Thr: r.thr,
			N: make([]int64, len(r.cm)), W: make([]float64, len(r.cm)), Moments: make([]float64, 0, len(r.cm)*per)}
		for k, c := range r.cm {
			st.N[k], st.W[k] = c.N, c.W
			st.Moments = append(st.Moments, c.Mean...)
			st.Moments = append(st.Moments, c.C...)
		}
		s.Steps[t] = st
	}
	if err := gob.NewEncoder(w).Encode(s); err != nil {
		return fmt.Errorf("relations: encoding the relationship accumulator: %w", err)
	}
	return nil
}

// DecodeAcc reads an accumulator written by Encode. The result merges
// (Merge) and gives Results exactly as the encoded accumulator does. A
// climatological-mode accumulator can also take further steps (AddStep);
// an anomaly-mode one keeps only the fingerprint of its climatology, so
// it cannot (AddStep panics), and it merges only with accumulators whose
// anomalies are against the same climatology.
func DecodeAcc(r io.Reader) (*Acc, error) {
	var s accState
	if err := gob.NewDecoder(r).Decode(&s); err != nil {
		return nil, fmt.Errorf("relations: reading the relationship accumulator: %w", err)
	}
	if s.Format != accFormat {
		return nil, fmt.Errorf("relations: relationship accumulator format %q, this lidscope reads %q: re-run the analysis with this version", s.Format, accFormat)
	}
	damaged := func(what string, args ...any) error {
		return fmt.Errorf("relations: the relationship accumulator is inconsistent (%s); the state is damaged: re-run the analysis", fmt.Sprintf(what, args...))
	}
	if s.Config.Text() != s.ConfigText {
		return nil, damaged("its configuration reads back as\n%s\ninstead of\n%s", s.Config.Text(), s.ConfigText)
	}
	if (s.Config.Mode == Anomaly) != (s.Clim != nil) {
		return nil, damaged("mode %v with climatology fingerprint %v", s.Config.Mode, s.Clim)
	}
	a, err := build(s.Config, s.Layout, nil, true)
	if err != nil {
		return nil, fmt.Errorf("relations: decoding the relationship accumulator: %w", err)
	}
	if fmt.Sprint(a.resp) != fmt.Sprint(s.Responses) {
		return nil, damaged("responses %v, the configuration gives %v", s.Responses, a.resp)
	}
	a.climID = s.Clim
	sizes := []struct {
		name      string
		got, want int
	}{
		{"binned", len(s.Binned), len(a.binned)}, {"bin steps", len(s.BinSteps), len(a.binned)}, {"bin last steps", len(s.BinLast), len(a.binned)},
		{"out-of-bin counts", len(s.OutCnt), len(a.outCnt)},
		{"joint moments", len(s.JointM), len(a.jointM)}, {"joint areas", len(s.JointArea), len(a.jointArea)},
		{"joint counts", len(s.JointCount), len(a.jointCount)}, {"joint totals", len(s.JointTotal), len(a.jointTotal)},
		{"omega moments", len(s.OmegaM), len(a.omegaM)}, {"omega areas", len(s.OmegaArea), len(a.omegaArea)},
		{"omega totals", len(s.OmegaTotal), len(a.omegaTotal)}, {"omega counts", len(s.OmegaCount), len(a.omegaCount)},
		{"omega outside counts", len(s.OmegaOut), len(a.omegaOut)}, {"patches", len(s.Patches), len(a.patches)},
	}
	for _, z := range sizes {
		if z.got != z.want {
			return nil, damaged("%d %s, the configuration and layout give %d", z.got, z.name, z.want)
		}
	}
	for i := range a.binned {
		if s.BinLast[i] < -1 || int(s.BinLast[i]) >= len(s.Steps) || s.BinSteps[i] < 0 || int(s.BinSteps[i]) > len(s.Steps) {
			return nil, damaged("bin %d: %d steps, last step %d of %d", i, s.BinSteps[i], s.BinLast[i], len(s.Steps))
		}
		a.binned[i] = binStat{m: s.Binned[i], steps: s.BinSteps[i], last: s.BinLast[i]}
	}
	a.outCnt = s.OutCnt
	a.jointM, a.jointArea, a.jointCount, a.jointTotal = s.JointM, s.JointArea, s.JointCount, s.JointTotal
	a.omegaM, a.omegaArea, a.omegaTotal, a.omegaCount, a.omegaOut = s.OmegaM, s.OmegaArea, s.OmegaTotal, s.OmegaCount, s.OmegaOut
	for p, ps := range s.Patches {
		pa := &a.patches[p]
		if len(ps.Sums) != len(pa.sums) {
			return nil, damaged("patch %q has %d ΔT sums, the configuration gives %d", pa.p.Name, len(ps.Sums), len(pa.sums))
		}
		for k, f := range ps.Sums {
			pa.sums[k] = flipSums{f.InArea, f.InChanged, f.InToConv, f.InFromConv, f.InConvBefore, f.InConvAfter,
				f.OutArea, f.OutChanged, f.OutToConv, f.OutFromConv, f.OutConvBefore, f.OutConvAfter}
		}
		pa.fSum, pa.fSteps, pa.fMin, pa.fMax = ps.FSum, ps.FSteps, ps.FMin, ps.FMax
	}
	a.thrN, a.thrW, a.thrOut = s.ThrN, s.ThrW, s.ThrOut
	ng := len(a.doms) * nreg * len(a.resp)
	per := a.K + a.K*a.K
	nthr := 0
	if a.indQ >= 0 {
		nthr = 2 * a.nthr
	}
	a.steps = make([]stepRec, len(s.Steps))
	for t, st := range s.Steps {
		if len(st.N) != ng || len(st.W) != ng || len(st.Moments) != ng*per || len(st.Thr) != nthr {
			return nil, damaged("step %d (%s): %d/%d/%d co-moment values and %d threshold bins, the configuration gives %d/%d/%d and %d",
				t, st.Label, len(st.N), len(st.W), len(st.Moments), len(st.Thr), ng, ng, ng*per, nthr)
		}
		rec := stepRec{label: st.Label, year: st.Year, month: st.Month, tropMean: st.TropMean, cm: make([]CoMoments, ng)}
		if nthr > 0 {
			rec.thr = st.Thr
		}
		for k := range rec.cm {
			o := k * per
			rec.cm[k] = CoMoments{K: a.K, N: st.N[k], W: st.W[k], Mean: st.Moments[o : o+a.K : o+a.K], C: st.Moments[o+a.K : o+per : o+per]}
		}
		a.steps[t] = rec
	}
	return a, nil
}
