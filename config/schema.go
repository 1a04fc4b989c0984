package config

import (
	"lidscope/vocab"
	"sort"

	"lidscope/cf"
)

// kind is the shape of a study value.
type kind uint8

const (
	kTable   kind = iota + 1 // a table with fixed keys
	kRoles                   // a table keyed by role names (values: elem)
	kList                    // a list of tables (elem)
	kString                  // a string
	kNumber                  // a number
	kBool                    // true or false
	kStrings                 // a string or a list of strings
	kNumbers                 // a number or a list of numbers
	kScalar                  // a number or a string (e.g. "1000hPa", "field")
	kNamed                   // a table keyed by a fixed list of names (choices; values: elem)
	kEdges                   // a list of numbers, or a table with fixed keys (keys)
	kNames                   // a table keyed by names the user chooses (dataset names; values: elem)
)

func (k kind) String() string {
	switch k {
	case kTable, kRoles:
		return "a table"
	case kList:
		return "a list of tables"
	case kString:
		return "a string"
	case kNumber:
		return "a number"
	case kBool:
		return "true or false"
	case kStrings:
		return "a string or a list of strings"
	case kNumbers:
		return "a number or a list of numbers"
	case kScalar:
		return "a number or a string"
	case kNamed, kNames:
		return "a table"
	case kEdges:
		return "a list of numbers or a table"
	}
	return "?"
}

// key describes one study key: its shape and, for tables and lists, what
// it holds. The schema is the single list of valid keys: unknown-key
// checks, suggestions, override keys and environment names all come from it.
type key struct {
	kind kind
	keys map[string]*key // kTable, kEdges (its table form)
	elem *key            // kRoles, kList, kNamed, kNames
	// roles, for a kTable, accepts every role name as a further key
	// (values: roles): the per-role entries of the time table.
	roles   *key
	all     bool     // kRoles: the key "all" is accepted too
	choices []string // kNamed: the names accepted as keys
	what    string   // kNamed: what a key names, for messages ("predictor")
}

func table(keys map[string]*key) *key { return &key{kind: kTable, keys: keys} }
func leaf(k kind) *key                { return &key{kind: k} }

var (
	str     = leaf(kString)
	number  = leaf(kNumber)
	boolean = leaf(kBool)
	strs    = leaf(kStrings)
	numbers = leaf(kNumbers)
	scalar  = leaf(kScalar)
)

// roleTime is a per-role time declaration (time.ROLE).
var roleTime = table(map[string]*key{"units": str, "calendar": str, "climatology": boolean})

var datasetKeys = table(map[string]*key{
	"about":     str,
	"accept":    strs,
	"files":     {kind: kRoles, elem: strs, all: true},
	"variables": {kind: kRoles, elem: str},
	"units":     {kind: kRoles, elem: str},
	"coordinates": {kind: kRoles, elem: table(map[string]*key{
		"lat": str, "lon": str, "level": str, "time": str, "level_units": str,
	})},
	"time": {kind: kTable, roles: roleTime, keys: map[string]*key{
		"units": str, "calendar": str, "climatology": boolean,
		"start": str, "end": str, "months": numbers, "season": str,
	}},
	"ocean": table(map[string]*key{
		"mask": str, "from": str, "min_fraction": number, "values": numbers,
	}),
	"sea_ice": table(map[string]*key{"max_fraction": number}),
	"surface": table(map[string]*key{
		"pressure": scalar, "humidity": scalar, "temperature": str,
	}),
	"conventions": table(map[string]*key{
		"svp": str, "lcl": str, "t850": str,
		"lapse_pressure": scalar, "lapse_moisture": str,
		"ectei": boolean, "ectei_beta": number, "ectei_surface": str,
		"constants": table(map[string]*key{
			"rd": number, "rv": number, "cpd": number, "lv0": number,
			"lv_slope": number, "g": number, "p0": number,
		}),
	}),
})

// renamed maps keys of the earlier study layout to their names now, per
// table, so that an old study gets told what to write instead of a
// suggestion by spelling.
var renamed = map[*key]map[string]string{
	datasetKeys: {
		"inputs": "files", "metrics": "conventions", "description": "about",
		"name": "", // the dataset's name is its key
	},
	datasetKeys.keys["ocean"]: {"role": "from", "min_ocean_fraction": "min_fraction", "ocean_values": "values"},
	datasetKeys.keys["files"]: {"all": allKey},
}

