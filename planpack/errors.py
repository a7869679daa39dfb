"""The one exception every layer may raise for a problem with how planpack was called.

It lives below everything else (it imports nothing), so that the output layer,
the preview server and the commands can all raise it without importing one
another; the command line turns it into a one-line message and exit code 2.
"""


class UsageError(Exception):
    """A problem with how planpack was called, or a file it cannot use (exit 2; nothing was written)."""
