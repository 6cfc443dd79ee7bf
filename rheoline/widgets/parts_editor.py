"""An editor for a line's parts: a row per part (type, gauge or bore, length), add and remove.

Each row edits a *part description*, a plain dict in the units the trade reads
(bore in mm, length in cm), for example ``{"type": "catheter", "gauge": 18}`` or
``{"type": "tube", "inner_diameter_mm": 3.0, "length_cm": 180.0}``.
:func:`build_part` turns a description into the model layer's part object; a
blank (zero) bore or length on a catheter, needle or cannula means "the
catalogue's nominal value".  The editor holds no physics.

Examples
--------
>>> editor = PartsEditor([{"type": "tube", "inner_diameter_mm": 3.0, "length_cm": 180.0},
...                       {"type": "catheter", "gauge": 18}])
>>> [d["type"] for d in editor.descriptions()]
['tube', 'catheter']
"""

from __future__ import annotations

import ipywidgets as widgets

import rheoline
from rheoline.model import catalogue
from rheoline.widgets.style import user_text

__all__ = ["PartsEditor", "PartRow", "build_part", "PART_KINDS", "DEFAULT_PARTS", "part_label"]

#: Part kinds the editor offers (a measured part comes only from a scenario file).
PART_KINDS = ("catheter", "needle", "cannula", "tube", "fitting")
#: Gauges offered for catheters and needles (the catalogue's), and French sizes for cannulas.
CATHETER_GAUGES = tuple(sorted(catalogue.CATHETER_GAUGES))
NEEDLE_GAUGES = tuple(sorted(catalogue.NEEDLE_GAUGES))
CANNULA_FRENCH = (6, 8, 10, 12, 14, 16, 18, 20, 22, 24)

#: A standard gravity set behind an 18G peripheral catheter (invented demo line).
DEFAULT_PARTS = (
    {"type": "tube", "label": "administration set", "inner_diameter_mm": 3.0, "length_cm": 180.0},
    {"type": "catheter", "gauge": 18},
)

_W = {"type": "105px", "size": "80px", "num": "150px", "button": "34px"}


def part_label(description: dict, index: int) -> str:
    """A short label for a part description, e.g. ``'2. catheter 18G'``."""
    if description.get("label"):
        return f"{index}. {description['label']}"
    kind = description["type"]
    if kind in ("catheter", "needle"):
        return f"{index}. {kind} {description.get('gauge')}G"
    if kind == "cannula":
        return f"{index}. cannula {description.get('french')} Fr"
    if kind == "tube":
        return f"{index}. tube {description.get('inner_diameter_mm')} mm"
    if kind == "fitting":
        return f"{index}. fitting K={description.get('k')}"
    if "part" in description:
        return f"{index}. {description['part'].name}"
    return f"{index}. {kind}"


def _given(description, key):
    value = description.get(key)
    return None if value in (None, 0, 0.0) else float(value)


def build_part(description: dict, inner_diameter=None, length=None):
    """The model layer's part for a description (bore [mm] and length [cm] become metres).

    ``inner_diameter`` and ``length`` [m] (floats or arrays, one per scenario) replace the
    description's values; the comparison view uses them for bore sweeps and tolerance
    samples.  A ``"measured"`` description carries the part object itself under ``"part"``.
    """
    kind = description["type"]
    name = description.get("label") or None
    bore = _given(description, "inner_diameter_mm")
    given_length = _given(description, "length_cm")
    bore_m = (
        inner_diameter if inner_diameter is not None else (None if bore is None else bore * 1e-3)
    )
    length_m = (
        length if length is not None else (None if given_length is None else given_length * 1e-2)
    )
    if kind == "catheter":
        return rheoline.Catheter(
            gauge=int(description["gauge"]), inner_diameter=bore_m, length=length_m, name=name
        )
    if kind == "needle":
        kwargs = {} if length_m is None else {"length": length_m}
        return rheoline.Needle(
            gauge=int(description["gauge"]),
            inner_diameter=bore_m,
            wall=description.get("wall", "regular"),
            name=name,
            **kwargs,
        )
    if kind == "cannula":
        kwargs = {} if length_m is None else {"length": length_m}
        return rheoline.Cannula(
            french=float(description["french"]), inner_diameter=bore_m, name=name, **kwargs
        )
    if kind == "tube":
        return rheoline.Tube(inner_diameter=bore_m, length=length_m, name=name)
    if kind == "fitting":
        return rheoline.Fitting(k=float(description.get("k", 0.0)), name=name)
    if "part" in description:  # a set or a measured part from a scenario file
        return description["part"]
    raise rheoline.RheolineError(
        f"part type {kind!r} is not one the editor knows; choose one of {PART_KINDS}"
    )


