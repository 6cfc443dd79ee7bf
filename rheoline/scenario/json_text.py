"""JSON text put together by columns, byte for byte what :func:`json.dumps` writes.

``rheoline run --json`` writes one object per case, up to 20,000 of them with some forty
keys each.  Building those objects and encoding them one by one spent more time than the
solve (issue 14).  Here the text is put together from columns instead: every value of a
column is written once as JSON (a number as Python's shortest round-trip ``repr``, which is
what :mod:`json` writes; a value that repeats, such as a regime, a flag list or the reasons
a value is null, encoded once and reused), then laid out with the keys' texts in one list,
column by column, and joined once.  The result equals ``json.dumps(objects, allow_nan=False)`` with the
default separators (``", "`` and ``": "``) and ASCII escapes; ``tests/test_json_text.py``
compares the two on every shipped example.

Examples
--------
>>> import json
>>> columns = {"case": ["a", "b"], "flow": numbers([1.5, None]), "flags": [[], ["slow"]]}
>>> text = array_text(object_texts(columns))
>>> text
'[{"case": "a", "flow": 1.5, "flags": []}, {"case": "b", "flow": null, "flags": ["slow"]}]'
>>> rows = [dict(zip(columns, row)) for row in zip(*columns.values())]
>>> text == json.dumps(rows, allow_nan=False)
True
"""

from __future__ import annotations

import json
import math

__all__ = [
    "Numbers",
    "Texts",
    "numbers",
    "value_texts",
    "object_texts",
    "objects_array_text",
    "objects_array_pieces",
    "array_text",
]

_encode = json.JSONEncoder(allow_nan=False).encode


class Numbers(list):
    """A column of finite Python floats or ``None`` (its maker checks them): written by
    ``float.__repr__`` without a check of each."""


class Texts(list):
    """A column of values already written as JSON text (written as they are)."""


def numbers(values):
    """``values`` (finite floats or ``None``) marked as a :class:`Numbers` column."""
    return Numbers(values)


def _float_text(value):
    if value - value != 0.0:  # NaN or infinity: JSON has no such number
        raise ValueError(f"Out of range float values are not JSON compliant: {value!r}")
    return float.__repr__(value)


#: The types of values (and of a list's items, a dict's keys and values) that
#: :func:`value_texts` keys by value: no two of them are equal unless written alike once
#: the type is in the key (a float is not: 0.0 == -0.0).
_KEYED = frozenset({str, int, bool, type(None)})


def _key(value):
    """A key naming ``value`` and the type of each of its parts (so that 1 and True, equal
    in Python, are told apart); TypeError for a value not keyed so (a float, a nested list
    or object: encoded each time instead)."""
    cls = value.__class__
    if cls in _KEYED:
        return (cls, value)
    if cls is list:
        parts, types = tuple(value), tuple(map(type, value))
    elif cls is dict:
        parts = tuple(value.items())
        types = (*map(type, value), *map(type, value.values()))
    else:
        raise TypeError(f"{cls.__name__} is not keyed by value")
    if not _KEYED.issuperset(types):
        raise TypeError("a part is not keyed by value")
    return (cls, parts, types)


def value_texts(values):
    """The JSON text of each value, as ``json.dumps(value, allow_nan=False)`` writes it.

    A :class:`Numbers` column is written by ``repr`` (null for ``None``), a :class:`Texts`
    column as it is; any other value is encoded by :mod:`json` once per distinct value (its
    type included) and reused.
    """
    if isinstance(values, Texts):
        return values
    if isinstance(values, Numbers):  # finite by its contract: repr is what json writes
        return _number_texts(values)
    try:
        distinct = set(values)
    except TypeError:  # a value is not hashable (a list or an object)
        distinct = None
    if distinct is not None and all(v.__class__ in _PLAIN for v in distinct):
        # text, None and booleans only: no two of them are equal unless they are the same
        cache = {v: _encode(v) for v in distinct}
        return list(map(cache.__getitem__, values))
    return _mixed_texts(values)


def _number_texts(values):
    """:func:`value_texts` of a :class:`Numbers` column: a column whose values repeat (a
    sweep's zero flows, a volume per catheter) writes each distinct value once."""
    text = float.__repr__
    distinct = set(values)
    if 2 * len(distinct) <= len(values) and not _both_zeros(distinct, values):
        cache = {v: "null" if v is None else text(v) for v in distinct}
        return list(map(cache.__getitem__, values))
    if None not in distinct:
        return list(map(text, values))
    return ["null" if v is None else text(v) for v in values]


