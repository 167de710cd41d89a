package pitpage

import (
	"context"
	"net"
	"net/http"
	"sync"
	"time"
)

// Limits bound what a client may hold of the server: a slow or stuck phone
// (or anything else on the network) cannot keep it from the others.
type Limits struct {
	ReadHeader, Read, Write, Idle time.Duration
	// BusyIdle is how long a connection that has shown no valid token may
	// sit idle once half the slots are taken (Idle otherwise): a stranger's
	// keep-alive connections give way to the crew's phones.
	BusyIdle time.Duration
	MaxConns int // open connections at once; when all are taken, the longest idle is closed for a new one
	// PerClient is the most connections one client address may hold (0: no
	// limit); past it, that address's longest idle connection that has shown
	// no token is closed, or the new one refused when there is none. A
	// phone's browser opens up to 6.
	PerClient      int
	MaxHeaderBytes int
}

// DefaultLimits suit a trailer's Wi-Fi: a form posts in well under a
// second, and a card renders in tens of milliseconds.
var DefaultLimits = Limits{
	ReadHeader: 5 * time.Second, Read: 15 * time.Second, Write: 30 * time.Second, Idle: 60 * time.Second,
	BusyIdle: 2 * time.Second, MaxConns: 64, PerClient: 16, MaxHeaderBytes: 16 << 10,
}

// HTTPServer is an http.Server for h with the limits' timeouts, and ln
// guarded by the limits' connection counts: serve with hs.Serve(gl).
func HTTPServer(h http.Handler, ln net.Listener, l Limits) (hs *http.Server, gl net.Listener) {
	g := &guard{Listener: ln, lim: l, conns: map[*guardConn]struct{}{}, perAddr: map[string]int{},
		free: make(chan struct{}, 1), done: make(chan struct{})}
	hs = &http.Server{
		Handler:           h,
		ReadHeaderTimeout: l.ReadHeader,
		ReadTimeout:       l.Read,
		WriteTimeout:      l.Write,
		IdleTimeout:       l.Idle,
		MaxHeaderBytes:    l.MaxHeaderBytes,
		ConnState:         g.state,
		ConnContext: func(ctx context.Context, c net.Conn) context.Context {
			return context.WithValue(ctx, connKey{}, c)
		},
	}
	return hs, g
}

// connKey finds a request's connection in its context, for trust.
type connKey struct{}

// trust marks the connection r came on as a crew or view phone's: it is
// closed for a newcomer only after every stranger's idle connection.
func trust(r *http.Request) {
	if c, ok := r.Context().Value(connKey{}).(*guardConn); ok {
		c.g.mu.Lock()
		c.trusted = true
		c.g.mu.Unlock()
	}
}

// guard is a listener that counts its open connections, in all and per
// client address, and knows which are idle (from the server's ConnState).
type guard struct {
	net.Listener
	lim       Limits
	mu        sync.Mutex
	conns     map[*guardConn]struct{}
	perAddr   map[string]int
	free      chan struct{} // a connection closed or went idle: a waiting Accept looks again
	done      chan struct{}
	closeOnce sync.Once
}

type guardConn struct {
	net.Conn
	g         *guard
	addr      string    // the client's address without its port
	idleSince time.Time // zero while a request is read or answered
	trusted   bool      // a request on it carried a valid token
	once      sync.Once
}

func (g *guard) Accept() (net.Conn, error) {
	for {
		c, err := g.Listener.Accept()
		if err != nil {
			return nil, err
		}
		addr := c.RemoteAddr().String()
		if h, _, err := net.SplitHostPort(addr); err == nil {
			addr = h
		}
		gc := &guardConn{Conn: c, g: g, addr: addr}
		ok, err := g.admit(gc)
		if err != nil {
			c.Close()
			return nil, err
		}
		if ok {
			return gc, nil
		}
		c.Close() // this address holds its share and none of it is idle
	}
}

// lookAgain is how long a newcomer waiting for a slot sleeps before it looks
// at the slots again even if no wake came.
const lookAgain = 250 * time.Millisecond

