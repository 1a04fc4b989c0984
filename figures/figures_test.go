package figures

import (
	"bytes"
	"errors"
	"image"
	"image/png"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"gonum.org/v1/plot/cmpimg"

	"lidscope/internal/figurestest"
	"lidscope/relations"
)

var (
	fixOnce sync.Once
	fixDir  string
	fixErr  error
	fixRel  *relations.Results
)

// fixture returns the directory of the small invented run (5° grid, 40°S–
// 40°N, 24 months) shared by the tests; tests draw into their own OutDir.
func fixture(t testing.TB) string {
	t.Helper()
	fixOnce.Do(func() {
		fixDir, fixErr = os.MkdirTemp("", "lidscope-figures-test-")
		if fixErr == nil {
			_, fixErr = figurestest.Write(filepath.Join(fixDir, "run"), figurestest.Spec{})
		}
		if fixErr == nil {
			fixRel, fixErr = figurestest.Relations(figurestest.Spec{})
		}
	})
	if fixErr != nil {
		t.Fatal(fixErr)
	}
	return filepath.Join(fixDir, "run")
}

func TestMain(m *testing.M) {
	code := m.Run()
	if fixDir != "" {
		os.RemoveAll(fixDir)
	}
	os.Exit(code)
}

// build lays out one figure of the fixture run.
func build(t testing.TB, name, format string, dpi float64) (*fig, *page) {
	t.Helper()
	run, err := Load(fixture(t))
	if err != nil {
		t.Fatal(err)
	}
	run.relations = fixRel
	for _, f := range registry {
		if f.name == name {
			fg := &fig{run: run, name: name, format: format, dpi: dpi, pdf: format == "pdf"}
			pg, err := f.build(fg)
			if err != nil {
				t.Fatalf("%s: %v", name, err)
			}
			return fg, pg
		}
	}
	t.Fatalf("no figure %q", name)
	return nil, nil
}

func renderBytes(t testing.TB, fg *fig, pg *page) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := fg.render(pg, &buf); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// tileSpread splits the image into 4×4 tiles and returns the range of the
// tiles' mean luminance (0…255) and the number of distinct colours.
func tileSpread(img image.Image) (spread float64, colours int) {
	b := img.Bounds()
	seen := map[[3]uint32]bool{}
	lo, hi := math.Inf(1), math.Inf(-1)
	for ty := 0; ty < 4; ty++ {
		for tx := 0; tx < 4; tx++ {
			var sum float64
			n := 0
			for y := b.Min.Y + ty*b.Dy()/4; y < b.Min.Y+(ty+1)*b.Dy()/4; y++ {
				for x := b.Min.X + tx*b.Dx()/4; x < b.Min.X+(tx+1)*b.Dx()/4; x++ {
					r, g, bb, _ := img.At(x, y).RGBA()
					seen[[3]uint32{r >> 8, g >> 8, bb >> 8}] = true
					sum += 0.299*float64(r>>8) + 0.587*float64(g>>8) + 0.114*float64(bb>>8)
					n++
				}
			}
			m := sum / float64(n)
			lo, hi = math.Min(lo, m), math.Max(hi, m)
		}
	}
	return hi - lo, len(seen)
}

