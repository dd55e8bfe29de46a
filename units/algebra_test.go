package units

import (
	"errors"
	"math"
	"strings"
	"testing"
)

type binop struct {
	name string
	f    func(a, b Q) (Q, error)
}

var (
	opAdd = binop{"+", Add}
	opSub = binop{"-", Sub}
	opMul = binop{"*", Mul}
	opDiv = binop{"/", Div}
)

// Every row of the table in SPEC §3. The expected value is the decibel arithmetic done by hand
// in the result unit.
func TestSpecTable(t *testing.T) {
	ok := []struct {
		a  string
		op binop
		b  string
		// result shown in unit, with value v in that unit
		unit string
		v    float64
	}{
		{"14 dBm", opAdd, "3 dB", "dBm", 17},
		{"14 dBm", opAdd, "2.15 dBi", "dBm", 16.15},
		{"14 dBm", opSub, "0.4 dB", "dBm", 13.6},
		{"14 dBm", opAdd, "1 dBd", "dBm", 14 + 1 + 2.15},
		{"14 dBm", opSub, "-90 dBm", "dB", 104},
		{"14 dBW", opSub, "14 dBm", "dB", 30}, // 1 W = 1000 mW = 30 dB
		{"3 dB", opAdd, "4 dB", "dB", 7},
		{"3 dB", opSub, "4 dB", "dB", -1},
		{"3 dBi", opAdd, "4 dBi", "dB", 7},
		{"-174 dBm/Hz", opAdd, "50 dBHz", "dBm", -124},
		{"-174 dBm/Hz", opAdd, "50 dB-Hz", "dBm", -124},
		{"-124 dBm", opSub, "50 dBHz", "dBm/Hz", -174},
		{"10 dBW", opSub, "24.6 dBK", "dBW/K", 10 - 24.6},
		{"2 × 3 dB", opMul, "", "dB", 6},
		{"3 dB", opMul, "2", "dB", 6},
		{"0.3 dB/km", opMul, "20 km", "dB", 6},
		{"0.3 dB/m", opMul, "20 m", "dB", 6},
		{"3 dB/100m", opMul, "50 m", "dB", 1.5},
		{"20 m", opMul, "0.3 dB/m", "dB", 6}, // either order
		{"6 dB", opDiv, "2", "dB", 3},
		{"6 dB", opDiv, "20 m", "dB/m", 0.3},
		{"6 dB", opDiv, "3 dB", "", 2},
		{"0.6 dB/m", opDiv, "2", "dB/m", 0.3},
		{"40 dBuV", opSub, "20 dBuV", "dB", 20},
		{"40 dBuV/m", opSub, "6 dB", "dBuV/m", 34},
		{"0 dBV", opSub, "0 dBuV", "dB", 120},
		// Carrier-relative levels (issue 14): phase noise L(f) in dBc/Hz integrated over a
		// channel is a ratio to the carrier; a level plus a carrier ratio is a level.
		{"-110 dBc/Hz", opAdd, "50 dBHz", "dBc", -60},
		{"-20 dBm", opAdd, "-60 dBc", "dBm", -80},
		{"-60 dBc", opAdd, "3 dB", "dBc", -57},
		{"-60 dBc", opSub, "-40 dBc", "dB", -20},
		{"-150 dBm/Hz", opSub, "-10 dBm", "dBc/Hz", -140}, // noise density over carrier power
		{"-60 dBc", opSub, "50 dBHz", "dBc/Hz", -110},
		{"10 dBK", opAdd, "20 dBHz", "", 0}, // K·Hz has no decibel unit: error checked below
	}
	for _, c := range ok {
		if c.unit == "" && c.op.name != "/" {
			continue
		}
		var a, b Q
		if strings.HasPrefix(c.a, "2 × ") {
			a, b = Num(2), mustParse(t, strings.TrimPrefix(c.a, "2 × "))
		} else {
			a, b = mustParse(t, c.a), mustParse(t, c.b)
		}
		r, err := c.op.f(a, b)
		if err != nil {
			t.Errorf("%s %s %s: %v", c.a, c.op.name, c.b, err)
			continue
		}
		if got := r.UnitName(); got != c.unit {
			t.Errorf("%s %s %s: unit %q, want %q", c.a, c.op.name, c.b, got, c.unit)
		}
		got, err := r.In(mustUnit(t, c.unit))
		if err != nil || !near(got, c.v, 1e-9) {
			t.Errorf("%s %s %s = %v %s (%v), want %v", c.a, c.op.name, c.b, got, c.unit, err, c.v)
		}
	}

	// EIRP − L + G/T − k = C/N0 (SPEC §3): dBW + dB/K − dBW/K/Hz → dBHz.
	cn0 := mustParse(t, "20 dBW")
	var err error
	for _, step := range []struct {
		op binop
		s  string
	}{{opSub, "180 dB"}, {opAdd, "10 dB/K"}, {opSub, "-228.6 dBW/K/Hz"}} {
		if cn0, err = step.op.f(cn0, mustParse(t, step.s)); err != nil {
			t.Fatalf("C/N0 chain at %s: %v", step.s, err)
		}
	}
	if cn0.UnitName() != "dBHz" || !near(cn0.V, 20-180+10+228.6, 1e-9) {
		t.Errorf("C/N0 = %v, want 78.60 dBHz", cn0)
	}
	// Eb/N0 = C/N0 − 10·log10(Rb): bit/s has the dimension of Hz, so the result is in dB.
	rb, err := mustParse(t, "38.4 kbit/s").ToLevel()
	if err != nil {
		t.Fatal(err)
	}
	ebn0, err := Sub(cn0, rb)
	if err != nil || ebn0.UnitName() != "dB" || !near(ebn0.V, 78.6-db10(38400), 1e-9) {
		t.Errorf("Eb/N0 = %v, %v", ebn0, err)
	}

	bad := []struct {
		a    string
		op   binop
		b    string
		is   error
		hint []string // words the hint must contain
	}{
		{"14 dBm", opAdd, "10 dBm", ErrLevel, []string{"psum"}},
		{"14 dBW", opAdd, "10 dBm", ErrLevel, []string{"psum"}},
		{"14 dBm", opMul, "2", ErrLevel, nil},
		{"2", opMul, "14 dBm", ErrLevel, nil},
		{"3 dB", opMul, "3 dB", ErrLevel, nil},
		{"1 W", opAdd, "3 dB", ErrLogLinear, []string{"dbm()", "watts()"}},
		{"14 dBm", opAdd, "25 mW", ErrLogLinear, []string{"dbm()", "watts()"}},
		{"14 dBm", opSub, "25 mW", ErrLogLinear, []string{"dbm()", "watts()"}},
		{"3", opAdd, "3 dB", ErrLogLinear, []string{"3 dB"}},
		{"3 dB", opSub, "3", ErrLogLinear, []string{"3 dB"}},
		{"1 m", opAdd, "1 s", ErrDimension, nil},
		{"1 dB/m", opAdd, "3 dB", ErrLevel, []string{"length"}},
		{"10 dBK", opAdd, "20 dBHz", ErrLevel, nil},
		{"10 dBuV", opAdd, "10 dBm", ErrLevel, nil},
		{"3 dB", opMul, "2 m", ErrLevel, nil},
		{"1 dB/m", opMul, "1 dB/m", ErrLevel, nil},
		{"1 dB/m", opMul, "1 s", ErrLevel, []string{"length"}},
		{"14 dBm", opDiv, "2", ErrLevel, nil},
		{"2", opDiv, "3 dB", ErrLevel, nil},
		{"2 m", opDiv, "3 dB", ErrLevel, nil},
	}
	for _, c := range bad {
		a, b := mustParse(t, c.a), mustParse(t, c.b)
		r, err := c.op.f(a, b)
		if err == nil {
			t.Errorf("%s %s %s = %v, want an error", c.a, c.op.name, c.b, r)
			continue
		}
		if !errors.Is(err, c.is) {
			t.Errorf("%s %s %s: %v is not %v", c.a, c.op.name, c.b, err, c.is)
		}
		var ue *Error
		if !errors.As(err, &ue) {
			t.Fatalf("%T is not *Error", err)
		}
		for _, w := range c.hint {
			if !strings.Contains(ue.Hint, w) {
				t.Errorf("%s %s %s: hint %q does not mention %q", c.a, c.op.name, c.b, ue.Hint, w)
			}
		}
		if !strings.Contains(err.Error(), ue.Msg) {
			t.Errorf("Error() %q lacks the message", err.Error())
		}
	}
}

