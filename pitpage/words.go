package pitpage

import (
	"errors"
	"io"
	"net"
	"path/filepath"
	"regexp"
	"strings"

	"pitcard/event"
)

// absDirs finds the directories of an absolute file path in a message
// (/home/crew/events/june/, C:\Users\crew\june\): a phone is told a file by
// its name (logbook.csv), not where it lies on the laptop.
var absDirs = regexp.MustCompile(`(^|[\s(\[{"'“‘=,;])(?:[A-Za-z]:)?(?:[/\\][^\s/\\"'“”‘’()\[\]{},;:]+)+[/\\]`)

// forPhone is msg as a phone is shown it: without the folder's path (e
// when one is open) or any other absolute path's directories.
func forPhone(e *event.Folder, msg string) string {
	if e != nil && e.Dir != "" {
		dirs := []string{e.Dir}
		if abs, err := filepath.Abs(e.Dir); err == nil && abs != e.Dir {
			dirs = append(dirs, abs)
		}
		for _, d := range dirs {
			// A folder's name with a space in it escapes absDirs: its path
			// goes by name first.
			msg = strings.ReplaceAll(msg, strings.TrimSuffix(d, string(filepath.Separator))+string(filepath.Separator), "")
		}
	}
	return absDirs.ReplaceAllString(msg, "$1")
}

// plainPage is p with every message it shows made forPhone.
func plainPage(e *event.Folder, p page) page {
	p.Error, p.Saved, p.Intro = forPhone(e, p.Error), forPhone(e, p.Saved), forPhone(e, p.Intro)
	p.Warnings = plainAll(e, p.Warnings)
	p.Said = plainAll(e, p.Said)
	if p.Form != nil {
		p.Form = append([]field(nil), p.Form...)
		for i := range p.Form {
			p.Form[i].Error = forPhone(e, p.Form[i].Error)
		}
	}
	return p
}

func plainAll(e *event.Folder, msgs []string) []string {
	if msgs == nil {
		return nil
	}
	out := make([]string, len(msgs))
	for i, m := range msgs {
		out[i] = forPhone(e, m)
	}
	return out
}

// formReadWords says why a form's body could not be read, in words: a
// socket's error names the laptop's addresses and ports, which the crew
// cannot act on.
func formReadWords(err error) string {
	var ne net.Error
	var op *net.OpError
	switch {
	case errors.As(err, &ne) && ne.Timeout():
		return "the form did not arrive in time (a weak Wi-Fi signal?): send it again."
	case errors.As(err, &op), errors.Is(err, io.ErrUnexpectedEOF), errors.Is(err, net.ErrClosed):
		return "the connection broke while the form was sent: send it again."
	}
	return "the form could not be read (" + forPhone(nil, err.Error()) + ")."
}
