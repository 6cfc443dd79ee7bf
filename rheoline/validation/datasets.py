"""The packaged validation data: one CSV per published source, described in ``sources.toml``.

Each CSV row is one measurement with its conditions (fluid, hematocrit, medium,
temperature, shear rate, geometry, drive), where in the source it was read, whether it
was digitized from a figure, and whether it is recalled rather than read (recalled rows
are shown but kept out of every statistic).
"""

from __future__ import annotations

import csv
import math
import tomllib
from dataclasses import dataclass
from importlib import resources

__all__ = ["Source", "Row", "DataSet", "load_datasets", "DATA_PACKAGE"]

#: Package holding the CSV files and ``sources.toml``.
DATA_PACKAGE = "rheoline.validation.data"

_COLUMNS = (
    "row",
    "quantity",
    "fluid",
    "hematocrit",
    "medium",
    "temperature_c",
    "shear_rate_1_s",
    "geometry",
    "inner_diameter_mm",
    "length_mm",
    "drive",
    "drive_value",
    "measured",
    "unit",
    "where",
    "digitized",
    "recalled",
    "note",
)

#: Quantities a row may hold, with the unit its ``measured`` value must carry.
QUANTITY_UNITS = {
    "viscosity": "mPa s",
    "flow": "mL/min",
    "viscosity_ratio": "ratio to saline-0.9",
}


@dataclass(frozen=True)
class Source:
    """One published source (a ``sources.toml`` table)."""

    key: str
    file: str
    family: str
    authors: str
    title: str
    journal: str
    year: str
    doi: str
    where: str
    digitized_by: str
    conditions: str
    role: str
    notes: str
    volume: str = ""
    pages: str = ""

    @property
    def citation(self) -> str:
        """Authors, title, journal, volume, pages, year and DOI in one line."""
        vol = f" {self.volume}" if self.volume else ""
        pages = f", {self.pages}" if self.pages else ""
        doi = f", doi:{self.doi}" if self.doi else ""
        return f'{self.authors}, "{self.title}", {self.journal}{vol}{pages} ({self.year}){doi}'


@dataclass(frozen=True)
class Row:
    """One measured value and its conditions (SI-free: the units of the CSV columns)."""

    dataset: str
    row: str
    quantity: str
    fluid: str
    hematocrit: float
    medium: str
    temperature_c: float
    shear_rate: float
    geometry: str
    inner_diameter_mm: float
    length_mm: float
    drive: str
    drive_value: float
    measured: float
    unit: str
    where: str
    digitized: bool
    recalled: bool
    note: str


@dataclass(frozen=True)
class DataSet:
    """A source and its rows."""

    source: Source
    rows: tuple[Row, ...]

    @property
    def key(self) -> str:
        return self.source.key


def _number(text: str) -> float:
    return float(text) if text.strip() else math.nan


def _yes(text: str, field: str, where: str) -> bool:
    value = text.strip().lower()
    if value not in ("yes", "no"):
        raise ValueError(f"{where}: {field} must be 'yes' or 'no', got {text!r}")
    return value == "yes"


def _row(dataset: str, raw: dict) -> Row:
    where = f"{dataset} row {raw.get('row', '?')}"
    quantity = raw["quantity"]
    if quantity not in QUANTITY_UNITS:
        raise ValueError(f"{where}: quantity {quantity!r} is not one of {sorted(QUANTITY_UNITS)}")
    if raw["unit"] != QUANTITY_UNITS[quantity]:
        raise ValueError(f"{where}: unit {raw['unit']!r} must be {QUANTITY_UNITS[quantity]!r}")
    return Row(
        dataset=dataset,
        row=raw["row"],
        quantity=quantity,
        fluid=raw["fluid"],
        hematocrit=_number(raw["hematocrit"]),
        medium=raw["medium"],
        temperature_c=_number(raw["temperature_c"]),
        shear_rate=_number(raw["shear_rate_1_s"]),
        geometry=raw["geometry"],
        inner_diameter_mm=_number(raw["inner_diameter_mm"]),
        length_mm=_number(raw["length_mm"]),
        drive=raw["drive"],
        drive_value=_number(raw["drive_value"]),
        measured=_number(raw["measured"]),
        unit=raw["unit"],
        where=raw["where"],
        digitized=_yes(raw["digitized"], "digitized", where),
        recalled=_yes(raw["recalled"], "recalled", where),
        note=raw["note"],
    )


def _source(key: str, table: dict) -> Source:
    fields = {k: str(v) for k, v in table.items()}
    return Source(key=key, **fields)


def load_datasets() -> tuple[DataSet, ...]:
    """Every packaged data set, in the order of ``sources.toml``.

    Raises
    ------
    ValueError
        A CSV whose columns, quantities, units or yes/no fields do not follow the schema.

    Examples
    --------
    >>> sets = load_datasets()
    >>> sets[0].key, len(sets[0].rows), sets[0].rows[0].unit
    ('wells-merrill-1962', 20, 'mPa s')
    """
    root = resources.files(DATA_PACKAGE)
    sources = tomllib.loads(root.joinpath("sources.toml").read_text(encoding="utf-8"))
    out = []
    for key, table in sources.items():
        source = _source(key, table)
        with root.joinpath(source.file).open(encoding="utf-8", newline="") as handle:
            reader = csv.DictReader(handle)
            if tuple(reader.fieldnames or ()) != _COLUMNS:
                raise ValueError(f"{source.file}: columns must be {', '.join(_COLUMNS)}")
            rows = tuple(_row(key, raw) for raw in reader)
        out.append(DataSet(source, rows))
    return tuple(out)
