// Package factors holds the mathematics of cloud-controlling factor
// analysis: a multi-linear regression of a cloud response on several
// meteorological factors, fitted from mergeable weighted co-moments
// (relations.CoMoments), by ordinary least squares or ridge regression on
// standardised factors with the penalty chosen by blocked cross-validation
// over whole years; near-surface temperature advection on the sphere; and
// the observational constraint on a model's cloud change,
// ΔC/ΔT ≈ Σ_i (∂C/∂x_i)_obs (Δx_i/ΔT)_model (Qu et al. 2015, Clim. Dyn.
// 45, 375–396; Myers & Norris 2016, GRL 43, 2144–2148; Klein et al. 2017,
// Surv. Geophys. 38, 1307–1329; Ceppi & Nowack 2021, PNAS 118,
// e2026290118, for ridge regression).
//
// The fitting functions are pure. Acc is the step sink of a run's factor
// analysis: per domain (the tropical band and the study's regions) and
// regime slot (subsidence, convective, all) it keeps each month's
// area-weighted domain means of the factor and response anomalies (against
// the first-pass climatology, relations.Climatology), fitted with one fold
// per calendar year; per mapped cell (ocean cells of the band) it keeps
// co-moments per block of Config.CellFoldYears years and the lag-1 sums
// of its effective sample size (BytesPerCell). Effective sample sizes
// follow Bretherton et al. (1999, J. Climate 12, eq. 31) as the
// relationships' multiple regression does: n(1 − ρ)/(1 + ρ) with ρ the
// largest product of a factor's lag-1 autocorrelation and the residual's
// (per cell: the response's, since a cell keeps no series). Stage writes
// factors.json, factors.csv and factors.nc; ReadRun reads them back.
//
// # Folds and moments
//
// A fit starts from Folds: one relations.CoMoments per fold (a whole year
// of samples, say), each with K = p + 1 variables, the p factors first and
// the response last. Folds stay mergeable: pieces of a fold merged with
// relations.CoMoments.Merge give the same fit as one pass, and the pooled
// moments are the merge of the folds. Years keeps such folds per calendar
// year and merges pieces of a record; a year's moments take
// BytesPerYear(p) = 16 + 8(K + K²) bytes (592 for seven factors), so a
// cell's state is that times its years.
//
// # Standardisation and the penalty scale
//
// Factors are standardised with the pooled weighted means and population
// standard deviations s_j = √(C_jj/W); the response keeps its units. With
// R the weighted correlation matrix of the factors and c_j = cov(z_j, y)
// the ridge coefficients per standard deviation are b = (R + λI)⁻¹ c, so λ
// is on the correlation-matrix scale (λ = 0 is OLS). For unit weights this
// is scikit-learn's Ridge on standardised X with alpha = n·λ (with sample
// weights alpha = Σw·λ). Coefficients in physical units are β_j = b_j/s_j.
//
// # Uncertainty
//
// The coefficient covariance per standard deviation is
// V = ResidVar·(R+λI)⁻¹ R (R+λI)⁻¹ / (N_eff − p − 1), the sandwich form
// of ridge regression, which for λ = 0 is the OLS covariance
// σ̂²R⁻¹/(N_eff − p − 1) in the convention of relations.Multi.SE
// (ResidVar = Σw e²/Σw). Intervals use Student's t with N_eff − p − 1
// degrees of freedom. The ridge interval is centred on a biased estimate
// and so covers the true coefficient less often than its nominal level
// when the penalty is large; the degrees of freedom are not reduced to the
// ridge's effective number of parameters (a choice; common practice
// varies).
package factors
