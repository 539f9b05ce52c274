package cell_test

import (
	"fmt"

	"reticle/cell"
)

// The values printed were checked by hand: V = abc·sin β, and
// 1/d² = (h²/a² + l²/c² − 2hl cos β/(ac))/sin²β + k²/b².
func ExampleParse() {
	c, e, err := cell.Parse("monoclinic C a=9.41 b=5.38 c=6.12 beta=102.4(1)")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s, V = %.2f Å³\n", cell.Format(c, e), c.Volume())
	fmt.Printf("d(2 0 -1) = %.4f Å\n", c.D(cell.HKL{2, 0, -1}))
	// Output:
	// monoclinic C a=9.41 b=5.38 c=6.12 beta=102.40(10), V = 302.60 Å³
	// d(2 0 -1) = 4.0924 Å
}

func ExampleReduce() {
	fcc := cell.Must(cell.Cubic, cell.F, 4.0)
	r, _ := cell.Reduce(fcc)
	fmt.Println(r.Cell)
	// Output: triclinic P a=2.82843 b=2.82843 c=2.82843 alpha=60 beta=60 gamma=60
}

func ExampleTwoTheta() {
	// Si 111 with Cu K-alpha1.
	fmt.Printf("%.4f°\n", cell.TwoTheta(5.431/1.7320508, 1.5405929))
	// Output: 28.4420°
}
