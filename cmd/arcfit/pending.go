package main

// The commands of design.md that are not built yet. Each has its help text
// and an example of the intended use; running one says it is not built yet
// and exits with status 2, so that no script mistakes it for a result.

// pendingCommand returns a command that is planned but not built yet: it has
// a help text and an example, and running it says so and exits with status 2.
func pendingCommand(name, summary, usage, about, example string) *command {
	return &command{name: name, summary: summary, usage: usage, about: about, example: example}
}

func planCommand() *command {
	return pendingCommand("plan", "a night's schedule for many targets",
		"arcfit plan TARGETS --date DATE [--site SITE] [--json | --csv]",
		"Orders many targets into one night's schedule at a site.",
		"arcfit plan targets.csv --date 2027-02-20 --site 44.52,-72.80,410")
}

func simulateCommand() *command {
	return pendingCommand("simulate", "synthetic observations for teaching and what-if planning",
		"arcfit simulate ELEMENTS --nights N --site SITE [--seed N]",
		"Makes seeded synthetic observations of an object with known elements, for teaching and for planning what cadence a follow-up needs.",
		"arcfit simulate elements.csv --nights 3 --site 44.52,-72.80,410 --seed 7")
}
