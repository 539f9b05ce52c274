package main

import (
	"fmt"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"time"

	"fyne.io/fyne/v2"
)

// takeScreenshots walks the steps of the work once the scan is analysed,
// saving what the window shows at each (DIR/NAME-N-step.png), rejects and
// restores a peak on the way, and quits. It serves `make screenshot`.
func (u *ui) takeScreenshots(dir, name string) {
	go func() {
		// Wait for the first analysis.
		for i := 0; i < 600; i++ {
			var ready bool
			fyne.DoAndWait(func() { ready = u.m.A != nil })
			if ready {
				break
			}
			time.Sleep(50 * time.Millisecond)
		}
		u.wait()
		var analysed bool
		fyne.DoAndWait(func() { analysed = u.m.A != nil })
		save := func(label string) {
			time.Sleep(900 * time.Millisecond)
			p := filepath.Join(dir, fmt.Sprintf("%s-%s.png", name, label))
			// The X server's picture of the screen, as a user sees it
			// (ImageMagick's import); without it, the canvas's own.
			if bin, err := exec.LookPath("import"); err == nil && os.Getenv("DISPLAY") != "" {
				if out, err := exec.Command(bin, "-window", "root", p).CombinedOutput(); err != nil {
					fmt.Fprintf(os.Stderr, "import: %v: %s\n", err, out)
				}
				fmt.Println(p)
				return
			}
			fyne.DoAndWait(func() {
				img := u.win.Canvas().Capture()
				f, err := os.Create(p)
				if err != nil {
					fmt.Fprintln(os.Stderr, err)
					return
				}
				defer f.Close()
				png.Encode(f, img)
				fmt.Println(p)
			})
		}
		titles := []string{}
		fyne.DoAndWait(func() {
			for _, t := range u.tabs.Items {
				titles = append(titles, strings.ReplaceAll(strings.TrimSpace(strings.ToLower(t.Text)), "  ", "-"))
			}
		})
		if !analysed {
			// The scan could not be read or analysed: the window shows
			// the error; picture it and stop.
			save("0-error")
			fyne.DoAndWait(func() {
				u.clearAutosave()
				u.app.Quit()
			})
			return
		}
		for i, t := range titles {
			fyne.DoAndWait(func() { u.tabs.SelectIndex(i) })
			save(t)
		}
		// An edit: reject the strongest peak, look, undo.
		fyne.DoAndWait(func() {
			u.tabs.SelectIndex(1)
			best := 0
			for i, p := range u.m.A.Peaks {
				if p.Height > u.m.A.Peaks[best].Height {
					best = i
				}
			}
			u.togglePeak(best)
		})
		u.wait()
		save("7-peak-rejected")
		fyne.DoAndWait(func() {
			u.undo()
		})
		u.wait()
		fyne.DoAndWait(func() {
			u.tabs.SelectIndex(3)
			u.autoCheck.SetChecked(false)
			u.zeroCheck.SetChecked(true)
			u.dispCheck.SetChecked(true)
		})
		u.wait()
		save("8-displacement-refined")
		fyne.DoAndWait(func() {
			lo, hi := u.m.Scan().Range()
			u.plot.setRange(lo+0.3*(hi-lo), lo+0.45*(hi-lo))
		})
		save("9-zoomed")
		// The whole-pattern fit of the chosen cell, with the next
		// candidate as a second phase when there is one.
		fyne.DoAndWait(func() {
			u.plot.resetZoom()
			u.tabs.SelectIndex(3)
			u.fitWhole()
		})
		u.wait()
		save("12-whole-pattern-fit")
		fyne.DoAndWait(u.settingsDialog)
		save("10-settings")
		fyne.DoAndWait(u.shortcutsDialog)
		save("11-keyboard-and-mouse")
		fyne.DoAndWait(func() {
			u.clearAutosave()
			u.app.Quit()
		})
	}()
}
