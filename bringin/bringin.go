// Package bringin brings files in from outside an event folder: another
// layout's CSV through a column map, a crewmate's copy of the logbook or
// weather log compared with the folder's (what is new, alike, in conflict)
// and readings imported into the weather log. It does not own the folder's
// files, settings, locks or safe writes (event), nor read a column map
// (colmap): it takes them from there.
package bringin
