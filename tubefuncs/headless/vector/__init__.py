"""The fast headless path: same-shape formula cells evaluated together as numpy vectors.

A sweep workbook is made of columns of formulas that share one shape (the
same formula in relative terms, row after row).  This package recalculates
such a workbook in a fraction of the general engine's time, with the same
answers:

- :mod:`.reader` reads worksheet parts with a streaming scanner (expat checks
  every byte is well-formed, safe XML; a compiled pattern picks out the
  cells), handing anything unusual to openpyxl's parser;
- :mod:`.shapes` groups the formula cells of each column by their relative
  form, found with one pattern pass (or given by the file's shared formulas);
- :mod:`.program` compiles each shape once into a vector program;
  :mod:`.vec` holds the vector values and the Excel operators and functions
  they support, element by element exactly as the general engine computes
  them;
- :mod:`.plan` orders groups and single cells by their dependencies and runs
  them; whatever a vector program does not cover is evaluated by the general
  engine, cell by cell;
- :mod:`.writer` writes the recalculated copy by rewriting only the formula
  cells of the worksheet parts.

:func:`tubefuncs.headless.recalculate` uses this path unless told
``engine="general"``.
"""

from __future__ import annotations

from .plan import recalculate_fast

__all__ = ["recalculate_fast"]
