"""An editor for a line's parts: one row per :class:`~rheoline.scenario.description.PartSpec`.

Each row shows one part of the scenario description: its type, its gauge or French size, its
bore [mm] and length [cm] (0 = the catalogue's nominal value) or its loss coefficient, and,
read-only, every other field the part has (a needle's wall, a set's kind, a measured part's
bench points, a sweep, the tolerances).  A control's change becomes an edit of that field
only (:mod:`rheoline.widgets.edits`); a field no control touched keeps what the file wrote,
so a part is described one way from file to model.  The editor holds no physics and builds
no model object.

Examples
--------
>>> editor = PartsEditor(DEFAULT_PARTS)
>>> [p.type for p in editor.parts()]
['tube', 'catheter']
>>> editor.parts()[0].fields["length"].written
'180 cm'
"""

from __future__ import annotations

import ipywidgets as widgets

from rheoline.errors import RheolineError
from rheoline.model import catalogue
from rheoline.scenario.description import Axis, PartSpec
from rheoline.widgets.edits import (
    control_range,
    field_words,
    first_shown,
    first_si,
    parsed,
    part_with_field,
    shown_amount,
    written,
)
from rheoline.widgets.style import user_text

__all__ = [
    "PartsEditor",
    "PartRow",
    "PART_KINDS",
    "DEFAULT_PARTS",
    "part_label",
    "part_spec",
    "sized_part_index",
    "CATHETER_GAUGES",
    "NEEDLE_GAUGES",
    "CANNULA_FRENCH",
]

#: Part types the editor offers (a set or a measured part comes only from a scenario file).
PART_KINDS = ("catheter", "needle", "cannula", "tube", "fitting")
#: Gauges offered for catheters and needles (the catalogue's), and French sizes for cannulas.
CATHETER_GAUGES = tuple(sorted(catalogue.CATHETER_GAUGES))
NEEDLE_GAUGES = tuple(sorted(catalogue.NEEDLE_GAUGES))
CANNULA_FRENCH = (6, 8, 10, 12, 14, 16, 18, 20, 22, 24)

#: The fields each editable type shows in controls (every other field is shown as text).
_CONTROLLED = {
    "catheter": ("gauge", "inner_diameter", "length"),
    "needle": ("gauge", "length"),
    "cannula": ("french", "inner_diameter", "length"),
    "tube": ("inner_diameter", "length"),
    "fitting": ("k",),
}
_SIZE_KEY = {"catheter": "gauge", "needle": "gauge", "cannula": "french"}
_SIZES = {"catheter": CATHETER_GAUGES, "needle": NEEDLE_GAUGES, "cannula": CANNULA_FRENCH}
_NO_SIZE = 0  # the size list's "no size" entry (a part given by its bore alone)
_W = {"type": "105px", "size": "90px", "num": "150px", "button": "40px"}


def part_spec(type_: str, label: str = "", **fields) -> PartSpec:
    """A part from fields as a file writes them, read by the file's parser.

    >>> part_spec("tube", inner_diameter="3.0 mm", length="1.8 m").fields["length"].si
    1.8
    """
    return PartSpec(type_, label, {k: parsed(f"part[1].{k}", v, type_) for k, v in fields.items()})


#: A standard gravity set behind an 18G peripheral catheter (invented demo line).
DEFAULT_PARTS = (
    part_spec("tube", "administration set", inner_diameter="3.0 mm", length="180 cm"),
    part_spec("catheter", gauge=18),
)


def sized_part_index(parts) -> int:
    """Index of the part a bore sweep or bore tolerance acts on: the last catheter, needle
    or cannula, else the last tube."""
    for kinds in (("catheter", "needle", "cannula"), ("tube",)):
        hits = [i for i, p in enumerate(parts) if p.type in kinds]
        if hits:
            return hits[-1]
    raise RheolineError(
        "a bore sweep or a bore tolerance needs a catheter, needle, cannula or tube in the line"
    )


def part_label(part: PartSpec, index: int) -> str:
    """A short label for a part, e.g. ``'2. catheter 18G'`` (its label where it has one)."""
    fields = part.fields
    if part.label:
        return f"{index}. {part.label}"
    if "gauge" in fields:
        return f"{index}. {part.type} {first_si(fields['gauge'])}G"
    if "french" in fields:
        return f"{index}. cannula {first_si(fields['french']):g} Fr"
    if "k" in fields:
        return f"{index}. fitting K={first_si(fields['k']):g}"
    if "inner_diameter" in fields:
        return f"{index}. {part.name} {first_shown(fields['inner_diameter'])}"
    return f"{index}. {part.name}"


