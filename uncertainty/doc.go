// Package uncertainty turns acquisition settings into a coverage interval on the hydrodynamic radius:
// the scenario document and its validation, the GUM uncertainty budget, the Monte Carlo propagation of
// JCGM 101, the planner and the review check.
package uncertainty