// 20·log10 for root-power quantities, from the definition of the decibel for field quantities
// (IEC 60027-3): 1 V = 10^6 µV = 120 dBuV.
func TestRootPower(t *testing.T) {
	v, err := mustParse(t, "1 V").In(mustUnit(t, "dBuV"))
	if err != nil || !near(v, 20*math.Log10(1/1e-6), 1e-12) {
		t.Errorf("1 V in dBuV = %v, %v; want 120", v, err)
	}
	l, err := mustParse(t, "2 V").ToLevel()
	if err != nil || !near(l.V, 20*math.Log10(2), 1e-12) {
		t.Errorf("ToLevel(2 V) = %v, %v", l.V, err)
	}
	back := mustParse(t, "26 dBuV").Linear()
	if back.D != Voltage || !near(back.V, 1e-6*math.Pow(10, 26.0/20), 1e-12) {
		t.Errorf("26 dBuV linear = %v", back)
	}
	// dBuV − dBuV is a ratio in dB: 40 dBuV / 20 dBuV = 10× in voltage = 20 dB.
	r, err := Sub(mustParse(t, "40 dBuV"), mustParse(t, "20 dBuV"))
	if err != nil || !r.IsRatio() || r.V != 20 {
		t.Errorf("40 dBuV - 20 dBuV = %v, %v", r, err)
	}
	// Field strength in dBuV/m reads back in V/m.
	e, err := mustParse(t, "40 dBuV/m").In(mustUnit(t, "V/m"))
	if err != nil || !near(e, 100e-6, 1e-12) {
		t.Errorf("40 dBuV/m in V/m = %v, %v; want 1e-4", e, err)
	}
}

