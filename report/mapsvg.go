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

// WriteMapPNG writes the report's map alone as a PNG picture, the one the
// workbook's Summary sheet holds: the same layers, projection and label
// places as WriteMapSVG, region ids and rank boxes in a bitmap font.
func WriteMapPNG(w io.Writer, in Input) error {
	return render(w, in, func(v *view, w io.Writer) error {
		b, err := v.png()
		if err != nil {
			return err
		}
		_, err = w.Write(b)
		return err
	})
}