// Every figure the fixture run allows renders to PNG and SVG through
// Draw: the PNG decodes, is 7 inches wide at the chosen resolution and as
// high as its layout, and is not blank; the SVG embeds its fonts and
// draws heat maps as images.
func TestEachFigureRenders(t *testing.T) {
	run := fixture(t)
	out := t.TempDir()
	const dpi = 100
	pngs, err := Draw(run, Options{OutDir: out, DPI: dpi, Relations: fixRel})
	if err != nil {
		t.Fatal(err)
	}
	svgs, err := Draw(run, Options{OutDir: out, Format: "svg", Relations: fixRel})
	if err != nil {
		t.Fatal(err)
	}
	wantNames := []string{"map_convective_time_fraction", "map_crossing_rate", "map_eis", "map_lts", "map_cloud", "map_relative_sst",
		"relationships_eis", "relationships_lts", "relationships_rel_sst", "joint_composite", "flips", "threshold", "series"}
	if len(pngs) != len(wantNames) || len(svgs) != len(wantNames) {
		t.Fatalf("drew %d PNG and %d SVG figures, want %d each (%v): %v", len(pngs), len(svgs), len(wantNames), wantNames, pngs)
	}
	for i, name := range wantNames {
		if filepath.Base(pngs[i]) != name+".png" || filepath.Base(svgs[i]) != name+".svg" {
			t.Errorf("figure %d: %s, %s; want %s", i, pngs[i], svgs[i], name)
		}
		b, err := os.ReadFile(pngs[i])
		if err != nil {
			t.Fatal(err)
		}
		img, err := png.Decode(bytes.NewReader(b))
		if err != nil {
			t.Fatalf("%s: %v", pngs[i], err)
		}
		_, pg := build(t, name, "png", dpi)
		wantW, wantH := int(math.Round(pageWidth.Dots(dpi))), int(math.Round(pg.height().Dots(dpi)))
		if img.Bounds().Dx() != wantW || img.Bounds().Dy() != wantH {
			t.Errorf("%s: %v, want %d×%d", name, img.Bounds().Size(), wantW, wantH)
		}
		if spread, colours := tileSpread(img); spread < 5 || colours < 30 {
			t.Errorf("%s looks blank: tile luminance spread %.1f, %d colours", name, spread, colours)
		}
		sv, err := os.ReadFile(svgs[i])
		if err != nil {
			t.Fatal(err)
		}
		s := string(sv)
		if !strings.HasPrefix(s, "<?xml") || !strings.Contains(s, "@font-face") {
			t.Errorf("%s: SVG without embedded fonts", svgs[i])
		}
		if strings.HasPrefix(name, "map_") || name == "joint_composite" {
			if !strings.Contains(s, "<image") {
				t.Errorf("%s: the heat map is not an embedded image", svgs[i])
			}
			if n := strings.Count(s, "<path"); n > 2000 {
				t.Errorf("%s: %d paths; a rasterised map needs a few hundred", svgs[i], n)
			}
		}
	}
	// Without Force, existing figures are not replaced and nothing is drawn.
	if _, err := Draw(run, Options{OutDir: out, Only: []string{"series"}}); !errors.Is(err, fs.ErrExist) {
		t.Errorf("second Draw without Force: %v, want fs.ErrExist", err)
	}
	if _, err := Draw(run, Options{OutDir: out, Only: []string{"series"}, Force: true}); err != nil {
		t.Errorf("Draw with Force: %v", err)
	}
	left, _ := filepath.Glob(filepath.Join(out, ".lidscope-figure-*"))
	if len(left) != 0 {
		t.Errorf("temporary files left: %v", left)
	}
}

func TestPDF(t *testing.T) {
	fg, pg := build(t, "map_eis", "pdf", 100)
	b := renderBytes(t, fg, pg)
	if !bytes.HasPrefix(b, []byte("%PDF-")) {
		t.Fatalf("not a PDF: %q", b[:min(20, len(b))])
	}
	if !bytes.Contains(b, []byte("/FontFile2")) {
		t.Error("PDF does not embed its TrueType fonts")
	}
	if !bytes.Contains(b, []byte("/Subtype /Image")) {
		t.Error("PDF heat map is not an image")
	}
}

func TestOptionsErrors(t *testing.T) {
	run := fixture(t)
	cases := []struct {
		opt  Options
		want string
	}{
		{Options{Format: "gif"}, "unknown format"},
		{Options{Only: []string{"map_rainfall"}}, "unknown figure"},
		{Options{Palettes: map[string]string{"eis": "rainbow"}}, "unknown colour map"},
		{Options{Palettes: map[string]string{"wind": "fathom"}}, "unknown kind of quantity"},
		{Options{DPI: 5}, "DPI"},
		{Options{Only: []string{"map_low_cloud"}, OutDir: t.TempDir()}, "no variable low_cloud_mean"},
	}
	for _, c := range cases {
		_, err := Draw(run, c.opt)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("Draw(%+v): %v, want an error with %q", c.opt, err, c.want)
		}
	}
	if _, err := Draw(t.TempDir(), Options{}); err == nil || !strings.Contains(err.Error(), "summary.json") {
		t.Errorf("Draw on an empty directory: %v", err)
	}
}

// The map of a field missing over a known box shows the missing colour
// there, and not elsewhere.
func TestMissingBoxIsGrey(t *testing.T) {
	const dpi = 100
	for _, name := range []string{"map_convective_time_fraction", "map_eis"} {
		fg, pg := build(t, name, "png", dpi)
		img, err := png.Decode(bytes.NewReader(renderBytes(t, fg, pg)))
		if err != nil {
			t.Fatal(err)
		}
		da := fg.dataArea
		H := pg.height().Dots(dpi)
		// The fixture is global in longitude with no more data near 180°
		// than near 0°, so the map runs −180…180; latitudes −40…40.
		px := func(lon, lat float64) (int, int) {
			x := da.Min.X.Dots(dpi) + (lon+180)/360*(da.Max.X-da.Min.X).Dots(dpi)
			y := da.Min.Y.Dots(dpi) + (lat+40)/80*(da.Max.Y-da.Min.Y).Dots(dpi)
			return int(x), int(H - y)
		}
		grey := func(lon0, lon1, lat0, lat1 float64) float64 {
			x0, y1 := px(lon0, lat0)
			x1, y0 := px(lon1, lat1)
			n, g := 0, 0
			for y := y0; y <= y1; y++ {
				for x := x0; x <= x1; x++ {
					r, gg, b, _ := img.At(x, y).RGBA()
					n++
					m := missingColour
					if absDiff(r>>8, m.R) <= 2 && absDiff(gg>>8, m.G) <= 2 && absDiff(b>>8, m.B) <= 2 {
						g++
					}
				}
			}
			return float64(g) / float64(n)
		}
		box := figurestest.MissingBox
		if got := grey(box.West+2, box.East-2, box.South+2, box.North-2); got < 0.7 {
			t.Errorf("%s: %.0f %% of the pixels inside the missing box are the missing colour, want ≥ 70 %% (coastlines cross it)", name, 100*got)
		}
		if got := grey(-170, -100, -35, 35); got > 0.01 {
			t.Errorf("%s: %.1f %% of the open-Pacific pixels are the missing colour", name, 100*got)
		}
	}
}

