package calendar

import "errors"

// Sentinel errors wrapped by the errors of this package.
var (
	// ErrUnits marks a time units string that cannot be parsed.
	ErrUnits = errors.New("bad time units")
	// ErrNotCF marks a time units string in a form that CF does not define
	// (no "since", a date written as a number). The time axis of such a file
	// can be declared in the study instead.
	ErrNotCF = errors.New("time units not in CF form")
	// ErrCalendar marks an unknown or unusable calendar name.
	ErrCalendar = errors.New("bad calendar")
	// ErrDate marks a date that does not exist in its calendar.
	ErrDate = errors.New("date not in calendar")
	// ErrRange marks a value that cannot be decoded: NaN, infinite, or a date
	// outside the years this package handles.
	ErrRange = errors.New("time value out of range")
)
