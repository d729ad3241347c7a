"""Physical constants the kit uses, each defined once.

>>> G
9.80665
"""

__all__ = ["G"]

#: Standard acceleration of gravity [m/s²] (3rd CGPM 1901, exact by definition).
G = 9.80665