def _number_box(description, high, step, width=_W["num"]):
    return widgets.BoundedFloatText(
        value=0.0,
        min=0.0,
        max=high,
        step=step,
        description=description,
        layout=widgets.Layout(width=width),
    )


class PartRow(widgets.HBox):
    """One part's controls: type, size, bore [mm], length [cm], K, what else it holds, remove.

    ``part()`` is the row's part: the part it was given with the fields its controls changed
    (read by the file's parser, so a value out of range raises the parser's error there).
    """

    def __init__(self, part: PartSpec, on_change, on_remove, index: int = 1):
        # a narrow column wraps the row's boxes onto a second line rather than hiding them
        super().__init__(layout=widgets.Layout(flex_flow="row wrap"))
        self.add_class("rl-part-row")
        self.index = index
        self._on_change = on_change
        self._quiet = True
        editable = part.type in PART_KINDS
        self.kind = widgets.Dropdown(
            options=PART_KINDS if editable else (part.type,),
            value=part.type,
            layout=widgets.Layout(width=_W["type"]),
        )
        self.kind.add_class("rl-part-type")
        self.size = widgets.Dropdown(layout=widgets.Layout(width=_W["size"]))
        self.size.add_class("rl-part-size")
        self.bore = _number_box(
            "bore [mm]", control_range("part[1].inner_diameter", "tube")[1], 0.01
        )
        self.bore.add_class("rl-part-bore")
        self.length = _number_box("length [cm]", control_range("part[1].length", "tube")[1], 0.1)
        self.length.add_class("rl-part-length")
        self.k = _number_box("K [-]", control_range("part[1].k", "fitting")[1], 0.1, _W["num"])
        self.k.add_class("rl-part-k")
        self.extra = widgets.HTML()
        self.extra.add_class("rl-part-extra")
        self.remove = widgets.Button(
            description="",
            icon="trash",
            tooltip="remove this part",
            layout=widgets.Layout(width=_W["button"], min_width=_W["button"], flex="0 0 auto"),
        )
        self.remove.add_class("rl-part-remove")
        self.adopt(part)
        self._quiet = False
        self.kind.observe(self._kind_changed, names="value")
        for key, control in (
            ("size", self.size),
            ("inner_diameter", self.bore),
            ("length", self.length),
            ("k", self.k),
        ):
            control.observe(lambda change, key=key: self._edited(key), names="value")
        self.remove.on_click(lambda button: on_remove(self))

    # -- showing a part ----------------------------------------------------------------
    def adopt(self, part: PartSpec):
        """Show ``part`` (no edit: what the row holds becomes ``part``)."""
        quiet, self._quiet = self._quiet, True
        try:
            self._part, self._edits = part, {}
            self.kind.value = part.type
            self._show(part)
        finally:
            self._quiet = quiet

    def _show(self, part):
        kind = part.type
        key = _SIZE_KEY.get(kind)
        if key:
            self._size_options(kind, first_si(part.fields.get(key)))
        values = {k: first_si(part.fields.get(k), 0.0) for k in ("inner_diameter", "length")}
        self.bore.value = shown_amount("inner_diameter", values["inner_diameter"])
        self.length.value = shown_amount("length", values["length"])
        self.k.value = float(first_si(part.fields.get("k"), 0.0))
        shown = [
            c
            for c in _CONTROLLED.get(kind, ())
            if kind != "fitting" or "equivalent_length" not in part.fields
        ]
        controls = {"gauge": self.size, "french": self.size, "inner_diameter": self.bore}
        controls.update(length=self.length, k=self.k)
        self.extra.value = user_text(self._extra_words(part, shown))
        self.children = [self.kind, *(controls[c] for c in shown), self.extra, self.remove]

    def _size_options(self, kind, value):
        sizes = _SIZES[kind]
        suffix = " Fr" if kind == "cannula" else "G"
        labels = [(f"{s}{suffix}", s) for s in sizes]
        if value is None:
            labels.insert(0, ("no size", _NO_SIZE))
            value = _NO_SIZE
        elif value not in sizes:
            labels.append((f"{value:g}{suffix}", value))
        if list(self.size.options) != labels:
            self.size.options = labels
        self.size.value = value

    @staticmethod
    def _extra_words(part, shown) -> str:
        """Everything the part holds that no control of the row shows, in words."""
        words = [part.label] if part.label else []
        for key, field in part.fields.items():
            if key not in shown:
                words.append(field_words(key, field))
            elif isinstance(field, Axis):
                words.append(f"{field_words(key, field)} (shown at {field.shown[0]})")
        if part.tolerance:
            widths = ", ".join(
                f"{k} {w.written if w.written is not None else w.width}"
                for k, w in part.tolerance.items()
            )
            words.append(f"tolerance {widths}")
        return "; ".join(words)

    # -- editing -----------------------------------------------------------------------
    def _edited(self, key):
        if self._quiet:
            return
        self._edits[key] = True
        self._on_change()

    def _kind_changed(self, change):
        if self._quiet:
            return
        kind = change.new
        bore = (self.bore.value or 3.0) if kind == "tube" else 0.0
        length = (self.length.value or 100.0) if kind == "tube" else 0.0
        k = self.k.value or 0.5
        self._quiet = True
        try:
            self._show(PartSpec(kind, self._part.label, {}, self._lumen_tolerance(kind)))
            if kind in _SIZES:
                self._size_options(kind, _SIZES[kind][len(_SIZES[kind]) // 2])
            self.bore.value, self.length.value, self.k.value = bore, length, k
        finally:
            self._quiet = False
        self._edits = {"type": True, "size": True, **dict.fromkeys(_CONTROLLED[kind], True)}
        self._on_change()

    def _lumen_tolerance(self, kind):
        return {} if kind == "fitting" else dict(self._part.tolerance)

    def part(self) -> PartSpec:
        """The row's part: as given, with the fields its controls changed."""
        if not self._edits:
            return self._part
        kind = self.kind.value
        part = self._part
        if "type" in self._edits:
            part = PartSpec(kind, part.label, {}, self._lumen_tolerance(kind))
        size_key = _SIZE_KEY.get(kind)
        amounts = {
            size_key: self.size.value,
            "inner_diameter": self.bore.value,
            "length": self.length.value,
            "k": self.k.value,
        }
        for key in _CONTROLLED.get(kind, ()):
            edited = key in self._edits or (key == size_key and "size" in self._edits)
            if edited:
                amount = amounts[key]
                path = f"part[{self.index}].{key}"
                blank = amount in (None, _NO_SIZE)  # 0: no size, or the nominal bore or length
                field = None if blank else parsed(path, written(path, amount), kind)
                part = part_with_field(part, key, field)
        return part


class PartsEditor(widgets.VBox):
    """Rows of parts from source to outlet, with an "add part" button.

    The trait ``version`` counts edits; observe it to recompute after any change.
    """

    def __init__(self, parts=DEFAULT_PARTS):
        super().__init__()
        self.add_class("rl-parts-editor")
        self.add_button = widgets.Button(
            description="add part", icon="plus", tooltip="add a part at the outlet end"
        )
        self.add_button.add_class("rl-add-part")
        self.add_button.on_click(lambda button: self.add(part_spec("fitting", k=0.5)))
        self.version = widgets.IntText(value=0, layout=widgets.Layout(display="none"))
        self.rows: list[PartRow] = []
        self.set_parts(parts, notify=False)

    def _changed(self):
        self.version.value += 1

    def _row(self, part, index):
        return PartRow(part, self._changed, self.remove, index)

    def _layout(self):
        for i, row in enumerate(self.rows, start=1):
            row.index = i
        header = widgets.HTML(
            "<b>Parts, source to outlet</b> (bore or length 0 = the catalogue's nominal value)"
        )
        self.children = [header, *self.rows, self.add_button]

    def set_parts(self, parts, notify=True):
        """Show ``parts`` (PartSpecs).  Rows that already hold them stay (a control being
        edited keeps its place); otherwise the rows are built anew."""
        parts = tuple(parts)
        if len(parts) == len(self.rows) and all(
            row.kind.value == p.type for row, p in zip(self.rows, parts, strict=True)
        ):
            for row, p in zip(self.rows, parts, strict=True):
                row.adopt(p)
        else:
            self.rows = [self._row(p, i) for i, p in enumerate(parts, start=1)]
            self._layout()
        if notify:
            self.version.value += 1

    def add(self, part: PartSpec):
        """Append a part at the outlet end."""
        self.rows.append(self._row(part, len(self.rows) + 1))
        self._layout()
        self.version.value += 1

    def remove(self, row: PartRow):
        """Remove a row (a line keeps at least one part)."""
        if len(self.rows) > 1 and row in self.rows:
            self.rows.remove(row)
            self._layout()
            self.version.value += 1

    def parts(self) -> tuple:
        """The parts, source to outlet (a parser error where a control holds a value a file
        could not)."""
        return tuple(row.part() for row in self.rows)
