"""Presentation: build sheets as data (``model``, built by ``sheet`` and ``figures``)
and their HTML renderer (``html``, which takes the site theme's names from its
caller), and reference tables.

Import rule: the standard library and the layers below (``quantities``,
``physics``, ``circuit``, ``fixture``); nothing imports this package except
the entry points on top (``api``, ``design_api``) and the build-time package.
"""
