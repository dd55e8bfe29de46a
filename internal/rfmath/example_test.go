package rfmath_test

import (
	"fmt"

	"github.com/rfledger/rfledger/internal/rfmath"
)

func ExampleFSPL() {
	// 1 km at 1 GHz.
	fmt.Printf("%.2f dB\n", rfmath.FSPL(1e3, 1e9))
	// Output: 92.45 dB
}

func ExampleHata() {
	loss, notes, err := rfmath.Hata(900e6, 5e3, 30, 1.5, "urban")
	fmt.Printf("%.1f dB %v %v\n", loss, notes, err)
	_, notes, _ = rfmath.Hata(3e9, 5e3, 30, 1.5, "urban")
	fmt.Println(notes[0])
	// Output:
	// 151.0 dB [] <nil>
	// frequency 3 GHz is outside the model's 150–1500 MHz
}

func ExampleEbN0For() {
	x, _ := rfmath.EbN0For("bpsk", 1e-5)
	fmt.Printf("%.2f dB\n", x)
	_, err := rfmath.EbN0For("gmsk", 1e-5)
	fmt.Println(err)
	// Output:
	// 9.59 dB
	// rfmath: unknown modulation scheme "gmsk" (valid: bpsk, qpsk, dbpsk, 8psk, 16qam, 64qam, fsk, fsk-nc, ook, ook-nc)
}

func ExampleCascadeChain() {
	c := rfmath.CascadeChain([]rfmath.Stage{
		{Name: "lna", GainDB: 20, NFDB: 1, IIP3: 0, HasIIP3: true},
		{Name: "mixer", GainDB: -7, NFDB: 10, IIP3: 10, HasIIP3: true},
	})
	fmt.Printf("G %.1f dB, NF %.2f dB, IIP3 %.2f dBm, OIP3 %.2f dBm\n", c.GainDB, c.NFDB, c.IIP3, c.OIP3)
	// Output: G 13.0 dB, NF 1.30 dB, IIP3 -10.41 dBm, OIP3 2.59 dBm
}