// admit makes room for c, closing idle connections as the limits say, and
// counts it; it waits while every slot is busy with a request.
func (g *guard) admit(c *guardConn) (bool, error) {
	g.mu.Lock()
	var closing []*guardConn
	defer func() {
		for _, v := range closing {
			v.Close()
		}
	}()
	if g.lim.PerClient > 0 && g.perAddr[c.addr] >= g.lim.PerClient {
		// Only a stranger's: a phone's connection is not given up for a
		// newcomer no token has been seen from yet.
		v := g.idlest(func(o *guardConn) bool { return o.addr == c.addr && !o.trusted })
		if v == nil {
			g.mu.Unlock()
			return false, nil
		}
		closing = append(closing, g.drop(v))
	}
	if len(g.conns) >= g.lim.MaxConns/2 && g.lim.BusyIdle > 0 {
		now := time.Now()
		for o := range g.conns {
			if !o.trusted && !o.idleSince.IsZero() && now.Sub(o.idleSince) >= g.lim.BusyIdle {
				closing = append(closing, g.drop(o))
			}
		}
	}
	for len(g.conns) >= g.lim.MaxConns {
		// A newcomer is a stranger until a token is seen: a phone's idle
		// connection is given up only when no stranger holds a slot at all;
		// while strangers are busy, wait for one of them to finish (their
		// read limits bound the wait), so the phone keeps its keep-alive.
		v := g.idlest(func(o *guardConn) bool { return !o.trusted })
		if v == nil && !g.anyStranger() {
			v = g.idlest(func(*guardConn) bool { return true })
		}
		if v != nil {
			closing = append(closing, g.drop(v))
			continue
		}
		g.mu.Unlock()
		// Woken when a connection closes or goes idle; the timer is a
		// backstop so that a missed wake costs a look, never a lockout.
		select {
		case <-g.free:
		case <-time.After(lookAgain):
		case <-g.done:
			return false, net.ErrClosed
		}
		g.mu.Lock()
	}
	g.conns[c] = struct{}{}
	g.perAddr[c.addr]++
	g.mu.Unlock()
	return true, nil
}

// anyStranger reports whether a connection no token has been seen on holds
// a slot. Called with mu held.
func (g *guard) anyStranger() bool {
	for o := range g.conns {
		if !o.trusted {
			return true
		}
	}
	return false
}

// idlest is the idle connection among those that match to close first: a
// stranger's before a phone's, the longest idle first. Called with mu held.
func (g *guard) idlest(match func(*guardConn) bool) *guardConn {
	var best *guardConn
	for o := range g.conns {
		if o.idleSince.IsZero() || !match(o) {
			continue
		}
		if best == nil || (best.trusted && !o.trusted) || (best.trusted == o.trusted && o.idleSince.Before(best.idleSince)) {
			best = o
		}
	}
	return best
}

// drop uncounts c (called with mu held) and returns it, to be closed once
// mu is released.
func (g *guard) drop(c *guardConn) *guardConn {
	if _, ok := g.conns[c]; ok {
		delete(g.conns, c)
		if g.perAddr[c.addr]--; g.perAddr[c.addr] <= 0 {
			delete(g.perAddr, c.addr)
		}
		g.wake()
	}
	return c
}

// wake tells a waiting Accept to look at the slots again.
func (g *guard) wake() {
	select {
	case g.free <- struct{}{}:
	default:
	}
}

// state follows the server's view of each connection: idle between
// requests, or busy.
func (g *guard) state(nc net.Conn, st http.ConnState) {
	c, ok := nc.(*guardConn)
	if !ok {
		return
	}
	g.mu.Lock()
	defer g.mu.Unlock()
	switch st {
	case http.StateIdle:
		c.idleSince = time.Now()
		g.wake() // an idle connection can now be given up for a waiting newcomer
	case http.StateNew, http.StateActive:
		c.idleSince = time.Time{}
	case http.StateClosed, http.StateHijacked:
		g.drop(c)
	}
}

func (c *guardConn) Close() error {
	err := c.Conn.Close()
	c.once.Do(func() {
		c.g.mu.Lock()
		c.g.drop(c)
		c.g.mu.Unlock()
	})
	return err
}

func (g *guard) Close() error {
	g.closeOnce.Do(func() { close(g.done) })
	return g.Listener.Close()
}
