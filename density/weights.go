package density

// An Element is a chemical element with its standard atomic weight.
type Element struct {
	Number int     // atomic number Z
	Symbol string  // e.g. "Fe"
	Weight float64 // standard (or conventional) atomic weight, g/mol
	// Uncertainty of Weight, g/mol: the IUPAC uncertainty in the last
	// digits; for elements whose weight IUPAC gives as an interval, the
	// largest distance from the conventional value to the interval's ends
	// (a bound, so molar masses of such elements are conservative); zero
	// for elements without a standard atomic weight.
	Uncertainty float64
	// Interval marks weights that IUPAC gives as an interval (the
	// conventional value is used).
	Interval bool
	// NoStandard marks radioactive elements without a standard atomic
	// weight: Weight is then the mass number of a long-lived isotope, as
	// periodic tables print in brackets.
	NoStandard bool
}

// Elements lists hydrogen through plutonium with the IUPAC 2021 standard
// atomic weights (Prohaska et al., Pure Appl. Chem. 94 (2022) 573,
// "Standard atomic weights of the elements 2021"), conventional values for
// interval elements (IUPAC's Table 3 of conventional weights), all
// recalled from memory. Deuterium (D, the ²H atom) is added after Pu
// with the atomic mass 2.01410177812(12) u (AME2016, from memory).
var Elements = []Element{
	{1, "H", 1.008, 0.00016, true, false},
	{2, "He", 4.002602, 0.000002, false, false},
	{3, "Li", 6.94, 0.057, true, false},
	{4, "Be", 9.0121831, 0.0000005, false, false},
	{5, "B", 10.81, 0.011, true, false},
	{6, "C", 12.011, 0.0014, true, false},
	{7, "N", 14.007, 0.00057, true, false},
	{8, "O", 15.999, 0.00077, true, false},
	{9, "F", 18.998403162, 0.000000005, false, false},
	{10, "Ne", 20.1797, 0.0006, false, false},
	{11, "Na", 22.98976928, 0.00000002, false, false},
	{12, "Mg", 24.305, 0.002, true, false},
	{13, "Al", 26.9815384, 0.0000003, false, false},
	{14, "Si", 28.085, 0.001, true, false},
	{15, "P", 30.973761998, 0.000000005, false, false},
	{16, "S", 32.06, 0.016, true, false},
	{17, "Cl", 35.45, 0.007, true, false},
	{18, "Ar", 39.95, 0.158, true, false},
	{19, "K", 39.0983, 0.0001, false, false},
	{20, "Ca", 40.078, 0.004, false, false},
	{21, "Sc", 44.955907, 0.000004, false, false},
	{22, "Ti", 47.867, 0.001, false, false},
	{23, "V", 50.9415, 0.0001, false, false},
	{24, "Cr", 51.9961, 0.0006, false, false},
	{25, "Mn", 54.938043, 0.000002, false, false},
	{26, "Fe", 55.845, 0.002, false, false},
	{27, "Co", 58.933194, 0.000003, false, false},
	{28, "Ni", 58.6934, 0.0004, false, false},
	{29, "Cu", 63.546, 0.003, false, false},
	{30, "Zn", 65.38, 0.02, false, false},
	{31, "Ga", 69.723, 0.001, false, false},
	{32, "Ge", 72.630, 0.008, false, false},
	{33, "As", 74.921595, 0.000006, false, false},
	{34, "Se", 78.971, 0.008, false, false},
	{35, "Br", 79.904, 0.003, true, false},
	{36, "Kr", 83.798, 0.002, false, false},
	{37, "Rb", 85.4678, 0.0003, false, false},
	{38, "Sr", 87.62, 0.01, false, false},
	{39, "Y", 88.905838, 0.000002, false, false},
	{40, "Zr", 91.222, 0.003, false, false},
	{41, "Nb", 92.90637, 0.00001, false, false},
	{42, "Mo", 95.95, 0.01, false, false},
	{43, "Tc", 98, 0, false, true},
	{44, "Ru", 101.07, 0.02, false, false},
	{45, "Rh", 102.90549, 0.00002, false, false},
	{46, "Pd", 106.42, 0.01, false, false},
	{47, "Ag", 107.8682, 0.0002, false, false},
	{48, "Cd", 112.414, 0.004, false, false},
	{49, "In", 114.818, 0.001, false, false},
	{50, "Sn", 118.710, 0.007, false, false},
	{51, "Sb", 121.760, 0.001, false, false},
	{52, "Te", 127.60, 0.03, false, false},
	{53, "I", 126.90447, 0.00003, false, false},
	{54, "Xe", 131.293, 0.006, false, false},
	{55, "Cs", 132.90545196, 0.00000006, false, false},
	{56, "Ba", 137.327, 0.007, false, false},
	{57, "La", 138.90547, 0.00007, false, false},
	{58, "Ce", 140.116, 0.001, false, false},
	{59, "Pr", 140.90766, 0.00001, false, false},
	{60, "Nd", 144.242, 0.003, false, false},
	{61, "Pm", 145, 0, false, true},
	{62, "Sm", 150.36, 0.02, false, false},
	{63, "Eu", 151.964, 0.001, false, false},
	{64, "Gd", 157.249, 0.002, false, false},
	{65, "Tb", 158.925354, 0.000007, false, false},
	{66, "Dy", 162.500, 0.001, false, false},
	{67, "Ho", 164.930329, 0.000005, false, false},
	{68, "Er", 167.259, 0.003, false, false},
	{69, "Tm", 168.934219, 0.000005, false, false},
	{70, "Yb", 173.045, 0.010, false, false},
	{71, "Lu", 174.96669, 0.00005, false, false},
	{72, "Hf", 178.486, 0.006, false, false},
	{73, "Ta", 180.94788, 0.00002, false, false},
	{74, "W", 183.84, 0.01, false, false},
	{75, "Re", 186.207, 0.001, false, false},
	{76, "Os", 190.23, 0.03, false, false},
	{77, "Ir", 192.217, 0.002, false, false},
	{78, "Pt", 195.084, 0.009, false, false},
	{79, "Au", 196.966570, 0.000004, false, false},
	{80, "Hg", 200.592, 0.003, false, false},
	{81, "Tl", 204.38, 0.005, true, false},
	{82, "Pb", 207.2, 1.06, true, false},
	{83, "Bi", 208.98040, 0.00001, false, false},
	{84, "Po", 209, 0, false, true},
	{85, "At", 210, 0, false, true},
	{86, "Rn", 222, 0, false, true},
	{87, "Fr", 223, 0, false, true},
	{88, "Ra", 226, 0, false, true},
	{89, "Ac", 227, 0, false, true},
	{90, "Th", 232.0377, 0.0004, false, false},
	{91, "Pa", 231.03588, 0.00001, false, false},
	{92, "U", 238.02891, 0.00003, false, false},
	{93, "Np", 237, 0, false, true},
	{94, "Pu", 244, 0, false, true},
	{1, "D", 2.01410177812, 0.00000000012, false, false},
}

var bySymbol = func() map[string]*Element {
	m := make(map[string]*Element, len(Elements))
	for i := range Elements {
		m[Elements[i].Symbol] = &Elements[i]
	}
	return m
}()

// Lookup returns the element with the given symbol (case-sensitive, e.g.
// "Co", not "CO").
func Lookup(symbol string) (Element, bool) {
	e, ok := bySymbol[symbol]
	if !ok {
		return Element{}, false
	}
	return *e, true
}
