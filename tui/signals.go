package tui

import (
	"fmt"
	"os"
	"os/signal"
	"sync"
)

// CatchSignals makes the exit signals (SIGHUP, SIGTERM, SIGINT, SIGQUIT;
// on Windows ctrl+c/ctrl+break and closing the console window, logoff and
// shutdown) write the guard's unsaved method to its recovery file and then
// call kill (which ends the UI). The UI library's own signal handling must
// be off (tea.WithoutSignalHandler), or it would quit first and race the
// write.
//
// stop ends the watch. It waits for a recovery write under way, and returns
// what happened: caught is true when a signal came, msg says what was
// written (or why nothing could be).
func (g *Guard) CatchSignals(kill func()) (stop func() (msg string, caught bool)) {
	sigs := make(chan os.Signal, 1)
	signal.Notify(sigs, exitSignals...)
	quit := make(chan struct{})
	var (
		mu     sync.Mutex
		msg    string
		caught bool
		done   = make(chan struct{})
	)
	handle := func(s os.Signal) {
		path, err := g.WriteRecovery()
		mu.Lock()
		caught = true
		switch {
		case err != nil:
			msg = fmt.Sprintf("%v: could not write the recovery file: %v", s, err)
		case path != "":
			msg = fmt.Sprintf("%v: unsaved changes written to %s", s, path)
		}
		mu.Unlock()
		kill()
	}
	go func() {
		defer close(done)
		select {
		case s := <-sigs:
			handle(s)
		case <-quit:
			select { // a signal that came with the quit still counts
			case s := <-sigs:
				handle(s)
			default:
			}
		}
	}()
	return func() (string, bool) {
		signal.Stop(sigs)
		close(quit)
		<-done
		mu.Lock()
		defer mu.Unlock()
		return msg, caught
	}
}
