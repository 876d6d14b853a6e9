package patterns

import (
	"fmt"
	"strings"
	"time"

	"narrows/regiongraph"
)

// Exclusions are what a planner leaves out of an analysis from local
// knowledge the data does not carry, each with its reason: days (the
// bridge closed for works, a match day, a data outage) and region pairs or
// whole regions (a ferry, known works, a counting fault). The toml tags
// are keys of a study file's [scan] table; the reasons go into the report.
type Exclusions struct {
	Days  []DayExclusion  `toml:"excluded_days" json:"days"`
	Pairs []PairExclusion `toml:"excluded_pairs" json:"pairs"`
}

// DayExclusion leaves out the local days From to To, inclusive
// (YYYY-MM-DD; To empty means From alone).
type DayExclusion struct {
	From   string `toml:"from" json:"from"`
	To     string `toml:"to,omitempty" json:"to,omitempty"`
	Reason string `toml:"reason" json:"reason"`
}

// PairExclusion leaves out every edge between regions A and B, both
// directions; with B = 0, every edge from or to region A.
type PairExclusion struct {
	A      int    `toml:"a" json:"a"`
	B      int    `toml:"b,omitempty" json:"b,omitempty"`
	Reason string `toml:"reason" json:"reason"`
}

// MaxExcludedDays bounds one day range: ten years of days.
const MaxExcludedDays = 3660

// Validate checks the dates, the order of each range, the region ids
// (>= 1, and <= regions when regions > 0) and that every exclusion gives
// a reason, since an exclusion without one cannot be defended later.
func (x Exclusions) Validate(regions int) error {
	for i, d := range x.Days {
		if _, err := d.List(); err != nil {
			return fmt.Errorf("excluded_days %d: %v", i+1, err)
		}
		if strings.TrimSpace(d.Reason) == "" {
			return fmt.Errorf("excluded_days %d (%s): give a reason", i+1, d)
		}
	}
	for i, p := range x.Pairs {
		switch {
		case p.A < 1 || p.B < 0:
			return fmt.Errorf("excluded_pairs %d: region ids are 1 or more, got %s", i+1, p)
		case regions > 0 && (p.A > regions || p.B > regions):
			return fmt.Errorf("excluded_pairs %d: %s: there are %d regions", i+1, p, regions)
		case p.A == p.B:
			return fmt.Errorf("excluded_pairs %d: %s joins a region to itself", i+1, p)
		case strings.TrimSpace(p.Reason) == "":
			return fmt.Errorf("excluded_pairs %d (%s): give a reason", i+1, p)
		}
	}
	return nil
}

func (d DayExclusion) String() string {
	if d.To == "" || d.To == d.From {
		return d.From
	}
	return d.From + ".." + d.To
}

func (p PairExclusion) String() string {
	if p.B == 0 {
		return fmt.Sprintf("region %d", p.A)
	}
	return fmt.Sprintf("%d-%d", p.A, p.B)
}

// List returns the days of the range, ascending.
func (d DayExclusion) List() ([]string, error) {
	from, err := time.Parse(dayLayout, d.From)
	if err != nil {
		return nil, fmt.Errorf("%q is not a date YYYY-MM-DD", d.From)
	}
	to := from
	if d.To != "" {
		if to, err = time.Parse(dayLayout, d.To); err != nil {
			return nil, fmt.Errorf("%q is not a date YYYY-MM-DD", d.To)
		}
	}
	if to.Before(from) {
		return nil, fmt.Errorf("%s ends before it starts", d)
	}
	if n := int(to.Sub(from).Hours()/24) + 1; n > MaxExcludedDays {
		return nil, fmt.Errorf("%s spans %d days, more than %d", d, n, MaxExcludedDays)
	}
	var out []string
	for t := from; !t.After(to); t = t.AddDate(0, 0, 1) {
		out = append(out, t.Format(dayLayout))
	}
	return out, nil
}

// Apply returns opts with the excluded days added to opts.Exclude (each
// once, in the order given) and the store without the excluded pairs and
// regions (store itself when there are none).
func (x Exclusions) Apply(store *regiongraph.Store, opts ScanOptions) (*regiongraph.Store, ScanOptions, error) {
	seen := map[string]bool{}
	var exclude []string
	add := func(d string) {
		if !seen[d] {
			seen[d] = true
			exclude = append(exclude, d)
		}
	}
	for _, d := range opts.Exclude {
		add(d)
	}
	for _, r := range x.Days {
		days, err := r.List()
		if err != nil {
			return nil, opts, err
		}
		for _, d := range days {
			add(d)
		}
	}
	opts.Exclude = exclude
	if len(x.Pairs) == 0 || store == nil {
		return store, opts, nil
	}
	type pair struct{ a, b int }
	pairs := map[pair]bool{}
	regions := map[int]bool{}
	for _, p := range x.Pairs {
		if p.B == 0 {
			regions[p.A] = true
			continue
		}
		pairs[pair{min(p.A, p.B), max(p.A, p.B)}] = true
	}
	return store.Without(func(e *regiongraph.Edge) bool {
		return regions[e.From] || regions[e.To] || pairs[pair{min(e.From, e.To), max(e.From, e.To)}]
	}), opts, nil
}
