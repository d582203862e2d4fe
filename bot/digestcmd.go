package bot

// digestCommands show and schedule the weekly digest.
func digestCommands() []command { return nil }