func absDiff(a uint32, b uint8) uint32 {
	if a > uint32(b) {
		return a - uint32(b)
	}
	return uint32(b) - a
}

// Golden images, compared with gonum's cmpimg per pixel in YIQ space; run
// `go test ./figures -run Golden -regen` to rewrite them after an intended
// change, and look at them before committing.
func TestGolden(t *testing.T) {
	for _, name := range []string{"map_eis", "relationships_eis", "series"} {
		fg, pg := build(t, name, "png", 80)
		got := renderBytes(t, fg, pg)
		path := filepath.Join("testdata", "golden", name+".png")
		if *cmpimg.GenerateTestData {
			if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(path, got, 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		want, err := os.ReadFile(path)
		if err != nil {
			t.Fatalf("%v (run with -regen to create it)", err)
		}
		// goldenDelta: gonum renders in pure Go with its embedded fonts, so
		// on one machine a figure is the same image pixel for pixel (the
		// unchanged goldens differ by 0: measured). The tolerance leaves
		// room only for rounding in anti-aliased edges on other CPUs (FMA
		// on arm64): cmpimg passes a pixel when its YIQ difference ≤
		// 35215·δ²; δ = 0.008 admits a change of 2 grey levels (of 255) on
		// every pixel (0.5053·2² = 2.0 ≤ 2.25), where the former 0.05
		// admitted 13 levels (a shifted colour map or a thinner line passed).
		const goldenDelta = 0.008
		ok, err := cmpimg.EqualApprox("png", got, want, goldenDelta)
		if err != nil {
			t.Fatal(err)
		}
		if !ok {
			bad := filepath.Join(t.TempDir(), name+".png")
			os.WriteFile(bad, got, 0o644)
			t.Errorf("%s differs from %s (new rendering in %s); if the change is intended, look at it and run with -regen", name, path, bad)
		}
	}
}

// Without relationship results the relationship figures are skipped, and
// asking for one by name is an error.
func TestRelationFiguresNeedResults(t *testing.T) {
	run := fixture(t)
	out := t.TempDir()
	paths, err := Draw(run, Options{OutDir: out, DPI: 60})
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range paths {
		if b := filepath.Base(p); strings.HasPrefix(b, "relationships_") || b == "flips.png" || b == "threshold.png" || b == "joint_composite.png" {
			t.Errorf("drew %s without relationship results", b)
		}
	}
	if _, err := Draw(run, Options{OutDir: out, Only: []string{"threshold"}}); !errors.Is(err, ErrUnavailable) {
		t.Errorf("threshold without results: %v, want ErrUnavailable", err)
	}
}

// Relationship figures re-drawn from relationships.json (relations.Write)
// are the same images as those drawn from the results in memory.
func TestRelationsFromFile(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "run")
	if _, err := figurestest.Write(dir, figurestest.Spec{}); err != nil {
		t.Fatal(err)
	}
	fixture(t)
	if _, err := relations.Write(dir, fixRel, relations.Meta{Dataset: "test", Version: "test", Command: []string{"test"}}, relations.WriteOptions{Force: true}); err != nil {
		t.Fatal(err)
	}
	names := []string{"relationships_eis", "relationships_lts", "relationships_rel_sst", "joint_composite", "flips", "threshold"}
	fromFile, err := Draw(dir, Options{Only: names, OutDir: filepath.Join(dir, "a"), DPI: 60})
	if err != nil {
		t.Fatal(err)
	}
	inMemory, err := Draw(dir, Options{Only: names, OutDir: filepath.Join(dir, "b"), DPI: 60, Relations: fixRel})
	if err != nil {
		t.Fatal(err)
	}
	for i := range names {
		a, _ := os.ReadFile(fromFile[i])
		b, _ := os.ReadFile(inMemory[i])
		if ok, err := cmpimg.Equal("png", a, b); err != nil || !ok {
			t.Errorf("%s from relationships.json differs from the one drawn from memory (%v)", names[i], err)
		}
	}
	os.WriteFile(filepath.Join(dir, relations.RelationshipsJSON), []byte(`{"format":"something else"}`), 0o644)
	if _, err := Draw(dir, Options{OutDir: filepath.Join(dir, "c")}); err == nil || !strings.Contains(err.Error(), "lidscope-relationships") {
		t.Errorf("a foreign relationships.json: %v", err)
	}
}
