"""Processes of a closed system: boundary work, polytropic analysis, end states, cycles and
stored expansion energy."""
