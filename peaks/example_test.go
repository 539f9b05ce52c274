package peaks_test

import (
	"fmt"

	"reticle/peaks"
)

func ExampleFormatESD() {
	fmt.Println(peaks.FormatESD(5.640213, 0.000071))
	fmt.Println(peaks.FormatESD(28.44213, 0.0013))
	// Output:
	// 5.64021(7)
	// 28.4421(13)
}

func ExampleDSpacingESD() {
	a, _ := peaks.LookupAnode("Cu")
	d, sd := peaks.DSpacingESD(28.442, 0.002, a.KAlpha1, 0)
	fmt.Println(peaks.FormatESD(d, sd), "Å")
	// Output: 3.1356(2) Å
}

func ExampleParseRadiation() {
	for _, s := range []string{"Cu", "MoKa1", "1.5406"} {
		r, _ := peaks.ParseRadiation(s)
		fmt.Printf("%s: %.7f Å, doublet %v\n", r.Name, r.Lambda1, r.Doublet())
	}
	// Output:
	// Cu K-alpha1/K-alpha2: 1.5405929 Å, doublet true
	// Mo K-alpha1: 0.7093171 Å, doublet false
	// 1.5406 Å: 1.5406000 Å, doublet false
}