func TestCompare(t *testing.T) {
	// 20 mW = 10·log10(20) = 13.0103 dBm (0 dBm = 1 mW by definition).
	if db10(20) <= 13 || db10(20) >= 14 {
		t.Fatal("test premise: 20 mW lies between 13 and 14 dBm")
	}
	cases := []struct {
		a, b string
		want int
	}{
		{"14 dBm", "20 mW", 1},
		{"13 dBm", "20 mW", -1},
		{"20 mW", "14 dBm", -1},
		{"20 mW", "13 dBm", 1},
		{"30 dBm", "1 W", 0},
		{"0 dBW", "30 dBm", 0},
		{"3 dB", "2 dB", 1},
		{"2 dBi", "2.15 dB", -1},
		{"1 km", "999 m", 1},
		{"1 mi", "1 nmi", -1},
		{"120 dBuV", "1 V", 0},
		{"1 dB/m", "1 dB/km", 1},
		{"25 dBK", "290 K", 1}, // 290 K = 10·log10(290) = 24.62 dBK
		{"24.6 dBK", "290 K", -1},
		{"-174 dBm/Hz", "-204 dBW/Hz", 0},
		{"2", "1", 1},
	}
	for _, c := range cases {
		got, err := Compare(mustParse(t, c.a), mustParse(t, c.b))
		if err != nil || got != c.want {
			t.Errorf("Compare(%s, %s) = %d, %v; want %d", c.a, c.b, got, err, c.want)
		}
	}
	bad := []struct {
		a, b string
		is   error
	}{
		{"3", "3 dB", ErrLogLinear},
		{"3 dB", "0", ErrLogLinear},
		{"3 dBm", "3 dB", ErrDimension},
		{"1 m", "1 s", ErrDimension},
		{"1 dB/m", "1 m", ErrDimension},
		{"3 dB", "2", ErrLogLinear},
	}
	for _, c := range bad {
		if _, err := Compare(mustParse(t, c.a), mustParse(t, c.b)); !errors.Is(err, c.is) {
			t.Errorf("Compare(%s, %s): err %v, want %v", c.a, c.b, err, c.is)
		}
	}
	if _, err := Compare(Num(math.NaN()), Num(1)); !errors.Is(err, ErrDomain) {
		t.Errorf("Compare(NaN, 1): %v, want ErrDomain", err)
	}
}

