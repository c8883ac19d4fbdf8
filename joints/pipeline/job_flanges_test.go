package pipeline

import (
	"reflect"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/joints"
)

func TestJobFlanges(t *testing.T) {
	job, err := ReadJob(strings.NewReader(`version: 1
meshes: [a.vtk]
build:
  attach: patch
flanges:
  pitch: 32.5
  end_margin: 8
  pairs: [[100, 200], [300, 200]]
`), "j.yaml")
	if err != nil {
		t.Fatal(err)
	}
	s, err := job.FlangeSettings()
	if err != nil {
		t.Fatal(err)
	}
	want := joints.FlangeOptions{Pitch: joints.Pitch{MM: 32.5}, EndMargin: 8, Pairs: [][2]int64{{100, 200}, {300, 200}}}
	if !reflect.DeepEqual(s.Flanges, want) || s.Options.Attach != joints.Patch {
		t.Errorf("settings %+v, want %+v with patch attachment", s.Flanges, want)
	}
	job, err = ReadJob(strings.NewReader("version: 1\nmeshes: [a.vtk]\nflanges: {pitch: table}\n"), "j.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if s, err := job.FlangeSettings(); err != nil || !s.Flanges.Pitch.Table {
		t.Errorf("pitch table: %+v, %v", s.Flanges, err)
	}
}

func TestJobFlangesErrors(t *testing.T) {
	const head = "version: 1\nmeshes: [a.vtk]\nflanges:\n"
	for _, tc := range []struct{ name, in, want string }{
		{"key", head + "  pich: 30\n", `j.yaml:4: flanges: unknown key "pich" (did you mean "pitch"?)`},
		{"pitch", head + "  pitch: often\n", `j.yaml:4: pitch "often": want a length in mm above 0, or table`},
		{"pitch negative", head + "  pitch: -30\n", `j.yaml:4: pitch "-30"`},
		{"pitch finer than a nugget", head + "  pitch: 1\n", `j.yaml:4: pitch "1": want a length in mm of at least 2.9`},
		{"end margin", head + "  end_margin: -2\n", "j.yaml:4: end_margin: -2 mm is negative"},
		{"pair size", head + "  pairs: [[100, 200, 300]]\n", "j.yaml:4: pairs: want two part ids"},
		{"pair self", head + "  pairs: [[100, 100]]\n", "j.yaml:4: pairs: a part does not pair with itself"},
		{"pair id", head + "  pairs: [[100, x]]\n", `j.yaml:4: pairs: want an integer, got "x"`},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ReadJob(strings.NewReader(tc.in), "j.yaml")
			checkErr(t, err, tc.want)
		})
	}
}
