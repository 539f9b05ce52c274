package indexing

import (
	"context"
	"testing"
)

// BenchmarkIndex20 times a search of all four systems on 20 lines of
// rutile (tetragonal P, a = 4.5937, c = 2.9587 Å; handbook values from
// memory) with a 0.03° zero error.
func BenchmarkIndex20(b *testing.B) {
	ls := rutileLines(20)
	for i := 0; i < b.N; i++ {
		if _, err := Index(context.Background(), ls, Options{Wavelength: 1.5405929}, nil); err != nil {
			b.Fatal(err)
		}
	}
}
