package main

import (
	"context"
	"testing"

	"reticle/analysis"
)

const demoScan = "../assets/demo/kiln-trial-07.xy"

func openDemo(t testing.TB) *Model {
	t.Helper()
	m := &Model{}
	if err := m.Open(context.Background(), demoScan, analysis.Settings{}); err != nil {
		t.Fatal(err)
	}
	if err := m.Analyse(context.Background(), nil); err != nil {
		t.Fatal(err)
	}
	return m
}

func TestModelEditsAndUndo(t *testing.T) {
	ctx := context.Background()
	m := openDemo(t)
	lines := len(m.A.Lines)
	if err := m.TogglePeak(0); err != nil {
		t.Fatal(err)
	}
	m.Analyse(ctx, nil)
	if !m.A.Peaks[0].Rejected || len(m.A.Lines) != lines-1 {
		t.Fatalf("toggle: rejected %v, %d lines", m.A.Peaks[0].Rejected, len(m.A.Lines))
	}
	m.Undo()
	m.Analyse(ctx, nil)
	if m.A.Peaks[0].Rejected || len(m.A.Lines) != lines {
		t.Fatalf("undo: rejected %v, %d lines", m.A.Peaks[0].Rejected, len(m.A.Lines))
	}
	m.Redo()
	m.Analyse(ctx, nil)
	if !m.A.Peaks[0].Rejected {
		t.Fatal("redo did not reject again")
	}
}
