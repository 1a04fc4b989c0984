#!/usr/bin/python3
"""Yardstick of the benchmark (bench/ratios.sh): the regime analysis of
lidscope's synthetic benchmark world written with xarray + dask, as a careful
scientist would write it, with the same formulas as lidscope's defaults, so
that `lidscope run` can be timed against it. Invented data only (package
fixtures).

    yardstick.py WORLD OUT          compute, write OUT/series.csv and OUT/cells.nc
    yardstick.py --check OUT RUN    compare with the lidscope run folder RUN

Formulas (the defaults of lidscope's metrics conventions, SI units):
  LTS = θ(T700, 700 hPa) − θ(SST, 1000 hPa), θ = T (P0/p)^κ, κ = Rd/cpd
        (Klein & Hartmann 1993)
  EIS = LTS − Γθ850 (z700 − zLCL)                  (Wood & Bretherton 2006, eq. 4)
  Γθ  = g/cpd [1 − (1 + Lv qs/(Rd T))/(1 + Lv² qs/(cpd Rv T²))] at 850 hPa and
        T = (SST + T700)/2                         (Wood & Bretherton 2006, eq. 5)
  qs  = ε es/(p − (1 − ε) es), es of Murphy & Koop (2005, eq. 10)
  z700 = Rd T̄/g ln(1000/700), T̄ = (SST + T700)/2  (hypsometric equation)
  zLCL: Romps (2017, J. Atmos. Sci. 74, eq. 22a) at RH 0.8, his constants
  regimes: convective where SST − tropical-mean SST > 1.5 K, else subsidence;
  tropical mean: cell-area-weighted over ocean (land fraction < 0.5), 30°S–30°N,
  cells weighted by their sin-latitude share inside the band.
"""
import glob
import os
import sys

import numpy as np
import xarray as xr
from scipy.special import lambertw

Rd, Rv, cpd, Lv, g, P0 = 287.04, 461.5, 1005.7, 2.501e6, 9.80665, 1e5
kappa, eps = Rd / cpd, Rd / Rv
R_EARTH = 6371008.8  # m, mean radius (IUGG)
BAND = (-30.0, 30.0)
DELTA = 1.5
RH = 0.8
QUANTITIES = ["sst", "t700", "lts", "eis", "low_cloud"]


def canonical(da):
    """Longitudes to −180…180 and both axes ascending, as lidscope stores them."""
    lon = ((da.lon + 180) % 360) - 180
    return da.assign_coords(lon=lon).sortby("lat").sortby("lon")


def murphy_koop(T):
    return np.exp(54.842763 - 6763.22 / T - 4.210 * np.log(T) + 0.000367 * T
                  + np.tanh(0.0415 * (T - 218.8)) * (53.878 - 1331.22 / T - 9.44523 * np.log(T) + 0.014025 * T))


def romps_lcl(T, p, rh):
    Ttrip, ptrip, E0v, gg = 273.16, 611.65, 2.3740e6, 9.81
    rgasa, rgasv = 287.04, 461.0
    cva, cvv, cvl = 719.0, 1418.0, 4119.0
    cpa, cpv = cva + rgasa, cvv + rgasv
    pv = rh * ptrip * (T / Ttrip) ** ((cpv - cvl) / rgasv) * np.exp((E0v - (cvv - cvl) * Ttrip) / rgasv * (1 / Ttrip - 1 / T))
    qv = rgasa * pv / (rgasv * p + (rgasa - rgasv) * pv)
    rgasm = (1 - qv) * rgasa + qv * rgasv
    cpm = (1 - qv) * cpa + qv * cpv
    a = -(cpv - cvl) / rgasv + cpm / rgasm
    b = -(E0v - (cvv - cvl) * Ttrip) / (rgasv * T)
    c = rh * np.exp(b)
    w = lambertw(b / a * c ** (1 / a), -1).real
    return cpm * T / gg * (1 - b / (a * w))


