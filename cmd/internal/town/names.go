// What the streets are called and how they are tagged.

package town

import "sort"

// roadClass is a street class; roadTags holds the tags of each.
type roadClass int

const (
	classResidential roadClass = iota
	classTertiary
	classSecondary
	classPrimary
	classTrunk
)

var roadTags = [...]struct {
	highway, maxspeed, lanes string
}{
	classResidential: {"residential", "30", "2"},
	classTertiary:    {"tertiary", "40", "2"},
	classSecondary:   {"secondary", "50", "2"},
	classPrimary:     {"primary", "50", "4"},
	classTrunk:       {"trunk", "70", "4"},
}

// Names of the town's features: invented, no real places.
const (
	riverName   = "Orvel"
	railwayName = "Orvel Valley Line"
	linkName    = "Lantern Bridge"
	housingName = "Northbank housing"
	jobsName    = "Southbank works"
)

// Street name stems: invented or generic words, no real places.
var stems = []string{
	"Alder", "Bramble", "Cobble", "Dunnock", "Elder", "Fernlow", "Gorse", "Hazel",
	"Ivymere", "Juniper", "Kestrel", "Linnet", "Marrow", "Nettle", "Oriel", "Pipit",
	"Quince", "Rowan", "Sorrel", "Teasel", "Umber", "Vetch", "Wicker", "Yarrow",
	"Amble", "Bittern", "Candle", "Dapple", "Ember", "Fallow", "Garnet", "Heron",
	"Inkwell", "Jasper", "Kettle", "Lantern", "Mallow", "Nimble", "Otterly", "Pewter",
}

// districtSuffixes end the invented district names.
var districtSuffixes = []string{"Green", "Heath", "Fold", "Cross", "End", "Lea", "Rise", "Side"}

// districtName is the n-th district name: unique for the first 320.
func districtName(n int) string {
	return stems[(n+7)%len(stems)] + " " + districtSuffixes[(n/len(stems))%len(districtSuffixes)]
}

var bridgeNames = []string{"Weir Bridge", "Cinder Bridge", "Tollgate Bridge", "Mill Bridge", "Chapel Bridge", "Ferry Bridge"}

func streetName(n int, suffixes []string) string {
	stem := stems[n%len(stems)]
	suf := suffixes[(n/len(stems))%len(suffixes)]
	return stem + " " + suf
}

func (b *builder) tagsFor(s lineSpec, bridge bool) []tag {
	rt := roadTags[s.class]
	tags := []tag{{"highway", rt.highway}, {"lanes", rt.lanes}, {"maxspeed", rt.maxspeed}, {"name", s.name}}
	if s.ref != "" {
		tags = append(tags, tag{"ref", s.ref})
	}
	if s.oneway {
		tags = append(tags, tag{"oneway", "yes"})
	}
	if bridge {
		tags = append(tags, tag{"bridge", "yes"}, tag{"layer", "1"})
	}
	sort.Slice(tags, func(i, j int) bool { return tags[i].Key < tags[j].Key })
	return tags
}
