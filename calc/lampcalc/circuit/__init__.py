"""The circuit and its solver: the exact periodic steady state of the
piecewise-linear mains circuit, switch-on and open-load transients.

Import rule: the standard library, ``lampcalc.errors``, ``lampcalc.quantities``
and ``lampcalc.physics`` only.
"""
