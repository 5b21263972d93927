package score

import "errors"

// Errors returned by the ranking, calibration, threshold and temperature
// functions. Each is wrapped with the row, class or setting concerned.
var (
	// ErrShape means matrices or slices whose sizes disagree, or no rows.
	ErrShape = errors.New("score: mismatched or empty input")
	// ErrValue means a score that is NaN, a probability outside [0, 1],
	// a non-finite logit or target, or a setting outside its range.
	ErrValue = errors.New("score: invalid value")
	// ErrNoPositives means rows among which no row is positive, so recall
	// is undefined and no threshold can be chosen.
	ErrNoPositives = errors.New("score: no positive rows")
	// ErrUnreachable means that no candidate threshold reaches the
	// target recall or precision.
	ErrUnreachable = errors.New("score: no threshold reaches the target")
)
