package geodesy

// kmhPerMPS is the number of kilometres per hour in one metre per second.
const kmhPerMPS = 3.6

// KMH converts a speed in metres per second to kilometres per hour.
func KMH(metresPerSecond float64) float64 { return metresPerSecond * kmhPerMPS }

// MPS converts a speed in kilometres per hour to metres per second.
func MPS(kmh float64) float64 { return kmh / kmhPerMPS }
