"""The Calc face: a LibreOffice Calc extension (.oxt) generated from the catalog.

* :mod:`.generate` writes the extension (``joulebook calc-extension -o joulebook.oxt``);
* :mod:`.typelib` writes the UNO type library that declares the functions to Calc;
* :mod:`.worker` is the joulebook side of each call: the extension starts
  ``python -m joulebook.faces.calc.worker`` with the Python joulebook is installed in and hands it
  the cells; the worker answers with :func:`joulebook.catalog.cellvalues.cell`, the path of the other
  cell faces;
* ``component.py`` is the extension's side, run by LibreOffice's own Python (standard library
  and ``uno`` only; joulebook never imports it).
"""
