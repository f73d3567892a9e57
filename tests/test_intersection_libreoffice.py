"""Differential test: implicit intersection and array formulas against LibreOffice.

LibreOffice Calc is an engine written independently of ours; it follows the
same implicit-intersection rule as Excel for the cases of the corpus
(``tests/intersection_corpus.py``).  Every formula cell of the corpus is
recalculated by LibreOffice (one conversion for the whole workbook) and by
both of our engines; all three must agree.  Skipped, with the reason shown,
where LibreOffice is not installed.
"""

from __future__ import annotations

import math

import openpyxl
import pytest
from intersection_corpus import build
from lo_runner import recalc_with_libreoffice, soffice

from tubefuncs.headless import recalculate
from tubefuncs.headless import values as V

pytestmark = pytest.mark.skipif(soffice() is None,
                                reason="LibreOffice (soffice) is not installed: the "
                                       "differential test against it cannot run")


def _same(ours, theirs) -> bool:
    if V.is_error(ours):
        return isinstance(theirs, str) and theirs == str(ours)
    if theirs is None:
        theirs = 0.0 if ours == "" else theirs
    if isinstance(ours, bool) or isinstance(theirs, bool):
        return isinstance(theirs, (bool, int, float)) and float(ours) == float(theirs)
    if isinstance(ours, float) and isinstance(theirs, (int, float)):
        return math.isclose(ours, float(theirs), rel_tol=1e-9, abs_tol=1e-12)
    return ours == theirs


@pytest.fixture(scope="module")
def corpus(tmp_path_factory):
    folder = tmp_path_factory.mktemp("isect")
    path = folder / "corpus.xlsx"
    cells = build(path)
    (out,) = recalc_with_libreoffice([path], folder / "lo")
    return path, cells, openpyxl.load_workbook(out, data_only=True)


def test_both_engines_agree_with_libreoffice(corpus, capsys):
    path, cells, theirs = corpus
    general = recalculate(path, engine="general")
    fast = recalculate(path, engine="fast")
    agree, differ = 0, []
    for sheet, coord, text, kind in cells:
        mine = general.value(sheet, coord)
        other = fast.value(sheet, coord)
        lo = theirs[sheet][coord].value
        assert _same(mine, other if not V.is_error(other) else str(other)) or (
            V.is_error(mine) and mine is other), (sheet, coord, text, mine, other)
        if _same(mine, lo):
            agree += 1
        else:
            differ.append(f"{sheet}!{coord} {kind} {text}: ours {mine!r}, LibreOffice {lo!r}")
    with capsys.disabled():
        print(f"\nimplicit intersection corpus: {agree} of {len(cells)} formula cells agree "
              f"with LibreOffice")
    assert not differ, "\n".join(differ[:40]) + f"\n({len(differ)} cells differ)"
    assert len(cells) > 1000
