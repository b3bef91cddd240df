"""Presentation: build sheets and reference tables rendered from the core's
results.

Import rule: the standard library and the layers below (``quantities``,
``physics``, ``circuit``, ``fixture``); nothing imports this package except
the entry points on top (``design_api``) and the build-time package.
"""
