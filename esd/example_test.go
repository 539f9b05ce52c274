package esd_test

import (
	"fmt"

	"reticle/esd"
)

func ExampleFormat() {
	fmt.Println(esd.Format(5.640213, 0.000071))
	fmt.Println(esd.Format(28.44213, 0.0013))
	// Output:
	// 5.64021(7)
	// 28.4421(13)
}

func ExampleParse() {
	v, u, _ := esd.Parse("5.6402(3)")
	fmt.Println(v, u)
	// Output: 5.6402 0.0003
}
