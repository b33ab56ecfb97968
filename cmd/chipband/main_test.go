package main

import (
	"bytes"
	"context"
	"strings"
	"testing"
)

// runCLI runs the tool in-process and returns its exit status and output.
func runCLI(t *testing.T, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var out, errb bytes.Buffer
	code = run(context.Background(), args, &out, &errb)
	return code, out.String(), errb.String()
}

func TestUsage(t *testing.T) {
	code, _, stderr := runCLI(t)
	if code != 2 || !strings.Contains(stderr, "usage: chipband") {
		t.Fatalf("no arguments: exit %d, stderr %q; want 2 and usage", code, stderr)
	}
	code, _, stderr = runCLI(t, "frobnicate")
	if code != 2 || !strings.Contains(stderr, `unknown command "frobnicate"`) {
		t.Fatalf("unknown command: exit %d, stderr %q", code, stderr)
	}
	if code, _, _ = runCLI(t, "--help"); code != 0 {
		t.Fatalf("--help: exit %d, want 0", code)
	}
}

func TestEveryCommandHasHelp(t *testing.T) {
	for name := range commands() {
		code, _, stderr := runCLI(t, name, "--help")
		if code != 0 {
			t.Errorf("%s --help: exit %d, want 0 (stderr %q)", name, code, stderr)
		}
		if !strings.Contains(stderr, "usage: chipband "+name) {
			t.Errorf("%s --help: no usage line in %q", name, stderr)
		}
	}
}
