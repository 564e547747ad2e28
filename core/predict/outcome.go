package predict

import (
	"fmt"
	"strings"
	"time"

	"tracewright/core/eventlog"
)

// Outcome is a rule a user states about how a case ends.
type Outcome interface {
	Met(l *eventlog.Log, acts []int32, times []int64) bool
	String() string
}

type endsWith string
type contains string
type longerThan time.Duration

func (o endsWith) Met(l *eventlog.Log, acts []int32, _ []int64) bool {
	return len(acts) > 0 && l.Activities.Name(acts[len(acts)-1]) == string(o)
}
func (o endsWith) String() string { return "ends with " + string(o) }

func (o contains) Met(l *eventlog.Log, acts []int32, _ []int64) bool {
	for _, a := range acts {
		if l.Activities.Name(a) == string(o) {
			return true
		}
	}
	return false
}
func (o contains) String() string { return "contains " + string(o) }

func (o longerThan) Met(_ *eventlog.Log, _ []int32, times []int64) bool {
	return len(times) > 0 && time.Duration(times[len(times)-1]-times[0])*time.Microsecond > time.Duration(o)
}
func (o longerThan) String() string { return "takes longer than " + time.Duration(o).String() }

// ParseOutcome reads a rule: "ends:ACTIVITY", "contains:ACTIVITY" or "longer:DURATION" (a Go
// duration such as 240h, or days as 10d).
func ParseOutcome(s string) (Outcome, error) {
	kind, arg, ok := strings.Cut(s, ":")
	if !ok || arg == "" {
		return nil, fmt.Errorf("an outcome is ends:ACTIVITY, contains:ACTIVITY or longer:DURATION, not %q", s)
	}
	switch kind {
	case "ends":
		return endsWith(arg), nil
	case "contains":
		return contains(arg), nil
	case "longer":
		if d, ok := strings.CutSuffix(arg, "d"); ok {
			var days float64
			if _, err := fmt.Sscan(d, &days); err == nil && days > 0 {
				return longerThan(time.Duration(days * 24 * float64(time.Hour))), nil
			}
		}
		d, err := time.ParseDuration(arg)
		if err != nil || d <= 0 {
			return nil, fmt.Errorf("the deadline %q is not a duration such as 72h or 10d", arg)
		}
		return longerThan(d), nil
	}
	return nil, fmt.Errorf("unknown outcome %q (ends, contains or longer)", kind)
}