func TestNeg(t *testing.T) {
	for _, s := range []string{"14 dBm", "24.6 dBK", "-174 dBm/Hz", "40 dBuV"} {
		if _, err := Neg(mustParse(t, s)); !errors.Is(err, ErrLevel) {
			t.Errorf("Neg(%s): %v, want ErrLevel", s, err)
		}
	}
	for _, c := range []struct {
		s    string
		want float64
	}{{"3 dB", -3}, {"2 dBi", -2}, {"0.3 dB/m", -0.3}, {"5 m", -5}, {"7", -7}} {
		r, err := Neg(mustParse(t, c.s))
		if err != nil || r.V != c.want || r.UnitName() != mustParse(t, c.s).UnitName() {
			t.Errorf("Neg(%s) = %v, %v", c.s, r, err)
		}
	}
}

func TestPowSqrt(t *testing.T) {
	r, err := Sqrt(mustParse(t, "4 m^2"))
	if err != nil || r.D != Length || r.V != 2 {
		t.Errorf("sqrt(4 m^2) = %v, %v", r, err)
	}
	r, err = Sqrt(mustParse(t, "9 W/Hz"))
	if err == nil {
		t.Errorf("sqrt(9 W/Hz) = %v, want an error (odd powers)", r)
	}
	if _, err = Sqrt(mustParse(t, "1 m")); !errors.Is(err, ErrDimension) {
		t.Errorf("sqrt(1 m): %v, want ErrDimension", err)
	}
	if _, err = Sqrt(mustParse(t, "3 dB")); !errors.Is(err, ErrLevel) {
		t.Errorf("sqrt(3 dB): %v, want ErrLevel", err)
	}
	r, err = Sqrt(mustParse(t, "16 1/s^2"))
	if err != nil || r.D != Frequency || r.V != 4 {
		t.Errorf("sqrt(16 1/s^2) = %v, %v", r, err)
	}
	pow := []struct {
		a, b string
		d    Dim
		v    float64
	}{
		{"3 m", "2", Area, 9},
		{"2 m", "-1", Length.Pow(-1), 0.5},
		{"2", "0.5", None, math.Sqrt2},
		{"10 s", "0", None, 1},
		{"3 dB", "1", None, 3}, // x ** 1 is x
	}
	for _, c := range pow {
		r, err := Pow(mustParse(t, c.a), mustParse(t, c.b))
		if err != nil || r.D != c.d || !near(r.V, c.v, 1e-12) {
			t.Errorf("Pow(%s, %s) = %v, %v", c.a, c.b, r, err)
		}
	}
	badPow := []struct {
		a, b string
		is   error
	}{
		{"2 m", "0.5", ErrDimension},
		{"2 m", "9", ErrDimension},
		{"2 m", "1 m", ErrDimension},
		{"2", "3 dB", ErrDimension},
		{"3 dB", "2", ErrLevel},
		{"14 dBm", "2", ErrLevel},
	}
	for _, c := range badPow {
		if _, err := Pow(mustParse(t, c.a), mustParse(t, c.b)); !errors.Is(err, c.is) {
			t.Errorf("Pow(%s, %s): %v, want %v", c.a, c.b, err, c.is)
		}
	}
	if _, err := Pow(mustParse(t, "2 m"), Num(math.NaN())); err == nil {
		t.Error("Pow(2 m, NaN): no error")
	}
}

// Dimension exponents are small integers; arithmetic must refuse to overflow them instead of
// wrapping round to a wrong dimension.
func TestDimensionOverflow(t *testing.T) {
	big := Lin(1, Dim{dimL: 100})
	if r, err := Mul(big, big); !errors.Is(err, ErrDimension) {
		t.Errorf("m^100 * m^100 = %v (dimension %v), %v; want ErrDimension", r, r.D, err)
	}
	if r, err := Div(big, Lin(1, Dim{dimL: -100})); !errors.Is(err, ErrDimension) {
		t.Errorf("m^100 / m^-100 = %v, %v; want ErrDimension", r, err)
	}
	q := Lin(2, Length)
	var err error
	for i := 0; i < 4 && err == nil; i++ {
		q, err = Pow(q, Num(8))
	}
	if err == nil {
		t.Errorf("((m^8)^8)^8... = %v, want an error", q.D)
	}
	// At the bound it still works and the name parses back.
	r, err := Mul(Lin(1, Dim{dimL: 8}), Lin(1, Dim{dimL: 8, dimT: -3}))
	if err != nil {
		t.Fatalf("m^8 * m^8/s^3: %v", err)
	}
	if u, err := ParseUnit(r.UnitName()); err != nil || u.D != r.D {
		t.Errorf("ParseUnit(%q) = %v, %v", r.UnitName(), u, err)
	}
	// A compound unit cannot overflow either.
	if _, err := ParseUnit(strings.Repeat("m^8*", 15) + "m^8"); err == nil {
		t.Error("ParseUnit of m^128: no error")
	}
	// Nor can its scale: (1e12)^8 four times is 1e384.
	if _, err := ParseUnit("Tm^8*Ts^8*TA^8*TK^8"); err == nil {
		t.Error("ParseUnit of a unit with an infinite scale: no error")
	}
}

