"""Physical models and numerics on SI floats and numpy arrays.

Modules here import only numpy, scipy, :mod:`screen.constants` and :mod:`screen.errors`.
They know nothing of files, unit strings, the CLI or the PDF.
"""
