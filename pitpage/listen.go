package pitpage

import (
	"net"
	"net/http"
	"sync"
	"time"
)

// Limits bound what a client may hold of the server: a slow or stuck phone
// (or anything else on the network) cannot keep it from the others.
type Limits struct {
	ReadHeader, Read, Write, Idle time.Duration
	MaxConns                      int // open connections at once; more wait to be accepted
	MaxHeaderBytes                int
}

// DefaultLimits suit a trailer's Wi-Fi: a form posts in well under a
// second, and a card renders in tens of milliseconds.
var DefaultLimits = Limits{
	ReadHeader: 5 * time.Second, Read: 15 * time.Second, Write: 30 * time.Second, Idle: 60 * time.Second,
	MaxConns: 64, MaxHeaderBytes: 16 << 10,
}

// HTTPServer is an http.Server for h with the limits' timeouts.
func HTTPServer(h http.Handler, l Limits) *http.Server {
	return &http.Server{
		Handler:           h,
		ReadHeaderTimeout: l.ReadHeader,
		ReadTimeout:       l.Read,
		WriteTimeout:      l.Write,
		IdleTimeout:       l.Idle,
		MaxHeaderBytes:    l.MaxHeaderBytes,
	}
}

// LimitListener accepts at most n connections at once from l.
func LimitListener(l net.Listener, n int) net.Listener {
	return &limitListener{Listener: l, slots: make(chan struct{}, n), done: make(chan struct{})}
}

type limitListener struct {
	net.Listener
	slots     chan struct{}
	done      chan struct{}
	closeOnce sync.Once
}

func (l *limitListener) Accept() (net.Conn, error) {
	select {
	case l.slots <- struct{}{}:
	case <-l.done:
		return nil, net.ErrClosed
	}
	c, err := l.Listener.Accept()
	if err != nil {
		<-l.slots
		return nil, err
	}
	return &limitConn{Conn: c, release: func() { <-l.slots }}, nil
}

type limitConn struct {
	net.Conn
	once    sync.Once
	release func()
}

func (c *limitConn) Close() error {
	err := c.Conn.Close()
	c.once.Do(c.release)
	return err
}

func (l *limitListener) Close() error {
	l.closeOnce.Do(func() { close(l.done) })
	return l.Listener.Close()
}
