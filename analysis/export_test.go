package analysis

// PerturbOnly makes the analyses recompute cones rather than use affine forms, until the
// function it returns is called.
func PerturbOnly() (restore func()) {
	perturbOnly = true
	return func() { perturbOnly = false }
}

// LinearThreshold is the number of inputs from which the affine forms are used.
const LinearThreshold = linearThreshold
