"""The library's one input error, shared by every front end.

A worksheet cell shows at most 255 characters, so messages are short and say
four things: the function, the argument, the value received and what is
allowed.  The Excel error value that a headless host shows is kept beside the
message: ``#VALUE!`` for a wrong type, unit or unparsable text, ``#NUM!`` for a
number outside the function's domain or the model's validity.
"""

from __future__ import annotations

VALUE = "#VALUE!"
NUM = "#NUM!"
NAME = "#NAME?"
DIV0 = "#DIV/0!"
NA = "#N/A"
REF = "#REF!"

EXCEL_ERROR_VALUES = (VALUE, NUM, NAME, DIV0, NA, REF, "#NULL!", "#SPILL!", "#CALC!")

MAX_CELL_TEXT = 255


class TubeInputError(ValueError):
    """Bad input to a tubefuncs function.

    Attributes
    ----------
    message : str
        Human-readable text naming function, argument, value and what is allowed.
    error_value : str
        The Excel error value a spreadsheet host shows (``#VALUE!`` or ``#NUM!``).
    function, argument : str or None
        Worksheet function name and argument name, when known.
    """

    def __init__(self, message: str, error_value: str = VALUE,
                 function: str | None = None, argument: str | None = None):
        super().__init__(message)
        self.message = message
        self.error_value = error_value
        self.function = function
        self.argument = argument

    def cell_text(self) -> str:
        """Short text for a cell: the error value, then the message (<= 255 chars)."""
        text = f"{self.error_value} {self.message}"
        if len(text) > MAX_CELL_TEXT:
            text = text[: MAX_CELL_TEXT - 3] + "..."
        return text


def show_value(value) -> str:
    """Short representation of a received value for an error message."""
    if isinstance(value, str):
        text = repr(value)
    elif isinstance(value, float):
        text = f"{value:.6g}"
    else:
        text = repr(value)
    if len(text) > 40:
        text = text[:37] + "..."
    return text


class CellError:
    """An Excel error value held in a cell (``#DIV/0!`` ...), passed as an argument.

    Front ends convert their host's error representation to this class so that
    the worksheet layer can propagate it as Excel does.
    """

    __slots__ = ("code", "message")

    def __init__(self, code: str, message: str = ""):
        self.code = code
        self.message = message

    def __repr__(self) -> str:
        return f"CellError({self.code!r})"

    def __eq__(self, other) -> bool:
        return isinstance(other, CellError) and other.code == self.code

    def __hash__(self) -> int:
        return hash(self.code)