def metrics(ts, t700):
    lts = t700 * (P0 / 70000.0) ** kappa - ts * (P0 / 1e5) ** kappa
    z700 = Rd * 0.5 * (ts + t700) / g * np.log(1e5 / 70000.0)
    zlcl = xr.apply_ufunc(romps_lcl, ts, 1e5, RH, dask="parallelized", output_dtypes=[np.float64])
    T = 0.5 * (ts + t700)
    es = murphy_koop(T)
    qs = eps * es / (85000.0 - (1 - eps) * es)
    gam = g / cpd * (1 - (1 + Lv * qs / (Rd * T)) / (1 + Lv * Lv * qs / (cpd * Rv * T * T)))
    return lts, lts - gam * (z700 - zlcl)


def compute(world, out):
    opt = dict(combine="by_coords", chunks={"time": 12}, mask_and_scale=True)
    sst = canonical(xr.open_mfdataset(sorted(glob.glob(f"{world}/sst/*.nc")), **opt)["sst"]).astype(np.float64) + 273.15
    ta = canonical(xr.open_mfdataset(sorted(glob.glob(f"{world}/air_temperature/*.nc")), **opt)["air_temp"])
    t700 = ta.sel(plev=700.0).drop_vars("plev").astype(np.float64)
    cld = canonical(xr.open_mfdataset(sorted(glob.glob(f"{world}/low_cloud/*.nc")), **opt)["low_cloud"]).astype(np.float64) * 0.01
    land = canonical(xr.open_dataset(f"{world}/land_area_fraction.nc")["land_fraction"]).astype(np.float64) * 0.01
    ocean = (1 - land) >= 0.5 - 1e-9

    # cell areas and band weights from the latitude bounds
    lb = xr.open_dataset(sorted(glob.glob(f"{world}/sst/*.nc"))[0])["lat_bnds"].values
    lb = np.sort(lb, axis=1)[np.argsort(lb.mean(axis=1))]
    dlon = np.deg2rad(360.0 / sst.sizes["lon"])
    s0, s1 = np.sin(np.deg2rad(lb[:, 0])), np.sin(np.deg2rad(lb[:, 1]))
    area_row = R_EARTH ** 2 * dlon * (s1 - s0)
    b0, b1 = np.sin(np.deg2rad(BAND[0])), np.sin(np.deg2rad(BAND[1]))
    frac = np.clip(np.minimum(s1, b1) - np.maximum(s0, b0), 0, None) / (s1 - s0)
    bw = xr.DataArray(np.broadcast_to((area_row * frac)[:, None], (sst.sizes["lat"], sst.sizes["lon"])).copy(),
                      dims=("lat", "lon"), coords={"lat": sst.lat, "lon": sst.lon})

    valid = ocean & sst.notnull()
    w = bw.where(valid, 0.0)
    tmean = (sst.fillna(0) * w).sum(("lat", "lon")) / w.sum(("lat", "lon"))
    rel = (sst - tmean).where(valid)
    conv = rel > DELTA
    subs = rel <= DELTA
    lts, eis = metrics(sst, t700)
    q = {"sst": sst, "t700": t700, "lts": lts, "eis": eis, "low_cloud": cld}

    # series over the band
    cols = {"tropical_mean_sst": tmean}
    wv = bw.where(valid)
    tot = wv.sum(("lat", "lon"))
    for name, m in (("convective", conv), ("subsidence", subs)):
        wr = bw.where(m & valid, 0.0)
        cols[f"{name}_area_fraction"] = wr.sum(("lat", "lon")) / tot
        for qn, x in q.items():
            wx = wr.where(x.notnull(), 0.0)
            cols[f"{name}_{qn}_band_mean"] = (x.fillna(0) * wx).sum(("lat", "lon")) / wx.sum(("lat", "lon"))
    series = xr.Dataset(cols).compute()

    # per-cell statistics
    nvalid = valid.sum("time")
    cells = {"convective_time_fraction": conv.sum("time") / nvalid.where(nvalid > 0)}
    for qn in ("lts", "eis"):
        for name, m in (("convective", conv), ("subsidence", subs)):
            cells[f"{qn}_mean_{name}"] = q[qn].where(m).mean("time")
    cells = xr.Dataset(cells).compute()
    # crossings: changes between definite regimes, missing steps skipped
    reg = np.where(conv.values, 2, np.where(subs.values, 0, -1)).astype(np.int8)
    last = np.full(reg.shape[1:], -1, np.int8)
    cross = np.zeros(reg.shape[1:], np.int32)
    for k in range(reg.shape[0]):
        r = reg[k]
        d = r >= 0
        cross += (d & (last >= 0) & (r != last)).astype(np.int32)
        last = np.where(d, r, last)
    years = reg.shape[0] / 12.0
    cells["crossing_rate"] = (("lat", "lon"), np.where(nvalid.values > 0, cross / years, np.nan))
    os.makedirs(out, exist_ok=True)
    series.to_dataframe().to_csv(f"{out}/series.csv")
    cells.to_netcdf(f"{out}/cells.nc")


