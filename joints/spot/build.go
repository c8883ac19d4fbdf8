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
				out[i] = buildOne(x, welds[i], &o)
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

// buildOne makes the connector of one spot weld: stack, checks, ends,
// links.
func buildOne(x *geom.Index, j *joints.Joint, o *joints.BuildOptions) joints.Connector {
	c := joints.Connector{Joint: *j, Attach: o.AttachFor(j.Group), DOFs: o.SpotDOFs}
	c.Stack, c.Findings = chooseStack(x, j, o)
	if len(c.Stack.Sheets) < 2 {
		c.Status = joints.NotBuilt
		return c
	}
	c.Diameter, c.DiameterSource = nugget(j, &c.Stack, o)
	c.Findings = append(c.Findings, checkSheets(x.Mesh(), j, &c.Stack, c.Diameter, o)...)
	if joints.HasError(c.Findings) {
		c.Status = joints.NotBuilt
		return c
	}
	c.Findings = append(c.Findings, checkStack(x, j, &c.Stack, c.Diameter, o)...)
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

// nugget returns the weld's nugget diameter, mm, and where it comes from:
// the list, or the rule applied to the stack's governing thickness.
func nugget(j *joints.Joint, st *joints.Stack, o *joints.BuildOptions) (float64, string) {
	if j.Diameter > 0 {
		return j.Diameter, "list"
	}
	return o.Rule.Diameter(joints.GoverningThickness(st.Thicknesses())), o.Rule.String()
}
