// Reticle is the desktop program: it opens a powder diffraction scan,
// shows the fitted pattern, lets the user accept, reject and add peaks,
// and keeps the candidate cells, the refined cell and the cell contents in
// step with every edit.
//
// Usage:
//
//	go run ./app [--theme light|dark] [FILE]
package main

import (
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"fyne.io/fyne/v2/app"
)

func main() {
	shots := flag.String("screenshots", "", "save a picture of every step into this directory, then quit (for make screenshot)")
	theme := flag.String("theme", "", "light or dark (default: as last chosen)")
	flag.Parse()
	a := app.NewWithID("io.reticle.desktop")
	previous := a.Preferences().String("theme")
	if *theme != "" {
		a.Preferences().SetString("theme", *theme)
	}
	u := newUI(a)
	if *theme != "" && *shots != "" {
		// A theme asked for the pictures only is not remembered.
		a.Preferences().SetString("theme", previous)
	}
	u.win.SetCloseIntercept(func() {
		u.clearAutosave()
		u.win.Close()
	})
	path := ""
	if flag.NArg() > 0 {
		path = flag.Arg(0)
		if !fileExists(path) {
			fmt.Fprintf(os.Stderr, "reticle: %s: no such file\n", path)
		}
	}
	openArg := func() {
		if path != "" {
			u.open(path)
		}
	}
	u.win.Show()
	if *shots != "" {
		name := strings.TrimSuffix(filepath.Base(path), filepath.Ext(path))
		if *theme != "" {
			name += "-" + *theme
		}
		u.autosave = ""
		openArg()
		u.takeScreenshots(*shots, name)
	} else if !u.offerRestore(openArg) {
		openArg()
	}
	a.Run()
}
