package report

import "io"

// WriteMapSVG writes the report's map alone, as one SVG element: regions,
// the network beneath, the scheme, and the findings of in.Comparison (by
// verdict) or in.Scan, with labels, scale bar and legend. It serves pages
// that redraw the map as the planner changes the analysis.
func WriteMapSVG(w io.Writer, in Input) error {
	return render(w, in, func(v *view, w io.Writer) error {
		_, err := io.WriteString(w, v.svg())
		return err
	})
}
