// Package route is the routable road network and its shortest paths.
//
// In: the roads and barriers that partition read with the regions
// (partition.Routing), and Options (free-flow speeds by highway class).
// Out: a directed Network (one-way streets kept, no turn costs) whose
// edges carry metres and free-flow seconds; shortest-time searches from
// one origin to many destinations (Dijkstra with a binary heap); nodes
// snapped to points; strongly connected components; the same network
// with candidate links added.
//
// A road segment that crosses a railway, river or canal is routable only
// where the data says the road passes it: a bridge, tunnel or ford tag on
// the road, a bridge or culvert on the barrier, or a node the two share
// (a level crossing). Other such segments are dropped and listed in
// Network.Dropped, so a mapping error does not invent a crossing.
package route
