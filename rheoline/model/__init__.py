"""The model layer: pure, vectorized physics on numpy and scipy, SI inside.

Nothing here imports pint, pandas, plotly or ipywidgets at import time.
"""
