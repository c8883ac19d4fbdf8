package geom

// Progress receives progress reports from long steps. Library code calls
// it and never checks whether anybody is watching; commands pass a
// terminal bar or NoProgress. Implementations must be safe for use by one
// goroutine at a time; library code never calls them concurrently.
type Progress interface {
	// Start begins a step with a label and a total amount of work (0 when
	// unknown).
	Start(label string, total int64)
	// Add reports n more units of work done in the current step.
	Add(n int64)
	// Done ends the current step.
	Done()
}

// NoProgress is a Progress that reports nothing.
type NoProgress struct{}

// Start does nothing.
func (NoProgress) Start(string, int64) {}

// Add does nothing.
func (NoProgress) Add(int64) {}

// Done does nothing.
func (NoProgress) Done() {}
