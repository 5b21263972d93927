package main

import "flag"

// The flags several commands share, defined once with one wording each
// (issue 14). What differs between commands (what -json writes, what -plot
// draws) is passed in and completes the same sentence.

// specFlag defines -spec.
func specFlag(fs *flag.FlagSet) *string {
	return fs.String("spec", "", "spec `FILE` (YAML) describing the net")
}

// dataFlag defines -data: a CSV file with a header row; labelled says the
// label column is needed.
func dataFlag(fs *flag.FlagSet, labelled bool) *string {
	if labelled {
		return fs.String("data", "", "labelled CSV `FILE` with a header row")
	}
	return fs.String("data", "", "CSV `FILE` with a header row; the label column may be absent")
}

// labelFlag defines -label; fromModel says the default is the model's own
// label column rather than the file's last column.
func labelFlag(fs *flag.FlagSet, fromModel bool) *string {
	if fromModel {
		return fs.String("label", "", "name of the label `COLUMN` (default the model's)")
	}
	return fs.String("label", "", "name of the label `COLUMN` (default the last column)")
}

// modelFlag defines -model.
func modelFlag(fs *flag.FlagSet) *string {
	return fs.String("model", "", "model `FILE` written by seine train")
}

// iterationsFlag defines -iterations.
func iterationsFlag(fs *flag.FlagSet) *int {
	return fs.Int("iterations", 0, "iteration limit of each fit, epochs for momentum and adam (default the spec's train.iterations, else 10000)")
}

// standardizeFlag defines -standardize.
func standardizeFlag(fs *flag.FlagSet) *bool {
	return fs.Bool("standardize", true, "centre and scale each number input on the training rows (-standardize=false to leave them)")
}

// jsonFlag defines -json; what says what it writes.
func jsonFlag(fs *flag.FlagSet, what string) *bool {
	return fs.Bool("json", false, "write "+what+" as JSON on standard output")
}

// plotFileFlag defines -plot; what says what it draws.
func plotFileFlag(fs *flag.FlagSet, what string) *string {
	return fs.String("plot", "", "also draw "+what+" to `FILE`.png or FILE.svg")
}

// quietFlag defines -quiet.
func quietFlag(fs *flag.FlagSet) *bool {
	return fs.Bool("quiet", false, "no progress on standard error")
}

// thresholdFlag defines -threshold, the operating threshold override of
// sigmoid outputs.
func thresholdFlag(fs *flag.FlagSet) *float64 {
	return fs.Float64("threshold", 0, "sigmoid outputs only: probability in (0, 1) at or above which a class is decided (default the model's operating thresholds, else 0.5)")
}

// checkThreshold reports a -threshold outside (0, 1); 0 means unset.
func checkThreshold(t float64) error {
	if t != 0 && !(t > 0 && t < 1) {
		return usagef("-threshold %g: want a probability in (0, 1)", t)
	}
	return nil
}

// requireFlags returns the usage error "-NAME is required" for the first of
// the flags, given as name, value pairs, whose value is empty.
func requireFlags(nameValues ...string) error {
	for i := 0; i+1 < len(nameValues); i += 2 {
		if nameValues[i+1] == "" {
			return usagef("-%s is required", nameValues[i])
		}
	}
	return nil
}
