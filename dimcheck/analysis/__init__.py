"""Analyses built on the unit machinery that are not checks of code (dimensionless groups).

Nothing here is imported by ``dimcheck check``; sympy is imported only inside the
functions that need it.
"""
