package reservoir

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestBadCorpus loads every malformed case under testdata/bad at the root
// of the repository. Each case directory holds case.yaml (and its maps)
// and expect.txt, a substring the error message must contain: it names
// the file and the culprit (line, row and column, key, cell or well). The
// command-line tests reuse the same corpus.
func TestBadCorpus(t *testing.T) {
	root := filepath.Join("..", "testdata", "bad")
	dirs, err := os.ReadDir(root)
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, de := range dirs {
		if !de.IsDir() {
			continue
		}
		n++
		dir := filepath.Join(root, de.Name())
		t.Run(de.Name(), func(t *testing.T) {
			exp, err := os.ReadFile(filepath.Join(dir, "expect.txt"))
			if err != nil {
				t.Fatal(err)
			}
			want := strings.TrimSpace(string(exp))
			if want == "" {
				t.Fatal("empty expect.txt")
			}
			m, err := Load(filepath.Join(dir, "case.yaml"))
			if err == nil {
				t.Fatalf("loaded without error (%d wells); want %q", len(m.Wells), want)
			}
			msg := err.Error()
			t.Log(msg)
			if !strings.Contains(msg, want) {
				t.Fatalf("message\n  %s\ndoes not contain\n  %s", msg, want)
			}
			// Every message starts with a file name from the case
			// directory.
			if !strings.HasPrefix(msg, dir+string(filepath.Separator)) {
				t.Errorf("message does not start with a file of %s: %s", dir, msg)
			}
			var ie *InputError
			var we *WellError
			if !errors.As(err, &ie) && !errors.As(err, &we) {
				t.Errorf("error %T is neither an *InputError nor a *WellError", err)
			}
		})
	}
	if n < 30 {
		t.Errorf("the corpus has %d cases; want at least 30", n)
	}
}
