package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"strings"
)

// exitInterrupted is the exit code of a run stopped by Ctrl-C or SIGTERM:
// 128 + SIGINT, as shells report it.
const exitInterrupted = 130

// interrupted reports whether err, or the context, says the run was
// interrupted, and prints the one line that says what was kept.
func interrupted(ctx context.Context, w io.Writer, name string, err error, files *runFiles) bool {
	if !errors.Is(err, context.Canceled) && ctx.Err() == nil {
		return false
	}
	if len(files.written) == 0 {
		fmt.Fprintf(w, "narrows %s: interrupted; nothing written\n", name)
	} else {
		fmt.Fprintf(w, "narrows %s: interrupted; kept %s (complete), nothing else written\n", name, strings.Join(files.written, ", "))
	}
	return true
}
