package pathplan

import (
	"bytes"
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// TestReportOpensInChromium loads a report in headless Chromium (Debian's
// chromium package) and checks that the page it builds holds the
// expected elements and that the browser logs no errors about the page.
// It is skipped when Chromium is not installed.
func TestReportOpensInChromium(t *testing.T) {
	bin := ""
	for _, name := range []string{"chromium", "chromium-browser"} {
		if p, err := exec.LookPath(name); err == nil {
			bin = p
			break
		}
	}
	if bin == "" {
		t.Skip("chromium not installed")
	}
	if testing.Short() {
		t.Skip("starts a browser")
	}
	c, err := Compare(context.Background(), readTiny(t), CompareOptions{Detail: true})
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	page := filepath.Join(dir, "report.html")
	var b bytes.Buffer
	if err := WriteReport(&b, c); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(page, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithTimeout(context.Background(), 90*time.Second)
	defer cancel()
	cmd := exec.CommandContext(ctx, bin, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic",
		"--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync",
		"--enable-logging=stderr", "--v=0",
		"--user-data-dir="+filepath.Join(dir, "profile"), "--dump-dom", "file://"+page)
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	if err := cmd.Run(); err != nil {
		t.Fatalf("chromium: %v\n%s", err, errb.String())
	}
	dom := out.String()
	for _, want := range []string{`id="comparison"`, `id="caution"`, `id="notes"`, `class="legend"`, `</html>`} {
		if !strings.Contains(dom, want) {
			t.Errorf("DOM lacks %s", want)
		}
	}
	for class, n := range map[string]int{"top": 2, "engagement": 2, "speed": 2, "wear": 2} {
		if got := strings.Count(dom, `<svg class="`+class+`"`); got != n*len(c.Features) {
			t.Errorf("DOM has %d %s plots, want %d", got, class, n*len(c.Features))
		}
	}
	// Messages about the page itself: script errors, failed loads, parse
	// problems. Chromium's own complaints about the sandbox, D-Bus and
	// the GPU are not about the page.
	for _, line := range strings.Split(errb.String(), "\n") {
		if strings.Contains(line, "CONSOLE") || strings.Contains(line, "Uncaught") ||
			strings.Contains(line, "net::ERR") || strings.Contains(line, "report.html") {
			t.Errorf("chromium: %s", line)
		}
	}
}
