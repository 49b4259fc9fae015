//go:build !(linux || darwin || freebsd || netbsd || openbsd)

package main

import "os"

// terminalColumns is 0 where borel cannot ask a terminal its size: text
// reports then fit COLUMNS when it is set, or print whole.
func terminalColumns(f *os.File) int { return 0 }
