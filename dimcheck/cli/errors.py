"""The one error every command raises for bad input on its command line: the entry point
prints it as one line and exits 2 (a configuration problem is ``config.ConfigError``)."""


class UsageError(Exception):
    """A one-line problem with a command's options or arguments."""
