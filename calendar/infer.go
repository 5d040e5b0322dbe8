package calendar

import (
	"fmt"
	"time"
)

// Infer returns the coarsest frequency on whose grid every time of every
// group lies, each group counted from its own first time: the spacing is
// the greatest common divisor of the offsets, tried in whole months
// first (giving yearly, quarterly or every n months), then whole days
// (weekly or every n days), then whole minutes (hourly or every n
// minutes). Times within a group need not be sorted or distinct. Groups
// with fewer than two distinct times say nothing about the spacing; when
// no group has two, or the times are not whole minutes apart, the error
// wraps ErrFrequency.
//
// ReadCSV in the root package infers a file's frequency with it, and so
// can any reader of long-format data that must agree with ReadCSV.
func Infer(groups ...[]time.Time) (Frequency, error) {
	for _, u := range []Unit{Month, Day, Minute} {
		base := Every(1, u)
		g, ok := 0, true
		for _, times := range groups {
			if len(times) == 0 {
				continue
			}
			for _, t := range times[1:] {
				n, err := base.Between(times[0], t)
				if err != nil {
					ok = false
					break
				}
				g = gcd(g, n)
			}
			if !ok {
				break
			}
		}
		if !ok || g == 0 {
			continue
		}
		switch {
		case u == Month && g%12 == 0:
			return Every(g/12, Year), nil
		case u == Month && g%3 == 0:
			return Every(g/3, Quarter), nil
		case u == Day && g%7 == 0:
			return Every(g/7, Week), nil
		case u == Minute && g%60 == 0:
			return Every(g/60, Hour), nil
		}
		return Every(g, u), nil
	}
	return Frequency{}, fmt.Errorf("calendar: %w: cannot infer it from the times (need two distinct times, spaced by whole minutes, days or months)", ErrFrequency)
}

func gcd(a, b int) int {
	if a < 0 {
		a = -a
	}
	if b < 0 {
		b = -b
	}
	for b != 0 {
		a, b = b, a%b
	}
	return a
}
