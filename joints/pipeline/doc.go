// Package pipeline runs Joinery's jobs from end to end, the same way for
// every command: read the inputs a job names (Load), index the model,
// build connectors with the job packages under joints, check them,
// render the documents and write them as one output set. Commands in
// cmd/joinery only turn flags into a Job and an exit status.
package pipeline