def _both_zeros(distinct, values):
    """True when ``values`` hold both 0.0 and -0.0 (equal as keys, written differently)."""
    if 0.0 not in distinct:
        return False
    return len({math.copysign(1.0, v) for v in values if v == 0.0}) > 1


#: The types :func:`value_texts` may key by value alone (none equals another's values).
_PLAIN = frozenset({str, bool, type(None)})


def _mixed_texts(values):
    """:func:`value_texts` of a column of any values: each keyed with its types."""
    cache = {}
    out = []
    for value in values:
        if value.__class__ is float:
            out.append(_float_text(value))
            continue
        try:
            key = _key(value)
        except TypeError:  # not keyed by value: encoded as it is
            out.append(_encode(value))
            continue
        text = cache.get(key)
        if text is None:
            text = cache[key] = _encode(value)
        out.append(text)
    return out


def _flat(columns, tails, end):
    """Every object's pieces in one list, object after object: each key's text and its
    value's text, then the object's tail members and ``end``.  Filled column by column (a
    slice assignment each), so that one ``str.join`` puts all the text together."""
    keys = list(columns)
    texts = [value_texts(column) for column in columns.values()]
    n = len(texts[0]) if texts else len(tails or ())
    if tails is None:
        ends = [end] * n
    else:
        sep = ", " if keys else ""
        ends = [(sep + t[1:-1] if len(t) > 2 else "") + end for t in value_texts(tails)]
    stride = 2 * len(keys) + 1
    flat = [""] * (n * stride)
    for j, (key, column) in enumerate(zip(keys, texts, strict=True)):
        if len(column) != n:
            raise ValueError(f"column {key!r} has {len(column)} values, not {n}")
        flat[2 * j :: stride] = [("{" if j == 0 else ", ") + _encode(key) + ": "] * n
        flat[2 * j + 1 :: stride] = column
    if len(ends) != n:
        raise ValueError(f"{len(ends)} tails for {n} objects")
    flat[stride - 1 :: stride] = ends
    if not keys:
        flat[::stride] = ["{" + e for e in ends]
    return flat


def object_texts(columns, tails=None):
    """The JSON text of each object of ``columns`` (key -> list of values, one per object),
    keys in their order; ``tails`` (objects, one per object) adds their members after the
    columns' (``{"a": 1}`` and ``{"b": 2}`` -> ``{"a": 1, "b": 2}``)."""
    # JSON text from json (ASCII escapes) never holds a raw NUL: it marks the objects' ends
    text = "".join(_flat(columns, tails, "}\x00"))
    return text.split("\x00")[:-1]


def objects_array_text(columns, tails=None):
    """The JSON text of the array of the objects of ``columns`` (as :func:`object_texts`)."""
    return "".join(objects_array_pieces(columns, tails))


def objects_array_pieces(columns, tails=None, size=2048):
    """:func:`objects_array_text` in pieces of at most ``size`` objects each (their
    concatenation is that text), so that a writer never holds the whole text at once."""
    lengths = {len(column) for column in columns.values()}
    if tails is not None:
        lengths.add(len(tails))
    if len(lengths) > 1:
        raise ValueError(f"columns and tails of different lengths: {sorted(lengths)}")
    n = lengths.pop() if lengths else 0
    if n == 0:
        yield "[]"
        return
    for start in range(0, n, size):
        stop = min(n, start + size)
        part = {key: _piece(column, start, stop) for key, column in columns.items()}
        flat = _flat(part, None if tails is None else _piece(tails, start, stop), "}, ")
        if stop == n:
            flat[-1] = flat[-1][:-2]  # no separator after the last object
        yield ("[" if start == 0 else "") + "".join(flat) + ("]" if stop == n else "")


def _piece(column, start, stop):
    """``column[start:stop]``, a :class:`Numbers` or :class:`Texts` column kept as one."""
    piece = column[start:stop]
    return type(column)(piece) if isinstance(column, (Numbers, Texts)) else piece


def array_text(texts):
    """The JSON text of an array of the given element texts."""
    return "[" + ", ".join(texts) + "]"
