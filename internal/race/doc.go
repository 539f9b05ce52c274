// Package race reports whether the binary was built with the race
// detector, so that long numerical tests whose work runs in one
// goroutine can leave the race run to the packages' concurrent tests
// (make unit runs them in full).
package race
