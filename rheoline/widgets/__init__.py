"""Interactive views (ipywidgets + plotly) for notebooks and the local Voila app.

Views call the model and scenario layers and do no physics of their own.  Each
view shows the caution banner at its top, then a status line that says what it
shows of its scenarios; flags are words and symbols, never colour alone.  The
line, comparison and files views edit one scenario description, a
:class:`~rheoline.widgets.document.ScenarioDocument`.

* :class:`~rheoline.widgets.line_view.LineView` -- one scenario's line: parts, fluid, drive;
  flow, pressure, regime, shear, pressure budget
* :class:`~rheoline.widgets.compare_view.ComparisonView` -- the scenarios' lines on one chart
  with tolerance bands and a table
* :class:`~rheoline.widgets.blood_view.BloodVesselView` -- blood viscosity, Fahraeus-Lindqvist,
  vessel resistance, SVR/PVR
* :class:`~rheoline.widgets.files_view.FilesView` -- load and save scenario files, write
  review packs
* :func:`~rheoline.widgets.app.build_app` -- all of them in tabs (what
  ``python -m rheoline.widgets.serve`` shows)

Import the views from their modules, e.g. ``from rheoline.widgets.line_view import LineView``,
or use ``from rheoline.widgets.app import build_app``.
"""
