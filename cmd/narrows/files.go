package main

import (
	"crypto/sha256"
	"encoding/hex"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"
)

// fileSHA256 returns the hex SHA-256 of a file's bytes.
func fileSHA256(path string) (string, error) {
	f, err := os.Open(path)
	if err != nil {
		return "", err
	}
	defer f.Close()
	h := sha256.New()
	if _, err := io.Copy(h, f); err != nil {
		return "", fmt.Errorf("%s: %w", path, err)
	}
	return hex.EncodeToString(h.Sum(nil)), nil
}

// outputDir makes the folder an output goes into, as a user naming a new
// folder for the results expects, and returns it.
func outputDir(path string) (string, error) {
	dir := filepath.Dir(path)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return "", fmt.Errorf("output folder for %s: %w", path, err)
	}
	return dir, nil
}

func stderrIsTerminal() bool { return term.IsTerminal(int(os.Stderr.Fd())) }

// progress returns a callback that draws a byte-count progress bar on
// stderr when it is a terminal, and a function that finishes the bar. In
// pipes and CI both do nothing.
func progress(env *environment, description string) (update func(done, total int64), finish func()) {
	if !env.interactive {
		return nil, func() {}
	}
	var bar *progressbar.ProgressBar
	update = func(done, total int64) {
		if bar == nil {
			bar = progressbar.NewOptions64(total,
				progressbar.OptionSetWriter(env.stderr),
				progressbar.OptionSetDescription(description),
				progressbar.OptionShowBytes(true),
				progressbar.OptionThrottle(100_000_000),
				progressbar.OptionClearOnFinish(),
			)
		}
		_ = bar.Set64(done)
	}
	finish = func() {
		if bar != nil {
			_ = bar.Finish()
		}
	}
	return update, finish
}

// stageProgress returns a callback for patterns.ScanOptions.Progress that
// draws a count bar per stage on stderr when it is a terminal, and a
// function that finishes the last bar. In pipes and CI both do nothing.
func stageProgress(env *environment) (update func(stage string, done, total int), finish func()) {
	if !env.interactive {
		return nil, func() {}
	}
	var bar *progressbar.ProgressBar
	current := ""
	finish = func() {
		if bar != nil {
			_ = bar.Finish()
			bar = nil
		}
	}
	update = func(stage string, done, total int) {
		if stage != current || bar == nil {
			finish()
			current = stage
			bar = progressbar.NewOptions(total,
				progressbar.OptionSetWriter(env.stderr),
				progressbar.OptionSetDescription(stage),
				progressbar.OptionShowCount(),
				progressbar.OptionThrottle(100_000_000),
				progressbar.OptionClearOnFinish(),
			)
		}
		_ = bar.Set(done)
	}
	return update, finish
}

// parseStudyArgs parses the flags of a command that takes exactly one study
// file, before or after its options, and returns the file.
func parseStudyArgs(env *environment, fs *flag.FlagSet, args []string) (string, error) {
	var files []string
	if err := parseFlagsWithRest(env, fs, args, func(rest []string) { files = append(files, rest...) }); err != nil {
		return "", err
	}
	if len(files) != 1 || files[0] == "" {
		return "", usagef("give exactly one study file")
	}
	return files[0], nil
}
