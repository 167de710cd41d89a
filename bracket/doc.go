// Package bracket is the arithmetic of bracket racing: settling a race by
// the rules, the dial-in and its breakout risk, and the chance to win
// against the other lane.
//
// Settling a race is exact decimal arithmetic, as the slips are; chances
// are float64. It knows the car only through an Estimate of its next ET
// (and the logbook's passes), never the pass model.
package bracket
