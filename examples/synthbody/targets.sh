#!/bin/bash
# targets.sh times the seven commands whose speed targets the README's
# Performance table gives, as whole processes, on a synthetic body made
# with 300 bolts:
#
#   go run ./examples/synthbody -elements 2000000 -welds 6000 -bolts 300 \
#       -format both -out /tmp/sb-bolt
#   sed 's/body.jmesh/body.vtk/' /tmp/sb-bolt/job.yaml > /tmp/sb-bolt/job-vtk.yaml
#
# Every binary given runs every command in each round, in turn, so that the
# load of a shared machine falls on all alike; the summary gives medians
# and the medians of the per-round ratios (lowest and highest round in
# brackets), against `inspect` or `build` of the same binary and against
# the first binary (give an older version first to compare with it).
# It is a developer's tool, not part of the tests (about 40 s a round).
#
# Usage: examples/synthbody/targets.sh ROUNDS BIN...   (BODY=/tmp/sb-bolt OUT=/tmp/joinery-targets)
set -eu
rounds=$1
shift
body=${BODY:-/tmp/sb-bolt}
out=${OUT:-/tmp/joinery-targets}
mkdir -p "$out"
log=$out/times.log
: >"$log"
mesh=(-m "$body/body.vtk" -p "$body/parts.yaml")
"$1" build "$body/job-vtk.yaml" -o "$out/b" --quiet
for r in $(seq "$rounds"); do
	for bin in "$@"; do
		n=$(basename "$bin")
		for k in inspect build buildoff check flanges offsets sweep; do
			case $k in
			inspect) c=("$bin" inspect "${mesh[@]}") ;;
			build) c=("$bin" build "$body/job-vtk.yaml" -o "$out/b-$n") ;;
			buildoff) c=("$bin" build "$body/job-vtk.yaml" --links offset -o "$out/bo-$n") ;;
			check) c=("$bin" check "${mesh[@]}" --connectors "$out/b/connectors.json" -o "$out/c-$n") ;;
			flanges) c=("$bin" flanges "${mesh[@]}" -o "$out/f-$n") ;;
			offsets) c=("$bin" offsets "${mesh[@]}" -j "$body/welds.csv" -o "$out/o-$n") ;;
			sweep) c=("$bin" sweep "$body/job-vtk.yaml" --vary bolt-dofs=tx+ty+tz,tx+ty+tz+rx+ry+rz \
				--vary attach=interpolated,patch --vary links=gap,offset -o "$out/s-$n") ;;
			esac
			/usr/bin/time -a -o "$log" -f "$r $n $k %e %U %S %M %R" "${c[@]}" --quiet >/dev/null ||
				echo "round $r: $n $k failed" >&2
		done
	done
done
python3 - "$log" <<'PY'
import collections, statistics as st, sys
d = collections.defaultdict(dict)
order = []
for line in open(sys.argv[1]):
    p = line.split()
    if len(p) == 8 and p[0].isdigit():
        if p[1] not in order:
            order.append(p[1])
        d[(p[1], p[2])][int(p[0])] = (float(p[3]), float(p[4]) + float(p[5]), int(p[6]), int(p[7]))
def ratio(a, b):
    rs = [d[a][r][0] / d[b][r][0] for r in d[a] if r in d[b]]
    return f"{st.median(rs):.2f} ({min(rs):.2f}-{max(rs):.2f})"
for b in order:
    print("==", b)
    for k in ["inspect", "build", "buildoff", "check", "flanges", "offsets", "sweep"]:
        v = list(d[(b, k)].values())
        if not v:
            continue
        s = (f"{k:9s} wall {st.median(x[0] for x in v):.2f} s  cpu {st.median(x[1] for x in v):.2f} s  "
             f"peak {st.median(x[2] for x in v) / 1024:.0f} MB  faults {st.median(x[3] for x in v):.0f}")
        ref = {"buildoff": "build", "sweep": "build"}.get(k, "inspect")
        if k != "inspect":
            s += f"  /{ref} {ratio((b, k), (b, ref))}"
        if b != order[0]:
            s += f"  /{order[0]} {ratio((b, k), (order[0], k))}"
        print(s)
PY
