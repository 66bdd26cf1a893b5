"""The command line, configuration and file discovery."""
