// Package config reads lidscope studies: the one file a scientist keeps per
// dataset (or per model run, or per comparison of several) that says which
// files hold which variables, how to read the ones that are not quite CF,
// which months to use, how to tell ocean from land, how LTS and EIS are
// computed, and how ocean columns are split into convective and subsidence
// regimes.
//
// [Load] reads a study file, applies overrides and defaults, checks it and
// expands the file globs; [Parse] does the same for a study given as text
// (a program that builds a study needs no file). The pipeline then works
// from the typed [Study] and records [Study.Resolved] (a canonical text of
// everything the study decides) and [Study.Hash] (its SHA-256) in every
// output. [Starter] writes a commented starter study from what cf.Inspect
// found in a set of files (`lidscope study init FILE…`).
//
// # The shape of a study
//
// A study has four sections: datasets (a table keyed by dataset name),
// analysis (the regime definition and analysis grid shared by every
// dataset), output, and relationships. A minimal study is
//
//	datasets:
//	  obs:
//	    files:
//	      sst: "sst/*.nc"
//	      air_temperature: ta.nc
//	      low_cloud: cll.nc
//
// # Ensembles
//
// A top-level ensemble block names many datasets from one template:
// names ("{model}-{member}") and the dataset table are filled in for every
// combination of the lists under over ({model: [alpha, beta], member:
// [m1, m2]}); each holds per-dataset changes keyed by expanded name, laid
// over the template key by key. The expanded datasets join those under
// datasets, in name order at the place of the block in the file. A
// placeholder not under over, a names template that leaves one out, an
// expanded name also written under datasets and an each entry naming no
// expanded dataset are problems at their lines; problems inside an
// expanded dataset are reported at the template's line.
//
// # Checking a study: lidscope study check
//
// `lidscope study check STUDY` loads a study exactly as `lidscope run`
// does (overrides from --set and the environment included), reports every
// problem, and otherwise prints [Study.Resolved] after a "# sha256" line
// with [Study.Hash]: the study with every default, glob and override
// applied, written with the keys of the study file, so a line of it can
// be copied back into a study. That text is what every output records as
// its provenance.
//
// The package is pure Go: it never opens a NetCDF file. It only checks that
// the input files exist.
//
// # Formats
//
// YAML by default (.yaml or .yml), TOML (.toml) and JSON (.json) are read
// too, chosen by the file name extension; testdata/example.yaml is a
// commented example, and testdata/example.toml and testdata/example.json
// say the same in the other formats. Keys are lower_snake_case. An
// unknown key is an error that names the file, line and key path and
// suggests the nearest valid key (edit distance); so is an unknown role.
// Lines are exact for YAML and JSON; for TOML they are found by following
// table headers and "key =" lines (keys inside inline tables get the line
// of the table).
//
// Every problem is reported at once, one per line, as
//
//	study.yaml:12: datasets.obs.ocean.mask: mask fraction needs a land_fraction or sea_fraction input …
//
// Key paths are dotted; a dataset is named by its name and list elements
// are numbered from 0 (datasets.obs.files.sst, analysis.regions.1.west).
//
// # Overrides: flags and environment
//
// Values come, highest precedence first, from flags ([LoadOptions].Flags,
// a map of dotted key paths to values), the environment, the study file,
// and the defaults below. Any key may be overridden, including per-dataset
// keys by the dataset's name:
//
//	flag key                             environment variable
//	analysis.threshold                   LIDSCOPE_ANALYSIS_THRESHOLD
//	datasets.obs.conventions.svp         LIDSCOPE_DATASETS_OBS_CONVENTIONS_SVP
//	datasets.model-a.time.months         LIDSCOPE_DATASETS_MODEL_A_TIME_MONTHS
//	datasets.obs.time.low_cloud.units    LIDSCOPE_DATASETS_OBS_TIME_LOW_CLOUD_UNITS
//	analysis.regions                     LIDSCOPE_ANALYSIS_REGIONS
//
// The variable name is "LIDSCOPE_" followed by the key path in capitals
// with dots and hyphens replaced by underscores ([EnvName]); two dataset
// names that differ only in - and _ are therefore refused. A flag key
// datasets.*.KEY sets KEY in every dataset (quote it in a shell: --set
// 'datasets.*.time.end=2002-12'). Only datasets present in the file can
// be overridden (there is no way to add a dataset
// from a flag or the environment, nor to set the datasets table or one
// dataset as a whole), and empty variables are ignored. Values are read as YAML
// flow values: "1.0" is a number, "true" a boolean, "[12, 1, 2]" (or, for
// lists of numbers, "12,1,2") a list, "{south: -20, north: 20}" a table,
// and "null" removes the key so that its default applies. [Study.Overrides]
// lists what was applied; problems in overridden values name the flag or
// variable instead of a line.
//
// # Keys
//
// datasets (required): a table with one entry per dataset, keyed by the
// dataset's name. A name is made of lower-case letters, digits, _ and -,
// starting with a letter or digit (it is a key of the study, and the
// folder of the dataset's results); datasets are run in the order the file
// writes them. Each entry is a table with:
//
//   - about: free text, shown in the titles of the outputs.
//   - accept: names of usability checks (cf.CheckNames: all_missing,
//     looks_kelvin, looks_percent, sst_zero, …) whose NOT USABLE verdict
//     the study overrides for this dataset. Without it, run stops on an
//     input that lidscope inspect calls NOT USABLE, with the same message;
//     with it, the run goes on and records the accepted check in its notes
//     (summary.json, provenance.json).
//   - files (required): role → a file, a glob, or a list of files and
//     globs, relative to the study's folder. Several files of one role are
//     one record along time (cf.Open sorts them). The roles are those of
//     package cf: sst, air_temperature, surface_air_temperature, low_cloud, cloud,
//     toa_sw_up, olr, omega, surface_pressure, sea_level_pressure,
//     relative_humidity, dew_point_temperature, specific_humidity, sea_fraction,
//     land_fraction, sea_ice, precipitation. The key any lists files that
//     may hold any role: every role the settings read and no other key
//     gives is read from them (an optional role those files do not hold
//     is left out, with a note). Required: sst (with a mask, the minimum:
//     regime statistics, crossings, dwell times and the tropical-mean
//     series); air_temperature adds LTS and EIS, and low_cloud or cloud
//     (see analysis.cloud) the cloud statistics and, with air_temperature,
//     the relationships (pipeline.Plan.Lacks). A glob that matches no file is
//     an error naming the role and the pattern.
//   - variables: role → variable name; by default cf finds the variable by
//     standard_name, then by an unambiguous name with fitting units.
//   - units: role → units, overriding the variable's units attribute (for
//     files whose attribute is missing or wrong, e.g. sst: degC). Checked
//     against the role's quantity.
//   - coordinates: role → {lat, lon, level, time, level_units}: names of
//     coordinate variables for files that do not declare them in a CF way,
//     and the units of the vertical coordinate (a pressure unit).
//   - time: how time axes are read, and which steps are used. units (CF
//     time units such as "days since 1979-01-01", for files with non-CF
//     time units), calendar (a CF calendar name) and climatology (true:
//     the time axis is 12 calendar months, January first) declare the time
//     axes of every role; a role may have its own declaration, a table
//     under its name with any of units, calendar and climatology
//     (time.low_cloud: {units: "months since 0000-01-01", calendar:
//     360_day}): a key it does not give is the dataset's (a role's
//     climatology: true drops the dataset's units). The mask roles
//     land_fraction and sea_fraction are read as fixed fields, without
//     time. start and end (inclusive year-months "YYYY-MM") and months (a
//     list of 1–12) or season (DJF, MAM, JJA or SON; not both) select the
//     steps of the record the run follows (the sst's, or, when sst is a
//     12-month climatology beside a dated record of another role, that
//     record's); start and end cannot be used when every time axis is
//     declared a climatology. [TimeSelection.For] gives a role's
//     declaration; [Dataset.Selects] applies the selection.
//   - ocean: mask is sst (ocean where the SST is present), fraction or
//     categorical; the default is fraction when a land_fraction or
//     sea_fraction input is given, else sst. from (land_fraction or
//     sea_fraction; default: the one given, land_fraction first) names the
//     mask input. min_fraction (fraction; default 0.5): ocean where the
//     ocean fraction (1 − land fraction, or the sea fraction) is at least
//     this. values (categorical; default [0]): the mask values that mean
//     ocean. See [OceanMask.IsOcean].
//   - sea_ice: max_fraction (default 0.15): columns with more sea ice are
//     excluded. Exclusion is on whenever a sea_ice input is given; a
//     sea_ice table without a sea_ice input (or files.any) is an error.
//   - surface: pressure is a constant with units (default 1000hPa; a bare
//     number is Pa) or "field" (needs a surface_pressure input); humidity
//     is an assumed relative humidity (default 0.8; 0.8 or "80%"), "field"
//     (the one humidity input given: relative_humidity, dew_point_temperature or
//     specific_humidity) or one of those role names; temperature is sst
//     (default) or air (needs a surface_air_temperature input).
//   - conventions: the metrics conventions, the formula choices and
//     constants with which LTS, EIS and ECTEI are computed, by the names of
//     package metrics: svp (murphy-koop, default; bolton), lcl (romps,
//     default; bolton; linear), t850 (mean, default: (Ts + T700)/2; field:
//     the air_temperature input at 850 hPa), lapse_pressure (default
//     850hPa), lapse_moisture (qs, default; rs), ectei (default false; true
//     needs a specific_humidity input on pressure levels, read at 700 hPa,
//     which cannot also be the surface humidity), ectei_beta (default
//     0.23), ectei_surface (air, default; saturated), and constants {rd,
//     rv, cpd, lv0, lv_slope, g, p0} (SI; defaults of
//     metrics.DefaultConstants). The mapping of t850, surface.temperature
//     and surface.humidity onto metrics.Conventions is done here; the other
//     names are parsed by package metrics. The result, surface settings
//     included, is [Dataset].Metrics and must pass
//     metrics.Conventions.Validate.
//
// analysis (shared by all datasets):
//
//   - band: {south, north}, degrees north (default −30, 30): the band of
//     the tropical-mean SST (ocean cells, area-weighted). Within ±90 with
//     south < north.
//   - threshold: δ, K (default 1.5): a column is convective where SST minus
//     the tropical-mean SST exceeds δ. Finite, |δ| < 10 K.
//   - transition: half-width, K, of a transition band around δ (default 0:
//     none). At least 0.
//   - rule: the regime rule (package regimes): relative_sst (default: the
//     fixed threshold δ on relative SST) or sst_percentile (convective where
//     SST exceeds the p-th percentile of the band's ocean SST at each step,
//     area-weighted; threshold is then refused).
//   - percentile: p, percent (default 70), 0 < p < 100; only with rule:
//     sst_percentile.
//   - cloud: auto (default: low_cloud where a low_cloud input is given,
//     else cloud; low_cloud when both come from files.any), low_cloud or
//     cloud. [Dataset].Cloud holds the role used. Low cloud is preferred
//     because the cloud–inversion relationships concern low cloud (Klein &
//     Hartmann 1993; Wood & Bretherton 2006).
//   - regions: a list of named boxes {name, south, north, west, east};
//     names start with a letter (then letters, digits and _ . -).
//     Longitudes in either convention (−180…180 or 0…360); west > east
//     (after putting both in 0…360) crosses the 0° or 180° meridian. See
//     [Region.Contains].
//   - domain: {south, north} (a latitude band) or {south, north, west,
//     east} (a box, longitudes as for regions), degrees; default: the
//     whole grid. Per-column statistics (maps.nc, per-column summaries)
//     are kept only for ocean columns inside it, so a run on a fine grid
//     needs memory only for the columns it analyses; the tropical mean,
//     the band series, regions and relationships do not depend on it.
//     south defaults to −90, north to 90; west and east come together.
//   - grid: the analysis grid when inputs come on different grids. target
//     is "" (default: every input must share one grid), a role (that
//     role's grid; every dataset must have that input), or a regular global
//     grid such as 1deg, 2deg, 2.5deg or "<x>deg" (x must divide 180).
//     method: role → conservative (default) or bilinear. min_coverage
//     (default 0.5): for conservative remapping, the smallest valid overlap
//     fraction of a target cell. mask_threshold (default 0.5): masks are
//     remapped as fractions and then thresholded at this.
//
// output:
//
//   - dir (default "out", relative to the study's folder): each dataset
//     writes into dir/<dataset name> ([Dataset].OutputDir).
//   - plots (default true).
//
// limits:
//
//   - memory_budget (default a quarter of the machine's memory, at most
//     8 GiB): bytes, or a size such as "4GiB" or "512MB". One time step of
//     an input, or the per-column arrays of a run, larger than this are
//     refused before anything is allocated, with the grid and the budget
//     in the message. The flag --memory-budget sets it too.
//
// relationships (shared by all datasets; the regime-conditioned
// cloud–inversion relationships of package relations, run with every
// dataset). [Study].Relations holds the typed result, starting from
// relations.Defaults(), with the regime definition of analysis
// (threshold, transition) as its Classifier and analysis.regions as its
// Regions; [Study.RelationsFor] gives a dataset's configuration with
// its responses resolved. What each setting means is documented in
// package relations.
//
//   - enabled (default true): false turns the relationship analysis off
//     ([Study].RelationsOff): runs give the regime statistics only, without
//     the relationship outputs and their cost.
//   - mode: climatological (default: composites of the values) or anomaly
//     (deseasonalised monthly anomalies, a second pass over the record).
//     The two give slopes that are not comparable.
//   - detrend (default false): also remove a linear trend per cell and
//     calendar month; needs mode: anomaly.
//   - bins: predictor → bin edges, K, as a list of increasing edges
//     ([-8, -6, -4, -2, 0, 2, 4]) or a table {min, max, width} whose width
//     divides max − min. The predictors are eis, lts, rel_sst (SST minus
//     the tropical-mean SST), sst, t700 and ectei (which needs
//     conventions.ectei: true in every dataset). The keys given are the
//     predictors of the binned relationships and single-predictor
//     regressions: a bins table replaces the defaults as a whole. Default
//     (no bins): relations.DefaultBins of the mode (climatological: eis
//     −6…14 K and lts 6…30 K in 1 K bins, rel_sst −8…4 K in 0.5 K bins;
//     anomaly: eis and lts −3…3 K in 0.5 K, rel_sst −2…2 K in 0.25 K).
//     At most 10000 bins per predictor. An empty bins table (or one whose
//     predictors are all empty) is no table: the defaults apply.
//   - responses: the quantities related to the predictors, by role name:
//     low_cloud, cloud, toa_sw_up, olr, precipitation, omega, or
//     analysis_cloud ([AnalysisCloud]: each dataset's analysis cloud,
//     [Dataset].Cloud). "cloud" is always the total cloud (role cloud),
//     never the low cloud: a dataset whose analysis cloud is low_cloud
//     needs a cloud input for it. Each response must be read in every
//     dataset: the dataset's analysis cloud, or an input of that role
//     (files.any counts; the role is then read from those files).
//     Default: per dataset, its analysis cloud, plus toa_sw_up when the
//     dataset names a toa_sw_up input. [Dataset].RelationResponses holds
//     the resolved list (analysis_cloud replaced, a quantity named twice
//     through it kept once).
//   - seasons (default false): also DJF, MAM, JJA and SON subsets.
//   - patches: named boxes {name, south, north, west, east} (as regions)
//     whose SST is perturbed in the flip analysis; default none.
//   - delta_t: the SST changes of the flip analysis, K (default −4, −3,
//     −2, −1, 1, 2, 3, 4); non-zero, distinct, within ±50 K.
//   - bootstrap: replicates (default 0: no bootstrap intervals for the
//     regressions; at most 100000), block_length (time steps, default 12;
//     also used for the threshold interval) and seed (a whole number
//     0…2^53, default 20040101, recorded in every output) of the circular
//     block bootstrap over time steps.
//   - threshold: the estimation of the convective threshold. indicator is
//     "" or none (default: off), omega (omega500 < value, ascent),
//     precipitation (> value) or olr (< value); it needs an input of that
//     role in every dataset (omega is read at 500 hPa). value: the
//     threshold with units ("-10 hPa day-1", "5 mm day-1", "240 W m-2"; a
//     bare number is SI: Pa s-1, kg m-2 s-1, W m-2); absent or null: the
//     default of relations.DefaultIndicatorThreshold (0 Pa s-1,
//     5 mm day-1, 240 W m-2). Values beyond |omega| 1 Pa s-1,
//     precipitation 0…0.01 kg m-2 s-1 or OLR 0…500 W m-2 are taken as
//     units mistakes. bin_width: the relative-SST bin of the logistic fit
//     (K, default 0.05, at most 1); range: [lowest, highest] relative SST
//     of the fit (K, default [-12, 8]); replicates: bootstrap replicates
//     of its interval (default 1000, 0 = none). value, bin_width, range
//     and replicates need an indicator.
//   - omega_regimes (default false): composites in omega500 bins (Bony et
//     al. 2004, Clim. Dyn. 22); needs an omega input in every dataset.
//   - decorrelation_length: the length L of the independent-area count of
//     the effective sample size, with units (default 1000km; a bare number
//     is m; 0 counts every cell as independent; at most 20000 km).
//   - partial: the two predictors of the two-predictor regression
//     (default [eis, sst]); different, among the predictors above.
//
// The factors section (off without it) fits the cloud-controlling factor
// regressions of package factors on deseasonalised monthly anomalies, so
// it needs the relationship analysis on and in anomaly mode (an unset
// relationships.mode becomes anomaly; an explicit climatological one is
// an error):
//   - use: the factors, in output order: sst, eis, lts, rh700 (input
//     relative_humidity at 700 hPa, or specific_humidity and
//     air_temperature), omega700 (input omega at 700 hPa), t_adv and
//     wind_speed (inputs eastward_wind and northward_wind). A factor whose
//     inputs a dataset lacks is an error at its line.
//   - response: analysis_cloud (default: each dataset's cloud), low_cloud,
//     cloud or toa_sw_up.
//   - method: ridge (default; penalty by cross-validation over years,
//     Ceppi & Nowack 2021) or ols; penalties: the ridge grid
//     (correlation-matrix scale, default 0 and 10^-4…10^2).
//   - level: the interval level (default 0.95).
//   - cell_fold_years: the per-cell cross-validation blocks, years
//     (default 8: five blocks for a 40-year record).
//   - maps: per-cell maps of the band's ocean cells (default true).
//   - bootstrap: replicates (default 0), block_years (default 1) and seed
//     (default 1, recorded) of the block bootstrap over whole years of the
//     regional fits.
//
// Everything is checked here with its line; relations.Config.Validate of
// every dataset's configuration is then asked too, and anything it still
// finds is reported against the relationships key. Region and patch names
// start with a letter (they become flag meanings of the relationship
// files), and "tropical_band" is reserved for the whole band.
//
// # Defaults and why
//
// The tropical band 30°S–30°N is common practice for tropical-mean SST.
//
// δ = 1.5 K: deep convection over the tropical oceans sets in near an SST
// of about 27.5 °C (Graham & Barnett 1987, Science 238, "Sea surface
// temperature, surface wind divergence, and convection over tropical
// oceans"), and the present-day 30°S–30°N ocean-mean SST is near 26 °C
// (from memory), so the onset lies about 1.5 K above the tropical mean.
// Because the threshold is taken relative to the tropical mean, it moves
// with the tropical mean as the climate warms. δ is a choice, not a
// constant of nature: every output records it ([Study.Resolved]), and
// results should be shown for a few values around it (e.g. 1.0–2.0 K).
//
// The ocean fraction 0.5 and the mask threshold 0.5 count a cell as ocean
// when at least half of it is ocean (a choice; recorded). The sea-ice limit
// 0.15 is the usual ice-edge concentration (common practice). The surface
// and metrics defaults are those of metrics.DefaultConventions, documented there
// (relative humidity 0.8 is an assumption, not a measurement).
package config
