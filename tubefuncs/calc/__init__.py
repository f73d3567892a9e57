"""LibreOffice Calc front end: the catalogue as a Calc extension (``.oxt``).

``generate`` writes the extension's files from the catalogue (checked in under
``extension/``), ``build`` packs them into an ``.oxt`` that records where
LibreOffice's Python finds numpy and tubefuncs, ``adapter`` is what the
component calls (plain Python, testable anywhere), ``runner`` drives a
headless LibreOffice in a private profile, and ``setup`` is
``tubefuncs calc-setup``.  Nothing here imports ``uno`` except the component
and ``driver.py``, which run in LibreOffice's own Python.
"""

#: UNO names of the extension (our own; Calc saves calls as IMPLEMENTATION.FUNCTION).
EXTENSION_ID = "org.tubefuncs.calc"
INTERFACE = "org.tubefuncs.calc.XFunctions"
IMPLEMENTATION = "org.tubefuncs.calc.Functions"
SERVICE = "org.tubefuncs.calc.FunctionsService"
#: Prefix of our functions' names in a workbook saved by Calc (upper case, with dot).
SAVED_PREFIX = IMPLEMENTATION.upper() + "."
