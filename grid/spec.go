package grid

import (
	"fmt"
	"strconv"
	"strings"
)

// ParseSpec builds a global grid from a short text, for configuration files
// and command lines:
//
//	"regular 2.5"        2.5°×2.5° regular grid
//	"regular 2x2.5"      2° latitude × 2.5° longitude
//	"gaussian 64"        64 Gaussian latitudes, 128 longitudes
//	"gaussian 64x192"    64 Gaussian latitudes, 192 longitudes
//
// Grids come in the canonical layout (latitudes south→north, longitudes
// ascending from the west edge −180°): regular grids have their centres
// half a cell in from the edges (first longitude −180+dlon/2), Gaussian
// grids start at −180° and use GaussMidpoint bounds. Case and surrounding
// blanks are ignored.
func ParseSpec(spec string) (*Grid, error) {
	kind, arg, ok := strings.Cut(strings.ToLower(strings.TrimSpace(spec)), " ")
	arg = strings.TrimSpace(arg)
	if !ok || arg == "" {
		return nil, specErr(spec, "want a kind and a size")
	}
	a, b, two := strings.Cut(arg, "x")
	switch kind {
	case "regular":
		dlat, err := strconv.ParseFloat(a, 64)
		if err != nil {
			return nil, specErr(spec, "latitude spacing %q is not a number", a)
		}
		dlon := dlat
		if two {
			if dlon, err = strconv.ParseFloat(b, 64); err != nil {
				return nil, specErr(spec, "longitude spacing %q is not a number", b)
			}
		}
		g, err := GlobalRegular(dlat, dlon, -180+dlon/2)
		if err != nil {
			return nil, fmt.Errorf("grid spec %q: %w", spec, err)
		}
		return g, nil
	case "gaussian":
		nlat, err := strconv.Atoi(a)
		if err != nil || nlat < 2 || nlat > 8192 {
			return nil, specErr(spec, "latitude count %q is not a whole number from 2 to 8192", a)
		}
		nlon := 2 * nlat
		if two {
			if nlon, err = strconv.Atoi(b); err != nil || nlon < 2 || nlon > 1<<17 {
				return nil, specErr(spec, "longitude count %q is not a whole number from 2 to 131072", b)
			}
		}
		g, err := GlobalGaussian(nlat, nlon, -180, GaussMidpoint)
		if err != nil {
			return nil, fmt.Errorf("grid spec %q: %w", spec, err)
		}
		return g, nil
	default:
		return nil, specErr(spec, "unknown kind %q", kind)
	}
}

func specErr(spec, format string, a ...any) error {
	return fmt.Errorf("%w: grid spec %q: %s (examples: \"regular 2.5\", \"regular 2x2.5\", \"gaussian 64\", \"gaussian 64x128\")",
		append([]any{ErrInvalid, spec}, fmt.Sprintf(format, a...))...)
}
