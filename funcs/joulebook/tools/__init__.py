"""Build-time tools, outside the runtime path of a cell or a check: the docs generator
(:mod:`.docgen`), the demo builder (:mod:`.demo`, :mod:`.demodiff`), the xlwings and Calc
generators (:mod:`.sheetgen`, :mod:`.calcgen`) and the unit-seed generator (:mod:`.unitseedgen`).
"""
