package cf

import (
	"strings"

	"lidscope/netcdf"
	"lidscope/units"
)

// Roles recognised by a variable's long_name and units when neither its
// standard_name nor its name identifies it: cloud cover as many station
// and reanalysis products write it (e.g. variable CLD, long_name
// "CLOUDINESS", units "FRACTION OF SKY COVER", or cover in tenths, oktas
// or percent), and sea-ice concentration as SST products carry it. Such a
// match is weaker evidence than a name: inspect lists it "by long name:
// confirm", and a run uses it only when the study names the variable.

// longNameRule recognises a role from the words of a long_name: all of
// every group in all must occur (one word of each group), and none of not.
type longNameRule struct {
	role Role
	all  [][]string
	not  []string
}

var longNameRules = []longNameRule{
	{RoleLowCloud, [][]string{{"low"}, {"cloud", "cloudiness"}, {"cover", "amount", "fraction", "cloudiness"}}, []string{"water", "ice", "liquid", "top", "base", "optical", "forcing", "effect", "radiative"}},
	{RoleCloud, [][]string{{"cloud", "cloudiness", "clouds"}, {"cover", "amount", "fraction", "cloudiness", "total"}}, []string{"low", "middle", "mid", "high", "convective", "water", "ice", "liquid", "top", "base", "optical", "forcing", "effect", "radiative", "free", "clear"}},
	{RoleCloud, [][]string{{"cloudiness"}}, []string{"low", "middle", "mid", "high", "convective"}},
	{RoleSeaIce, [][]string{{"ice"}, {"concentration", "fraction", "cover", "coverage"}}, []string{"thickness", "volume", "water", "cloud", "land", "shelf", "sheet"}},
}

// skyCoverUnits are unit spellings that only cloud cover uses.
var skyCoverUnits = map[string]bool{
	"fraction of sky cover": true, "fraction of sky": true, "sky cover fraction": true,
	"tenths": true, "tenths of sky cover": true, "tenths of sky": true,
	"okta": true, "oktas": true, "octa": true, "octas": true, "eighths": true, "eighths of sky": true, "eighths of sky cover": true,
	"percent of sky cover": true, "% of sky cover": true, "percent sky cover": true,
}

func words(s string) map[string]bool {
	s = strings.ToLower(s)
	s = strings.NewReplacer("-", " ", "_", " ", ",", " ", "(", " ", ")", " ", "/", " ").Replace(s)
	out := map[string]bool{}
	for _, w := range strings.Fields(s) {
		out[w] = true
	}
	return out
}

// longNameMatches returns the roles v could fill by its long_name (or, for
// cloud, by sky-cover units alone), given whether it has a pressure axis.
func longNameMatches(v *netcdf.Var, hasLevels bool) []RoleMatch {
	ln := textAttr(v, "long_name")
	u := textAttr(v, "units")
	w := words(ln)
	skyUnits := skyCoverUnits[strings.Join(strings.Fields(strings.ToLower(u)), " ")]
	var out []RoleMatch
	seen := map[Role]bool{}
	for _, r := range longNameRules {
		if seen[r.role] || hasLevels || !ruleMatches(r, w) {
			continue
		}
		if _, err := units.Parse(units.Fraction, u); err != nil {
			continue // a cover must be in units of a fraction
		}
		how := "long name " + quoteText(ln)
		if u != "" {
			how += " and units " + quoteText(u)
		}
		seen[r.role] = true
		out = append(out, RoleMatch{Role: r.role, Var: v.Name, How: how, ByName: true, ByLongName: true})
	}
	if len(out) == 0 && skyUnits && !hasLevels {
		out = append(out, RoleMatch{Role: RoleCloud, Var: v.Name, How: "units " + quoteText(u) + " (sky cover)", ByName: true, ByLongName: true})
	}
	return out
}

func ruleMatches(r longNameRule, w map[string]bool) bool {
	for _, n := range r.not {
		if w[n] {
			return false
		}
	}
	for _, group := range r.all {
		ok := false
		for _, x := range group {
			if w[x] {
				ok = true
			}
		}
		if !ok {
			return false
		}
	}
	return true
}

func quoteText(s string) string { return `"` + s + `"` }
