package indexing

// rutileLines returns the first n calculated lines of rutile above 20° 2θ
// for Cu K-alpha1 (tetragonal P, a = 4.5937, c = 2.9587 Å, handbook values
// from memory), shifted by a zero error of +0.03°, with esds of 0.002°.
func rutileLines(n int) []Line {
	c := NewCell(Tetragonal, P, 4.5937, 2.9587)
	var ls []Line
	for _, r := range Reflections(c, 1) {
		tt := ttOf(r.Q, 1.5405929)
		if tt > 20 && len(ls) < n {
			ls = append(ls, Line{tt + 0.03, 0.002})
		}
	}
	return ls
}
