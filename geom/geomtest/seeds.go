package geomtest

import (
	"os"
	"path/filepath"
	"testing"
)

// AddFiles adds the contents of every file that matches one of the glob
// patterns (filepath.Match syntax) to the seed corpus of f, in the order
// filepath.Glob returns them. It stops the fuzz test if a pattern is
// malformed or matches no file, or if a file cannot be read.
func AddFiles(f *testing.F, patterns ...string) {
	f.Helper()
	for _, pattern := range patterns {
		files, err := filepath.Glob(pattern)
		if err != nil {
			f.Fatalf("seed files %q: %v", pattern, err)
		}
		if len(files) == 0 {
			f.Fatalf("no seed files match %q", pattern)
		}
		for _, name := range files {
			data, err := os.ReadFile(name)
			if err != nil {
				f.Fatal(err)
			}
			f.Add(data)
		}
	}
}
