package metrics

import "math"

// blockSize is the number of columns computed together. The kernel works
// stage by stage over a block (all logs of a stage, then the arithmetic that
// uses them, then all exps, ...), so that the processor overlaps the
// long-latency exp, log and division of independent columns instead of
// waiting on one column's chain of them.
const blockSize = 32

// block holds the inputs, intermediate values and results of up to
// blockSize columns, SI units, float64.
type block struct {
	n int
	// inputs; ps already holds the conventions' constant when it is not a field
	ts, t700, ps, hum, t850, q700 [blockSize]float64
	fault                         [blockSize]fault
	// intermediates
	lnTs, invTs, rh, lnrh, lnPs, inv850 [blockSize]float64
	t1, t2, t3                          [blockSize]float64
	romps                               [blockSize]rompsState
	// results
	theta700, thetaS, lts, z700, lcl, gammaθ, eis, qSurface, ectei [blockSize]float64
}

// Safe stand-in values for a rejected column, so that later stages do only
// finite arithmetic; its outputs are replaced by NaN at the end.
const (
	safeT   = 288.0
	safePs  = 100000.0
	safeRH  = 0.5
	safeTd  = 280.0
	safeQ   = 0.005
	safeQ70 = 0.003
)

// check returns why column i cannot be computed, or faultNone. NaN is
// checked before the ranges so that a missing value is never reported as an
// impossible one.
func (k *Kernel) check(b *block, i int, w want) fault {
	r := &k.r
	needHum := r.Humidity != HumidityAssumedRH && (w.lcl || w.eis || w.ectei)
	needT850 := r.T850Field && (w.eis || w.ectei)
	ts, t700, ps, hum, t850, q700 := b.ts[i], b.t700[i], b.ps[i], b.hum[i], b.t850[i], b.q700[i]
	if ts != ts || t700 != t700 || ps != ps || (needHum && hum != hum) ||
		(needT850 && t850 != t850) || (w.ectei && q700 != q700) {
		return faultMissing
	}
	switch {
	case badT(ts):
		return faultTs
	case badT(t700):
		return faultT700
	case !SurfacePressureOK(ps):
		return faultPs
	}
	if needHum {
		switch r.Humidity {
		case HumidityRH:
			if !RelativeHumidityOK(hum) || (hum == 0 && r.LCL == LCLLinear) {
				return faultHumidity
			}
		case HumidityDewPoint:
			if badT(hum) {
				return faultHumidity
			}
		case HumiditySpecific:
			if !(hum >= 0 && hum < maxSpecific) || (hum == 0 && r.LCL == LCLLinear) {
				return faultHumidity
			}
		}
	}
	if needT850 && badT(t850) {
		return faultT850
	}
	if w.ectei && !(q700 >= 0 && q700 < maxSpecific) {
		return faultQ700
	}
	return faultNone
}

