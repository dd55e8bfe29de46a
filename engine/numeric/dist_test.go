package numeric

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"
)

func TestParseDist(t *testing.T) {
	for _, d := range []Dist{Normal, Uniform, Triangular} {
		got, err := ParseDist(" " + d.String() + " ")
		if err != nil || got != d {
			t.Errorf("ParseDist(%q) = %v, %v", d.String(), got, err)
		}
	}
	if got, err := ParseDist("Uniform"); err != nil || got != Uniform {
		t.Errorf("case-insensitive parse failed: %v %v", got, err)
	}
	_, err := ParseDist("gaussian")
	if err == nil {
		t.Fatal("ParseDist(gaussian) should fail")
	}
	for _, n := range []string{"normal", "uniform", "triangular"} {
		if !contains(err.Error(), n) {
			t.Errorf("error %q does not list %q", err, n)
		}
	}
}

func contains(s, sub string) bool {
	for i := 0; i+len(sub) <= len(s); i++ {
		if s[i:i+len(sub)] == sub {
			return true
		}
	}
	return false
}

const nSamples = 200000

func sample(seed uint64, d Dist, nom, lo, hi float64) []float64 {
	r := rand.New(rand.NewPCG(seed, 1))
	xs := make([]float64, nSamples)
	for i := range xs {
		xs[i] = Draw(r, d, nom, lo, hi)
	}
	return xs
}

// checkMoments compares the sample mean and standard deviation of xs with
// the reference values. The standard error of the mean is σ/√n; that of the
// sample standard deviation is √((μ₄/σ⁴ − 1)/(4n))·σ, bounded here by
// σ/√n for the light-tailed shapes tested.
func checkMoments(t *testing.T, name string, xs []float64, mean, sd float64) {
	t.Helper()
	m, s := stat.MeanStdDev(xs, nil)
	se := sd / math.Sqrt(float64(len(xs)))
	if math.Abs(m-mean) > 5*se {
		t.Errorf("%s: sample mean %.6g, want %.6g ± %.2g", name, m, mean, 5*se)
	}
	if math.Abs(s-sd) > 5*se {
		t.Errorf("%s: sample σ %.6g, want %.6g ± %.2g", name, s, sd, 5*se)
	}
}

// TestDrawAgainstGonum checks Sigma exactly and Draw statistically against
// the moments of gonum's stat/distuv distributions.
func TestDrawAgainstGonum(t *testing.T) {
	// Normal with ±3σ limits: nom 10, limits 7..13 → σ = 1.
	n := distuv.Normal{Mu: 10, Sigma: 1}
	if got := Sigma(Normal, 10, 7, 13); math.Abs(got-n.StdDev()) > 1e-15 {
		t.Errorf("Sigma(Normal) = %g, distuv %g", got, n.StdDev())
	}
	checkMoments(t, "normal", sample(1, Normal, 10, 7, 13), n.Mean(), n.StdDev())

	u := distuv.Uniform{Min: -2, Max: 5}
	if got := Sigma(Uniform, 0, -2, 5); math.Abs(got-u.StdDev()) > 1e-15 {
		t.Errorf("Sigma(Uniform) = %g, distuv %g", got, u.StdDev())
	}
	if got := Mean(Uniform, 0, -2, 5); math.Abs(got-u.Mean()) > 1e-15 {
		t.Errorf("Mean(Uniform) = %g, distuv %g", got, u.Mean())
	}
	xs := sample(2, Uniform, 0, -2, 5)
	checkMoments(t, "uniform", xs, u.Mean(), u.StdDev())
	checkRange(t, "uniform", xs, -2, 5)

	// Asymmetric triangle: a=-1, mode c=0.5, b=4.
	tr := distuv.NewTriangle(-1, 4, 0.5, nil)
	if got := Sigma(Triangular, 0.5, -1, 4); math.Abs(got-tr.StdDev()) > 1e-14 {
		t.Errorf("Sigma(Triangular) = %.17g, distuv %.17g", got, tr.StdDev())
	}
	if got := Mean(Triangular, 0.5, -1, 4); math.Abs(got-tr.Mean()) > 1e-14 {
		t.Errorf("Mean(Triangular) = %g, distuv %g", got, tr.Mean())
	}
	xs = sample(3, Triangular, 0.5, -1, 4)
	checkMoments(t, "triangular", xs, tr.Mean(), tr.StdDev())
	checkRange(t, "triangular", xs, -1, 4)
	// Mode check via the CDF: P(X <= c) = (c−a)/(b−a) = 0.3.
	checkFrac(t, "triangular P(X<=mode)", xs, 0.5, tr.CDF(0.5))
}

// TestDrawSplitNormal checks the asymmetric normal against the two-piece
// normal moments (K. F. Wallis, "The two-piece normal, binormal, or double
// Gaussian distribution", Statistical Science 29(1), 2014):
// mean μ + √(2/π)(σ₂−σ₁), variance (1−2/π)(σ₂−σ₁)² + σ₁σ₂,
// and P(X < μ) = σ₁/(σ₁+σ₂).
func TestDrawSplitNormal(t *testing.T) {
	nom, lo, hi := 0.0, -1.5, 6.0 // σ₁ = 0.5, σ₂ = 2
	s1, s2 := 0.5, 2.0
	wantMean := nom + math.Sqrt(2/math.Pi)*(s2-s1)
	wantSD := math.Sqrt((1-2/math.Pi)*(s2-s1)*(s2-s1) + s1*s2)
	if got := Sigma(Normal, nom, lo, hi); math.Abs(got-wantSD) > 1e-15 {
		t.Errorf("Sigma(split normal) = %g, want %g", got, wantSD)
	}
	if got := Mean(Normal, nom, lo, hi); math.Abs(got-wantMean) > 1e-15 {
		t.Errorf("Mean(split normal) = %g, want %g", got, wantMean)
	}
	xs := sample(4, Normal, nom, lo, hi)
	checkMoments(t, "split normal", xs, wantMean, wantSD)
	checkFrac(t, "split normal P(X<nom)", xs, nom, s1/(s1+s2))

	// One-sided: all mass above nom (half-normal with σ = 1).
	xs = sample(5, Normal, 0, 0, 3)
	checkMoments(t, "half normal", xs, math.Sqrt(2/math.Pi), math.Sqrt(1-2/math.Pi))
	checkRange(t, "half normal", xs, 0, math.Inf(1))
}

func TestDrawDegenerate(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	for _, d := range []Dist{Normal, Uniform, Triangular} {
		if got := Draw(r, d, 3.5, 3.5, 3.5); got != 3.5 {
			t.Errorf("%v: Draw at a point = %g", d, got)
		}
		if got := Sigma(d, 3.5, 3.5, 3.5); got != 0 {
			t.Errorf("%v: Sigma at a point = %g", d, got)
		}
	}
}

func checkRange(t *testing.T, name string, xs []float64, lo, hi float64) {
	t.Helper()
	for _, x := range xs {
		if x < lo || x > hi {
			t.Fatalf("%s: sample %g outside [%g, %g]", name, x, lo, hi)
		}
	}
}

// checkFrac compares the fraction of xs below x with p, within five binomial
// standard errors √(p(1−p)/n).
func checkFrac(t *testing.T, name string, xs []float64, x, p float64) {
	t.Helper()
	k := 0
	for _, v := range xs {
		if v <= x {
			k++
		}
	}
	got := float64(k) / float64(len(xs))
	se := math.Sqrt(p * (1 - p) / float64(len(xs)))
	if math.Abs(got-p) > 5*se {
		t.Errorf("%s = %.5f, want %.5f ± %.2g", name, got, p, 5*se)
	}
}
