"""The workbook face: read saved .xlsx/.xlsm files safely, recalculate every formula headless,
check the values Excel saved, and write recalculated copies."""
