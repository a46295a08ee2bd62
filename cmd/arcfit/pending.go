package main

// The commands of design.md that are not built yet. Each has its help text
// and an example of the intended use; running one says it is not built yet
// and exits with status 2, so that no script mistakes it for a result. Every
// command of design.md's first set is built now; the helper stays for the
// next ones.

// pendingCommand returns a command that is planned but not built yet: it has
// a help text and an example, and running it says so and exits with status 2.
func pendingCommand(name, summary, usage, about, example string) *command {
	return &command{name: name, summary: summary, usage: usage, about: about, example: example}
}
