package peaks_test

import (
	"fmt"

	"reticle/scanfile"
)

func ExampleParseRadiation() {
	for _, s := range []string{"Cu", "MoKa1", "1.5406"} {
		r, _ := scanfile.ParseRadiation(s)
		fmt.Printf("%s: %.7f Å, doublet %v\n", r.Name, r.Lambda1, r.Doublet())
	}
	// Output:
	// Cu K-alpha1/K-alpha2: 1.5405929 Å, doublet true
	// Mo K-alpha1: 0.7093171 Å, doublet false
	// 1.5406 Å: 1.5406000 Å, doublet false
}
