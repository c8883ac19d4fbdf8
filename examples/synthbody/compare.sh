#!/bin/sh
# compare.sh times Joinery side by side with VTK's own reader on the
# synthetic body (2,000,000 elements, 6,000 welds, binary legacy VTK) and
# prints the ratios the issue "Speed and memory" sets:
#
#   inspect / VTK read   the whole `joinery inspect` process against
#                        vtkUnstructuredGridReader's Update() alone (all
#                        arrays read), in a Python process with VTK
#                        (python3-vtk9)
#   build / inspect      two whole processes on the same inputs
#   build B/element      the peak resident memory of `joinery build`
#                        (mapped file pages included) per element
#
# The three are run in turn, round after round, so that the load of a
# shared machine falls on all of them alike; the medians are reported.
# It is a developer's tool, not part of the tests (it takes a minute and
# needs VTK).
#
# Usage: examples/synthbody/compare.sh [DIR]   (RUNS=7 ELEMENTS=2000000)
# DIR (default /tmp/joinery-compare) receives the body and the outputs;
# JOINERY=path times that binary instead of one built from this checkout
# (to compare with an older version).
set -eu
dir=${1:-/tmp/joinery-compare}
runs=${RUNS:-7}
elements=${ELEMENTS:-2000000}
python=${PYTHON:-/usr/bin/python3}
repo=$(cd "$(dirname "$0")/../.." && pwd)
mkdir -p "$dir"
bin=${JOINERY:-$dir/joinery}
[ -n "${JOINERY:-}" ] || (cd "$repo" && go build -o "$bin" ./cmd/joinery)
if [ ! -f "$dir/body.vtk" ] || [ "$(cat "$dir/.elements" 2>/dev/null)" != "$elements" ]; then
	(cd "$repo" && go run ./examples/synthbody -elements "$elements" -welds $((elements * 3 / 1000)) -bolts 20 -format vtk -out "$dir")
	echo "$elements" >"$dir/.elements"
fi
exec "$python" - "$dir" "$runs" "$bin" <<'EOF'
import os, statistics, subprocess, sys, time
import vtk

d, runs, joinery = sys.argv[1], int(sys.argv[2]), sys.argv[3]
body = os.path.join(d, "body.vtk")
inputs = ["-m", body, "-p", os.path.join(d, "parts.yaml"), "-j", os.path.join(d, "welds.csv")]
commands = {
    "inspect": [joinery, "inspect", *inputs],
    "build": [joinery, "build", *inputs, "-o", os.path.join(d, "out"), "--quiet"],
}

def vtk_read():
    r = vtk.vtkUnstructuredGridReader()
    r.SetFileName(body)
    for f in ("Scalars", "Vectors", "Normals", "Tensors", "ColorScalars", "TCoords", "Fields"):
        getattr(r, "ReadAll%sOn" % f)()
    t = time.perf_counter()
    r.Update()
    t = time.perf_counter() - t
    return t, r.GetOutput().GetNumberOfCells()

def run(argv):
    # /usr/bin/time reports the peak memory of its child; a child of this
    # process would count the pages it shared with it before exec.
    t = time.perf_counter()
    p = subprocess.run(["/usr/bin/time", "-f", "%M", *argv], stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    t = time.perf_counter() - t
    if p.returncode not in (0, 1):
        sys.exit("%s failed (%d): %s" % (" ".join(argv), p.returncode, p.stderr))
    return t, int(p.stderr.split()[-1]) * 1024  # KiB

times = {"vtk": [], "inspect": [], "build": []}
rss = {"inspect": [], "build": []}
cells = 0
for name, argv in commands.items():
    run(argv)  # warm-up: the file in the page cache, the output directory made
for i in range(runs):
    t, cells = vtk_read()
    times["vtk"].append(t)
    for name, argv in commands.items():
        t, m = run(argv)
        times[name].append(t)
        rss[name].append(m)
med = {k: statistics.median(v) for k, v in times.items()}
print("%d rounds, %d elements, medians (min..max):" % (runs, cells))
for k, v in times.items():
    print("  %-8s %.3f s (%.3f..%.3f)" % (k, med[k], min(v), max(v)))
for k, v in rss.items():
    m = statistics.median(v)
    print("  %-8s peak %.0f MB, %.0f B/element" % (k, m / 1e6, m / cells))
print("inspect / VTK read  %.2f  (target <= 1.25)" % (med["inspect"] / med["vtk"]))
print("build / inspect     %.2f  (target <= 1.5)" % (med["build"] / med["inspect"]))
print("build B/element     %.0f  (target <= 160)" % (statistics.median(rss["build"]) / cells))
EOF
