"""Quantities: parsing and formatting values with units, preferred-number
series and mains region presets.

Import rule: the standard library and ``lampcalc.errors`` only.
"""
