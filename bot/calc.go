package bot

// calcCommands are the quick calculations: margin, flight, com.
func calcCommands() []command { return nil }
