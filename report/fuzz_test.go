package report

import (
	"bytes"
	"reflect"
	"strings"
	"testing"
)

// FuzzReadCSV: any input either fails with ErrCSV or reads into rows
// that write and read back unchanged.
func FuzzReadCSV(f *testing.F) {
	head := strings.Join(csvHeader, ",") + "\n"
	f.Add(head)
	f.Add(head + "1,19.0082,0.0007,4.665,0.0002,1517,20,100,2,0.0668,0.001,0.5,120,29,,,false,1 1 1,19.0075,0.0006\n")
	f.Add(head + "2,31.28,0.0005,2.857,0.0001,1964,20,100,2,0.0677,0.001,0.5,120,60,K-beta,1,true,,,\n")
	f.Add("a,b\n1,2\n")
	f.Fuzz(func(t *testing.T, s string) {
		rows, err := ReadCSV(strings.NewReader(s))
		if err != nil {
			return
		}
		var plain []PeakRow
		for _, r := range rows {
			plain = append(plain, PeakRow{Peak: r.Peak})
		}
		var buf bytes.Buffer
		if err := writeRows(&buf, plain); err != nil {
			t.Fatal(err)
		}
		again, err := ReadCSV(&buf)
		if err != nil {
			t.Fatalf("%q: written list does not read: %v", s, err)
		}
		for i := range again {
			if !reflect.DeepEqual(again[i].Peak, rows[i].Peak) {
				t.Fatalf("%q: row %d changed: %+v → %+v", s, i+1, rows[i].Peak, again[i].Peak)
			}
		}
	})
}

func BenchmarkWritePDF(b *testing.B) {
	a := demoAnalysis(b)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		var buf bytes.Buffer
		if err := WritePDF(&buf, a, A4, goldenDate); err != nil {
			b.Fatal(err)
		}
	}
}
