// Package explore serves a study to a planner's browser: a local page on
// which the planner moves the thresholds, picks the periods and leaves out
// days and region pairs with a reason, and the server re-scans (or
// re-compares) the day graphs held in memory at once.
//
// In: a Study (the day-graph store, its regions, the study's options and
// exclusions, and a function that saves them back into the study file).
// Out: an http.Handler serving the page (embedded, offline: no build step,
// no library, nothing fetched) and a small JSON API:
//
//	GET  /api/state       the settings, exclusions, findings, day strip, map
//	POST /api/settings    new settings; answers with the new state
//	POST /api/exclusions  the whole list of exclusions; answers with the state
//	POST /api/save        writes the study file; answers with its path
//
// State-changing requests must carry the page's token in the
// X-Narrows-Token header and a JSON body of at most MaxBody bytes; the
// Host header must name the loopback address the server was started on,
// so another site cannot drive it from the planner's browser.
package explore
