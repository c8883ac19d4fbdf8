package spot

import (
	"context"
	"fmt"
	"runtime"
	"sync"
	"sync/atomic"
	"time"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// Build makes the connectors of the spot welds among js (other kinds are
// left out) with options o, defaults resolved against the mesh of x.
// Welds are processed in parallel; each connector depends on its weld
// alone, so the result is the same whatever GOMAXPROCS. The connectors
// come in the order of js; joints.NewResult sorts them and hands out ids.
func Build(ctx context.Context, x *geom.Index, js []joints.Joint, o joints.BuildOptions, prog geom.Progress) ([]joints.Connector, error) {
	return BuildShared(ctx, x, js, o, prog, nil)
}

// BuildShared builds like Build, taking each weld's first stage (stack,
// nugget, their checks) from st when an earlier build with the same
// stack options made it, and keeping it there for later builds; st nil
// keeps nothing. Every build given st must be of the same js on the
// same index.
func BuildShared(ctx context.Context, x *geom.Index, js []joints.Joint, o joints.BuildOptions, prog geom.Progress, st *Stacks) ([]joints.Connector, error) {
	if err := o.Validate(); err != nil {
		return nil, fmt.Errorf("spot: %w", err)
	}
	o = o.Defaults(joints.MaxThickness(x.Mesh()))
	if prog == nil {
		prog = geom.NoProgress{}
	}
	var welds []*joints.Joint
	for i := range js {
		if js[i].Kind == joints.Spot {
			welds = append(welds, &js[i])
		}
	}
	out := make([]joints.Connector, len(welds))
	var stages []stage
	if st != nil {
		set := st.set(&o)
		set.once.Do(func() {
			set.stages = make([]stage, len(welds))
			parallelWelds(ctx, len(welds), func(i int) { set.stages[i] = firstStage(x, welds[i], &o) })
		})
		if err := ctx.Err(); err != nil {
			return nil, fmt.Errorf("spot: build interrupted: %w", err)
		}
		stages = set.stages
	}
	var next, done atomic.Int64
	workers := min(runtime.GOMAXPROCS(0), max(1, len(welds)/64))
	var wg sync.WaitGroup
	for range workers {
		wg.Go(func() {
			for {
				i := int(next.Add(1) - 1)
				if i >= len(welds) || ctx.Err() != nil {
					return
				}
				if stages != nil {
					out[i] = finishOne(x, welds[i], &o, &stages[i])
				} else {
					s := firstStage(x, welds[i], &o)
					out[i] = finishOne(x, welds[i], &o, &s)
				}
				done.Add(1)
			}
		})
	}
	prog.Start("building spot welds", int64(len(welds)))
	finished := make(chan struct{})
	go func() { wg.Wait(); close(finished) }()
	tick := time.NewTicker(100 * time.Millisecond)
	var reported int64
	for waiting := true; waiting; {
		select {
		case <-finished:
			waiting = false
		case <-tick.C:
		}
		d := done.Load()
		prog.Add(d - reported)
		reported = d
	}
	tick.Stop()
	prog.Done()
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("spot: build interrupted: %w", err)
	}
	return out, nil
}

// finishOne makes the connector of one spot weld from its first stage
// s (stack, nugget, checks): ends, links, state.
func finishOne(x *geom.Index, j *joints.Joint, o *joints.BuildOptions, s *stage) joints.Connector {
	c := joints.Connector{Joint: *j, Attach: o.AttachFor(j.Group), DOFs: o.SpotDOFs}
	s.apply(&c)
	if s.stop {
		c.Status = joints.NotBuilt
		return c
	}
	var capped []joints.Finding
	c.Ends, capped = attach(x, &c.Stack, c.Attach, c.Diameter, j)
	c.Findings = append(c.Findings, capped...)
	if c.Attach == joints.NodePair {
		c.Findings = append(c.Findings, checkFacing(&c.Stack, c.Ends, c.Diameter/2, o.NodeFactor*c.Diameter/2, j)...)
	}
	var lfs []joints.Finding
	c.Links, lfs = link(x.Mesh(), j, &c.Stack, c.Ends, c.DOFs, o)
	c.Findings = append(c.Findings, lfs...)
	c.SetStatus()
	return c
}

// parallelWelds calls f for every weld index, on as many goroutines as
// there are processors.
func parallelWelds(ctx context.Context, n int, f func(i int)) {
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), max(1, n/64)) {
		wg.Go(func() {
			for {
				i := int(next.Add(1) - 1)
				if i >= n || ctx.Err() != nil {
					return
				}
				f(i)
			}
		})
	}
	wg.Wait()
}

// nugget returns the weld's nugget diameter, mm, and where it comes from:
// the list, or the rule applied to the stack's governing thickness.
func nugget(j *joints.Joint, st *joints.Stack, o *joints.BuildOptions) (float64, string) {
	if j.Diameter > 0 {
		return j.Diameter, "list"
	}
	return o.Rule.Diameter(joints.GoverningThickness(st.Thicknesses())), o.Rule.String()
}
