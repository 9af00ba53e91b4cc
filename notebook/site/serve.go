package site

import (
	"context"
	"fmt"
	"mime"
	"net/http"
	"path"
	"strconv"
	"strings"
	"sync"
	"time"
)

// Server serves the site of a notebook from memory and rebuilds it when a file of the
// notebook changes; its pages reload themselves after a rebuild (they poll
// /_cleave/version).
type Server struct {
	b *Builder

	mu      sync.RWMutex
	site    *Site
	version int
	digest  string
	lastErr error
}

// NewServer builds the site of the notebook at root once.
func NewServer(root string) (*Server, error) {
	s := &Server{b: &Builder{Root: root, Opt: Options{Live: true}}}
	if _, err := s.Refresh(); err != nil {
		return nil, err
	}
	return s, nil
}

// Refresh rebuilds the site when a file of the notebook changed since the last build, and
// reports whether it did.
func (s *Server) Refresh() (bool, error) {
	d := inputsDigest(s.b.Root)
	s.mu.RLock()
	same := d == s.digest && s.site != nil
	s.mu.RUnlock()
	if same {
		return false, nil
	}
	site, err := s.b.Build()
	s.mu.Lock()
	defer s.mu.Unlock()
	s.lastErr = err
	if err != nil {
		return false, err
	}
	changed := s.site == nil || len(site.Files) != len(s.site.Files)
	if !changed {
		for p, b := range site.Files {
			if string(s.site.Files[p]) != string(b) {
				changed = true
				break
			}
		}
	}
	s.site, s.digest = site, d
	if changed {
		s.version++
	}
	return changed, nil
}

// Watch polls the notebook every interval until ctx ends, rebuilding on a change; report,
// when not nil, hears of each rebuild and each failed one.
func (s *Server) Watch(ctx context.Context, interval time.Duration, report func(changed bool, err error)) {
	t := time.NewTicker(interval)
	defer t.Stop()
	for {
		select {
		case <-ctx.Done():
			return
		case <-t.C:
			changed, err := s.Refresh()
			if report != nil && (changed || err != nil) {
				report(changed, err)
			}
		}
	}
}

// ServeHTTP serves the current site; /_cleave/version is the build's number.
func (s *Server) ServeHTTP(w http.ResponseWriter, r *http.Request) {
	if r.Method != http.MethodGet && r.Method != http.MethodHead {
		http.Error(w, "method not allowed", http.StatusMethodNotAllowed)
		return
	}
	h := w.Header()
	h.Set("X-Content-Type-Options", "nosniff")
	h.Set("Content-Security-Policy", "default-src 'none'; script-src 'self'; style-src 'self'; img-src 'self'; connect-src 'self'; base-uri 'none'; form-action 'none'")
	h.Set("Cache-Control", "no-store")
	p := path.Clean("/" + r.URL.Path)
	s.mu.RLock()
	defer s.mu.RUnlock()
	if p == "/_cleave/version" {
		h.Set("Content-Type", "text/plain; charset=utf-8")
		fmt.Fprint(w, strconv.Itoa(s.version))
		return
	}
	if s.lastErr != nil && s.site == nil {
		http.Error(w, s.lastErr.Error(), http.StatusInternalServerError)
		return
	}
	name := strings.TrimPrefix(p, "/")
	if name == "" || strings.HasSuffix(p, "/") {
		name = strings.TrimSuffix(name, "/")
		if name != "" {
			name += "/"
		}
		name += "index.html"
	}
	data, ok := s.site.Files[name]
	if !ok {
		http.NotFound(w, r)
		return
	}
	ct := mime.TypeByExtension(path.Ext(name))
	switch path.Ext(name) {
	case ".html":
		ct = "text/html; charset=utf-8"
	case ".js":
		ct = "text/javascript; charset=utf-8"
	case ".css":
		ct = "text/css; charset=utf-8"
	case ".svg":
		ct = "image/svg+xml"
	}
	if ct == "" {
		ct = "application/octet-stream"
	}
	h.Set("Content-Type", ct)
	_, _ = w.Write(data)
}
