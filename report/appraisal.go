package report

import (
	"errors"
	"fmt"
	"io"
	"strconv"
	"time"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
	"github.com/xuri/excelize/v2"

	"narrows/patterns/appraise"
)

// Appraisal is the appraisal of candidate links for one weak link, as the
// report shows it: the sheet SheetCandidates, the best candidate on the
// map, a table on the page and the candidates layer
// (WriteCandidatesGeoJSON). narrows appraise writes the same sheet and
// layer on their own (WriteAppraisalWorkbook).
type Appraisal struct {
	// FindingID and Place name the weak link appraised.
	FindingID, Place string
	Result           *appraise.Appraisal
	// Observed is the saving seen after a scheme opened (optional).
	Observed *AppraisalObserved
}

// AppraisalObserved is the saving the trips showed after a scheme opened,
// per day, for comparison with the estimate.
type AppraisalObserved struct {
	Name            string
	Metres, Seconds float64
}

// SheetCandidates is the sheet of the candidate links.
const SheetCandidates = "Candidate links"

// AppraisalCautions are printed with every appraisal, after the sentence
// on speeds (appraisalSpeeds).
var AppraisalCautions = []string{
	"A screening estimate of the savings of the sample fleet in the data, not a traffic forecast.",
	"There is no congestion feedback: the link's own traffic does not slow it or the roads it feeds.",
	"Induced demand, rerouting of other traffic and wider network effects are not modelled.",
	"Any scheme needs a proper appraisal under local design standards by qualified, licensed engineers.",
}

// appraisalSpeeds says which speeds the routes were timed at.
func appraisalSpeeds(a *appraise.Appraisal) string {
	if a.Speeds == appraise.SpeedsObserved {
		return fmt.Sprintf("Routes are shortest times at the observed pace of the weak link's trips: free-flow times (class defaults or tagged maxspeed) times %.2f, the median ratio of their observed time to the free-flow time of their route. A common factor leaves the routes, the vehicle-km saved and the shares as at free-flow.", a.PaceFactor)
	}
	return "Routes are shortest times at free-flow speeds (class defaults or tagged maxspeed), not the speeds observed."
}

// appraisalNotes are the speeds sentence and the cautions.
func appraisalNotes(a *appraise.Appraisal) []string {
	return append([]string{appraisalSpeeds(a)}, AppraisalCautions...)
}

func (ap *Appraisal) check() error {
	if ap.Result == nil {
		return errors.New("report: appraisal without a result")
	}
	return nil
}

// title is the heading of the appraisal.
func (ap *Appraisal) title() string {
	if ap.FindingID == "" {
		return "Candidate links for " + ap.Place
	}
	return "Candidate links for " + ap.Place + " (weak link " + ap.FindingID + ")"
}

// routedLine sums up the routed trips without any candidate.
func (ap *Appraisal) routedLine() string {
	a := ap.Result
	return fmt.Sprintf("%d trips over %d days, %d routed; routed now %.1f vehicle-km and %.2f vehicle-hours per day (observed %.1f vehicle-km, %.2f vehicle-hours); detour %.2f.",
		a.Trips, a.Days, a.Routed, a.RoutedMetres/1000, a.RoutedSeconds/3600, a.ObservedMetres/1000, a.ObservedSeconds/3600, a.Detour)
}

// observedLine is the observed saving, or "".
func (ap *Appraisal) observedLine() string {
	o := ap.Observed
	if o == nil {
		return ""
	}
	return fmt.Sprintf("Observed after %s opened, on the before period's trips per day: %.1f vehicle-km and %.2f vehicle-hours saved per day.",
		o.Name, o.Metres/1000, o.Seconds/3600)
}

// best is the top-ranked candidate that saves time, if any.
func (ap *Appraisal) best() (appraise.Result, bool) {
	if ap == nil || ap.Result == nil || len(ap.Result.Results) == 0 || !(ap.Result.Results[0].VehicleSecondsSaved > 0) {
		return appraise.Result{}, false
	}
	return ap.Result.Results[0], true
}

// bestLabel names the best candidate on the map and in the legend.
func (ap *Appraisal) bestLabel() string {
	r, _ := ap.best()
	return fmt.Sprintf("best candidate link: %s, %.2f vehicle-hours saved per day (screening estimate)", r.Candidate.Link.Name, r.VehicleSecondsSaved/3600)
}

