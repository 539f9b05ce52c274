package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
	"time"
)

// TestBatch: a folder of scans with one unreadable file, analysed two at
// a time, is reported in input order whatever the scheduling; the bad
// file is listed with its error, the exit status is 1, and the summary
// table (CSV and JSON) holds every scan.
func TestBatch(t *testing.T) {
	in := t.TempDir()
	demoData, err := os.ReadFile(demo)
	if err != nil {
		t.Fatal(err)
	}
	names := []string{"a-first.xy", "b-second.xy", "c-broken.xy", "d-fourth.xy"}
	for _, n := range names {
		data := demoData
		if strings.Contains(n, "broken") {
			data = []byte("not a scan\n")
		}
		if err := os.WriteFile(filepath.Join(in, n), data, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	out := filepath.Join(t.TempDir(), "reports")
	code, stdout, errs := runCmd("report", "--jobs", "2", "--out", out, in)
	if code != 1 || !strings.Contains(errs, "c-broken.xy") || !strings.Contains(errs, "1 of 4 scans failed") {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	// Records of the good scans, in input order.
	var order []string
	for _, l := range strings.Fields(stdout) {
		if strings.HasSuffix(l, ".json") {
			order = append(order, filepath.Base(l))
		}
	}
	if strings.Join(order, " ") != "a-first.json b-second.json d-fourth.json" {
		t.Errorf("records %v", order)
	}
	f, err := os.Open(filepath.Join(out, "summary.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 5 || rows[0][0] != "file" {
		t.Fatalf("summary rows %d: %v", len(rows), rows)
	}
	for i, n := range names {
		r := rows[i+1]
		want := "ok"
		if strings.Contains(n, "broken") {
			want = "failed"
		}
		if filepath.Base(r[0]) != n || r[2] != want {
			t.Errorf("row %d: %v", i+1, r[:4])
		}
		// A scan that fails is still identified by its bytes (digest
		// of "not a scan\n" from sha256sum, GNU coreutils).
		if want == "failed" && r[1] != "009aa247953d2983cf9c257f5ab544e43205f22a9f47f2e8b663d42668bafbd1" {
			t.Errorf("row %d SHA-256 %q", i+1, r[1])
		}
		if want == "ok" && !strings.HasPrefix(r[6], "cubic F a=8.08") {
			t.Errorf("row %d cell %q", i+1, r[6])
		}
	}
	raw, err := os.ReadFile(filepath.Join(out, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Scans []struct{ File, Status, Error string }
	}
	if err := json.Unmarshal(raw, &doc); err != nil || len(doc.Scans) != 4 || doc.Scans[2].Error == "" {
		t.Errorf("summary JSON: %v %+v", err, doc)
	}
	// index takes the same inputs and writes the summary where asked.
	base := filepath.Join(t.TempDir(), "day")
	if code, _, errs := runCmd("index", "--jobs", "2", "--summary", base, filepath.Join(in, "*.xy")); code != 1 || !strings.Contains(errs, "summary written") {
		t.Fatalf("index: exit %d, %q", code, errs)
	}
	if _, err := os.Stat(base + ".csv"); err != nil {
		t.Error(err)
	}
}

// TestJobsHoldCores checks that --jobs N holds the run to N cores while
// it lasts and gives the process its cores back afterwards.
func TestJobsHoldCores(t *testing.T) {
	before := runtime.GOMAXPROCS(0)
	if before < 2 {
		t.Skip("one core: nothing to hold back")
	}
	seen := make([]int, 3)
	forEach(context.Background(), len(seen), 1, io.Discard, "test", nil, func(i int) bool { seen[i] = runtime.GOMAXPROCS(0); return true })
	for i, c := range seen {
		if c != 1 {
			t.Errorf("item %d ran with %d cores, want 1", i, c)
		}
	}
	if after := runtime.GOMAXPROCS(0); after != before {
		t.Errorf("after the run: %d cores, want %d", after, before)
	}
	forEach(context.Background(), 2, before, io.Discard, "test", nil, func(i int) bool { seen[i] = runtime.GOMAXPROCS(0); return true })
	if seen[0] != before {
		t.Errorf("with --jobs %d: %d cores", before, seen[0])
	}
}

// TestInterrupt: a batch report whose context is cancelled (Ctrl-C)
// after the first scan stops within a second, names the scans finished,
// exits with 130, and leaves in the output folder the finished scan's
// files only: no empty or temporary file.
func TestInterrupt(t *testing.T) {
	dir := t.TempDir()
	data, err := os.ReadFile(demo)
	if err != nil {
		t.Fatal(err)
	}
	var files []string
	for i := 0; i < 6; i++ {
		f := filepath.Join(dir, fmt.Sprintf("kiln-%d.xy", i))
		if err := os.WriteFile(f, data, 0o644); err != nil {
			t.Fatal(err)
		}
		files = append(files, f)
	}
	out := filepath.Join(dir, "out")
	ctx, cancel := context.WithCancel(context.Background())
	var errb strings.Builder
	finished := make(chan int)
	go func() {
		var o strings.Builder
		finished <- reportAt(ctx, append([]string{"--out", out, "--jobs", "1"}, files...), &o, &errb, time.Date(2026, 1, 2, 3, 4, 5, 0, time.UTC))
	}()
	// Stop once the first scan's report is written.
	deadline := time.Now().Add(60 * time.Second)
	for {
		ents, _ := os.ReadDir(out)
		if len(ents) >= 4 || time.Now().After(deadline) {
			break
		}
		time.Sleep(20 * time.Millisecond)
	}
	stopped := time.Now()
	cancel()
	code := <-finished
	if d := time.Since(stopped); d > time.Second {
		t.Errorf("stopped %v after the cancel, want within 1 s", d)
	}
	if code != exitInterrupted || !strings.Contains(errb.String(), "stopped;") || !strings.Contains(errb.String(), "of 6 scans were finished") {
		t.Errorf("status %d, message %q", code, errb.String())
	}
	ents, err := os.ReadDir(out)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range ents {
		fi, _ := e.Info()
		if fi.Size() == 0 || strings.HasPrefix(e.Name(), ".") || strings.Contains(e.Name(), "tmp") {
			t.Errorf("left behind: %s (%d bytes)", e.Name(), fi.Size())
		}
	}
	if len(ents) == 0 || len(ents)%4 != 0 {
		t.Errorf("%d files in the output folder, want the four of each finished scan", len(ents))
	}
}