// computeBlock computes the columns of b. It is the single implementation
// behind Column, Slab and Slab64. b.ps must hold the surface pressure (the
// conventions' constant when there is no field) and b.t850 the lapse-level
// temperature when it is a field.
func (k *Kernel) computeBlock(b *block, w want) {
	r := &k.r
	n := b.n
	// Only surface temperature and T700 need checking when every other
	// input is a conventions constant: a fast path for that case.
	simple := !r.PressureField && (r.Humidity == HumidityAssumedRH || !(w.lcl || w.eis || w.ectei)) &&
		(!r.T850Field || !(w.eis || w.ectei)) && !w.ectei
	for i := range n {
		b.fault[i] = faultNone
		if t, u := b.ts[i], b.t700[i]; simple && t >= minTemperature && t <= maxTemperature &&
			u >= minTemperature && u <= maxTemperature {
			continue
		}
		if f := k.check(b, i, w); f != faultNone {
			b.fault[i] = f
			b.ts[i], b.t700[i], b.ps[i], b.t850[i], b.q700[i] = safeT, safeT, safePs, safeT, safeQ70
			switch r.Humidity {
			case HumidityRH:
				b.hum[i] = safeRH
			case HumidityDewPoint:
				b.hum[i] = safeTd
			case HumiditySpecific:
				b.hum[i] = safeQ
			}
		}
	}
	ts, t700, ps := b.ts[:n], b.t700[:n], b.ps[:n]

	// θ, LTS (Klein & Hartmann 1993) and z700 (hypsometric).
	lnPs, thetaS := b.lnPs[:n], b.thetaS[:n]
	if r.PressureField {
		vlog(lnPs, ps)
		t1 := b.t1[:n]
		for i := range t1 {
			t1[i] = k.kappa * (k.lnP0 - lnPs[i])
		}
		vexp(t1, t1)
		for i := range t1 {
			thetaS[i] = ts[i] * t1[i]
		}
	} else {
		for i := range lnPs {
			lnPs[i] = k.lnPsConst
			thetaS[i] = ts[i] * k.thetaFacConst
		}
	}
	theta700, lts, z700 := b.theta700[:n], b.lts[:n], b.z700[:n]
	for i := range theta700 {
		theta700[i] = t700[i] * k.exner700
		lts[i] = theta700[i] - thetaS[i]
		z700[i] = k.rdOverG * 0.5 * (ts[i] + t700[i]) * (lnPs[i] - k.lnP700)
	}
	if !(w.lcl || w.eis || w.ectei) {
		return
	}

	// Near-surface relative humidity over liquid and its log.
	lnTs, invTs, rh, lnrh := b.lnTs[:n], b.invTs[:n], b.rh[:n], b.lnrh[:n]
	vlog(lnTs, ts)
	for i := range invTs {
		invTs[i] = 1 / ts[i]
	}
	switch r.Humidity {
	case HumidityAssumedRH:
		for i := range rh {
			rh[i], lnrh[i] = k.rhConst, k.lnRhConst
		}
	case HumidityRH:
		copy(rh, b.hum[:n])
		vlog(lnrh, rh)
		for i := range rh {
			if rh[i] == 0 {
				lnrh[i] = math.Inf(-1)
			}
		}
	case HumidityDewPoint:
		for i := range lnrh {
			td := b.hum[i]
			lnrh[i] = k.lnes(td, 1/td, flog(td)) - k.lnes(ts[i], invTs[i], lnTs[i])
		}
		k.rhFromLog(b)
	case HumiditySpecific:
		for i := range lnrh {
			q := b.hum[i]
			e := q * ps[i] / (k.eps + (1-k.eps)*q)
			lnrh[i] = logOrMinusInf(e) - k.lnes(ts[i], invTs[i], lnTs[i])
		}
		k.rhFromLog(b)
	}

	// Lifting condensation level.
	lcl := b.lcl[:n]
	switch r.LCL {
	case LCLRomps:
		t1, st := b.t1[:n], b.romps[:n]
		for i := range t1 {
			t1[i] = rompsE0 + rompsE1*lnTs[i] - rompsE2*invTs[i]
		}
		vexp(t1, t1) // Romps' saturation vapour pressure over liquid
		rompsPrep(st, ts, invTs, ps, rh, lnrh, t1)
		rompsConverge(st) // dry columns only
		for i := range st {
			t1[i] = st[i].rho
		}
		vlog(t1, t1)
		rompsHeight(lcl, st, t1)
	case LCLBolton:
		for i := range lcl {
			lcl[i] = BoltonLCL(ts[i], rh[i], k.c)
		}
	case LCLLinear:
		for i := range lcl {
			if rh[i] >= 1 {
				lcl[i] = 0
				continue
			}
			td := b.hum[i]
			if r.Humidity != HumidityDewPoint {
				td = r.SVP.DewPoint(ts[i], rh[i])
			}
			lcl[i] = LinearLCL(ts[i], td)
		}
	}
	if !(w.eis || w.ectei) {
		return
	}

	// Γθ at the lapse level (Wood & Bretherton 2006, eq. 5) and EIS (eq. 4).
	t850 := b.t850[:n]
	if !r.T850Field {
		for i := range t850 {
			t850[i] = 0.5 * (ts[i] + t700[i])
		}
	}
	inv850, lne := b.inv850[:n], b.t3[:n]
	if r.SVP == SVPMurphyKoop {
		E, lnT := b.t1[:n], b.t2[:n]
		for i := range E {
			E[i] = mkTanhScale * (t850[i] - 218.8)
		}
		vexp(E, E)
		vlog(lnT, t850)
		for i := range lne {
			// one division for 1/T and tanh = 1 − 2/(1 + E)
			q := 1 / (t850[i] * (1 + E[i]))
			inv850[i] = (1 + E[i]) * q
			lne[i] = lnesMK(t850[i], inv850[i], lnT[i], 1-2*t850[i]*q)
		}
	} else {
		for i := range lne {
			inv850[i] = 1 / t850[i]
			lne[i] = lnesBolton(t850[i])
		}
	}
	vexp(lne, lne) // es at the lapse level
	// With e = es(T), P' = p − (1 − ε)e (qs) or p − e (rs), w = εe/P',
	// A = Lv w/(Rd T) and B = Lv² w/(cp Rv T²), eq. 5 is
	// Γθ = (g/cp)(B − A)/(1 + B) = (g/cp)(b' − a')/(P' + b') with
	// a' = Lv εe/(Rd T), b' = Lv² εe/(cp Rv T²): one division.
	p := r.LapsePressure
	oneMinus := 1 - k.eps
	if r.LapseMoisture == LapseRs {
		oneMinus = 1
	}
	gam, eis := b.gammaθ[:n], b.eis[:n]
	for i := range gam {
		e, inv := lne[i], inv850[i]
		lv := k.c.Lv(t850[i])
		epse := k.eps * e
		a := lv * epse * inv * k.invRd
		bb := lv * lv * epse * inv * inv * k.invCpRv
		gam[i] = k.gOverCp * (bb - a) / (p - oneMinus*e + bb)
		eis[i] = lts[i] - gam[i]*(z700[i]-lcl[i])
	}
	if !w.ectei {
		return
	}

	// ECTEI (Kawai, Koshiro & Webb 2017).
	sat := r.ECTEISurface == ECTEISaturated
	for i := range n {
		es := fexp(k.lnes(ts[i], invTs[i], lnTs[i]))
		if !sat {
			es *= rh[i] // e = rh·es(Ts)
		}
		b.qSurface[i] = k.eps * es / (ps[i] - (1-k.eps)*es)
		b.ectei[i] = ECTEI(eis[i], b.qSurface[i], b.q700[i], r.ECTEIBeta, k.c.Lv(ts[i]), k.c.Cpd)
	}
}

// rhFromLog sets b.rh from b.lnrh, rejecting columns whose relative
// humidity exceeds maxRH.
func (k *Kernel) rhFromLog(b *block) {
	for i := range b.n {
		if b.lnrh[i] > lnMaxRH {
			if b.fault[i] == faultNone {
				b.fault[i] = faultHumidity
			}
			b.lnrh[i] = math.Log(safeRH)
		}
		if math.IsInf(b.lnrh[i], -1) { // no vapour at all
			b.rh[i] = 0
			continue
		}
		b.rh[i] = fexp(b.lnrh[i])
	}
}
