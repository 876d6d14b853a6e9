package regiongraph

// Validate reports the first option that Ingest would refuse: an unknown
// time zone, a bad or repeated window, an unknown distance unit or column
// name, a negative or non-finite threshold, a maximum speed, jump speed or
// duration that is not positive, or a minimum speed above the maximum.
func (o Options) Validate() error {
	_, err := o.settings()
	return err
}
