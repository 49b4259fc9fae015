package main

import (
	"context"
	"os"
	"os/signal"
	"sync"
	"sync/atomic"
	"syscall"
	"time"
)

// exitInterrupted is the status of a run stopped by SIGINT or SIGTERM
// (128 + SIGINT, the shell's convention).
const exitInterrupted = 130

// interrupted is set when SIGINT or SIGTERM arrives, and passCtx is
// cancelled: the pass checks it after every chunk and stops.
var (
	interrupted       atomic.Bool
	passCtx, stopPass = context.WithCancel(context.Background())
	// forceExitAfter is how long after a signal borel waits for the
	// command to end before it exits anyway (a read may block): a second,
	// or longer for a live audit writing its interrupted report.
	forceExitAfter atomic.Int64
	// writesAfterSignal is set by a command that ends a signalled run with
	// a report of its own (watch): its writes then go ahead, and it sets
	// its exit status itself.
	writesAfterSignal atomic.Bool
)

// tempFiles holds the temporary files being written, so that a forced exit
// removes them.
var tempFiles sync.Map

// watchSignals makes SIGINT and SIGTERM stop borel promptly: the pass
// notices within one chunk and returns; if the process is still running a
// second later (blocked on a read), it removes its temporary files and exits
// with status 130. Nothing half-written is left: reports and shards are
// renamed into place only when complete.
func watchSignals() {
	ch := make(chan os.Signal, 1)
	signal.Notify(ch, os.Interrupt, syscall.SIGTERM)
	go func() {
		<-ch
		interrupted.Store(true)
		stopPass()
		wait := time.Duration(forceExitAfter.Load())
		if wait <= 0 {
			wait = time.Second
		}
		time.Sleep(wait)
		removeTempFiles()
		os.Stderr.WriteString("borel: interrupted; nothing was written\n")
		os.Exit(exitInterrupted)
	}()
}

func removeTempFiles() {
	tempFiles.Range(func(k, _ any) bool {
		os.Remove(k.(string))
		return true
	})
}

// errInterrupted reports a pass stopped by a signal.
type errInterrupted struct{}

func (errInterrupted) Error() string { return "interrupted; nothing was written" }
