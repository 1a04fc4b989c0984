package output

import (
	"lidscope/vocab"
)

// TimeAxisClimatology is the time_axis global attribute of a run over a
// 12-month climatology.
const TimeAxisClimatology = "12-month climatology: the time stamps stand for the calendar months January … December, not for dates"

// quantity is what the output files say about one accumulated quantity: its
// row of the table of names (package vocab).
type quantity = vocab.Quantity

// KnownQuantities lists the quantity names Write accepts, sorted (the
// quantities of the table of names, package vocab).
func KnownQuantities() []string { return vocab.ColumnQuantities() }

// lookupQuantity returns the table entry of name, or an error that lists the
// names the table knows.
func lookupQuantity(name string) (quantity, error) { return vocab.MustLookup(name) }

// QuantityUnits returns the units Write records for a quantity name, e.g.
// "K" for "eis" and "W m-2" for "olr"; ok is false for an unknown name.
func QuantityUnits(name string) (units string, ok bool) { return vocab.Units(name) }
