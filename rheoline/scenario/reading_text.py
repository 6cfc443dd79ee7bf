"""From the raw text of a scenario file to plain data: size, encoding, nesting and text.

Every check here runs before a scenario is read: the size limit and UTF-8 decoding, the
raw-text guard (:mod:`rheoline.scenario.text_guard`) before any parser, the parse itself
(TOML or JSON, duplicate JSON keys refused), the nesting limit and the text check of every
key and string. Each failure is a :class:`~rheoline.errors.ScenarioError` naming the source.
"""

from __future__ import annotations

import json
import tomllib

from rheoline.errors import ScenarioError
from rheoline.scenario import schema, text_guard
from rheoline.scenario.values import shown

__all__ = ["check_depth", "decoded", "parsed"]


def decoded(text, source):
    """``text`` as a ``str`` within the size limit (bytes decoded as UTF-8)."""
    limit = schema.MAX_FILE_BYTES
    if isinstance(text, bytes):
        if len(text) > limit:
            raise ScenarioError(
                f"text is {len(text)} bytes, above the limit of {limit}", source=source
            )
        try:
            text = text.decode("utf-8-sig")
        except UnicodeDecodeError as exc:
            raise ScenarioError(
                f"is not UTF-8 text (bad byte at position {exc.start}); save it as UTF-8",
                source=source,
            ) from None
    if len(text) > limit:
        raise ScenarioError(
            f"text is {len(text)} characters, above the limit of {limit}", source=source
        )
    return text


def parsed(text, source, fmt):
    """The plain data of TOML or JSON ``text``; a ScenarioError for anything malformed."""
    text_guard.check_text(text, fmt, source)  # depth and key-count bombs, before any parser
    try:
        if fmt == "json":
            return json.loads(text, object_pairs_hook=lambda pairs: _json_object(pairs, source))
        return tomllib.loads(text)
    except ScenarioError:
        raise
    except tomllib.TOMLDecodeError as exc:
        raise ScenarioError(f"is not valid TOML: {exc}", source=source) from None
    except json.JSONDecodeError as exc:
        raise ScenarioError(
            f"is not valid JSON: {exc.msg} at line {exc.lineno} column {exc.colno}", source=source
        ) from None
    except RecursionError:
        raise ScenarioError(
            f"is nested too deeply (the limit is {schema.MAX_DEPTH} levels)", source=source
        ) from None
    except ValueError as exc:  # e.g. integers longer than Python's digit limit
        raise ScenarioError(f"cannot be parsed as {fmt.upper()}: {exc}", source=source) from None


def _json_object(pairs, source):
    """A JSON object as a dict, refusing a key given twice (TOML refuses it too; JSON
    readers keep the last value silently, so the file would read as one number and solve
    as another)."""
    out = {}
    for key, value in pairs:
        if key in out:
            name = out.get("name", dict(pairs).get("name"))
            where = f" (in the object named {shown(name)!r})" if isinstance(name, str) else ""
            raise ScenarioError(
                f"key {shown(key)!r} is given more than once in one JSON "
                f"object{where}; keep one value",
                source=source,
            )
        out[key] = value
    return out


def check_depth(data, source):
    """Refuse nesting deeper than the limit, keys that are not text, and text that is not
    valid Unicode (a lone surrogate, which JSON's escapes can write: it cannot be encoded
    in any report, so it would pass here and fail when the pack is written)."""
    stack = [(data, 0, "")]
    while stack:
        node, depth, path = stack.pop()
        _check_unicode(node, path, source)
        if depth > schema.MAX_DEPTH:
            raise ScenarioError(
                f"is nested {depth} levels deep, above the limit of {schema.MAX_DEPTH}",
                source=source,
                field=path or None,
            )
        if isinstance(node, dict):
            for k, v in node.items():
                if not isinstance(k, str):
                    raise ScenarioError(
                        f"keys must be text, got {k!r}", source=source, field=path or None
                    )
                _check_unicode(k, path, source)
                if isinstance(v, (dict, list)):
                    stack.append((v, depth + 1, f"{path}.{k}" if path else k))
                elif isinstance(v, str):
                    _check_unicode(v, f"{path}.{k}" if path else k, source)
        elif isinstance(node, list):
            for j, v in enumerate(node, start=1):
                if isinstance(v, (dict, list)):
                    stack.append((v, depth + 1, f"{path}[{j}]"))
                elif isinstance(v, str):
                    _check_unicode(v, f"{path}[{j}]", source)


def _check_unicode(text, path, source):
    """Refuse text holding a lone surrogate (U+D800-U+DFFF), naming where it is."""
    if not isinstance(text, str) or text.isascii():
        return
    bad = next((c for c in text if 0xD800 <= ord(c) <= 0xDFFF), None)
    if bad is not None:
        raise ScenarioError(
            f"holds a lone surrogate U+{ord(bad):04X}, which is not valid Unicode text; "
            "remove it (write the character itself, or a valid escaped pair)",
            source=source,
            field=path or None,
        )