class PartRow(widgets.HBox):
    """One part's controls: type, gauge (or French size), bore [mm], length [cm], K, remove."""

    def __init__(self, description: dict, on_change, on_remove):
        super().__init__()
        self.add_class("rl-part-row")
        self._fixed = description if "part" in description else None
        self._label = description.get("label", "")
        options = PART_KINDS if self._fixed is None else (description["type"],)
        self.kind = widgets.Dropdown(
            options=options, value=description["type"], layout=widgets.Layout(width=_W["type"])
        )
        self.kind.add_class("rl-part-type")
        self.size = widgets.Dropdown(layout=widgets.Layout(width=_W["size"]))
        self.size.add_class("rl-part-size")
        self.bore = widgets.BoundedFloatText(
            value=description.get("inner_diameter_mm") or 0.0,
            min=0.0,
            max=60.0,
            step=0.01,
            description="bore [mm]",
            layout=widgets.Layout(width=_W["num"]),
        )
        self.bore.add_class("rl-part-bore")
        self.length = widgets.BoundedFloatText(
            value=description.get("length_cm") or 0.0,
            min=0.0,
            max=3000.0,
            step=0.1,
            description="length [cm]",
            layout=widgets.Layout(width=_W["num"]),
        )
        self.length.add_class("rl-part-length")
        self.k = widgets.BoundedFloatText(
            value=description.get("k", 1.0),
            min=0.0,
            max=1000.0,
            step=0.1,
            description="K [-]",
            layout=widgets.Layout(width="120px"),
        )
        self.remove = widgets.Button(
            description="",
            icon="trash",
            tooltip="remove this part",
            layout=widgets.Layout(width=_W["button"]),
        )
        self.remove.add_class("rl-part-remove")
        self._on_change = on_change
        self._quiet = True
        self._sizes(description["type"], description.get("gauge", description.get("french")))
        self._quiet = False
        self.kind.observe(self._kind_changed, names="value")
        for control in (self.size, self.bore, self.length, self.k):
            control.observe(self._notify, names="value")
        self.remove.on_click(lambda button: on_remove(self))

    def _notify(self, change=None):
        if not self._quiet:
            self._on_change()

    def _sizes(self, kind, value=None):
        sizes = {
            "catheter": CATHETER_GAUGES,
            "needle": NEEDLE_GAUGES,
            "cannula": CANNULA_FRENCH,
        }.get(kind, ())
        if sizes:
            labels = [(f"{s} Fr" if kind == "cannula" else f"{s}G", s) for s in sizes]
            if value is not None and value not in sizes:
                labels.append((f"{value:g}{' Fr' if kind == 'cannula' else 'G'}", value))
            self.size.options = labels
            self.size.value = value if value is not None else sizes[len(sizes) // 2]
        else:
            self.size.options = []
        visible = {
            "catheter": (self.size, self.bore, self.length),
            "needle": (self.size, self.bore, self.length),
            "cannula": (self.size, self.bore, self.length),
            "tube": (self.bore, self.length),
            "fitting": (self.k,),
        }.get(kind, ())
        if self._fixed is not None:
            name = user_text(self._fixed["part"].name)
            visible = (widgets.HTML(f"<i>{name} (from the scenario file, not editable here)</i>"),)
        self.children = [self.kind, *visible, self.remove]

    def _kind_changed(self, change):
        self._quiet = True
        try:
            self._sizes(change.new)
            if change.new == "tube" and not self.bore.value:
                self.bore.value = 3.0
            if change.new == "tube" and not self.length.value:
                self.length.value = 100.0
        finally:
            self._quiet = False
        self._notify()

    def description(self) -> dict:
        """This row as a part description."""
        kind = self.kind.value
        if self._fixed is not None:
            return dict(self._fixed)
        out = {"type": kind}
        if self._label:
            out["label"] = self._label
        if kind in ("catheter", "needle"):
            out["gauge"] = self.size.value
        if kind == "cannula":
            out["french"] = self.size.value
        if kind in ("catheter", "needle", "cannula", "tube"):
            out["inner_diameter_mm"] = self.bore.value
            out["length_cm"] = self.length.value
        if kind == "fitting":
            out["k"] = self.k.value
        return out


class PartsEditor(widgets.VBox):
    """Rows of parts from source to outlet, with an "add part" button.

    The trait ``version`` counts edits; observe it to recompute after any change.
    """

    def __init__(self, descriptions=DEFAULT_PARTS):
        super().__init__()
        self.add_class("rl-parts-editor")
        self.add_button = widgets.Button(
            description="add part", icon="plus", tooltip="add a part at the outlet end"
        )
        self.add_button.add_class("rl-add-part")
        self.add_button.on_click(lambda button: self.add({"type": "fitting", "k": 0.5}))
        self.version = widgets.IntText(value=0, layout=widgets.Layout(display="none"))
        self.rows: list[PartRow] = []
        self.set_descriptions(descriptions, notify=False)

    def _changed(self):
        self.version.value += 1

    def _row(self, description):
        return PartRow(description, self._changed, self.remove)

    def _layout(self):
        header = widgets.HTML(
            "<b>Parts, source to outlet</b> (bore or length 0 = the catalogue's nominal value)"
        )
        self.children = [header, *self.rows, self.add_button]

    def set_descriptions(self, descriptions, notify=True):
        """Replace all rows."""
        self.rows = [self._row(dict(d)) for d in descriptions]
        self._layout()
        if notify:
            self.version.value += 1

    def add(self, description: dict):
        """Append a part at the outlet end."""
        row = self._row(description)
        self.rows.append(row)
        self._layout()
        self.version.value += 1

    def remove(self, row: PartRow):
        """Remove a row (a line keeps at least one part)."""
        if len(self.rows) > 1 and row in self.rows:
            self.rows.remove(row)
            self._layout()
            self.version.value += 1

    def descriptions(self) -> list[dict]:
        """The parts as descriptions, source to outlet."""
        return [row.description() for row in self.rows]
