package gamma

import "errors"

var (
	// ErrTooFew is returned when Fit gets fewer than MinSamples values.
	ErrTooFew = errors.New("gamma: too few values to fit")

	// ErrNotFinite is returned when a value to fit is NaN or infinite, or
	// the values are too large to sum.
	ErrNotFinite = errors.New("gamma: value is not finite")

	// ErrNotPositive is returned when a value to fit is zero or negative;
	// the gamma distribution with location 0 only covers x > 0.
	ErrNotPositive = errors.New("gamma: value is not positive")

	// ErrNoSpread is returned when all values to fit are equal, or so
	// nearly equal that the shape would exceed MaxShape.
	ErrNoSpread = errors.New("gamma: values are all equal or nearly so")

	// ErrNoConvergence is returned when the shape iteration in Fit does
	// not converge.
	ErrNoConvergence = errors.New("gamma: shape estimate did not converge")

	// ErrBadDist is returned by Dist.Validate when the shape is outside
	// [MinShape, MaxShape] or the scale is not a finite positive number.
	ErrBadDist = errors.New("gamma: shape or scale out of range")
)
