package units

import "testing"

func BenchmarkParse(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		if _, _, err := Parse("\u2212174 dBm/Hz"); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkAddLevels(b *testing.B) {
	n0, bw := mustParse(b, "-174 dBm/Hz"), mustParse(b, "50 dBHz")
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Add(n0, bw); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkFormat(b *testing.B) {
	qs := []Q{DBm(14), Lin(0.345, Length), Lin(868e6, Frequency), Num(1.23e-6)}
	b.ReportAllocs()
	for b.Loop() {
		for _, q := range qs {
			_ = q.String()
		}
	}
}
