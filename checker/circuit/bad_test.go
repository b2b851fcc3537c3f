package circuit

import (
	"errors"
	"io/fs"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"golang.org/x/tools/txtar"
)

// archive is one test case of testdata/bad: a circuit.toml, optional library
// files, an optional ruleset-libraries list and the wanted error as
// "FILE:LINE:COL: message fragment". A case without circuit.toml tests an
// unreadable path.
type archive struct {
	name      string
	files     map[string][]byte
	libraries []string
	wantFile  string
	wantLine  int
	wantCol   int
	wantFrag  string
}

func readArchive(t *testing.T, path string) archive {
	t.Helper()
	ar, err := txtar.ParseFile(path)
	if err != nil {
		t.Fatal(err)
	}
	a := archive{name: filepath.Base(path), files: map[string][]byte{}}
	for _, f := range ar.Files {
		switch {
		case f.Name == "want":
			line := strings.TrimSpace(string(f.Data))
			parts := strings.SplitN(line, ":", 4)
			if len(parts) != 4 {
				t.Fatalf("%s: want %q is not FILE:LINE:COL: fragment", path, line)
			}
			a.wantFile = parts[0]
			a.wantLine, _ = strconv.Atoi(parts[1])
			a.wantCol, _ = strconv.Atoi(parts[2])
			a.wantFrag = strings.TrimSpace(parts[3])
		case f.Name == "ruleset-libraries":
			a.libraries = strings.Fields(string(f.Data))
		case strings.HasSuffix(f.Name, ".toml"):
			a.files[f.Name] = f.Data
		default:
			t.Fatalf("%s: unknown section %q", path, f.Name)
		}
	}
	if a.wantLine < 1 || a.wantCol < 1 || a.wantFrag == "" {
		t.Fatalf("%s: incomplete want", path)
	}
	return a
}

func (a archive) readFile(p string) ([]byte, error) {
	if d, ok := a.files[filepath.ToSlash(p)]; ok {
		return d, nil
	}
	return nil, &fs.PathError{Op: "open", Path: p, Err: fs.ErrNotExist}
}

// TestBadInput loads every malformed circuit of testdata/bad and checks the
// file, line, column (code points, FORMAT.md §5) and message of the error
// (FORMAT.md §7). The expected positions were counted by hand in each file.
func TestBadInput(t *testing.T) {
	paths, err := filepath.Glob("../../testdata/bad/*.txtar")
	if err != nil {
		t.Fatal(err)
	}
	if len(paths) < 25 {
		t.Fatalf("only %d malformed circuits in testdata/bad", len(paths))
	}
	for _, p := range paths {
		a := readArchive(t, p)
		t.Run(strings.TrimSuffix(a.name, ".txtar"), func(t *testing.T) {
			_, err := Load("circuit.toml", Options{ReadFile: a.readFile, Libraries: a.libraries})
			var ie *InputError
			if !errors.As(err, &ie) {
				t.Fatalf("got %v (%T), want an *InputError", err, err)
			}
			if ie.Pos.File != a.wantFile || ie.Pos.Line != a.wantLine || ie.Pos.Col != a.wantCol {
				t.Errorf("at %s:%d:%d, want %s:%d:%d (%v)", ie.Pos.File, ie.Pos.Line, ie.Pos.Col, a.wantFile, a.wantLine, a.wantCol, err)
			}
			if !strings.Contains(ie.Msg, a.wantFrag) {
				t.Errorf("message %q lacks %q", ie.Msg, a.wantFrag)
			}
			prefix := a.wantFile + ":" + strconv.Itoa(a.wantLine) + ":" + strconv.Itoa(a.wantCol) + ": "
			if !strings.HasPrefix(err.Error(), prefix) {
				t.Errorf("Error() = %q, want the GNU form %q...", err.Error(), prefix)
			}
		})
	}
}
