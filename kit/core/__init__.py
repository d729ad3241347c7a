"""Pure hydraulics in SI floats and numpy arrays.

Nothing here imports pint, ipywidgets or plotly; CoolProp loads on first use.
Import the modules you need (``from kit.core.line import Line``) or the names
re-exported below.
"""
