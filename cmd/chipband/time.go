package main

import (
	"context"
	"errors"
	"io"
)

// runTime is not built yet.
func runTime(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	return errors.New("time: not built yet")
}
