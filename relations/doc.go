// Package relations computes regime-conditioned cloud–inversion
// relationships in the same streaming pass as the regime statistics:
// binned relationships and joint composites, weighted regressions with
// confidence intervals that account for autocorrelation, a two-predictor
// ("cloud-controlling factor") regression, perturbation flips of the
// regime under local SST changes, a logistic estimate of the convective
// threshold, and omega500 regime composites.
//
//	acc, err := relations.New(cfg, layout, nil) // climatological mode
//	for each step { acc.AddStep(step) }          // serially, in time order
//	res, err := acc.Results()
//	files, err := relations.Write(dir, res, meta, relations.WriteOptions{})
//
// Anomaly mode needs a first pass for the climatology:
//
//	clim := relations.NewClimatology(layout)
//	for each step { clim.AddStep(step) }  // pass 1
//	acc, err := relations.New(cfg, layout, clim)
//	for each step { acc.AddStep(step) }   // pass 2
//
// Every accumulator merges (Climatology.Merge in any order; Acc.Merge with
// the accumulator of the steps right after), so a run split by time gives
// the same results as one pass, to floating-point rounding (a test checks
// every statistic). Values arrive in SI units (K, fraction 1, W m-2,
// Pa s-1, kg m-2 s-1), as package accumulate delivers them.
//
// Acc.Encode saves an accumulator and DecodeAcc reads it back, so runs
// over pieces of a record can be merged later (lidscope merge). In anomaly
// mode only a fingerprint of the climatology is saved, and Merge refuses
// pieces whose anomalies are against different climatologies — which is
// always the case for pieces run on their own, each against the
// climatology of its own period — rather than return relationships that
// no single run gives; such a record must be run in one piece (or every
// piece against one climatology of the whole record).
//
// # Samples, domains, seasons, regimes
//
// A sample is one cell at one time step whose regime is not Missing
// (valid ocean with SST). Samples are pooled per domain — the tropical
// band (cells with accumulate.Layout.BandWeight > 0, weighted by their
// area inside the band) and each of Config.Regions (cells whose centres
// lie in the box, weighted by the cell area) — per season (the whole
// record "all", and DJF, MAM, JJA, SON when Config.Seasons) and per
// regime (the regime of the sample at that step: convective, transition,
// subsidence). Weights are areas in m², so sums of weights are area ×
// time steps.
//
// # Modes
//
// Climatological (default): the values themselves. Anomaly: each value
// minus the climatology of its cell and calendar month over the record
// (Climatology, the mean over the valid steps of that cell and month,
// regardless of regime), and with Config.Detrend also minus a linear trend
// in time fitted per cell and calendar month. The regime of a sample is
// always its actual regime. The predictors (EIS, LTS, relative SST, SST)
// and responses become anomalies; flips, the threshold and the omega
// composites always use actual values. Every output says which mode made
// it: climatological composites give slopes of the order of 6 % per K of
// EIS (Klein & Hartmann 1993, J. Climate 6, 1587–1606; Wood & Bretherton
// 2006, J. Climate 19, 6425–6432 — from memory), which mix geographic and
// seasonal contrasts; deseasonalised anomalies give partial sensitivities
// of the order of 1–2 % per K. The two are not comparable.
//
// Climatology memory: 40 bytes × 12 months × (quantities + 1) per cell of
// the band and the layout's regions that is ever valid (about 55 MB for
// the band of a 1° grid with 6 quantities), independent of the record
// length.
//
// # Binned relationships and joint composites
//
// For each predictor of Config.Bins (default DefaultBins: EIS −6…14 K and
// LTS 6…30 K in 1 K bins, relative SST −8…4 K in 0.5 K bins; in anomaly
// mode ±3 K in 0.5 K bins and ±2 K in 0.25 K bins) and each response
// (default: cloud, low_cloud and toa_sw_up where present): per domain,
// season, regime and bin the area-weighted mean, the area-weighted
// population standard deviation, the standard error, the count of
// cell-steps, the number of time steps contributing, the effective sample
// size and the area × time. Bins include their lower edge (the last bin
// also its upper edge); samples outside are counted as out of range. The
// same rule holds for the threshold and omega bins, and a value on an edge
// is compared exactly as the run holds it (float32 quantities, widened to
// float64, against float64 edges; uniform edges are lo + k·w): a float64
// reference reproduces the counts once it rounds its values to float32. Each
// predictor–response pair uses the samples where both are valid. The
// standard error is std/√(N_eff − 1), N_eff as below for a mean with the
// lag-1 autocorrelation of the domain-mean response series.
//
// When relative SST and EIS are both binned, the joint composite over
// their 2-D bins gives per domain and season the mean of each response and
// the frequency of occurrence: the bin's share of the area × time of all
// samples with both predictors valid (in or out of range).
//
// # Regressions
//
// Weighted least squares with the sample areas as weights, per domain,
// season, regime and response, of the response on each binned predictor
// (slope, intercept, correlation), and on the two predictors of
// Config.Partial (default EIS and SST) jointly: the partial sensitivities
// of the cloud-controlling-factor kind. All regressions of a response use
// the samples where the response and every predictor are valid, so the
// simple and two-predictor fits see the same sample. They are computed
// from mergeable weighted co-moments (CoMoments: West 1979; Chan, Golub &
// LeVeque 1979), never from stored samples.
//
// Standard errors follow the weighted-least-squares convention with the
// weights rescaled to sum to the sample size: σ̂² = Σwe²/Σw·N/(N − p),
// cov = σ̂²(XᵀWX)⁻¹, with N replaced by the effective sample size N_eff:
// slope SE = √(Σwe²/Σw / ((N_eff − 2)·var_w(x))). Slope and intercept
// intervals use Student's t with N_eff − 2 degrees of freedom (N_eff − 3
// for the two-predictor fit); the correlation interval uses Fisher's z
// with N_eff − 3. With Config.Bootstrap.N > 0 every slope, correlation and
// partial coefficient also gets a percentile interval from a circular
// block bootstrap over time steps (Politis & Romano 1992; blocks of
// Bootstrap.BlockLength steps, default 12, seed Bootstrap.Seed, recorded).
//
// # Effective sample size of pooled space-time samples
//
// Cell-steps are neither independent in time nor in space. The package
// uses
//
//	N_eff = min(N, M · T · min(1, (1 − r1 r2)/(1 + r1 r2)))   (at least 1)
//
// the Bretherton et al. (1999, J. Climate 12, 1990–2009) eq. 31 factor
// applied to the number of time steps T that have samples (eq. 30,
// (1 − r1)/(1 + r1), for a mean), times an independent-area count
//
//	M = min(N/T, max(1, (area per time step)/L²))
//
// with L = Config.DecorrelationLength (default 1000 km: one independent
// sample per 10⁶ km² of sampled area per step; a choice of the order of
// the spatial decorrelation scale of monthly SST and cloud anomalies —
// from memory; L = 0 counts every cell as independent). The lag-1
// autocorrelations come from the domain-mean series (area-weighted mean
// over the pooled samples of each time step; each step counts once; gaps,
// e.g. the months outside a season, break the lag pairs):
//
//   - slope and intercept: r1 of the predictor series and r2 of the
//     residual series ē_t = ȳ_t − a − b x̄_t (exact from the per-step means,
//     since the fit is linear);
//   - correlation: the predictor and response series (eq. 31 as published);
//   - two-predictor fit: the residual series with whichever predictor
//     series gives the larger product r1 r2 (the more conservative);
//   - bin means: the domain-mean response series (eq. 30).
//
// A lag-1 autocorrelation that cannot be estimated (fewer than 3 steps, no
// variance) is taken as 0 and the result says so. The estimator is
// Σ(z_t − z̄)(z_t+1 − z̄)/Σ(z_t − z̄)² times n/(number of pairs). A test
// with synthetic autocorrelated records checks that the intervals cover
// the truth in 95 % of records (the naive N_eff = N gives about 85 %).
//
// Per time step the accumulator keeps the weighted co-moments of every
// (domain, regime, response): 8·(K + K²) + 72 bytes each with K =
// predictors + 1 (K = 5 by default: 312 bytes), i.e. 1.9 KB per domain per
// step for two responses. These are the small per-step series that give the lag-1
// autocorrelations, the seasons and the block bootstrap; nothing else
// grows with the record length except the threshold counts below.
//
// # Perturbation flips
//
// For each patch of Config.Patches and each ΔT of Config.DeltaT (default
// ±1, ±2, ±3, ±4 K), at each step: f = the patch's share of the band's
// valid ocean area (band weights); relative SST inside the patch becomes
// SST* + ΔT(1 − f) and outside SST* − ΔT f (the patch's own effect on the
// tropical mean), and each column is reclassified with Config.Classifier.
// Reported: the fraction of the patch's ocean area × time (cell areas)
// whose regime changes, the fractions that become and stop being
// convective, the convective area fraction before and after and its
// change; the same outside the patch over the band's ocean (band weights);
// and f's mean, minimum and maximum over the steps. ΔT = 0 gives no flip,
// and the flipped fraction grows monotonically with |ΔT| on either side.
//
// # Convective threshold
//
// When Config.Indicator names a quantity of the run ("omega": convective
// where omega500 < 0 Pa s-1, i.e. ascent; "precipitation": > 5 mm d-1;
// "olr": < 240 W m-2; Config.IndicatorThreshold overrides), the band's
// ocean samples are binned by relative SST (Config.ThresholdBinWidth
// 0.05 K over Config.ThresholdRange −12…8 K; outside: counted, left out)
// with the area of convective and of all samples per bin and step. A
// logistic regression of the indicator on relative SST is fitted to the
// binned counts by IRLS (FitLogistic: the exact maximum-likelihood fit of
// relative SST rounded to the bin centre, at most 0.025 K off); the
// threshold is where p = 0.5, its absolute counterpart that
// plus the record's mean tropical-mean SST. The 95 % interval is the
// percentile interval of a circular block bootstrap over time steps
// (Config.ThresholdReplicates, default 1000; Bootstrap.BlockLength and
// Bootstrap.Seed; a record shorter than 10 blocks gets a note, since block
// bootstraps then underestimate the variance by about 1 − L/T). With at
// least 5 calendar years, the threshold is also fitted per year, and the
// slope of the yearly absolute threshold on the yearly tropical-mean SST
// is reported with a t interval over the years (years taken as
// independent): about 1 when the threshold tracks the tropical mean
// (Johnson & Xie 2010, Nature Geoscience 3, 842–845). Complete or
// quasi-complete separation (an indicator that is a step function of
// relative SST) is reported, not fitted. Per step this keeps 16 bytes per
// bin (6.4 KB per step by default). Users can feed the estimate back as
// the regime threshold δ.
//
// # Omega regimes
//
// With Config.OmegaBins and an "omega" quantity (omega500, Pa s-1), per
// domain and season: the area share, the PDF (share per hPa d-1) and the
// count of samples in omega500 bins of 10 hPa d-1 from −100 to 100 hPa
// d-1 (positive = subsidence), and the area-weighted mean and standard
// deviation of each response per bin (Bony, Dufresne, Le Treut, Morcrette
// & Senior 2004, Clim. Dyn. 22, 71–86). These are composites of the actual
// values in both modes; the relative-SST regimes stay the default
// classification.
//
// # Files (Write)
//
// Write stages every file in a hidden directory inside the output
// directory and moves them into place only when all are written; without
// WriteOptions.Force it refuses when any exists.
//
//   - relationships.nc (CF-1.10, NetCDF-4 classic model, package cfwrite):
//     categorical axes domain (flag_meanings: tropical_band and the region
//     names), season (all DJF MAM JJA SON) and regime (0 convective,
//     1 transition, 2 subsidence), a bin axis P_bin with bounds per
//     predictor, and omega_bin (hPa d-1). Variables R_vs_P_mean, _std,
//     _stderr (response units), _n_eff (1), _count (int), _area (m2) over
//     (domain, season, regime, P_bin); rel_sst_eis_frequency,
//     rel_sst_eis_count and R_vs_rel_sst_eis_mean over (domain, season,
//     rel_sst_bin, eis_bin); omega_frequency, omega_pdf (d hPa-1),
//     omega_count, R_vs_omega_mean and R_vs_omega_std over (domain,
//     season, omega_bin). Empty bins are _FillValue. Global attributes:
//     relationships_mode, relationships_mode_description, detrended (byte
//     1/0), regime_definition, uncertainty_method, relationships_config
//     (Text), period, time_steps (int), regime_index, dataset,
//     lidscope_version, study_hash; every variable also has
//     relationships_mode. All names come from package vocab.
//   - regressions.csv: one row per simple regression (kind "simple") and
//     two per two-predictor fit (kind "partial": the coefficient of
//     predictor with controls held fixed); columns with units in brackets,
//     slope units per row (e.g. K-1 for cloud fraction, W m-2 K-1).
//   - flips.csv: one row per patch and ΔT.
//   - thresholds.csv: the record's estimate and one row per year (header
//     only when no indicator was given).
//   - relationships.json: everything above, every number as {"value": x,
//     "units": "K"} ("value": null for none), with format
//     "lidscope-relationships", format_version 3 (FormatVersion), the mode and its
//     description, the regime definition, the uncertainty method and the
//     configuration text.
package relations
