// Package figures draws the figures of a finished lidscope run from its
// output files (package output: maps.nc, series.nc, summary.json; the
// relationship files of package relations when present), so that any
// earlier run can be re-plotted without recomputing.
//
// # Figures
//
// Draw writes one file per figure, named after the figure (Names lists
// them): maps of the fraction of time convective, regime crossings per
// year, mean EIS, LTS, cloud and relative SST (map_*), and the band time
// series of the tropical-mean SST and the regimes' area fractions (series).
// Every figure has a title naming what it shows, the dataset and period,
// and the regime definition (from summary.json); axis labels and colour
// bars with units; and a footer with the lidscope version, the study hash
// and the figure's name.
//
// # Maps
//
// Maps are equirectangular (plate carrée): the data area's height/width is
// the latitude span over the longitude span, so a degree is as long north
// as east. A global grid is drawn over −180…180 unless more of its valid
// cells lie near 180° than near 0°, when it is drawn over 0…360; a regional
// grid over its own extent. Cells without data (land, or never valid) are a
// neutral grey (CIELAB L* 66, no chroma), explained by a key beside the
// colour bar. Heat maps are one raster image (one pixel per device pixel in
// PNG, 300 per inch in SVG and PDF), never one rectangle per cell.
// Coastlines are Natural Earth's 1:110m (see figures/internal/coast and the
// NOTICE file), split at the map's seam and clipped to its box, drawn as a
// dark line on a light halo so that they show on both ends of every colour
// map. Values beyond the colour range are drawn in the end colours and
// marked by triangles at the ends of the colour bar.
//
// # Colour maps
//
// Colour maps are lidscope's own straight CIELAB lightness ramps (package
// figures/internal/ramp): "fathom" (sequential, deep blue-green through
// violet and rose to pale peach) for fractions, frequencies, cloud and
// LTS; "fulcrum" (diverging, blue-green below zero and sand to rust above,
// centred on zero, symmetric limits at the larger magnitude of the 2nd and
// 98th percentiles) for EIS and relative SST; "pumice" (neutral grey) for
// counts. Their perceptual uniformity (CAM02-UCS) and their order under
// simulated colour-vision deficiency are tested against colorspacious,
// their lightness is monotone for greyscale printing, and their lightness
// and hue tracks are tested to follow none of the colour maps of a widely
// used plotting library. Options.Palettes overrides the map of a
// kind of quantity (PaletteKeys); "NAME-reversed" runs a map backwards.
// Line colours are from Wong's (2011) colour-blind-safe set.
//
// # Fonts and formats
//
// Text is set in Liberation Sans, compiled into the program by gonum plot,
// so no system font is needed; SVG files embed the fonts (@font-face) and
// PDF files embed them as TrueType. PDF text is encoded in the Windows-1252
// code page the PDF writer expects (degree sign, ellipsis and en dash
// included); the few characters outside it (the minus sign, Greek letters)
// are written in ASCII there; PDF titles are not bold (the
// writer cannot embed a bold face in gonum plot v0.17.0).
//
// # Files
//
// Figures go into RUN_DIR/figures unless Options.OutDir says otherwise, each
// written under a temporary name and renamed when complete. Without
// Options.Force, Draw refuses before drawing anything when one of the
// figures it would write exists already.
package figures
