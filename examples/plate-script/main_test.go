package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestPlateScript(t *testing.T) {
	out := filepath.Join(t.TempDir(), "plate.nc")
	var b bytes.Buffer
	if err := run(context.Background(), out, &b); err != nil {
		t.Fatal(err)
	}
	prog, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	// RS-274 set-up of chipband's writer (design notes §7) and the caution.
	for _, want := range []string{"G21 G90 G17", "(op: sensor pocket)", "(op: rebate)", "M30", "Machining can injure"} {
		if !strings.Contains(string(prog), want) {
			t.Errorf("program lacks %q", want)
		}
	}
	if !strings.Contains(b.String(), "wrote "+out) {
		t.Errorf("output: %s", b.String())
	}
}
