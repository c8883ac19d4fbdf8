// Package html writes report.html: one self-contained page a person can
// look at, with the run's header (inputs, settings, counts by kind and
// state, the caution), pictures of the model with the joints marked by
// state, plots of the measured quantities against the trade rules, and a
// findings table that can be filtered and that links every finding to
// its mark in the pictures.
//
// The page needs no network: no fonts, styles or scripts are fetched;
// its styles and its few lines of plain JavaScript are written into it,
// and every picture is inline SVG. It opens from a file.
//
// # Page model
//
// A Page holds what every command shows (Title, Inputs, Settings,
// Counts, the Caution, the Marks of its joints and its Findings) and an
// ordered list of Sections. A section is anything that writes a part of
// the body: this package provides the overview pictures (Overview), the
// findings table (FindingsTable), the plots of a build (BuildPlots) and
// the part-pair plan views and tables (PartPairs). Each command has its
// assembly in a file of its own: ForBuild (build.go), ForCheck
// (check.go, with the Audit section), ForFlanges (flanges.go, with
// Flanges), ForOffsets (offsets.go, with Surfaces and Contacts); a new
// command adds its own the same way (see DEVELOPERS.md).
//
// Lengths are shown in the unit of the documents (Page.Unit) and
// labelled with it; the outline, found in mm, is converted (Outline.In).
//
// Marks and findings meet through stable ids: the mark of joint J in the
// pictures has the id "axo-"+Anchor(J) (and "xy-", "xz-", "yz-" in the
// three orthographic views), finding n (from 1, in report.json's order)
// is the table row "f-n", and a part pair's section is "pair-A-B".
//
// # Palette
//
// States are told apart by shape as well as colour, in colours of the
// Okabe-Ito set for colour-blind readers (M. Okabe and K. Ito, Color
// Universal Design, 2008; hex values from memory): built, a bluish green
// (#009E73) disc; flagged, an orange (#E69F00) triangle with a black
// outline; not-built, a vermillion (#D55E00) cross. Part outlines are
// grey, weld lines blue (#0072B2), spacings below the minimum vermillion.
//
// Output is deterministic: the same documents and outline give the same
// bytes, whatever GOMAXPROCS.
package html
