package document

// Caution is the one text Joinery shows wherever a person or a
// downstream file sees results: the README, every command's help, the
// reports, connectors.json and the headers of connectors.csv and
// connectors.vtk (a test checks that the README holds it word for word).
const Caution = "Joinery is a modelling aid. Connectors for crash structures, seat and belt anchorages, lifting points " +
	"or anything else whose failure can hurt someone need physical test, the applicable codes and qualified engineering " +
	"judgement; Joinery's output does not replace them. Check every report, and run the sensitivity variants " +
	"(attachment method, coupled degrees of freedom) that your model's purpose calls for."

// ShortCaution fits where a full paragraph does not (the 256-character
// title line of a VTK legacy file) and points to the full text.
const ShortCaution = "a modelling aid, not a substitute for test, codes and engineering judgement: see the caution in report.txt"
