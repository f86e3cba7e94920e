"""Closed-form and exact-phase aperture models of rectangular horns (numpy/scipy only).

Must import without Meep installed; imports nothing from ``sim`` or ``compare``.
"""
