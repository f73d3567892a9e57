"""Excel front end: classic xlwings user-defined functions.

* :mod:`tubefuncs.excel.udfs` - the generated UDF module that Excel imports
  (the only module of tubefuncs that imports xlwings);
* :mod:`tubefuncs.excel.generate` - writes it from the catalogue;
* :mod:`tubefuncs.excel.adapter` - converts xlwings-shaped values to and from
  :func:`tubefuncs.worksheet.evaluate`;
* :mod:`tubefuncs.excel.names` - names that survive Excel's VBA layer;
* :mod:`tubefuncs.excel.setup` - ``tubefuncs excel-setup``: xlwings
  configuration and a starter workbook.

Importing this package does not import xlwings.
"""
