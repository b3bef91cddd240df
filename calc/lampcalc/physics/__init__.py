"""Closed-form physics: the capacitive dropper, smoothing ripple, LED modules
and strings, wire and flicker measures, each as pure functions of SI floats.

Import rule: the standard library, ``lampcalc.errors`` and
``lampcalc.quantities`` only.
"""
