package cell

import (
	"math"
	"testing"
)

// TestBragg checks Bragg's law against a worked value: Cu K-alpha1
// (1.5405929 Å) on the Si 111 spacing d = 5.4310/√3 = 3.135589 Å gives
// sin θ = 1.5405929/6.271179 = 0.245662, θ = 14.22098°, 2θ = 28.44197°
// (the textbook Si 111 line sits at 28.44° with Cu K-alpha1; arithmetic with
// the Si cell of NIST SRM 640 series, a ≈ 5.4310 Å, from memory).
func TestBragg(t *testing.T) {
	d := 5.4310 / math.Sqrt(3)
	tt := TwoTheta(d, 1.5405929)
	if math.Abs(tt-28.44197) > 2e-5 {
		t.Errorf("2θ = %.5f, want 28.44197", tt)
	}
	if got := DSpacing(tt, 1.5405929); math.Abs(got-d) > 1e-12 {
		t.Errorf("round trip d = %.9f, want %.9f", got, d)
	}
	if q := QOf(tt, 1.5405929); math.Abs(q-1/(d*d)) > 1e-12 {
		t.Errorf("Q = %g, want %g", q, 1/(d*d))
	}
	if got := TwoThetaOfQ(1/(d*d), 1.5405929); math.Abs(got-tt) > 1e-9 {
		t.Errorf("2θ of Q = %g, want %g", got, tt)
	}
	// Derivatives and uncertainties against numerical differences.
	const s = 0.002
	_, sd := DSpacingESD(tt, s, 1.5405929, 0)
	num := math.Abs(DSpacing(tt+s/2, 1.5405929)-DSpacing(tt-s/2, 1.5405929)) / s * s
	if math.Abs(sd-num)/num > 1e-4 {
		t.Errorf("σd = %g, numerical %g", sd, num)
	}
	_, stt := TwoThetaESD(d, sd, 1.5405929, 0)
	if math.Abs(stt-s)/s > 1e-3 {
		t.Errorf("σ2θ back = %g, want %g", stt, s)
	}
	q := 1 / (d * d)
	const h = 1e-6
	numQ := (TwoThetaOfQ(q+h, 1.5405929) - TwoThetaOfQ(q-h, 1.5405929)) / (2 * h)
	if got := DTwoThetaDQ(q, 1.5405929); math.Abs(got-numQ)/numQ > 1e-6 {
		t.Errorf("d2θ/dQ = %g, numerical %g", got, numQ)
	}
	if !math.IsNaN(TwoTheta(0.5, 1.5405929)) || !math.IsNaN(DSpacing(0, 1)) {
		t.Error("impossible reflections must give NaN")
	}
}

// TestAtWavelength: the K-alpha2 angle of a K-alpha1 line is that of the
// same d-spacing at the other wavelength (Cu, Hölzer et al. 1997, from
// memory), and the derivative matches a central difference.
func TestAtWavelength(t *testing.T) {
	const l1, l2 = 1.5405929, 1.5444274
	for _, tt := range []float64{20, 44.5, 90, 150} {
		got, d := AtWavelength(tt, l1, l2)
		if want := TwoTheta(DSpacing(tt, l1), l2); math.Abs(got-want) > 1e-9 {
			t.Errorf("2θ %g: %g, want %g", tt, got, want)
		}
		h := 1e-5
		a, _ := AtWavelength(tt+h, l1, l2)
		b, _ := AtWavelength(tt-h, l1, l2)
		if fd := (a - b) / (2 * h); math.Abs(fd-d) > 1e-6 {
			t.Errorf("2θ %g: derivative %g, difference %g", tt, d, fd)
		}
	}
	if got, _ := AtWavelength(179, l1, 1.6); !math.IsInf(got, 1) {
		t.Errorf("beyond 180°: %g", got)
	}
}
