package relations

import (
	"bytes"
	"encoding/gob"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"

	"lidscope/accumulate"
	"lidscope/regimes"
)

// roundTrip encodes a and decodes the bytes.
func roundTrip(t testing.TB, a *Acc) *Acc {
	t.Helper()
	var buf bytes.Buffer
	if err := a.Encode(&buf); err != nil {
		t.Fatal(err)
	}
	b, err := DecodeAcc(&buf)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func results(t testing.TB, a *Acc) *Results {
	t.Helper()
	r, err := a.Results()
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// differences lists the fields where two Results differ by more than the
// relative tolerance (0 = bit for bit, NaN equal to NaN).
func differences(a, b *Results, tol float64) []string {
	var errs []string
	closeEqual("Results", reflect.ValueOf(*a), reflect.ValueOf(*b), tol, &errs)
	return errs
}

// stateSetup returns the configuration of the merge tests in a mode and,
// in anomaly mode, the climatology of the given steps (synthetic record of richSteps, invented data).
func stateSetup(mode Mode, steps []*accumulate.Step) (Config, *Climatology) {
	l := richLayout()
	l.Regions = richConfig().Regions
	cfg := richConfig()
	cfg.Mode = mode
	cfg.Bins = nil
	if mode != Anomaly {
		return cfg, nil
	}
	cfg.Detrend = true
	clim := NewClimatology(l)
	for _, s := range steps {
		clim.AddStep(s)
	}
	return cfg, clim
}

func stateLayout() Layout {
	l := richLayout()
	l.Regions = richConfig().Regions
	return l
}

func accOver(t testing.TB, cfg Config, clim *Climatology, steps []*accumulate.Step) *Acc {
	t.Helper()
	a, err := New(cfg, stateLayout(), clim)
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range steps {
		a.AddStep(s)
	}
	return a
}

// The record split in two, each half encoded and decoded, the decoded
// halves merged: the Results are bit for bit those of the halves merged in
// memory, and those of one pass over the record to the merge's rounding
// (1e-9 relative, as TestMergeEqualsSinglePass), for every statistic, in
// both modes. The decoded merge encodes and decodes again unchanged, so a
// merged run can itself be merged.
func TestEncodedHalvesMergeToTheSinglePass(t *testing.T) {
	t.Parallel()
	steps := richSteps(66, 5)
	for _, mode := range []Mode{Climatological, Anomaly} {
		t.Run(mode.String(), func(t *testing.T) {
			cfg, clim := stateSetup(mode, steps)
			whole := accOver(t, cfg, clim, steps)
			rWhole := results(t, whole)
			if len(rWhole.Regressions) == 0 || len(rWhole.Binned) == 0 || len(rWhole.Joint) == 0 || len(rWhole.Flips) != 2 ||
				rWhole.Threshold == nil || len(rWhole.Omega) == 0 || rWhole.Regressions[0].Boot == nil {
				t.Fatal("the test record does not exercise every statistic")
			}
			// Encoding loses nothing: the decoded single pass gives the same Results bit for bit.
			if d := differences(rWhole, results(t, roundTrip(t, whole)), 0); len(d) > 0 {
				t.Fatalf("decoded single pass differs: %v", d)
			}
			const cut = 29
			memA, memB := accOver(t, cfg, clim, steps[:cut]), accOver(t, cfg, clim, steps[cut:])
			decA, decB := roundTrip(t, memA), roundTrip(t, memB)
			if err := memA.Merge(memB); err != nil {
				t.Fatal(err)
			}
			if err := decA.Merge(decB); err != nil {
				t.Fatal(err)
			}
			rMem, rDec := results(t, memA), results(t, decA)
			if d := differences(rMem, rDec, 0); len(d) > 0 {
				t.Errorf("decoded halves merged differ from the halves merged in memory: %v", d)
			}
			if d := differences(rWhole, rDec, 1e-9); len(d) > 0 {
				t.Errorf("decoded halves merged differ from the single pass: %v", d)
			}
			if d := differences(rDec, results(t, roundTrip(t, decA)), 0); len(d) > 0 {
				t.Errorf("re-encoded merge differs: %v", d)
			}
			// The comparison notices a missing piece.
			if d := differences(rWhole, results(t, roundTrip(t, memB)), 1e-9); len(d) == 0 {
				t.Error("the second half alone compares equal to the whole record")
			}
		})
	}
}

// A decoded climatological accumulator takes further steps: the first
// half decoded, then the second half added, is the single pass bit for bit.
func TestDecodedAccContinues(t *testing.T) {
	steps := richSteps(40, 9)
	cfg, _ := stateSetup(Climatological, steps)
	whole := accOver(t, cfg, nil, steps)
	a := roundTrip(t, accOver(t, cfg, nil, steps[:13]))
	for _, s := range steps[13:] {
		a.AddStep(s)
	}
	if d := differences(results(t, whole), results(t, a), 0); len(d) > 0 {
		t.Errorf("decoded then continued differs from one pass: %v", d)
	}
}

// Anomaly-mode pieces whose anomalies are against different climatologies
// (each piece's own, as when the pieces are run separately) are refused,
// in memory, decoded and mixed; pieces against climatologies of the same
// contents (built separately over the same record) merge.
func TestMergeRefusesDifferentClimatologies(t *testing.T) {
	steps := richSteps(48, 11)
	cfg, whole := stateSetup(Anomaly, steps)
	_, own1 := stateSetup(Anomaly, steps[:24])
	_, own2 := stateSetup(Anomaly, steps[24:])
	cases := []struct {
		name string
		a, b func() *Acc
	}{
		{"in memory", func() *Acc { return accOver(t, cfg, own1, steps[:24]) }, func() *Acc { return accOver(t, cfg, own2, steps[24:]) }},
		{"decoded", func() *Acc { return roundTrip(t, accOver(t, cfg, own1, steps[:24])) }, func() *Acc { return roundTrip(t, accOver(t, cfg, own2, steps[24:])) }},
		{"live and decoded", func() *Acc { return accOver(t, cfg, own1, steps[:24]) }, func() *Acc { return roundTrip(t, accOver(t, cfg, own2, steps[24:])) }},
		{"decoded and the whole-record climatology", func() *Acc { return roundTrip(t, accOver(t, cfg, own1, steps[:24])) }, func() *Acc { return accOver(t, cfg, whole, steps[24:]) }},
	}
	for _, c := range cases {
		err := c.a().Merge(c.b())
		if err == nil || !strings.Contains(err.Error(), "different climatologies") || !strings.Contains(err.Error(), "whole record") {
			t.Errorf("%s: merge of pieces with their own climatologies: %v", c.name, err)
		}
	}
	_, same := stateSetup(Anomaly, steps) // same contents, another pointer
	a := roundTrip(t, accOver(t, cfg, whole, steps[:24]))
	if err := a.Merge(accOver(t, cfg, same, steps[24:])); err != nil {
		t.Errorf("pieces against equal climatologies: %v", err)
	}
	if d := differences(results(t, accOver(t, cfg, whole, steps)), results(t, a), 1e-9); len(d) > 0 {
		t.Errorf("merged anomaly pieces differ from one pass: %v", d)
	}
	// A decoded anomaly accumulator has no climatology to take more steps.
	func() {
		defer func() {
			if r := recover(); r == nil || !strings.Contains(r.(string), "decoded anomaly-mode") {
				t.Errorf("AddStep on a decoded anomaly accumulator: recovered %v", r)
			}
		}()
		a.AddStep(steps[0])
	}()
}

// DecodeAcc refuses other formats (asking for a re-run), truncated input
// and arrays that do not fit the configuration.
func TestDecodeAccRefuses(t *testing.T) {
	steps := richSteps(20, 3)
	cfg, _ := stateSetup(Climatological, steps)
	a := accOver(t, cfg, nil, steps)
	var good bytes.Buffer
	if err := a.Encode(&good); err != nil {
		t.Fatal(err)
	}
	state := func() accState {
		var s accState
		if err := gob.NewDecoder(bytes.NewReader(good.Bytes())).Decode(&s); err != nil {
			t.Fatal(err)
		}
		return s
	}
	enc := func(s accState) []byte {
		var b bytes.Buffer
		if err := gob.NewEncoder(&b).Encode(s); err != nil {
			t.Fatal(err)
		}
		return b.Bytes()
	}
	cases := []struct {
		name, want string
		data       []byte
	}{
		{"truncated", "reading the relationship accumulator", good.Bytes()[:good.Len()/2]},
		{"empty", "reading the relationship accumulator", nil},
		{"old format", "re-run", enc(func() accState { s := state(); s.Format = "lidscope-relations-accumulator/0"; return s }())},
		{"config changed", "configuration reads back", enc(func() accState { s := state(); s.ConfigText += "x"; return s }())},
		{"binned short", "binned", enc(func() accState { s := state(); s.Binned = s.Binned[1:]; return s }())},
		{"bin last step", "last step", enc(func() accState { s := state(); s.BinLast[3] = int32(len(s.Steps)); return s }())},
		{"step co-moments", "co-moment", enc(func() accState { s := state(); s.Steps[4].Moments = s.Steps[4].Moments[1:]; return s }())},
		{"patch sums", "ΔT sums", enc(func() accState { s := state(); s.Patches[1].Sums = s.Patches[1].Sums[:2]; return s }())},
		{"climatology without anomaly mode", "climatology fingerprint", enc(func() accState { s := state(); s.Clim = &climIdentity{SHA256: "00"}; return s }())},
		{"responses", "responses", enc(func() accState { s := state(); s.Responses = []string{"cloud"}; return s }())},
	}
	for _, c := range cases {
		_, err := DecodeAcc(bytes.NewReader(c.data))
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: got %v, want an error mentioning %q", c.name, err, c.want)
		}
	}
	// The unchanged mirror decodes.
	if _, err := DecodeAcc(bytes.NewReader(enc(state()))); err != nil {
		t.Errorf("re-encoded mirror: %v", err)
	}
}

// DecodeAcc never panics; what it accepts gives Results (or an error)
// without panicking, and encodes again.
func FuzzDecodeAcc(f *testing.F) {
	l := rowLayout(3, "sst", "lts", "eis", "cloud")
	cfg := Defaults()
	a, err := New(cfg, l, nil)
	if err != nil {
		f.Fatal(err)
	}
	w := synthWorld{cells: 3, steps: 5, a: 0.2, b: 0.05, sigma: 0.01, phiX: 0.3, phiE: 0.3, sdX: 1, meanX: 3,
		quantities: []string{"sst", "lts", "eis", "cloud"}, regime: regimes.Subsidence}
	w.generate(rand.New(rand.NewPCG(1, 2)), a.AddStep)
	var buf bytes.Buffer
	if err := a.Encode(&buf); err != nil {
		f.Fatal(err)
	}
	f.Add(buf.Bytes())
	f.Add(buf.Bytes()[:buf.Len()-7])
	f.Add([]byte{})
	f.Fuzz(func(t *testing.T, data []byte) {
		if len(data) > 1<<16 {
			return
		}
		b, err := DecodeAcc(bytes.NewReader(data))
		if err != nil {
			return
		}
		// Results of what decoded (replicate counts capped: a valid state
		// may ask for 100000 bootstrap replicates, which is slow, not wrong).
		if b.Steps() > 0 && b.cfg.Bootstrap.N <= 50 && (b.cfg.Indicator == "" || b.cfg.ThresholdReplicates <= 50) {
			b.Results()
		}
		if err := b.Encode(&bytes.Buffer{}); err != nil {
			t.Fatalf("a decoded accumulator does not encode: %v", err)
		}
	})
}

// Encoding and decoding a 10-year monthly record on the 1° grid (all
// statistics on but patches); reports the encoded size.
func BenchmarkEncodeAcc1Deg120Steps(b *testing.B) {
	a := oneDegreeAcc(b)
	var buf bytes.Buffer
	b.ReportAllocs()
	b.ResetTimer()
	for k := 0; k < b.N; k++ {
		buf.Reset()
		if err := a.Encode(&buf); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(buf.Len()), "bytes")
}

func BenchmarkDecodeAcc1Deg120Steps(b *testing.B) {
	a := oneDegreeAcc(b)
	var buf bytes.Buffer
	if err := a.Encode(&buf); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	b.ResetTimer()
	for k := 0; k < b.N; k++ {
		if _, err := DecodeAcc(bytes.NewReader(buf.Bytes())); err != nil {
			b.Fatal(err)
		}
	}
}

// The climatology fingerprint that Encode and Merge take in anomaly mode,
// for the band of the 1° grid with a full 12-month climatology.
func BenchmarkClimatologyFingerprint1Deg(b *testing.B) {
	l, steps := oneDegree(4)
	c := NewClimatology(l)
	for k := 0; k < 12; k++ {
		s := steps[k%4]
		s.Year, s.Month = 2001, k+1
		c.AddStep(s)
	}
	b.ResetTimer()
	for k := 0; k < b.N; k++ {
		c.identity()
	}
}

func oneDegreeAcc(b *testing.B) *Acc {
	l, steps := oneDegree(4)
	cfg := Defaults()
	cfg.Classifier = richConfig().Classifier
	cfg.Seasons = true
	cfg.OmegaBins = true
	cfg.Indicator = IndicatorOmega
	a, err := New(cfg, l, nil)
	if err != nil {
		b.Fatal(err)
	}
	for k := 0; k < 120; k++ {
		s := steps[k%4]
		s.Year, s.Month = 2001+k/12, k%12+1
		a.AddStep(s)
	}
	return a
}