var schema = table(map[string]*key{
	"datasets": {kind: kNames, elem: datasetKeys, what: "dataset"},
	"analysis": table(map[string]*key{
		"band":       table(map[string]*key{"south": number, "north": number}),
		"domain":     table(map[string]*key{"south": number, "north": number, "west": number, "east": number}),
		"threshold":  number,
		"transition": number,
		"rule":       str,
		"percentile": number,
		"cloud":      str,
		"regions": {kind: kList, elem: table(map[string]*key{
			"name": str, "south": number, "north": number, "west": number, "east": number,
		})},
		"grid": table(map[string]*key{
			"target":         str,
			"method":         {kind: kRoles, elem: str},
			"min_coverage":   number,
			"mask_threshold": number,
		}),
	}),
	"output": table(map[string]*key{"dir": str, "plots": boolean}),
	"limits": table(map[string]*key{"memory_budget": scalar}),
	"relationships": table(map[string]*key{
		"enabled": boolean,
		"mode":    str,
		"detrend": boolean,
		"bins": {kind: kNamed, what: "predictor", choices: predictorNames, elem: &key{kind: kEdges, keys: map[string]*key{
			"min": number, "max": number, "width": number,
		}}},
		"responses": strs,
		"seasons":   boolean,
		"patches": {kind: kList, elem: table(map[string]*key{
			"name": str, "south": number, "north": number, "west": number, "east": number,
		})},
		"delta_t": numbers,
		"bootstrap": table(map[string]*key{
			"replicates": number, "block_length": number, "seed": number,
		}),
		"threshold": table(map[string]*key{
			"indicator": str, "value": scalar, "bin_width": number, "replicates": number, "range": numbers,
		}),
		"omega_regimes":        boolean,
		"decorrelation_length": scalar,
		"partial":              strs,
	}),
	"factors": table(map[string]*key{
		"use": strs, "response": str, "method": str, "penalties": numbers, "level": number,
		"cell_fold_years": number, "maps": boolean,
		"bootstrap": table(map[string]*key{"replicates": number, "block_years": number, "seed": number}),
	}),
})

// predictorNames are the predictors the relationship analysis bins and
// regresses on (package relations; all in K).
var predictorNames = vocab.Predictors() // the table of names: sst, t700, lts, eis, ectei, rel_sst

// roleNames lists the role keys a kRoles table accepts.
func roleNames(k *key) []string {
	var out []string
	for _, r := range cf.Roles() {
		out = append(out, string(r))
	}
	if k.all {
		out = append(out, allKey)
	}
	return out
}

// allKey is the files key for files that may hold any role.
const allKey = "any"

func isRole(k *key, name string) bool {
	if k.all && name == allKey {
		return true
	}
	_, ok := cf.KindOf(cf.Role(name))
	return ok
}

// names returns the valid keys of a table, sorted. For kNames (keys the
// user chooses) it returns nil: see namesIn.
func (k *key) names() []string {
	switch k.kind {
	case kRoles:
		return roleNames(k)
	case kNamed:
		out := append([]string(nil), k.choices...)
		sort.Strings(out)
		return out
	case kNames:
		return nil
	}
	out := make([]string, 0, len(k.keys))
	for n := range k.keys {
		out = append(out, n)
	}
	if k.roles != nil {
		out = append(out, roleNames(&key{})...)
	}
	sort.Strings(out)
	return out
}

// child returns the description of key name inside k, or nil. Every name
// is a valid key of a kNames table (whether it exists is the tree's
// business).
func (k *key) child(name string) *key {
	switch k.kind {
	case kTable, kEdges:
		if c := k.keys[name]; c != nil {
			return c
		}
		if k.roles != nil && isRole(&key{}, name) {
			return k.roles
		}
	case kRoles:
		if isRole(k, name) {
			return k.elem
		}
	case kNamed:
		for _, c := range k.choices {
			if c == name {
				return k.elem
			}
		}
	case kNames:
		return k.elem
	}
	return nil
}
