package explore

import (
	"context"
	"crypto/rand"
	"embed"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"html"
	"io"
	"io/fs"
	"net"
	"net/http"
	"strings"
	"sync"

	"narrows/patterns"
)

//go:embed page
var pageFiles embed.FS

// MaxBody is the largest request body accepted, in bytes.
const MaxBody = 64 << 10

// MaxExclusions bounds the exclusions of one request.
const MaxExclusions = 1000

// TokenHeader carries the page's token on state-changing requests.
const TokenHeader = "X-Narrows-Token"

// Server holds a study in memory and answers the page.
type Server struct {
	study *Study
	token string
	// hosts are the Host header values accepted (the address served).
	hosts map[string]bool

	mu      sync.Mutex
	choices Choices
	state   *State
}

// New analyses the study once and returns its server. The token, which
// the page carries on every state-changing request, is random.
func New(ctx context.Context, st *Study) (*Server, error) {
	if st == nil || st.Store == nil || st.Regions == nil {
		return nil, errors.New("explore: a study needs its day graphs and regions")
	}
	var b [16]byte
	if _, err := rand.Read(b[:]); err != nil {
		return nil, err
	}
	s := &Server{study: st, token: hex.EncodeToString(b[:]), hosts: map[string]bool{}}
	c := Choices{Scan: st.Scan, Before: st.Before, After: st.After, Exclusions: st.Exclusions}
	if err := c.Exclusions.Validate(len(st.Regions.Regions)); err != nil {
		return nil, err
	}
	state, err := analyse(ctx, st, c)
	if err != nil {
		return nil, err
	}
	s.choices, s.state = c, state
	return s, nil
}

// Token returns the page's token.
func (s *Server) Token() string { return s.token }

// AllowHost accepts requests whose Host header is host ("127.0.0.1:8080").
// A server accepts only the hosts allowed, so a page of another site that
// resolves its own name to the loopback address cannot reach it.
func (s *Server) AllowHost(host string) { s.hosts[host] = true }

// Choices returns the current choices.
func (s *Server) Choices() Choices {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.choices
}

// Handler returns the page and the API.
func (s *Server) Handler() http.Handler {
	mux := http.NewServeMux()
	static, _ := fs.Sub(pageFiles, "page")
	files := http.FileServerFS(static)
	mux.HandleFunc("GET /{$}", s.index)
	mux.Handle("GET /app.js", files)
	mux.Handle("GET /style.css", files)
	mux.HandleFunc("GET /api/state", s.getState)
	mux.HandleFunc("POST /api/settings", s.postSettings)
	mux.HandleFunc("POST /api/exclusions", s.postExclusions)
	mux.HandleFunc("POST /api/save", s.postSave)
	return s.guard(mux)
}

// guard refuses requests for another host and sets headers that keep the
// page from being framed or its answers from being sniffed.
func (s *Server) guard(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if len(s.hosts) > 0 && !s.hosts[r.Host] {
			httpError(w, http.StatusMisdirectedRequest, fmt.Sprintf("this server answers only for %s", strings.Join(sortedHosts(s.hosts), ", ")))
			return
		}
		h := w.Header()
		h.Set("X-Content-Type-Options", "nosniff")
		h.Set("X-Frame-Options", "DENY")
		h.Set("Content-Security-Policy", "default-src 'self'; img-src 'self' data:; style-src 'self' 'unsafe-inline'")
		h.Set("Cache-Control", "no-store")
		next.ServeHTTP(w, r)
	})
}

func sortedHosts(m map[string]bool) []string {
	var out []string
	for h := range m {
		out = append(out, h)
	}
	return out
}

// index serves the page with the token in a meta element.
func (s *Server) index(w http.ResponseWriter, r *http.Request) {
	page, err := pageFiles.ReadFile("page/index.html")
	if err != nil {
		httpError(w, http.StatusInternalServerError, err.Error())
		return
	}
	text := strings.Replace(string(page), "{{TOKEN}}", html.EscapeString(s.token), 1)
	w.Header().Set("Content-Type", "text/html; charset=utf-8")
	io.WriteString(w, text)
}

