package main

import (
	"bytes"
	"context"
	"io"
	"net/http"
	"regexp"
	"strings"
	"sync"
	"testing"
	"time"

	"narrows/cmd/internal/explore"
)

// lockedBuffer is a stdout that a test reads while the command writes.
type lockedBuffer struct {
	mu  sync.Mutex
	buf bytes.Buffer
}

func (b *lockedBuffer) Write(p []byte) (int, error) {
	b.mu.Lock()
	defer b.mu.Unlock()
	return b.buf.Write(p)
}

func (b *lockedBuffer) String() string {
	b.mu.Lock()
	defer b.mu.Unlock()
	return b.buf.String()
}

// serveExplore runs narrows explore with args in the background until the
// test ends and returns the address it printed.
func serveExplore(t *testing.T, args ...string) string {
	t.Helper()
	ctx, cancel := context.WithCancel(context.Background())
	out := &lockedBuffer{}
	done := make(chan int, 1)
	go func() {
		done <- dispatch(ctx, &environment{stdout: out, stderr: io.Discard}, append([]string{"explore"}, args...))
	}()
	t.Cleanup(func() {
		cancel()
		// Stopped as by Ctrl-C.
		if code := <-done; code != exitOK && code != exitInterrupted {
			t.Errorf("explore %v ended with %d", args, code)
		}
	})
	printed := regexp.MustCompile(`open (http://\S+)`)
	for deadline := time.Now().Add(2 * time.Minute); time.Now().Before(deadline); time.Sleep(50 * time.Millisecond) {
		if m := printed.FindStringSubmatch(out.String()); m != nil {
			return m[1]
		}
		select {
		case code := <-done:
			done <- code
			t.Fatalf("explore %v ended with %d before serving:\n%s", args, code, out.String())
		default:
		}
	}
	t.Fatalf("explore %v printed no address:\n%s", args, out.String())
	return ""
}

// TestExploreListen checks the access token of a server other machines can
// reach, and that a loopback server needs none.
func TestExploreListen(t *testing.T) {
	if testing.Short() {
		t.Skip("simulated study")
	}
	study := exploreStudyFile(t)
	for _, c := range []struct {
		args []string
		code int
	}{
		{[]string{"--listen", "nonsense", study}, exitUsage},
		{[]string{"--listen", "127.0.0.1:0", "--port", "8080", study}, exitUsage},
	} {
		if code, _, stderr := runCLI(t, append([]string{"explore"}, c.args...)...); code != c.code || stderr == "" {
			t.Errorf("explore %v: exit %d (want %d), %q", c.args, code, c.code, stderr)
		}
	}

	// Every interface: the printed address carries the token.
	printed := serveExplore(t, "--listen", "0.0.0.0:0", study)
	m := regexp.MustCompile(`^http://.*:(\d+)/\?access=([0-9a-f]{32})$`).FindStringSubmatch(printed)
	if m == nil {
		t.Fatalf("printed address %q has no port and access token", printed)
	}
	base, access := "http://127.0.0.1:"+m[1], m[2]
	get := func(path string, cookie string) (int, string, *http.Response) {
		t.Helper()
		req, _ := http.NewRequest("GET", base+path, nil)
		if cookie != "" {
			req.AddCookie(&http.Cookie{Name: explore.AccessCookie, Value: cookie})
		}
		res, err := http.DefaultClient.Do(req)
		if err != nil {
			t.Fatal(err)
		}
		defer res.Body.Close()
		body, _ := io.ReadAll(res.Body)
		return res.StatusCode, string(body), res
	}
	wrong := otherToken(access)
	for _, c := range []struct {
		name, path, cookie string
		code               int
	}{
		{"page without the token", "/", "", 401},
		{"state without the token", "/api/state", "", 401},
		{"script without the token", "/app.js", "", 401},
		{"page with a wrong token", "/?access=" + wrong, "", 403},
		{"state with a wrong cookie", "/api/state", wrong, 403},
		{"state with the cookie", "/api/state", access, 200},
		{"page with the token", "/?access=" + access, "", 200},
	} {
		if code, body, _ := get(c.path, c.cookie); code != c.code {
			t.Errorf("%s: status %d, want %d (%.100s)", c.name, code, c.code, body)
		}
	}
	_, page, res := get("/?access="+access, "")
	var cookie *http.Cookie
	for _, ck := range res.Cookies() {
		if ck.Name == explore.AccessCookie {
			cookie = ck
		}
	}
	if cookie == nil || cookie.Value != access || !cookie.HttpOnly || cookie.SameSite != http.SameSiteStrictMode {
		t.Fatalf("opening the printed address sets the cookie %+v", cookie)
	}
	tok := regexp.MustCompile(`name="narrows-token" content="([0-9a-f]+)"`).FindStringSubmatch(page)
	if tok == nil {
		t.Fatal("the page carries no token")
	}
	post := func(cookie, pageToken string) int {
		req, _ := http.NewRequest("POST", base+"/api/exclusions", strings.NewReader(`{"days":[],"pairs":[]}`))
		req.Header.Set("Content-Type", "application/json")
		if pageToken != "" {
			req.Header.Set(explore.TokenHeader, pageToken)
		}
		if cookie != "" {
			req.AddCookie(&http.Cookie{Name: explore.AccessCookie, Value: cookie})
		}
		res, err := http.DefaultClient.Do(req)
		if err != nil {
			t.Fatal(err)
		}
		res.Body.Close()
		return res.StatusCode
	}
	for _, c := range []struct {
		name, cookie, token string
		code                int
	}{
		{"change without the access token", "", tok[1], 401},
		{"change without the page's token", access, "", 403},
		{"change with both", access, tok[1], 200},
	} {
		if code := post(c.cookie, c.token); code != c.code {
			t.Errorf("%s: status %d, want %d", c.name, code, c.code)
		}
	}

	// Loopback, the default: no access token, and the address printed
	// carries none.
	local := serveExplore(t, study)
	if strings.Contains(local, "access=") || !strings.HasPrefix(local, "http://127.0.0.1:") {
		t.Errorf("loopback address printed as %q", local)
	}
	res, err := http.Get(local + "api/state")
	if err != nil {
		t.Fatal(err)
	}
	res.Body.Close()
	if res.StatusCode != 200 {
		t.Errorf("loopback state: status %d, want 200", res.StatusCode)
	}
}
