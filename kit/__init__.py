"""Headline: a kit for designing liquid piping systems in Jupyter.

``kit.core`` is pure computation in SI; ``kit.units`` parses and formats
quantities; ``kit.panels`` are the widget panels; ``kit.record`` writes the
checker's record. Importing ``kit`` loads nothing heavy.
"""

__version__ = "0.1.0"
__all__ = ["__version__"]
