// Package constraint computes the observational constraint on a model's
// low-cloud (or other response's) change under warming from three run
// folders: an observational run with a factor analysis (its sensitivities
// ∂C/∂x_i, package factors), and a model's control and warmer runs made
// with the same study. For every domain (the tropical band and each region)
// and regime of the factor analysis, and per cell where both have maps,
//
//	ΔC/ΔT ≈ Σ_i (∂C/∂x_i)_obs · (Δx_i/ΔT)_model
//
// (Qu et al. 2015, Clim. Dyn. 45, 375–396; Myers & Norris 2016, GRL 43,
// 2144–2148; Klein et al. 2017, Surv. Geophys. 38, 1307–1329), with the
// interval of factors.Constrain, which propagates both the sensitivities'
// covariance and the sampling error of the model's factor changes; the
// contribution of each factor; and beside it the model's own ΔC/ΔT (the
// change of the response's time mean) and the model's own sensitivities
// times its own factor changes (the self-consistency check: when the two
// disagree, the linear framework does not hold for that model).
//
// Δx_i is the difference of the time means of the raw (not anomaly)
// domain-mean factor between the warm and the control run; its standard
// error combines the two runs' standard errors of the mean (factors'
// mean_stderr, with the effective sample size of Bretherton et al. 1999,
// J. Climate 12, 1990–2009, eq. 30), and the two runs and the factors are
// taken as independent (a diagonal covariance: the factors' means are
// correlated in truth, and the interval neglects that). Per cell, Δx comes
// from the runs' per-cell time means (maps.nc) and its standard error from
// the per-cell anomaly standard deviation and effective sample size of the
// runs' factor maps (factors.nc), σ/√N_eff per run. The global-mean surface
// warming ΔT is given (a number with units) or computed from a temperature
// quantity of the two runs' maps (the cell-area-weighted mean of the
// per-cell time means over the cells valid in both runs); it is taken as
// exact.
//
// Compute works on loaded runs (Load); Stage writes the result into a run
// folder (constraint.json, constraint.csv, constraint_changes.csv,
// constraint.nc, provenance.json) and Read reads constraint.json back.
// Compare gathers several models' constraints against one observational
// run.
package constraint
