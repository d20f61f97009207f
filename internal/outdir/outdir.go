// Package outdir writes a run's output folder safely: every file goes to a
// temporary name in its final folder and is renamed when complete; a
// manifest records what floodtrace wrote, so a folder holding files that
// floodtrace did not write is refused unless forced, and nothing outside
// the folder is touched.
package outdir

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"
)

// Manifest is the name of the file that lists what floodtrace wrote.
const Manifest = ".floodtrace-files"

// Dir is an output folder being written.
type Dir struct {
	Path    string
	old     map[string]bool
	written map[string]bool
}

// Open prepares dir for a new set of outputs. It creates the folder if
// needed. A folder that holds files not listed in its manifest is refused
// unless force is set; with force those files are left alone. A previous
// summary.json is removed first, so the folder reads as unfinished until the
// new run completes.
func Open(dir string, force bool) (*Dir, error) { return open(dir, force, false) }

// Reopen opens the folder of a finished run to add or redraw files: the
// run's own files, summary.json included, are kept (see KeepAll).
func Reopen(dir string) (*Dir, error) {
	d, err := open(dir, true, true)
	if err != nil {
		return nil, err
	}
	d.KeepAll()
	return d, nil
}

func open(dir string, force, keepSummary bool) (*Dir, error) {
	d := &Dir{Path: dir, old: map[string]bool{}, written: map[string]bool{}}
	st, err := os.Stat(dir)
	switch {
	case err == nil && !st.IsDir():
		return nil, fmt.Errorf("%s: exists and is not a folder", dir)
	case err == nil:
		if b, err := os.ReadFile(filepath.Join(dir, Manifest)); err == nil {
			for _, l := range strings.Split(string(b), "\n") {
				if l = strings.TrimSpace(l); l != "" {
					d.old[l] = true
				}
			}
		}
		var foreign []string
		err := filepath.WalkDir(dir, func(p string, e fs.DirEntry, err error) error {
			if err != nil {
				return err
			}
			if e.IsDir() {
				return nil
			}
			rel, _ := filepath.Rel(dir, p)
			rel = filepath.ToSlash(rel)
			if rel == Manifest || d.old[rel] || strings.Contains(filepath.Base(rel), ".floodtrace-tmp") {
				return nil
			}
			foreign = append(foreign, rel)
			return nil
		})
		if err != nil {
			return nil, fmt.Errorf("%s: %w", dir, err)
		}
		if len(foreign) > 0 && !force {
			sort.Strings(foreign)
			ex := foreign
			if len(ex) > 3 {
				ex = ex[:3]
			}
			return nil, fmt.Errorf("%s: the folder holds %d file(s) floodtrace did not write (%s); choose another folder or use --force to write beside them", dir, len(foreign), strings.Join(ex, ", "))
		}
		if d.old["summary.json"] && !keepSummary {
			if err := os.Remove(filepath.Join(dir, "summary.json")); err != nil && !os.IsNotExist(err) {
				return nil, &WriteError{Path: filepath.Join(dir, "summary.json"), Err: err}
			}
		}
	case os.IsNotExist(err):
		if err := os.MkdirAll(dir, 0o755); err != nil {
			return nil, &WriteError{Path: dir, Err: err}
		}
	default:
		return nil, &WriteError{Path: dir, Err: err}
	}
	return d, nil
}

// Create writes the file rel (slash-separated, inside the folder) through
// write, atomically.
func (d *Dir) Create(rel string, write func(w io.Writer) error) error {
	clean := filepath.Clean(filepath.FromSlash(rel))
	if filepath.IsAbs(clean) || clean == ".." || strings.HasPrefix(clean, ".."+string(filepath.Separator)) {
		return fmt.Errorf("outdir: %q is outside the output folder", rel)
	}
	if err := WriteFile(filepath.Join(d.Path, clean), write); err != nil {
		return err
	}
	d.written[filepath.ToSlash(clean)] = true
	return nil
}

// Bytes writes b to rel atomically.
func (d *Dir) Bytes(rel string, b []byte) error {
	return d.Create(rel, func(w io.Writer) error { _, err := w.Write(b); return err })
}

// Adopt records files written by another writer (already atomic) as ours.
func (d *Dir) Adopt(rel ...string) {
	for _, r := range rel {
		d.written[filepath.ToSlash(filepath.Clean(r))] = true
	}
}

// KeepAll marks every file of the previous manifest as written, so Close
// keeps them.
func (d *Dir) KeepAll() {
	for r := range d.old {
		d.written[r] = true
	}
}

// Redraw marks the files of the previous manifest for which drawn is
// true as not written, so Close removes those the new set does not write
// again: a redraw replaces the set of pictures instead of leaving the old
// size or format beside the new one.
func (d *Dir) Redraw(drawn func(rel string) bool) {
	for r := range d.old {
		if drawn(r) {
			delete(d.written, r)
		}
	}
}

// Close removes files of the previous run that this run did not write
// again (they were floodtrace's own) and writes the new manifest.
func (d *Dir) Close() error {
	for r := range d.old {
		if !d.written[r] {
			p := filepath.Join(d.Path, filepath.FromSlash(r))
			if err := os.Remove(p); err != nil && !os.IsNotExist(err) {
				return &WriteError{Path: p, Err: err}
			}
		}
	}
	names := make([]string, 0, len(d.written))
	for r := range d.written {
		names = append(names, r)
	}
	sort.Strings(names)
	var buf bytes.Buffer
	for _, n := range names {
		buf.WriteString(n)
		buf.WriteByte('\n')
	}
	return WriteFile(filepath.Join(d.Path, Manifest), func(w io.Writer) error {
		_, err := w.Write(buf.Bytes())
		return err
	})
}

// WriteError is a failure to write an output file: the disk is full,
// the folder is not writable, and so on. It is a problem of the output
// folder or the machine, not of the input.
type WriteError struct {
	Path string
	Err  error
}

// Error returns "cannot write PATH: cause".
func (e *WriteError) Error() string { return "cannot write " + e.Path + ": " + e.Err.Error() }

// Unwrap returns the cause.
func (e *WriteError) Unwrap() error { return e.Err }

// WriteFile writes path atomically: to a temporary file in the same folder,
// then renamed over path. The folder is created if needed. A failure of the
// file system is a *WriteError; an error of write that is not one is
// returned with the path in front.
func WriteFile(path string, write func(w io.Writer) error) (err error) {
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		return &WriteError{Path: path, Err: err}
	}
	f, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".floodtrace-tmp*")
	if err != nil {
		return &WriteError{Path: path, Err: err}
	}
	tmp := f.Name()
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(tmp)
		}
	}()
	bw := bufio.NewWriterSize(f, 1<<16)
	if err = write(bw); err != nil {
		var pe *fs.PathError
		if errors.As(err, &pe) {
			return &WriteError{Path: path, Err: err}
		}
		return fmt.Errorf("%s: %w", path, err)
	}
	if err = bw.Flush(); err != nil {
		return &WriteError{Path: path, Err: err}
	}
	if err = f.Close(); err != nil {
		return &WriteError{Path: path, Err: err}
	}
	if err = os.Chmod(tmp, 0o644); err != nil {
		return &WriteError{Path: path, Err: err}
	}
	if err = os.Rename(tmp, path); err != nil {
		return &WriteError{Path: path, Err: err}
	}
	return nil
}
