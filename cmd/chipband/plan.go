package main

import (
	"context"
	"errors"
	"io"
)

// runPlan is not built yet.
func runPlan(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	return errors.New("plan: not built yet")
}
