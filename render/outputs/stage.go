package outputs

import (
	"bufio"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
)

// Outputs stages files in a hidden temporary folder inside the output
// directory and moves them into place only when all are written, so a
// failed or interrupted run leaves no partial file behind (each rename is
// atomic on one file system).
type Outputs struct {
	dir, stage string
	names      []string
}

// NewOutputs creates the output directory (if needed) and a staging folder in it.
func NewOutputs(dir string) (*Outputs, error) {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("output directory: %w", err)
	}
	stage, err := os.MkdirTemp(dir, fmt.Sprintf(".kerrscope-partial-%d-", os.Getpid()))
	if err != nil {
		return nil, fmt.Errorf("output directory: %w", err)
	}
	return &Outputs{dir: dir, stage: stage}, nil
}

// Write stages one file, produced by write.
func (o *Outputs) Write(name string, write func(io.Writer) error) error {
	f, err := os.Create(filepath.Join(o.stage, name))
	if err != nil {
		return err
	}
	bw := bufio.NewWriterSize(f, 1<<16)
	if err := write(bw); err != nil {
		f.Close()
		return fmt.Errorf("%s: %w", name, err)
	}
	if err := bw.Flush(); err != nil {
		f.Close()
		return fmt.Errorf("%s: %w", name, err)
	}
	if err := f.Close(); err != nil {
		return fmt.Errorf("%s: %w", name, err)
	}
	o.names = append(o.names, name)
	return nil
}

// Commit moves every staged file into the output directory and returns
// their paths, sorted.
func (o *Outputs) Commit() ([]string, error) {
	defer os.RemoveAll(o.stage)
	var paths []string
	for _, n := range o.names {
		dst := filepath.Join(o.dir, n)
		if err := os.Rename(filepath.Join(o.stage, n), dst); err != nil {
			return paths, err
		}
		paths = append(paths, dst)
	}
	sort.Strings(paths)
	return paths, nil
}

// Abort discards everything staged.
func (o *Outputs) Abort() { os.RemoveAll(o.stage) }
