package report

import (
	"fmt"
	"io"

	"narrows/patterns/appraise"
)

// AppraisalCautions are printed with every appraisal.
var AppraisalCautions = []string{
	"A screening estimate of the savings of the sample fleet in the data, not a traffic forecast.",
	"Routes are shortest times at free-flow speeds (class defaults or tagged maxspeed); there is no congestion feedback.",
	"Induced demand, rerouting of other traffic and wider network effects are not modelled.",
	"Any scheme needs a proper appraisal under local design standards by qualified, licensed engineers.",
}

// AppraisalObserved is the saving the trips showed after a scheme opened,
// per day, for comparison with the estimate.
type AppraisalObserved struct {
	Name            string
	Metres, Seconds float64
}

// WriteAppraisalText writes an appraisal as a plain-text table: the
// candidates ranked by vehicle-hours saved per day per km of new road.
func WriteAppraisalText(w io.Writer, place string, a *appraise.Appraisal, observed *AppraisalObserved) error {
	fmt.Fprintf(w, "Candidate links for %s\n", place)
	fmt.Fprintf(w, "%d trips over %d days, %d routed; routed now %.1f vehicle-km and %.2f vehicle-hours per day at free-flow speeds (observed %.1f vehicle-km, %.2f vehicle-hours), detour %.2f\n",
		a.Trips, a.Days, a.Routed, a.RoutedMetres/1000, a.RoutedSeconds/3600, a.ObservedMetres/1000, a.ObservedSeconds/3600, a.Detour)
	fmt.Fprintf(w, "%-4s %-24s %-9s %8s %12s %12s %8s %7s %14s\n", "rank", "candidate", "kind", "km", "veh-km/day", "veh-h/day", "using", "detour", "veh-h/day/km")
	for i, r := range a.Results {
		kind := "yours"
		if r.Candidate.Generated {
			kind = "generated"
		}
		perKM := r.SecondsSavedPerMetre * 1000 / 3600
		fmt.Fprintf(w, "%-4d %-24s %-9s %8.2f %12.1f %12.2f %7.0f%% %7.2f %14.2f\n", i+1, clip(r.Candidate.Link.Name, 24), kind,
			r.LengthMetres/1000, r.VehicleMetresSaved/1000, r.VehicleSecondsSaved/3600, 100*r.ShareUsing, r.Detour, perKM)
	}
	if observed != nil {
		fmt.Fprintf(w, "Observed after %s opened, on the before period's trips per day: %.1f vehicle-km and %.2f vehicle-hours saved per day.\n",
			observed.Name, observed.Metres/1000, observed.Seconds/3600)
	}
	for _, c := range AppraisalCautions {
		fmt.Fprintln(w, "Note:", c)
	}
	_, err := fmt.Fprintln(w)
	return err
}

func clip(s string, n int) string {
	r := []rune(s)
	if len(r) > n {
		return string(r[:n-1]) + "…"
	}
	return s
}
