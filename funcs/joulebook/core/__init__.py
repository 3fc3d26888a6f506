"""The core: pure computation in SI, no spreadsheet types.

Units and unit systems (:mod:`.units`), errors (:mod:`.errors`), root finding
(:mod:`.roots`), states and media (:mod:`.states`, :mod:`.media`), the first law
(:mod:`.firstlaw`), workings (:mod:`.working`), substances (:mod:`.substances`) and processes
(:mod:`.processes`).  Nothing here imports the catalog or a face.
"""
