// Package figures turns plan and analysis results into charts (package chart), so that the command
// line's -svg files and the browser draw the very same documents. It imports uncertainty and chart.
package figures
