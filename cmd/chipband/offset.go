package main

import (
	"context"
	"errors"
	"io"
)

// runOffset is not built yet.
func runOffset(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	return errors.New("offset: not built yet")
}
