package pipeline

import (
	"io"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/writers"
	"github.com/joinery-cae/joinery/writers/html"
)

// PageFile is report.html's name in every output set.
const PageFile = "report.html"

// pageJob finds the model's outline for report.html while the run does
// its work (html.NewOutline only reads the mesh), and gives the page's
// file of the output set, which waits for the outline when rendered.
// Every command that writes a report adds its page so:
//
//	page := startPage(in.Model.Mesh)
//	...
//	files = append(files, page.file(func(o *html.Outline) *html.Page { return html.ForX(rep, ..., o) }))
type pageJob struct {
	outline chan *html.Outline
}

func startPage(m *geom.Mesh) *pageJob {
	j := &pageJob{outline: make(chan *html.Outline, 1)}
	go func() { j.outline <- html.NewOutline(m) }()
	return j
}

// file returns report.html's file; page builds the page from the
// outline (in mm: the page builders convert it to their documents'
// unit).
func (j *pageJob) file(page func(*html.Outline) *html.Page) writers.File {
	return writers.File{Name: PageFile, Render: func(w io.Writer) error {
		return html.Render(w, page(<-j.outline))
	}}
}
