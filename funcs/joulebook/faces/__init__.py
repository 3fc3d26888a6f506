"""The faces: each exposes the catalog one way and imports the core and the catalog, never
another face.

* :mod:`.sheet` — the xlwings module (generated) and the calling workbook's style;
* :mod:`.calc` — the LibreOffice extension (generated) and its worker;
* :mod:`.workbook` — reader, engine, check, recalc, audit, package, diff, sensitivity, writer;
* :mod:`.api` — the Python face with pint quantities.

:mod:`.cli` is the command line (argument parsing over the workbook face and the tools);
:mod:`.files` and :mod:`.runio` are file helpers the faces share.
"""
