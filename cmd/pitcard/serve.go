package main

import (
	"context"
	"errors"
	"fmt"
	"net"
	"net/http"
	"os"
	"os/signal"
	"path/filepath"
	"strings"
	"syscall"
	"time"

	"github.com/skip2/go-qrcode"
	"github.com/spf13/cobra"

	"pitcard/event"
	"pitcard/pitpage"
)

type serveOptions struct {
	g         *globalOptions
	s         *IOStreams
	Addr      string
	NewTokens bool
	NoQR      bool
}

func newServeCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &serveOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:   "serve",
		Short: "The pit page: the card, readings, slips and the checklist on the crew's phones",
		Long: `Serves the event folder to phones on the same network (the trailer's Wi-Fi):
the card of the next round, laid out for a phone and refreshed when the folder
changes; forms for a weather reading and a time slip, checked as the command
line checks them; the checklist, ticked per round; the other lane's dial;
today's passes and the weather log.

Nothing is served without a token. At the first start pitcard writes two
random tokens to .pitcard-tokens in the folder (mode 0600, left out of version
control by the folder's .gitignore) and prints two links: the crew link reads
and writes, the view link only reads (for family or a tuner). A phone opens
its link once and keeps the token as a cookie. --new-tokens revokes both.

This is a LAN tool without encryption: anyone on the network who sees a
link, or the traffic, can use it. Do not forward its port to the internet.`,
		Example: `  pitcard serve
  pitcard serve --addr 192.168.1.20:8080
  pitcard serve --demo --addr 127.0.0.1:8080
  pitcard serve --new-tokens`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error { return serveRun(cmd, o) },
	}
	cmd.Flags().StringVar(&o.Addr, "addr", ":8080", "address to listen on: host:port, or :port for every network of this machine")
	cmd.Flags().BoolVar(&o.NewTokens, "new-tokens", false, "make new crew and view links; the old ones stop working")
	cmd.Flags().BoolVar(&o.NoQR, "no-qr", false, "do not print the crew link's QR code")
	return cmd
}

func serveRun(cmd *cobra.Command, o *serveOptions) error {
	e, err := o.g.open(cmd)
	if err != nil {
		return err
	}
	if _, err := e.Track(); err != nil {
		return err
	}
	tokens, made, err := serveTokens(e, o.NewTokens)
	if err != nil {
		return err
	}
	ln, err := net.Listen("tcp", o.Addr)
	if err != nil {
		return userErrf("--addr %q: cannot listen there (%v); give another port, e.g. --addr :8090", o.Addr, err)
	}
	hosts, port := lanHosts(ln.Addr())
	srv, err := pitpage.New(pitpage.Config{
		Open:   func() (*eventFolder, error) { return o.g.open(cmd) },
		Tokens: tokens,
		Now:    o.s.Now,
		Log:    o.s.Out,
		Hosts:  servedHosts(hosts, port),
	})
	if err != nil {
		ln.Close()
		return err
	}
	printServeLinks(o, e, ln.Addr(), hosts, port, tokens, made)
	return serveUntilStopped(o.s, srv, ln)
}

// serveTokens is the crew and view tokens of the links, and whether they
// were just made. The demo folder is read-only: its links are new and last
// while the server runs. Any other folder keeps them in its tokens file,
// made anew when it has none or with --new-tokens.
func serveTokens(e *eventFolder, newTokens bool) (tokens pitpage.Tokens, made bool, err error) {
	if e.Demo {
		tokens, err = pitpage.NewTokens()
		return tokens, true, err
	}
	return pitpage.LoadTokens(e.Dir, newTokens)
}

