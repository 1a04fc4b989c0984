package calendar

import "testing"

func BenchmarkParseUnits(b *testing.B) {
	for b.Loop() {
		if _, err := ParseUnits("hours since 1900-01-01 00:00:0.0 +05:00", Standard, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}

func benchValues(n int) []float64 {
	v := make([]float64, n)
	for i := range v {
		v[i] = float64(i)*0.25 + 0.125
	}
	return v
}

func benchmarkDecodeAll(b *testing.B, units string, cal Calendar) {
	u, err := ParseUnits(units, cal, Options{CalendarMonths: true})
	if err != nil {
		b.Fatal(err)
	}
	values := benchValues(100_000)
	b.ReportAllocs()
	b.SetBytes(int64(8 * len(values)))
	for b.Loop() {
		if _, err := u.DecodeAll(values); err != nil {
			b.Fatal(err)
		}
	}
}

// 100 000 values per iteration.
func BenchmarkDecodeAllDaysStandard(b *testing.B) {
	benchmarkDecodeAll(b, "days since 1850-01-01", Standard)
}

func BenchmarkDecodeAllHoursNoLeap(b *testing.B) {
	benchmarkDecodeAll(b, "hours since 1850-01-01", NoLeap)
}

func BenchmarkDecodeAllMonths(b *testing.B) {
	benchmarkDecodeAll(b, "months since 1850-01-01", Standard)
}

func BenchmarkEncode(b *testing.B) {
	u, _ := ParseUnits("days since 1850-01-01", Standard, Options{})
	d := Date{2014, 7, 16, 12, 0, 0, 0, Standard}
	for b.Loop() {
		if _, err := u.Encode(d); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkClassifyAxis(b *testing.B) {
	u, _ := ParseUnits("months since 1850-01-01", NoLeap, Options{CalendarMonths: true})
	values := make([]float64, 1980) // 165 years of monthly means
	for i := range values {
		values[i] = float64(i) + 0.5
	}
	dates, _ := u.DecodeAll(values)
	b.ReportAllocs()
	for b.Loop() {
		if k, _ := ClassifyAxis(dates); k != AxisMonthly {
			b.Fatal(k)
		}
	}
}
