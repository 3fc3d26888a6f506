"""The sheet face: joulebook's worksheet functions in Excel through xlwings.

``joulebook.faces.sheet.udfs`` is the module to put in xlwings' "UDF Modules"; it is generated from
the catalog by ``joulebook sheet`` (a test fails when the committed copy is stale).
"""
