package regiongraph

// Validate reports the first option that Ingest would refuse: an unknown
// time zone, a bad or repeated window, an unknown distance unit or column
// name, a negative or non-finite threshold, a maximum speed, jump speed or
// duration that is not positive, a minimum speed above the maximum, quoted
// field bounds under 1, a used share outside 0-1, or a time span that ends
// before it starts.
func (o Options) Validate() error {
	_, err := o.settings()
	return err
}
