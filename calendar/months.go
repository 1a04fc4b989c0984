package calendar

// monthAbbrev are the English three-letter month abbreviations (common
// practice).
var monthAbbrev = [12]string{"Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"}

// MonthAbbrev returns the three-letter English name of month m (1–12),
// e.g. "Jan" for 1: the label of a calendar month on a climatological axis.
// It returns "" for a month outside 1–12.
func MonthAbbrev(m int) string {
	if m < 1 || m > 12 {
		return ""
	}
	return monthAbbrev[m-1]
}
