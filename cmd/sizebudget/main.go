// Sizebudget sizes particles from their Brownian motion, with an honest uncertainty budget.
//
// Usage:
//
//	sizebudget <command> [flags]
//
// Run "sizebudget -h" for the list of commands and "sizebudget <command> -h" for the flags of one.
// Quantities carry their unit in the value (25C, 50nm, 4.9um2/s). The exit status is 0 on success,
// 1 when a value is outside its allowed range (one line on stderr names the field, the value and the
// range), 2 on bad usage, and 3 on an internal error.
package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"maps"
	"os"
	"os/signal"
	"slices"
	"strings"
)

// A command is one subcommand: its function, called with the arguments after its name, and a one-line
// description for "sizebudget -h".
type command struct {
	run  func(args []string, stdout, stderr io.Writer) error
	help string
}

// commands are the subcommands of sizebudget. Adding one is adding a line here.
var commands = map[string]command{
	"viscosity": {runViscosity, "viscosity of water, glycerol–water or a custom liquid at a temperature, with its uncertainty"},
	"diffusion": {runDiffusion, "Stokes–Einstein both ways (radius → D, D → radius), optionally near a wall"},
	"plan":      {interruptible(planCommand), "coverage interval, uncertainty budget and the frames per track a target needs"},
	"check":     {interruptible(checkCommand), "review a reported radius ± uncertainty against what its settings can achieve"},
	"serve":     {runServe, "serve the offline browser app on 127.0.0.1 (builds the WebAssembly engine when needed)"},
	"analyze":   {interruptible(analyzeCommand), "radius with its coverage interval from recorded tracks, with drift and free-diffusion checks"},
	"simulate":  {runSimulate, "write a track file of INVENTED data from a scenario, seeded, to try analyze"},
}

// interruptible turns a command that runs under a context into one whose context an interrupt
// (Ctrl-C) cancels, so a long Monte Carlo stops cleanly.
func interruptible(f func(ctx context.Context, args []string, stdout, stderr io.Writer) error) func(args []string, stdout, stderr io.Writer) error {
	return func(args []string, stdout, stderr io.Writer) error {
		ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
		defer stop()
		return f(ctx, args, stdout, stderr)
	}
}

// A usageError reports a command line that cannot be understood: an unknown command or flag, a
// missing or conflicting flag, a malformed value. main exits 2 for it and points to -h.
type usageError struct {
	Cmd string // the command line it concerns, e.g. "sizebudget viscosity"
	Err error
}

func (e *usageError) Error() string { return e.Cmd + ": " + e.Err.Error() }
func (e *usageError) Unwrap() error { return e.Err }

func main() {
	os.Exit(runMain(os.Args[1:], os.Stdout, os.Stderr))
}

// runMain runs sizebudget with the arguments args (without the program name), reports any error on
// stderr and returns the exit status (see exitStatus). A panic, which would be a bug, is recovered as
// a last resort into one line on stderr and status 3, never a stack trace.
func runMain(args []string, stdout, stderr io.Writer) (status int) {
	defer func() {
		if r := recover(); r != nil {
			fmt.Fprintf(stderr, "sizebudget: internal error (please report it): %s\n", oneLine(fmt.Sprint(r)))
			status = 3
		}
	}()
	return exitStatus(run(args, stdout, stderr), stderr)
}

// run runs the command line args (without the program name): the first argument names the
// subcommand. "sizebudget -h" (or help) lists the commands; "sizebudget help <command>" is
// "sizebudget <command> -h".
func run(args []string, stdout, stderr io.Writer) error {
	if len(args) == 0 {
		return usagef(nil, "missing command: one of %s", commandList())
	}
	name, rest := args[0], args[1:]
	switch name {
	case "-h", "-help", "--help", "help":
		if name == "help" && len(rest) > 0 {
			return run([]string{rest[0], "-h"}, stdout, stderr)
		}
		printUsage(stderr)
		return flag.ErrHelp
	}
	c, ok := commands[name]
	if !ok {
		return usagef(nil, "unknown command %q: the commands are %s", name, commandList())
	}
	return c.run(rest, stdout, stderr)
}

// exitStatus reports err on stderr and returns the exit status:
//
//	0  no error, or a help request (-h), whose text is already printed
//	2  a *usageError: its message, then a line pointing to -h
//	1  any other error (a value out of range, an output error): "sizebudget: " and one line
func exitStatus(err error, stderr io.Writer) int {
	var ue *usageError
	switch {
	case err == nil, errors.Is(err, flag.ErrHelp):
		return 0
	case errors.As(err, &ue):
		fmt.Fprintf(stderr, "%s: %s\nrun '%s -h' for usage\n", ue.Cmd, oneLine(ue.Err.Error()), ue.Cmd)
		return 2
	}
	fmt.Fprintf(stderr, "sizebudget: %s\n", oneLine(err.Error()))
	return 1
}

// oneLine joins the lines of s, so that every message is one line on stderr.
func oneLine(s string) string {
	return strings.Join(strings.Fields(strings.ReplaceAll(s, "\n", " ")), " ")
}

// commandList returns the names of the commands, sorted, separated by commas.
func commandList() string {
	return strings.Join(slices.Sorted(maps.Keys(commands)), ", ")
}

// printUsage prints the list of commands.
func printUsage(w io.Writer) {
	fmt.Fprint(w, `sizebudget sizes particles from their Brownian motion, with an honest uncertainty budget.

usage: sizebudget <command> [flags]

commands:
`)
	for _, name := range slices.Sorted(maps.Keys(commands)) {
		fmt.Fprintf(w, "  %-10s %s\n", name, commands[name].help)
	}
	fmt.Fprint(w, `
Run 'sizebudget <command> -h' for the flags of a command. Quantities carry their unit in the value
(25C, 50nm, 4.9um2/s).

`+exitStatusHelp)
}