// printServeLinks says what is served and where: the folder, every address
// on this network, the crew and view links (and where they are kept), the
// crew link's QR code unless --no-qr, and a word on the page's security. It
// starts nothing.
func printServeLinks(o *serveOptions, e *eventFolder, addr net.Addr, hosts []string, port string, tokens pitpage.Tokens, made bool) {
	base := "http://" + net.JoinHostPort(hosts[0], port)
	crew, view := base+"/join/"+tokens.Crew, base+"/join/"+tokens.View
	where := "the demo event (read-only)"
	if !e.Demo {
		where = e.Dir
		if abs, err := filepath.Abs(e.Dir); err == nil {
			where = abs
		}
	}
	fmt.Fprintf(o.s.Out, "Serving the pit page of %s on %s.\n", where, addr)
	fmt.Fprintln(o.s.Out, "Open on this network:")
	for _, h := range hosts {
		fmt.Fprintf(o.s.Out, "  http://%s\n", net.JoinHostPort(h, port))
	}
	switch {
	case e.Demo:
		fmt.Fprintln(o.s.Out, "Links for this run only (the demo keeps no tokens):")
	case made:
		fmt.Fprintf(o.s.Out, "New links (written to %s; any older links no longer work):\n", e.Name(event.TokensFile))
	default:
		fmt.Fprintf(o.s.Out, "Links (from %s):\n", e.Name(event.TokensFile))
	}
	fmt.Fprintf(o.s.Out, "  crew (reads and writes): %s\n  view (reads only):       %s\n", crew, view)
	if !o.NoQR {
		if q, err := qrcode.New(crew, qrcode.Medium); err == nil {
			fmt.Fprintln(o.s.Out, "Scan for the crew link:")
			fmt.Fprint(o.s.Out, q.ToSmallString(false))
		}
	}
	fmt.Fprintln(o.s.Out, "A LAN page without encryption: keep the links to the crew. Ctrl-C stops it.")
}

// serveUntilStopped serves the pit page on ln until Ctrl-C, SIGTERM or the
// streams' Stop (the tests'), then shuts it down, letting requests under
// way finish for up to 5 seconds. A server that fails on its own returns
// its error.
func serveUntilStopped(s *IOStreams, srv *pitpage.Server, ln net.Listener) error {
	hs, gl := pitpage.HTTPServer(srv, ln, pitpage.DefaultLimits)
	errc := make(chan error, 1)
	go func() { errc <- hs.Serve(gl) }()
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	stopped := s.Stop
	select {
	case err := <-errc:
		return err
	case <-ctx.Done():
	case <-stopped:
	}
	shut, cancel := context.WithTimeout(context.Background(), 5*time.Second)
	defer cancel()
	if err := hs.Shutdown(shut); err != nil && !errors.Is(err, http.ErrServerClosed) {
		return err
	}
	fmt.Fprintln(s.Out, "Stopped the pit page.")
	return nil
}

// servedHosts are the names the pit page answers to: the links' hosts and
// this machine's own names (a request for any other is refused).
func servedHosts(hosts []string, port string) []string {
	names := append([]string(nil), hosts...)
	names = append(names, "localhost")
	if h, err := os.Hostname(); err == nil && h != "" {
		names = append(names, h, h+".local")
	}
	out := make([]string, len(names))
	for i, h := range names {
		out[i] = net.JoinHostPort(h, port)
	}
	return out
}

// lanHosts are the hosts a phone can reach the listener at: its own
// address, or, listening on every network, this machine's LAN addresses
// (and localhost last).
func lanHosts(a net.Addr) ([]string, string) {
	host, port, _ := net.SplitHostPort(a.String())
	ip := net.ParseIP(host)
	if ip != nil && !ip.IsUnspecified() {
		return []string{host}, port
	}
	var hosts []string
	if addrs, err := net.InterfaceAddrs(); err == nil {
		for _, ad := range addrs {
			if n, ok := ad.(*net.IPNet); ok && n.IP.To4() != nil && !n.IP.IsLoopback() && !strings.HasPrefix(n.IP.String(), "169.254.") {
				hosts = append(hosts, n.IP.String())
			}
		}
	}
	return append(hosts, "localhost"), port
}
