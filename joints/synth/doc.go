// Package synth generates synthetic body-in-white models: shell meshes of
// spot-welded sheet-metal assemblies with their joint lists and the ground
// truth a connector builder must find, for tests and benchmarks at any
// scale.
//
// # Layout
//
// A model is one chained body of assemblies, each a few sheets extruded
// along a length and joined along one or two flanges. Every assembly is
// drawn in a local frame (x along its length, y across, z normal to its
// flanges). The assemblies lie side by side along a chain (their local
// y), each tilted about its own x axis by up to 25 degrees (a bounded
// random walk, at most 10 degrees between neighbours), and the whole
// chain is turned by one random rotation. The outermost sheet of each
// side of an assembly runs on as a flat strip where it has too little
// bare width, and a bent link plate lies under the right strip of each
// assembly and the left strip of the next, welded to each by three spot
// welds in a triangle (25 and 40 mm apart), so that every part belongs to
// one assembly, held rigidly even by welds that couple translations
// only, unless the welds are too few: links take at most half of the
// welds. There are four kinds of assembly:
//
//   - rail on floor: a hat-section rail whose two flanges sit on a flat
//     floor panel (two weld lines);
//   - sill box: two hat sections facing each other, flange on flange, as a
//     closed box section (two weld lines);
//   - lap: two flat panels overlapping along one edge (one weld line);
//   - angle on panel: an L-shaped angle whose wide flange sits on a flat
//     panel (one weld line; bolts prefer these flanges).
//
// Rails and sill boxes may carry a flat doubler on top of one flange over
// a quarter to a half of its length, at one end; welds through the doubler
// are three-sheet stacks. Doublers are added until about a tenth of the
// weld line length runs through three sheets.
//
// Meshes are drawn on mid-surfaces. Sheets in contact have their
// mid-surfaces (t1+t2)/2 apart. Thicknesses come from 0.7, 0.8, 1.0, 1.2,
// 1.5 and 2.0 mm. Every part has its own element size (within 15 per cent
// of Config.ElementSize) and its own extent along the length, so facing
// flanges never have matching meshes; some parts have a few per cent of
// their quads split into triangles, and some have their element normals
// reversed. Part ids are 100*a+j for assembly a (from 1) and sheet j (from
// 1; the link plate to the next assembly is the assembly's last sheet);
// node and element ids of part p start at p*1,000,000+1, so ids are
// sparse and never contiguous across parts. Coordinates are rounded to
// 0.001 mm.
//
// # Sizing
//
// There is one assembly per 10,000 requested elements (two main parts of
// about 5,000 elements each). The cross-section widths and the lengths are
// scaled together so that the element count lands on Config.Elements and
// the flange length gives room for the requested welds at a pitch close to
// 32 mm; the pitch actually used is the largest in 25 to 40 mm (car-body
// weld pitch, common practice) at which all joints fit, and it is the
// same on every weld line. Weld runs are shortened at their ends to hit
// the exact count.
//
// # Joints
//
// Spot welds sit on the centre line of the faying flanges, at least 12 mm
// from the ends of every sheet of their stack and at least 9 mm from its
// side edges; the point lies on the stack's normal mid-way between the
// mid-surfaces of its outermost sheets. Bolts (M6, M8 or M10 by flange
// width) replace a weld station on two-sheet flanges, with the stations
// either side of them left empty. About 15 per cent of the welds and half
// of the bolts list their parts; about 30 per cent of the welds give a
// nugget diameter of 5*sqrt(t) (t the governing thickness).
//
// Link welds (group "<assembly>-link") come after the welds of the
// flanges; their stacks are the link plate, then the strip's sheet.
//
// Generation is deterministic for a Config: the same Config gives the same
// model, bit for bit.
package synth
