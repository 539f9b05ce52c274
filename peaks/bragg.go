package peaks

import (
	"math"

	"reticle/cell"
)

const deg = math.Pi / 180

// Companion returns the angle in degrees 2θ at which a line of wavelength
// lambdaB appears for the reflection seen at twoTheta with lambdaA (the
// same d-spacing by Bragg's law), NaN when it falls beyond 180°.
func Companion(twoTheta, lambdaA, lambdaB float64) float64 {
	return cell.TwoTheta(cell.DSpacing(twoTheta, lambdaA), lambdaB)
}
