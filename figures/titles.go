package figures

import (
	"strings"

	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Panel titles of pages with panels side by side. gonum centres a plot's
// own title over its whole tile (the axis label and tick labels included)
// at the top of the tile, and plot.Align shifts each tile by its own
// padding, so titles of panels with different axes came out at different
// heights and off the centre of their data areas. drawPanelTitles puts
// them on one baseline, each centred over its panel's data area.

// panelTitleStyle is the style of a panel title.
func (f *fig) panelTitleStyle() text.Style {
	st := f.bold(sizeLabel)
	st.XAlign, st.YAlign = text.XCenter, text.YBottom
	return st
}

// panelTitleGap is the space between a panel title and its data area.
const panelTitleGap = 6

// panelTitleHeight is the room a row of panel titles takes above the
// panels.
func (f *fig) panelTitleHeight() vg.Length {
	return lineHeight(f.panelTitleStyle()) + panelTitleGap
}

// drawPanelTitles draws titles[i] centred over data[i], all on one
// baseline just above the highest data area, and records the data areas
// for the tests (fig.panels).
func (f *fig) drawPanelTitles(c draw.Canvas, titles []string, data []vg.Rectangle) {
	if len(data) == 0 {
		return
	}
	st := f.panelTitleStyle()
	top := data[0].Max.Y
	for _, r := range data {
		top = max(top, r.Max.Y)
	}
	for i, t := range titles {
		if i >= len(data) || t == "" {
			continue
		}
		c.FillText(st, vg.Point{X: (data[i].Min.X + data[i].Max.X) / 2, Y: top + panelTitleGap}, f.t(t))
	}
	f.panels = append(f.panels[:0], data...)
}

// patchLabel is the legend text of a flip patch: its study name in words
// ("east_pacific" → "east Pacific patch").
func patchLabel(name string) string {
	if w := placeWords(name); w != "" {
		return w + " patch"
	}
	return "patch"
}

// placeWords writes a study's name of a region or patch in words
// ("cold_tongue" → "cold tongue", "east_pacific" → "east Pacific"); words
// that name an ocean or a sea keep their capital.
func placeWords(name string) string {
	words := strings.FieldsFunc(name, func(r rune) bool { return r == '_' || r == '-' })
	for i, w := range words {
		if properNames[w] {
			words[i] = strings.ToUpper(w[:1]) + w[1:]
		}
	}
	return strings.Join(words, " ")
}

// properNames are the geographic words a patch name may hold that are
// written with a capital.
var properNames = map[string]bool{
	"pacific": true, "atlantic": true, "indian": true, "arctic": true, "caribbean": true, "mediterranean": true,
	"california": true, "peru": true, "peruvian": true, "namibia": true, "namibian": true, "angola": true,
	"canary": true, "australia": true, "australian": true, "benguela": true, "humboldt": true, "chile": true,
	"chilean": true, "nino": true, "niño": true, "indo": true,
}
