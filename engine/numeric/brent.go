package numeric

import (
	"fmt"
	"math"
)

// ScanPoints is the number of sample points (including both ends) that
// Brent evaluates across [a,b] to look for a sign change when f(a) and f(b)
// do not bracket a root.
const ScanPoints = 200

// MaxBrentIter is the iteration limit of the Brent refinement.
const MaxBrentIter = 200

// DefaultXTol is the relative tolerance Brent uses when xtol <= 0.
const DefaultXTol = 1e-10

// Brent finds x in [a,b] with f(x)=0 by Brent's method (inverse quadratic
// interpolation, secant steps and bisection).
//
// If f(a) and f(b) do not bracket a root, Brent first evaluates f at
// ScanPoints sample points across [a,b] (log-spaced when logScale is true,
// which needs 0 < a < b; linear otherwise) and brackets the first sign
// change; if there is none it returns found=false with a nil error. Sample
// points where f is NaN are skipped by the scan. An error returned by f is
// passed back unchanged (wrapped with the x it failed at); a NaN inside the
// refinement is reported as an error.
//
// The refinement stops when the bracket is no wider than
// xtol·max(|x|, 1e-6·max(|a|,|b|)) — relative to |x| with an absolute floor
// so that a root at zero terminates — or after MaxBrentIter iterations.
// xtol <= 0 means DefaultXTol. a and b may be given in either order.
func Brent(f func(float64) (float64, error), a, b float64, logScale bool, xtol float64) (x float64, found bool, err error) {
	if math.IsNaN(a) || math.IsNaN(b) || math.IsInf(a, 0) || math.IsInf(b, 0) {
		return 0, false, fmt.Errorf("numeric: Brent bracket [%g, %g] is not finite", a, b)
	}
	if a > b {
		a, b = b, a
	}
	if logScale && a <= 0 {
		return 0, false, fmt.Errorf("numeric: Brent log scan needs a > 0, got a=%g", a)
	}
	if xtol <= 0 {
		xtol = DefaultXTol
	}
	eval := func(x float64) (float64, error) {
		y, err := f(x)
		if err != nil {
			return 0, fmt.Errorf("numeric: f(%g): %w", x, err)
		}
		return y, nil
	}

	fa, err := eval(a)
	if err != nil {
		return 0, false, err
	}
	if fa == 0 {
		return a, true, nil
	}
	if a == b {
		return 0, false, nil
	}
	fb, err := eval(b)
	if err != nil {
		return 0, false, err
	}
	if fb == 0 {
		return b, true, nil
	}

	if !brackets(fa, fb) {
		// Scan the interior for the first sign change.
		lo, flo := a, fa
		found := false
		for i := 1; i < ScanPoints; i++ {
			var xi float64
			t := float64(i) / float64(ScanPoints-1)
			switch {
			case i == ScanPoints-1:
				xi = b
			case logScale:
				xi = a * math.Pow(b/a, t)
			default:
				xi = a + (b-a)*t
			}
			var fi float64
			if i == ScanPoints-1 {
				fi = fb
			} else if fi, err = eval(xi); err != nil {
				return 0, false, err
			}
			if math.IsNaN(fi) {
				continue
			}
			if fi == 0 {
				return xi, true, nil
			}
			if math.IsNaN(flo) {
				lo, flo = xi, fi
				continue
			}
			if brackets(flo, fi) {
				a, fa, b, fb = lo, flo, xi, fi
				found = true
				break
			}
			lo, flo = xi, fi
		}
		if !found {
			return 0, false, nil
		}
	}

	floor := 1e-6 * math.Max(math.Abs(a), math.Abs(b))
	if floor == 0 {
		floor = math.SmallestNonzeroFloat64
	}
	x, err = brentRefine(eval, a, b, fa, fb, xtol, floor)
	if err != nil {
		return 0, false, err
	}
	return x, true, nil
}

// brackets reports whether fa and fb have strictly opposite signs.
func brackets(fa, fb float64) bool {
	return (fa < 0 && fb > 0) || (fa > 0 && fb < 0)
}

// brentRefine is the classic zero finder of R. P. Brent, "Algorithms for
// Minimization without Derivatives" (1973), ch. 4, in the arrangement used by
// Press et al., "Numerical Recipes", 3rd ed., §9.3 (zbrent). fa and fb must
// have opposite signs.
func brentRefine(f func(float64) (float64, error), a, b, fa, fb, xtol, floor float64) (float64, error) {
	const eps = 0x1p-52
	c, fc := b, fb
	var d, e float64
	for iter := 0; iter < MaxBrentIter; iter++ {
		if (fb > 0 && fc > 0) || (fb < 0 && fc < 0) {
			c, fc = a, fa
			d = b - a
			e = d
		}
		if math.Abs(fc) < math.Abs(fb) {
			a, b, c = b, c, b
			fa, fb, fc = fb, fc, fb
		}
		tol := xtol * math.Max(math.Abs(b), floor)
		tol1 := 2*eps*math.Abs(b) + 0.5*tol
		xm := 0.5 * (c - b)
		if math.Abs(xm) <= tol1 || fb == 0 {
			return b, nil
		}
		if math.Abs(e) >= tol1 && math.Abs(fa) > math.Abs(fb) {
			// Attempt inverse quadratic interpolation (secant if a == c).
			s := fb / fa
			var p, q float64
			if a == c {
				p = 2 * xm * s
				q = 1 - s
			} else {
				q = fa / fc
				r := fb / fc
				p = s * (2*xm*q*(q-r) - (b-a)*(r-1))
				q = (q - 1) * (r - 1) * (s - 1)
			}
			if p > 0 {
				q = -q
			}
			p = math.Abs(p)
			min1 := 3*xm*q - math.Abs(tol1*q)
			min2 := math.Abs(e * q)
			if 2*p < math.Min(min1, min2) {
				e = d
				d = p / q
			} else {
				d = xm
				e = d
			}
		} else {
			d = xm
			e = d
		}
		a, fa = b, fb
		if math.Abs(d) > tol1 {
			b += d
		} else {
			b += math.Copysign(tol1, xm)
		}
		var err error
		fb, err = f(b)
		if err != nil {
			return 0, err
		}
		if math.IsNaN(fb) {
			return 0, fmt.Errorf("numeric: f(%g) is NaN inside the bracket", b)
		}
	}
	return b, nil
}