func candidateKind(c appraise.Candidate) string {
	if c.Generated {
		return "generated"
	}
	return "yours"
}

// AppraisalCandidateText is the text that lists a candidate in the
// study's [appraise] candidates key: its drawn line and class.
func AppraisalCandidateText(c appraise.Candidate) string {
	return appraise.FormatLine(c.Link)
}

// appraisalHeader are the columns of the candidates sheet.
var appraisalHeader = []string{"Rank", "Candidate", "Kind", "Length (km)", "Vehicle-km saved per day",
	"Vehicle-hours saved per day", "Share of trips using it", "Detour with it", "Vehicle-hours saved per day per km",
	"Study file text (candidates key)"}

// WriteAppraisalText writes an appraisal as a plain-text table: the
// candidates ranked by vehicle-hours saved per day per km of new road.
func WriteAppraisalText(w io.Writer, ap Appraisal) error {
	if err := ap.check(); err != nil {
		return err
	}
	fmt.Fprintln(w, ap.title())
	fmt.Fprintln(w, ap.routedLine())
	fmt.Fprintf(w, "%-4s %-24s %-9s %8s %12s %12s %8s %7s %14s\n", "rank", "candidate", "kind", "km", "veh-km/day", "veh-h/day", "using", "detour", "veh-h/day/km")
	for i, r := range ap.Result.Results {
		fmt.Fprintf(w, "%-4d %-24s %-9s %8.2f %12.1f %12.2f %7.0f%% %7.2f %14.2f\n", i+1, clip(r.Candidate.Link.Name, 24), candidateKind(r.Candidate),
			r.LengthMetres/1000, r.VehicleMetresSaved/1000, r.VehicleSecondsSaved/3600, 100*r.ShareUsing, r.Detour, r.SecondsSavedPerMetre*1000/3600)
	}
	if l := ap.observedLine(); l != "" {
		fmt.Fprintln(w, l)
	}
	for _, c := range appraisalNotes(ap.Result) {
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

// candidatesSheet writes the candidates sheet: the routed totals, the
// ranked candidates with their figures, the observed saving when known,
// the speeds and the cautions. It is the one writer of the sheet, in the
// study's workbook and in narrows appraise's own.
func (b *book) candidatesSheet(ap *Appraisal) {
	s := b.newSheet(SheetCandidates)
	s.add(b.bold(ap.title()))
	s.para(ap.routedLine(), "J", 140)
	s.skip(1)
	head := s.header(appraisalHeader...)
	for i, r := range ap.Result.Results {
		s.add(intCell(i+1, b.st.integer), b.str(r.Candidate.Link.Name), b.str(candidateKind(r.Candidate)),
			numCell(roundTo(r.LengthMetres/1000, 3), b.st.dec2), numCell(roundTo(r.VehicleMetresSaved/1000, 1), b.st.dec1),
			numCell(roundTo(r.VehicleSecondsSaved/3600, 2), b.st.dec2), numCell(roundTo(r.ShareUsing, 3), b.st.pct),
			numCell(roundTo(r.Detour, 3), b.st.dec2), numCell(roundTo(r.SecondsSavedPerMetre*1000/3600, 2), b.st.dec2),
			b.str(AppraisalCandidateText(r.Candidate)))
	}
	s.filter(head, len(appraisalHeader))
	s.skip(1)
	if l := ap.observedLine(); l != "" {
		s.para(l, "J", 140)
	}
	for _, c := range appraisalNotes(ap.Result) {
		s.para("Note: "+c, "J", 140)
	}
	s.widths[10] = min(s.widths[10], 60)
	s.finish()
}

// WriteAppraisalWorkbook writes the appraisal alone as a workbook with the
// candidates sheet. created is the fixed creation time (two runs give
// identical files).
func WriteAppraisalWorkbook(w io.Writer, ap Appraisal, created time.Time) error {
	if err := ap.check(); err != nil {
		return err
	}
	f := excelize.NewFile()
	defer f.Close()
	b := &book{f: f, v: &view{}}
	b.newStyles()
	stamp := created.UTC().Format(time.RFC3339)
	b.fail(f.SetDocProps(&excelize.DocProperties{Title: ap.title(), Creator: "narrows",
		LastModifiedBy: "narrows", Created: stamp, Modified: stamp,
		Description: "Screening estimate; see the cautions on the sheet."}))
	b.candidatesSheet(&ap)
	if b.err == nil {
		b.fail(f.DeleteSheet("Sheet1"))
		f.SetActiveSheet(0)
	}
	if b.err != nil {
		return fmt.Errorf("report: appraisal workbook: %w", b.err)
	}
	buf, err := f.WriteToBuffer()
	if err != nil {
		return fmt.Errorf("report: appraisal workbook: %w", err)
	}
	if err := repack(w, buf.Bytes()); err != nil {
		return fmt.Errorf("report: appraisal workbook: %w", err)
	}
	return nil
}

// WriteCandidatesGeoJSON writes the study's candidates layer (see
// WriteAppraisalGeoJSON); in must have an Appraisal.
func WriteCandidatesGeoJSON(w io.Writer, in Input) error {
	if in.Appraisal == nil {
		return errors.New("report: candidates layer without an appraisal")
	}
	return WriteAppraisalGeoJSON(w, *in.Appraisal)
}

// WriteAppraisalGeoJSON writes the candidates as a map layer: one line
// feature per candidate with its rank and figures, and the speeds and
// cautions on the collection.
func WriteAppraisalGeoJSON(w io.Writer, ap Appraisal) error {
	if err := ap.check(); err != nil {
		return err
	}
	fc := geojson.NewFeatureCollection()
	fc.ExtraMembers = geojson.Properties{"title": ap.title(), "weak_link": ap.FindingID, "speeds": ap.Result.Speeds,
		"pace_factor": jsonNumber(ap.Result.PaceFactor, 3), "cautions": appraisalNotes(ap.Result)}
	for i, r := range ap.Result.Results {
		line := make(orb.LineString, len(r.Candidate.Link.Line))
		for j, p := range r.Candidate.Link.Line {
			line[j] = roundPoint(p)
		}
		f := geojson.NewFeature(line)
		f.Properties = geojson.Properties{
			"rank": i + 1, "best": i == 0 && r.VehicleSecondsSaved > 0, "name": r.Candidate.Link.Name, "kind": candidateKind(r.Candidate), "class": r.Candidate.Link.Class,
			"length_km":                    jsonNumber(r.LengthMetres/1000, 3),
			"vehicle_km_saved_per_day":     jsonNumber(r.VehicleMetresSaved/1000, 1),
			"vehicle_hours_saved_per_day":  jsonNumber(r.VehicleSecondsSaved/3600, 2),
			"share_using":                  jsonNumber(r.ShareUsing, 3),
			"detour_with":                  jsonNumber(r.Detour, 3),
			"vehicle_hours_per_day_per_km": jsonNumber(r.SecondsSavedPerMetre*1000/3600, 2),
			"study_text":                   AppraisalCandidateText(r.Candidate),
		}
		fc.Append(f)
	}
	return encodeGeoJSON(w, fc, "candidates")
}

// htmlCandidate is one row of the page's candidates table.
type htmlCandidate struct {
	Rank                                              int
	Name, Kind, KM, VehKM, VehH, Using, Detour, PerKM string
	Best                                              bool
}

// htmlCandidates are the page's rows for the appraisal.
func (ap *Appraisal) htmlCandidates() []htmlCandidate {
	var out []htmlCandidate
	_, hasBest := ap.best()
	for i, r := range ap.Result.Results {
		out = append(out, htmlCandidate{Rank: i + 1, Name: r.Candidate.Link.Name, Kind: candidateKind(r.Candidate),
			KM: fmtFixed(r.LengthMetres/1000, 2), VehKM: fmtFixed(r.VehicleMetresSaved/1000, 1), VehH: fmtFixed(r.VehicleSecondsSaved/3600, 2),
			Using: strconv.FormatFloat(roundTo(100*r.ShareUsing, 0), 'f', -1, 64) + " %", Detour: fmtFixed(r.Detour, 2),
			PerKM: fmtFixed(r.SecondsSavedPerMetre*1000/3600, 2), Best: i == 0 && hasBest})
	}
	return out
}
