package pitpage

import (
	"net"
	"net/http"
	"net/netip"
	"net/url"
	"strings"
)

// hostPort splits a Host header or an origin's host into a lower-case host
// and its port, 80 when none is given (the page is plain http). ok is false
// for an empty or malformed one.
func hostPort(h string) (host, port string, ok bool) {
	if h == "" {
		return "", "", false
	}
	host, port, err := net.SplitHostPort(h)
	if err != nil {
		if strings.Contains(h, ":") && !strings.HasPrefix(h, "[") {
			return "", "", false
		}
		host, port = strings.Trim(h, "[]"), "80"
	}
	if host == "" {
		return "", "", false
	}
	return strings.ToLower(host), port, true
}

// knownHost reports whether a request for Host h is the page's: one of
// cfg.Hosts, or an IP address on one of their ports.
func (s *Server) knownHost(h string) bool {
	if len(s.cfg.Hosts) == 0 {
		return true
	}
	host, port, ok := hostPort(h)
	if !ok {
		return false
	}
	_, err := netip.ParseAddr(host)
	isIP := err == nil
	for _, k := range s.cfg.Hosts {
		kh, kp, ok := hostPort(k)
		if ok && kp == port && (kh == host || isIP) {
			return true
		}
	}
	return false
}

// foreignOrigin is why a form's Origin is not the page's own, or "": a
// browser names the page a form was sent from, and only the page's own
// scheme and host are taken. "null" (a sandboxed frame, a data: or file:
// page) is not. No Origin at all (an older browser, a script) is left to
// the cookie and the CSRF token.
func foreignOrigin(r *http.Request) string {
	o := r.Header.Get("Origin")
	if o == "" {
		return ""
	}
	if o == "null" {
		return "the form came from a page without an address (a frame or a saved file), not from the pit page."
	}
	scheme := "http"
	if r.TLS != nil {
		scheme = "https"
	}
	u, err := url.Parse(o)
	if err != nil {
		return "the form came from another site (" + o + ")."
	}
	oh, op, ok1 := hostPort(u.Host)
	rh, rp, ok2 := hostPort(r.Host)
	if u.Scheme != scheme || !ok1 || !ok2 || oh != rh || op != rp {
		return "the form came from another site (" + o + ")."
	}
	return ""
}
