"""The one exception of the headless engine: a workbook it cannot use.

Its message is one line that names the file and says what is wrong and, where
there is one, what to do.  The command line prints it and exits with status 2;
it never shows a traceback for it.
"""

from __future__ import annotations


class WorkbookError(Exception):
    """A workbook that cannot be evaluated (corrupt, unsafe, too large, circular...)."""

    def __init__(self, message: str):
        message = " ".join(str(message).split())  # one line, always
        super().__init__(message)
        self.message = message
