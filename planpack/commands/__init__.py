"""The command-line commands, one module each."""
