package main

import (
	"context"
	"errors"
	"io"
)

// runCompare is not built yet.
func runCompare(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	return errors.New("compare: not built yet")
}