func TestConversions(t *testing.T) {
	// 14 dBm = 10^(14/10) mW = 25.12 mW (0 dBm = 1 mW by definition).
	p := mustParse(t, "14 dBm")
	mw := mustUnit(t, "mW")
	if v, err := p.In(mw); err != nil || !near(v, math.Pow(10, 1.4), 1e-12) {
		t.Errorf("14 dBm in mW = %v, %v", v, err)
	}
	if got := p.Format(mw); got != "25.12 mW" {
		t.Errorf("14 dBm formatted in mW = %q", got)
	}
	// 0.1 W = 100 mW = 20 dBm.
	w := mustParse(t, "0.1 W")
	if got := w.Format(mustUnit(t, "dBm")); got != "20.00 dBm" {
		t.Errorf("0.1 W formatted in dBm = %q", got)
	}
	if got := w.Format(mustUnit(t, "dBW")); got != "-10.00 dBW" {
		t.Errorf("0.1 W formatted in dBW = %q", got)
	}
	d := mustParse(t, "2.4 km")
	if got := d.Format(mustUnit(t, "m")); got != "2400 m" {
		t.Errorf("2.4 km in m = %q", got)
	}
	if got := d.Format(mustUnit(t, "mi")); got != FormatNum(2400/1609.344)+" mi" {
		t.Errorf("2.4 km in mi = %q", got)
	}
	if got := mustParse(t, "2400 m").Format(mustUnit(t, "km")); got != "2.4 km" {
		t.Errorf("2400 m in km = %q", got)
	}
	// Format falls back to the quantity's own unit when it cannot be shown in the one asked.
	if got := d.Format(mustUnit(t, "s")); got != "2.4 km" {
		t.Errorf("2.4 km in s = %q, want the fallback", got)
	}
	if got := d.Format(nil); got != "2.4 km" {
		t.Errorf("Format(nil) = %q", got)
	}
	if got := Num(0.5).Format(mustUnit(t, "%")); got != "50 %" {
		t.Errorf("0.5 in %% = %q", got)
	}
	if _, err := d.In(mustUnit(t, "dBm")); !errors.Is(err, ErrDimension) {
		t.Errorf("km in dBm: %v", err)
	}
	if _, err := mustParse(t, "1 dB/m").In(mustUnit(t, "dB")); err == nil {
		t.Error("dB/m in dB: no error")
	}
	if _, err := mustParse(t, "0 W").In(mustUnit(t, "dBm")); !errors.Is(err, ErrDomain) {
		t.Errorf("0 W in dBm: %v, want ErrDomain", err)
	}

	// As changes the form and takes the unit's display family.
	q, err := p.As(mustUnit(t, "W"))
	if err != nil || q.K != Linear || !near(q.V, math.Pow(10, 1.4)*1e-3, 1e-12) || q.UnitName() != "W" {
		t.Errorf("14 dBm as W = %+v, %v", q, err)
	}
	q, err = w.As(mustUnit(t, "dBW"))
	if err != nil || q.K != Level || !near(q.V, -10, 1e-12) || q.String() != "-10.00 dBW" {
		t.Errorf("0.1 W as dBW = %v, %v", q, err)
	}
	q, err = p.As(mustUnit(t, "dBW"))
	if err != nil || q.String() != "-16.00 dBW" {
		t.Errorf("14 dBm as dBW = %v, %v", q, err)
	}
	if _, err := p.As(mustUnit(t, "dB/m")); !errors.Is(err, ErrDimension) {
		t.Errorf("dBm as dB/m: %v", err)
	}
	if _, err := d.As(mustUnit(t, "dBm")); !errors.Is(err, ErrDimension) {
		t.Errorf("km as dBm: %v", err)
	}
	// 290 K = 10·log10(290) = 24.62 dBK.
	q, err = mustParse(t, "290 K").As(mustUnit(t, "dBK"))
	if err != nil || !near(q.V, db10(290), 1e-12) || q.String() != "24.62 dBK" {
		t.Errorf("290 K as dBK = %v, %v", q, err)
	}
	// A level exists only for dimensions that have a decibel unit.
	if l, err := mustParse(t, "5 m").ToLevel(); err == nil {
		t.Errorf("ToLevel(5 m) = %v (%q), want an error", l, l.UnitName())
	}
	for _, s := range []string{"0 W", "-1 W", "0"} {
		if _, err := mustParse(t, s).ToLevel(); !errors.Is(err, ErrDomain) {
			t.Errorf("ToLevel(%s): %v, want ErrDomain", s, err)
		}
	}
}

