package almanac

import "github.com/almanac-go/almanac/calendar"

var calendarErrFrequency = calendar.ErrFrequency
