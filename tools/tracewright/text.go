package main

import (
	"fmt"
	"io"
	"strings"
	"time"

	"tracewright/core/intake"
	"tracewright/core/overview"
)

// duration writes seconds the way people read them: the two largest units.
func duration(s float64) string {
	d := time.Duration(s * float64(time.Second))
	switch {
	case d >= 24*time.Hour:
		days := int(d / (24 * time.Hour))
		return fmt.Sprintf("%dd %dh", days, int((d%(24*time.Hour))/time.Hour))
	case d >= time.Hour:
		return fmt.Sprintf("%dh %dm", int(d/time.Hour), int((d%time.Hour)/time.Minute))
	case d >= time.Minute:
		return fmt.Sprintf("%dm %ds", int(d/time.Minute), int((d%time.Minute)/time.Second))
	}
	return fmt.Sprintf("%.1fs", s)
}

func printOverview(w io.Writer, path string, o *overview.Overview, rep *intake.Report) {
	fmt.Fprintf(w, "%s (%s, %d bytes)\n", path, rep.Format, rep.Bytes)
	fmt.Fprintf(w, "  cases       %d\n  events      %d\n  activities  %d\n  variants    %d\n  resources   %d\n",
		o.Cases, o.Events, o.Activities, o.Variants, o.Resources)
	if o.Instances != o.Events {
		fmt.Fprintf(w, "  activity instances %d (start and complete events paired)\n", o.Instances)
	}
	if o.First != "" {
		fmt.Fprintf(w, "  from %s to %s (%s)\n", o.First, o.Last, duration(o.SpanSeconds))
		d := o.CaseDuration
		fmt.Fprintf(w, "  case duration: median %s, mean %s, 90%% within %s, longest %s\n",
			duration(d.Median), duration(d.Mean), duration(d.P90), duration(d.Max))
	}
	e := o.EventsPerCase
	fmt.Fprintf(w, "  events per case: median %g, mean %.1f, min %g, max %g\n", e.Median, e.Mean, e.Min, e.Max)
	if o.UntimedEvents > 0 {
		fmt.Fprintf(w, "  %d events have no timestamp\n", o.UntimedEvents)
	}
	names := func(cs []overview.Count, k int) string {
		var parts []string
		for i, c := range cs {
			if i == k {
				parts = append(parts, fmt.Sprintf("and %d more", len(cs)-k))
				break
			}
			parts = append(parts, fmt.Sprintf("%s (%d)", c.Name, c.Events))
		}
		return strings.Join(parts, ", ")
	}
	fmt.Fprintf(w, "  cases start with: %s\n", names(o.StartActivities, 5))
	fmt.Fprintf(w, "  cases end with:   %s\n", names(o.EndActivities, 5))
	fmt.Fprintln(w, "\nactivities (events, cases):")
	for _, a := range o.ActivityCounts {
		fmt.Fprintf(w, "  %-32s %8d %8d\n", a.Name, a.Events, a.Cases)
	}
	fmt.Fprintf(w, "\nmost frequent variants (%.0f%% of cases):\n", o.VariantsCoverage*100)
	for _, v := range o.TopVariants {
		fmt.Fprintf(w, "  %5.1f%% %6d  %s\n", v.Share*100, v.Cases, strings.Join(v.Activities, " > "))
	}
	for _, wmsg := range rep.Warnings {
		fmt.Fprintln(w, "\nnote:", wmsg)
	}
	if rep.Problems.Skipped > 0 {
		fmt.Fprintln(w, "\nset aside:", rep.Problems.Summary())
	}
}