// Decibel facts every budget leans on.
func TestDecibelFacts(t *testing.T) {
	// 3 dB ≈ ×2 in power: 10·log10(2) = 3.0103 (common practice, no source).
	two, err := Num(2).ToLevel()
	if err != nil || !near(two.V, 3.0103, 1e-5) || two.String() != "3.01 dB" {
		t.Errorf("db(2) = %v, %v", two, err)
	}
	if r := mustParse(t, "3 dB").Linear().V; math.Abs(r-2) > 0.01 {
		t.Errorf("lin(3 dB) = %v, want ≈ 2", r)
	}
	// 10 dB = ×10 (definition of the decibel, IEC 60027-3).
	if r := mustParse(t, "10 dB").Linear(); !r.IsNumber() || !near(r.V, 10, 1e-12) {
		t.Errorf("lin(10 dB) = %v", r)
	}
	// 0 dBm = 1 mW (definition); 30 dBm = 1 W.
	wu := mustUnit(t, "W")
	if v, _ := mustParse(t, "0 dBm").In(wu); !near(v, 1e-3, 1e-12) {
		t.Errorf("0 dBm = %v W", v)
	}
	if v, _ := mustParse(t, "30 dBm").In(wu); !near(v, 1, 1e-12) {
		t.Errorf("30 dBm = %v W", v)
	}
	// kT0 at 290 K is −174 dBm/Hz: k = 1.380649e-23 J/K exactly (SI 2019 redefinition).
	const k = 1.380649e-23
	kdB := Q{V: db10(k), D: Boltzmann, K: Level, F: flavorWatt}
	if kdB.String() != "-228.60 dBW/K/Hz" {
		t.Errorf("k = %v, want -228.60 dBW/K/Hz", kdB)
	}
	t0, err := mustParse(t, "290 K").ToLevel()
	if err != nil {
		t.Fatal(err)
	}
	n0, err := Add(kdB, t0)
	if err != nil {
		t.Fatal(err)
	}
	v, err := n0.In(mustUnit(t, "dBm/Hz"))
	want := db10(k*290) + 30
	if err != nil || !near(v, want, 1e-12) || math.Abs(v-(-174)) > 0.03 {
		t.Errorf("kT0 = %v dBm/Hz, %v; want %v ≈ -174", v, err, want)
	}
	// The same from the written constants: −228.6 dBW/K/Hz + 24.6 dBK = −204 dBW/Hz = −174 dBm/Hz.
	n0, err = Add(mustParse(t, "-228.6 dBW/K/Hz"), mustParse(t, "24.6 dBK"))
	if err != nil || n0.UnitName() != "dBW/Hz" {
		t.Fatalf("k + T0 = %v, %v", n0, err)
	}
	if v, _ := n0.In(mustUnit(t, "dBm/Hz")); !near(v, -174, 1e-12) {
		t.Errorf("k + T0 = %v dBm/Hz", v)
	}
	// Noise in 100 kHz: −174 dBm/Hz + 50 dBHz = −124 dBm.
	bw, _ := mustParse(t, "100 kHz").ToLevel()
	if bw.String() != "50.00 dBHz" {
		t.Errorf("100 kHz = %v, want 50.00 dBHz", bw)
	}
}
