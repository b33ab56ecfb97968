package main

import (
	"context"
	"errors"
	"io"
)

// runCheck is not built yet.
func runCheck(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	return errors.New("check: not built yet")
}
