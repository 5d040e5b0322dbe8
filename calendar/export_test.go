package calendar

// EasterMonthDay exposes the integer Easter computation to the tests, so
// that a whole 5,700,000-year cycle can be checked without building
// time.Time values.
var EasterMonthDay = easterMonthDay
