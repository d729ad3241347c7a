"""Pure hydraulics in SI floats and numpy arrays.

Nothing here imports pint, ipywidgets or plotly; CoolProp loads on the first property call.
Import the module you need (``from kit.core.line import Line``); each lists its public
names in ``__all__``. The modules: ``findings``, ``friction``, ``liquids``, ``pipes``,
``roughness``, ``fittings``, ``line``, ``system``, ``site``, ``criteria``, ``sizing``,
``pump``, ``operating``, ``motors``, ``tank``, ``drain``.
"""
