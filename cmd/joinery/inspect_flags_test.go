package main

import (
	"encoding/json"
	"strings"
	"testing"
)

// inspect honours --warp-limit 0 and refuses negative or non-finite
// --warp-limit and --box-margin with exit 2, naming the flag, and
// --warp-limit without --deep.
func TestInspectFlagValidation(t *testing.T) {
	const mesh = "../../testdata/native/small.jmesh"
	// --warp-limit 0 must be honoured (or refused), not turned into 10.
	code, out, errs := runCLI(t, "inspect", "--mesh", mesh, "--deep", "--json", "--warp-limit", "0")
	if code == exitOK {
		var v struct {
			WarpLimit float64 `json:"warp_limit_deg"`
		}
		if err := json.Unmarshal([]byte(out), &v); err != nil {
			t.Fatal(err)
		}
		if v.WarpLimit != 0 {
			t.Errorf("--warp-limit 0 reported as %g", v.WarpLimit)
		}
	}
	for _, args := range [][]string{
		{"--warp-limit", "-5"},
		{"--warp-limit", "NaN"},
		{"--box-margin", "-1"},
		{"--box-margin", "NaN"},
	} {
		code, _, errs = runCLI(t, append([]string{"inspect", "--mesh", mesh, "--deep", "--json"}, args...)...)
		if code != exitBadInput || !strings.Contains(errs, strings.TrimPrefix(args[0], "--")) {
			t.Errorf("%v: exit %d, stderr %q; want exit 2 naming the flag", args, code, strings.TrimSpace(errs))
		}
	}
	// --warp-limit without --deep would be ignored: refused.
	if code, _, errs := runCLI(t, "inspect", "--mesh", mesh, "--warp-limit", "5"); code != exitBadInput || !strings.Contains(errs, "--warp-limit applies with --deep only") {
		t.Errorf("--warp-limit without --deep: exit %d, stderr %q", code, strings.TrimSpace(errs))
	}
}
