package main

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// TestOpenMillionPoints: opening a 1,000,000-point scan whose features
// are broad compared with its step returns to the window at once (the
// reading and extraction run on a worker), and the scan is open and
// analysed when the worker ends; Stop during the read keeps the scan open
// before.
func TestOpenMillionPoints(t *testing.T) {
	if testing.Short() {
		t.Skip("a million points")
	}
	var sb strings.Builder
	for i := 0; i < 1_000_000; i++ {
		fmt.Fprintf(&sb, "%.5f %d\n", 10+float64(i)*1e-4, 100+int(50*math.Sin(float64(i)/3000)))
	}
	p := filepath.Join(t.TempDir(), "humps.xy")
	if err := os.WriteFile(p, []byte(sb.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	u := demoUI(t, "")
	before := u.m.Path
	// Stopped at once: the demo stays open.
	u.open(p)
	u.cancelBtn.OnTapped()
	u.wait()
	if u.m.Path != before {
		t.Fatalf("after Stop the open scan is %s", u.m.Path)
	}
	start := time.Now()
	u.open(p)
	if took := time.Since(start); took > 200*time.Millisecond {
		t.Errorf("open held the window for %v", took)
	}
	u.wait()
	if u.m.Path != p || u.m.Scan().Len() != 1_000_000 {
		t.Fatalf("not opened: %s (%s)", u.m.Path, u.status.Text)
	}
	t.Logf("opened and analysed in %v: %s", time.Since(start), u.status.Text)
}
