"""Substance models: real fluids, ideal gases and incompressible solids and liquids."""
