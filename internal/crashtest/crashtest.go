// Package crashtest kills a writer at a named point of its write, for
// pitcard's crash tests: the test runs its own binary as a child that
// pauses at the point and says so, and kills it there with kill -9, so
// every kill lands where the test means it to however loaded the machine.
// It checks nothing of what the writer left: each test reads that back.
package crashtest

import (
	"bufio"
	"fmt"
	"os"
	"os/exec"
	"testing"
	"time"
)

// PauseAt is the child's pause: at stage at it says so on standard output
// and waits to be killed; at any other stage it goes on.
func PauseAt(at string) func(stage string) {
	return func(stage string) {
		if stage == at {
			fmt.Fprintln(os.Stdout, "PAUSED "+stage)
			_ = os.Stdout.Sync()
			time.Sleep(time.Hour) // until killed
		}
	}
}

// KillAt runs the test binary's tests matching run (the child, which
// writes with PauseAt(at)) with env added to the environment, waits until
// the child says it paused at at, and kills it there. It fails t when the
// child ends without pausing or does not pause within a minute.
func KillAt(t testing.TB, run string, env []string, at string) {
	t.Helper()
	child := exec.Command(os.Args[0], "-test.run="+run)
	child.Env = append(os.Environ(), env...)
	out, err := child.StdoutPipe()
	if err != nil {
		t.Fatal(err)
	}
	if err := child.Start(); err != nil {
		t.Fatal(err)
	}
	paused := make(chan bool, 1)
	go func() {
		sc := bufio.NewScanner(out)
		for sc.Scan() {
			if sc.Text() == "PAUSED "+at {
				paused <- true
				return
			}
		}
		paused <- false
	}()
	select {
	case ok := <-paused:
		if !ok {
			_ = child.Wait()
			t.Fatalf("the writer ended without pausing at %s", at)
		}
	case <-time.After(60 * time.Second):
		_ = child.Process.Kill()
		_ = child.Wait()
		t.Fatalf("the writer did not reach %s in 60 s", at)
	}
	_ = child.Process.Kill() // SIGKILL where there is one
	_ = child.Wait()
}