func (s *Server) getState(w http.ResponseWriter, r *http.Request) {
	s.mu.Lock()
	state := s.state
	s.mu.Unlock()
	writeJSON(w, http.StatusOK, state)
}

func (s *Server) postSettings(w http.ResponseWriter, r *http.Request) {
	var set Settings
	if !s.readRequest(w, r, &set) {
		return
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	c, err := set.apply(s.choices, s.study.Store.Meta.Windows)
	if err != nil {
		httpError(w, http.StatusBadRequest, "settings: "+err.Error())
		return
	}
	s.update(w, r, c)
}

func (s *Server) postExclusions(w http.ResponseWriter, r *http.Request) {
	var x patterns.Exclusions
	if !s.readRequest(w, r, &x) {
		return
	}
	if len(x.Days)+len(x.Pairs) > MaxExclusions {
		httpError(w, http.StatusBadRequest, fmt.Sprintf("exclusions: at most %d", MaxExclusions))
		return
	}
	if err := x.Validate(len(s.study.Regions.Regions)); err != nil {
		httpError(w, http.StatusBadRequest, "exclusions: "+err.Error())
		return
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	c := s.choices
	c.Exclusions = x
	s.update(w, r, c)
}

// update analyses the choices and, when that works, makes them current.
// The caller holds s.mu.
func (s *Server) update(w http.ResponseWriter, r *http.Request, c Choices) {
	state, err := analyse(r.Context(), s.study, c)
	if err != nil {
		// A choice the analysis refuses (a period with no data, say) is the
		// request's fault; the current state stays.
		httpError(w, http.StatusUnprocessableEntity, err.Error())
		return
	}
	s.choices, s.state = c, state
	writeJSON(w, http.StatusOK, state)
}

func (s *Server) postSave(w http.ResponseWriter, r *http.Request) {
	var none struct{}
	if !s.readRequest(w, r, &none) {
		return
	}
	if s.study.Save == nil {
		httpError(w, http.StatusConflict, "no study file to save into: start explore with a study file")
		return
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	path, err := s.study.Save(s.choices)
	if err != nil {
		httpError(w, http.StatusInternalServerError, "save: "+err.Error())
		return
	}
	s.state.Saved = path
	writeJSON(w, http.StatusOK, map[string]string{"saved": path})
}

// readRequest checks the token, the content type and the size, and
// decodes the JSON body into v, refusing unknown fields.
func (s *Server) readRequest(w http.ResponseWriter, r *http.Request, v any) bool {
	if got := r.Header.Get(TokenHeader); got == "" || got != s.token {
		httpError(w, http.StatusForbidden, "missing or wrong "+TokenHeader+": reload the page")
		return false
	}
	if ct := r.Header.Get("Content-Type"); !strings.HasPrefix(ct, "application/json") {
		httpError(w, http.StatusUnsupportedMediaType, "send application/json")
		return false
	}
	body := http.MaxBytesReader(w, r.Body, MaxBody)
	dec := json.NewDecoder(body)
	dec.DisallowUnknownFields()
	if err := dec.Decode(v); err != nil {
		var tooBig *http.MaxBytesError
		if errors.As(err, &tooBig) {
			httpError(w, http.StatusRequestEntityTooLarge, fmt.Sprintf("request body over %d bytes", MaxBody))
			return false
		}
		httpError(w, http.StatusBadRequest, "request body: "+err.Error())
		return false
	}
	if dec.More() {
		httpError(w, http.StatusBadRequest, "request body: one JSON value expected")
		return false
	}
	return true
}

func writeJSON(w http.ResponseWriter, code int, v any) {
	w.Header().Set("Content-Type", "application/json")
	w.WriteHeader(code)
	json.NewEncoder(w).Encode(v)
}

func httpError(w http.ResponseWriter, code int, msg string) {
	writeJSON(w, code, map[string]string{"error": msg})
}

// Listen opens a loopback listener on port (0: a free one).
func Listen(port int) (net.Listener, error) {
	return net.Listen("tcp", fmt.Sprintf("127.0.0.1:%d", port))
}

// State returns the state the page shows now.
func (s *Server) State() State {
	s.mu.Lock()
	defer s.mu.Unlock()
	return *s.state
}