def check(out, run):
    """Largest differences from lidscope's results; fails beyond the tolerances."""
    import csv
    ys = xr.open_dataset(f"{out}/cells.nc")
    ref = [r for r in csv.DictReader(open(f"{run}/series.csv"))]
    mine = [r for r in csv.DictReader(open(f"{out}/series.csv"))]
    # lidscope's names, and the ones it used before its name table
    # (area_fraction_convective, eis_band_mean_convective, ...)
    def old(name):
        for r in ("convective", "transition", "subsidence"):
            if name.startswith(r + "_"):
                rest = name[len(r) + 1:]
                return f"{rest}_{r}" if rest.endswith(("area_fraction", "band_mean")) else name
        return name
    worst = {}
    for a, b in zip(ref, mine):
        b = {**b, **{old(k): v for k, v in b.items()}}
        for col, x in a.items():
            name = col.split(" [")[0]
            if name in b and name not in ("time", "label", "year", "month", "date"):
                d = abs(float(x) - float(b[name])) if not (np.isnan(float(x)) and np.isnan(float(b[name]))) else 0.0
                worst[name] = max(worst.get(name, 0.0), d)
    m = xr.open_dataset(f"{run}/maps.nc")
    regimes = {int(v): i for i, v in enumerate(m["regime"].values)}
    flags = dict(zip([int(x) for x in m["regime"].attrs.get("flag_values", [])], m["regime"].attrs.get("flag_meanings", "").split()))
    idx = {flags.get(v, str(v)): i for v, i in regimes.items()}
    def var(ds, *names):
        return next(ds[n] for n in names if n in ds)
    diffs = {}
    for new, before in (("convective_time_fraction", "convective_fraction"), ("crossing_rate", "crossings_per_year")):
        diffs[new] = np.nanmax(np.abs(var(m, new, before).isel(time=0).values - var(ys, new, before).values))
    for qn in ("lts", "eis"):
        for name in ("convective", "subsidence"):
            if name in idx:
                a = m[f"{qn}_mean"].isel(time=0, regime=idx[name]).values
                diffs[f"{qn}_mean_{name}"] = np.nanmax(np.abs(a - ys[f"{qn}_mean_{name}"].values))
    # maps are float32; LTS/EIS pass through float32 in lidscope
    tol = {"convective_time_fraction": 1e-7, "crossing_rate": 1e-6, "lts_mean": 5e-5, "eis_mean": 5e-5}
    bad = []
    for k, v in sorted({**{"series " + k: v for k, v in worst.items()}, **diffs}.items()):
        t = next((tv for tk, tv in tol.items() if k.startswith(tk)), 5e-6)
        print(f"  {k:45s} max |lidscope − xarray| = {v:.3g} (tolerance {t:g})")
        if not v <= t:
            bad.append(k)
    if bad:
        print("outputs differ beyond the tolerances: " + ", ".join(bad))
        sys.exit(1)
    print("outputs agree")


if __name__ == "__main__":
    if len(sys.argv) == 4 and sys.argv[1] == "--check":
        check(sys.argv[2], sys.argv[3])
    elif len(sys.argv) == 3:
        compute(sys.argv[1], sys.argv[2])
    else:
        sys.exit(__doc__)
