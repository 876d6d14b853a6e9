// Package appraise screens candidate links for a finding against the
// finding's own observed trips.
//
// In: the routable network (route.Network), the regions, the finding's
// trips (regiongraph.ReadTrips, for its region pairs and windows over the
// analysed days) and candidate links: the user's (a way of an extract with
// the scheme built, or a drawn line with a road class) and generated ones
// (the shortest new connections across the barrier between junctions of
// the two regions, of at least a set class). Out: per candidate, per day
// of the period, vehicle-km and vehicle-hours saved, the share of trips
// that would use it, the detour with it, its length; ranked by
// vehicle-hours saved per km of new road.
//
// Routing is shortest time at free-flow speeds (class defaults or
// maxspeed), each trip's ends snapped to the nearest node of the largest
// strongly connected part of the network; one search per distinct origin
// node. There is no congestion feedback and no induced demand: a screening
// estimate for the sample fleet, not a traffic forecast.
package appraise
