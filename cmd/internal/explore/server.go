package explore

import (
	"context"
	"crypto/rand"
	"crypto/subtle"
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

// AccessParam is the query parameter of the printed address that carries
// the access token of a server reachable from other machines; AccessCookie
// keeps it for the page's later requests.
const (
	AccessParam  = "access"
	AccessCookie = "narrows-access"
)

// Server holds a study in memory and answers the page.
type Server struct {
	study *Study
	token string
	// hosts are the Host header values accepted (the address served).
	hosts map[string]bool
	// access, when set, is required on every request (see RequireAccess).
	access string

	mu      sync.Mutex
	choices Choices
	state   *State
	// dirty says the choices differ from those of the study file.
	dirty bool
	// cache keeps what the analysis derives from the day graphs across
	// requests (nil when the study asks for none).
	cache *cache
}

// New analyses the study once and returns its server. The token, which
// the page carries on every state-changing request, is random.
func New(ctx context.Context, st *Study) (*Server, error) {
	if st == nil || st.Store == nil || st.Regions == nil {
		return nil, errors.New("explore: a study needs its day graphs and regions")
	}
	token, err := randomToken()
	if err != nil {
		return nil, err
	}
	s := &Server{study: st, token: token, hosts: map[string]bool{}}
	c := Choices{Scan: st.Scan, Before: st.Before, After: st.After, Exclusions: st.Exclusions, Focus: st.Focus}
	if err := c.Exclusions.Validate(len(st.Regions.Regions)); err != nil {
		return nil, err
	}
	if !st.NoCache {
		s.cache = newCache(st.Store)
	}
	state, err := analyse(ctx, st, c, s.cache)
	if err != nil {
		return nil, err
	}
	s.choices, s.state = c, state
	return s, nil
}

func randomToken() (string, error) {
	var b [16]byte
	if _, err := rand.Read(b[:]); err != nil {
		return "", err
	}
	return hex.EncodeToString(b[:]), nil
}

// Token returns the page's token.
func (s *Server) Token() string { return s.token }

// RequireAccess makes every request need a new random access token, which
// it returns: a server that other machines can reach answers only those
// given the address with the token (?access=TOKEN, kept as a cookie for
// the page's later requests). Without the token a request gets 401, with
// a wrong one 403. Call it before serving.
func (s *Server) RequireAccess() (string, error) {
	token, err := randomToken()
	if err != nil {
		return "", err
	}
	s.access = token
	return token, nil
}

// sameToken compares a token given with the expected one in constant time.
func sameToken(got, want string) bool {
	return subtle.ConstantTimeCompare([]byte(got), []byte(want)) == 1
}

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
	mux.HandleFunc("POST /api/report", s.postReport)
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
		if s.access != "" && !s.checkAccess(w, r) {
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

// checkAccess refuses a request without the access token (401) or with a
// wrong one (403). The token comes in the address's query or in the
// cookie set when the page was opened with it.
func (s *Server) checkAccess(w http.ResponseWriter, r *http.Request) bool {
	got := r.URL.Query().Get(AccessParam)
	fromQuery := got != ""
	if !fromQuery {
		if c, err := r.Cookie(AccessCookie); err == nil {
			got = c.Value
		}
	}
	switch {
	case got == "":
		w.Header().Set("WWW-Authenticate", `narrows-access realm="narrows explore"`)
		httpError(w, http.StatusUnauthorized, "this server needs its access token: open the address narrows explore printed, with ?"+AccessParam+"=...")
		return false
	case !sameToken(got, s.access):
		httpError(w, http.StatusForbidden, "wrong access token: open the address narrows explore printed")
		return false
	}
	if fromQuery {
		http.SetCookie(w, &http.Cookie{Name: AccessCookie, Value: got, Path: "/", HttpOnly: true, SameSite: http.SameSiteStrictMode})
	}
	return true
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
	c, err := set.apply(s.choices, s.study.Store.Meta.Windows, s.study.ParseFocus, len(s.study.Regions.Regions))
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
	state, err := analyse(r.Context(), s.study, c, s.cache)
	if err != nil {
		// A choice the analysis refuses (a period with no data, say) is the
		// request's fault; the current state stays.
		httpError(w, http.StatusUnprocessableEntity, err.Error())
		return
	}
	s.choices, s.state, s.dirty = c, state, true
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
	path, err := s.save()
	if err != nil {
		httpError(w, http.StatusInternalServerError, "save: "+err.Error())
		return
	}
	writeJSON(w, http.StatusOK, map[string]string{"saved": path})
}

// save writes the choices into the study file. The caller holds s.mu.
func (s *Server) save() (string, error) {
	path, err := s.study.Save(s.choices)
	if err != nil {
		return "", err
	}
	s.state.Saved, s.dirty = path, false
	return path, nil
}

// ReportAnswer is the answer to "Write report": the study file saved
// first, when the choices had changed since, and the files written.
type ReportAnswer struct {
	Saved   string   `json:"saved,omitempty"`
	Written []string `json:"written"`
}

// postReport writes the report of the current choices. A report names the
// study file it comes from, so changed choices are saved first: the study
// file then reproduces the report, as narrows run would write it.
func (s *Server) postReport(w http.ResponseWriter, r *http.Request) {
	var none struct{}
	if !s.readRequest(w, r, &none) {
		return
	}
	if s.study.Report == nil || s.study.Save == nil {
		httpError(w, http.StatusConflict, "no study file to report on: start explore with a study file")
		return
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	var ans ReportAnswer
	if s.dirty {
		path, err := s.save()
		if err != nil {
			httpError(w, http.StatusInternalServerError, "save before the report: "+err.Error())
			return
		}
		ans.Saved = path
	}
	written, err := s.study.Report(r.Context())
	if err != nil {
		httpError(w, http.StatusInternalServerError, "report: "+err.Error())
		return
	}
	ans.Written = written
	writeJSON(w, http.StatusOK, ans)
}

// readRequest checks the token, the content type and the size, and
// decodes the JSON body into v, refusing unknown fields.
func (s *Server) readRequest(w http.ResponseWriter, r *http.Request, v any) bool {
	if got := r.Header.Get(TokenHeader); got == "" || !sameToken(got, s.token) {
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

// IsLoopback reports whether addr ("host:port") is reached only from this
// machine: a loopback IP address or "localhost". An empty host (every
// interface) is not.
func IsLoopback(addr string) (bool, error) {
	host, _, err := net.SplitHostPort(addr)
	if err != nil {
		return false, err
	}
	if host == "localhost" {
		return true, nil
	}
	ip := net.ParseIP(host)
	return ip != nil && ip.IsLoopback(), nil
}

// State returns the state the page shows now.
func (s *Server) State() State {
	s.mu.Lock()
	defer s.mu.Unlock()
	return *s.state
}
