"""Raw-text guard: refuse nesting and key-count bombs before any parser runs.

Python's TOML reader expands a dotted key (``a.a.a....b = 1``) or a table header
(``[a.a.a...]``) into nested tables before any nesting limit applies, and its work
grows with the square of the number of parts: 20,000 parts in a 40 KB file take
gigabytes.  :func:`check_text` scans the raw text once, in linear time and constant
memory per token, and refuses

* any table, list or dotted key nested deeper than :data:`MAX_DEPTH` levels (the
  same limit and the same way of counting as the check of the parsed data, so the
  guard never refuses a file that the data check would accept), and
* more than :data:`MAX_TEXT_ITEMS` items: key parts (a key or table header counts one
  item per part, ``a.b.c = 1`` three) and list entries.  The TOML reader's time and
  memory grow with the parts of the keys and headers it reads, each a few microseconds
  and up to a kilobyte (a megabyte of distinct eight-part headers took 300 MB and several
  seconds when each header counted once),

with a :class:`~rheoline.errors.ScenarioError` naming the file, the line and the
limit, and never quoting the file's text.

The scan knows TOML's and JSON's strings and comments (a bracket or a dot inside
a string is text, not structure).  Depth is counted as the parsed-data check
counts it: the top table is level 0 and each table or list inside another is one
level deeper; a dotted key of ``k`` parts adds ``k - 1`` tables.  A header's
parts are counted as tables (a lower bound when a part is an array of tables),
so every count here is at most the true depth.

Examples
--------
>>> check_text('format_version = 1\\n[[scenario]]\\nname = "a.b.c"\\n', "toml", "ok.toml")
>>> check_text("a" + ".a" * 50 + " = 1\\n", "toml", "bomb.toml")
Traceback (most recent call last):
...
rheoline.errors.ScenarioError: bomb.toml: line 1: a dotted key or table header of more than 9 parts
nests tables deeper than the limit of 8 levels; flatten the file
"""

from __future__ import annotations

import re

from rheoline.errors import ScenarioError
from rheoline.scenario import schema

__all__ = ["MAX_TEXT_ITEMS", "check_text", "max_depth"]

#: Most key parts (each part of a key or a table header: ``a.b.c`` is three) and list
#: entries a scenario file may hold.  The largest file the other limits allow (200
#: scenarios of 40 parts, ``benchmarks/load_file.py``) holds about 53,000.
MAX_TEXT_ITEMS = 100_000


def max_depth() -> int:
    """The nesting limit of scenario files (:data:`rheoline.scenario.schema.MAX_DEPTH`, read
    at each call like the other limits)."""
    return schema.MAX_DEPTH


# Possessive quantifiers (``*+``, ``++``) keep every alternative linear: an unterminated
# string cannot make the scan backtrack.
_TOML_TOKEN = re.compile(
    r'(?P<str>"""(?:[^"\\]++|\\[\s\S]|"(?!""))*+"{3,5}'
    r"|'''(?:[^']++|'(?!''))*+'{3,5}"
    r'|"(?:[^"\\\n]++|\\.)*+"'
    r"|'[^'\n]*+')"
    r"|(?P<comment>#[^\n]*+)"
    r"|(?P<nl>\n)"
    r"|(?P<punct>[\[\]{}=,])"
    r"|(?P<bare>[^\s\"'#\[\]{}=,]++)"
)
_JSON_TOKEN = re.compile(r'"(?:[^"\\]++|\\.)*+"|[\[\]{}:,]')


class _Refusal(Exception):
    """Raised inside a scan; carries the offset and the words, turned into a ScenarioError."""

    def __init__(self, position: int, words: str):
        super().__init__(words)
        self.position = position
        self.words = words


def check_text(text: str, fmt: str, source: str) -> None:
    """Refuse depth and key-count bombs in scenario text before it is parsed.

    Parameters
    ----------
    text : str
        The file's text (already decoded).
    fmt : {"toml", "json"}
        Its format.
    source : str
        The file's name, for the message.

    Raises
    ------
    ScenarioError
        Naming ``source``, the line, and the limit: a table, list or dotted key nested
        deeper than :func:`max_depth` levels, or more than :data:`MAX_TEXT_ITEMS` key
        parts and list entries.  Other faults are left to the parser.
    """
    scan = _scan_json if fmt == "json" else _scan_toml
    try:
        scan(text, max_depth())
    except _Refusal as refusal:
        line = text.count("\n", 0, refusal.position) + 1
        raise ScenarioError(f"line {line}: {refusal.words}", source=source) from None


def _too_deep(position, what, depth, limit):
    return _Refusal(
        position,
        f"{what} {depth} levels deep, above the limit of {limit} levels; flatten the file",
    )


def _too_many(position):
    return _Refusal(
        position,
        f"the file holds more than {MAX_TEXT_ITEMS} keys (each part of a dotted key or "
        "table header counts) and list entries, above the limit; split it into smaller files",
    )


class _TomlScan:
    """The state of one TOML scan: the open lists and inline tables, the key being read."""

    def __init__(self, limit):
        self.limit = limit
        self.items = 0
        self.stack = []  # ("[", depth) or ("{", depth) of each open list or inline table
        self.table_depth = 0  # depth of the table the last [header] opened
        self.key_parts = 0  # parts of the key or header being read; 0: none yet
        self.expect_key = True  # at the start of a statement or of an inline table's entry
        self.header = 0  # 1 inside [..], 2 inside [[..]], 0 elsewhere
        self.value_depth = 0  # depth a list or table would have at the current value

    def count(self, position, items=1):
        self.items += items
        if self.items > MAX_TEXT_ITEMS:
            raise _too_many(position)

    def word(self, token, bare, position):
        """A bare word or a quoted string: part of a key or header, or else a value."""
        if not (self.header or self.expect_key):
            return
        self.key_parts += (token.count(".") if bare else 0) + (self.key_parts == 0)
        if self.key_parts > self.limit + 1:  # checked as the key grows: a bomb stops early
            raise _Refusal(
                position,
                f"a dotted key or table header of more than {self.limit + 1} parts nests "
                f"tables deeper than the limit of {self.limit} levels; flatten the file",
            )

    def open_list(self, position):
        if self.expect_key and not self.stack and self.key_parts == 0:
            self.header += 1  # "[" or "[[" at the start of a statement: a table header
        else:
            self.push("[", position)

    def open_table(self, position):
        self.push("{", position)
        self.expect_key = True

    def push(self, kind, position):
        depth = self.value_depth
        if depth > self.limit:
            raise _too_deep(position, "a list or inline table is nested", depth, self.limit)
        self.stack.append((kind, depth))
        self.value_depth = depth + 1

    def close(self, position):
        if self.header:
            self.end_header(position)
        elif self.stack:
            self.stack.pop()
            self.expect_key = False
            self.value_depth = self.stack[-1][1] + 1 if self.stack else self.table_depth

    def end_header(self, position):
        self.header -= 1
        if self.header:
            return
        if self.key_parts > self.limit:
            raise _too_deep(position, "a table header nests tables", self.key_parts, self.limit)
        self.count(position, self.key_parts)
        self.table_depth, self.key_parts, self.expect_key = self.key_parts, 0, False

    def assign(self, position):
        base = self.stack[-1][1] if self.stack else self.table_depth
        inner = base + self.key_parts - 1  # the deepest table a dotted key opens
        if inner > self.limit:
            raise _too_deep(position, "a dotted key nests tables", inner, self.limit)
        self.value_depth = base + max(self.key_parts, 1)
        self.count(position, max(self.key_parts, 1))
        self.key_parts, self.expect_key = 0, False

    def comma(self, position):
        if self.stack and self.stack[-1][0] == "{":
            self.expect_key = True
        elif self.stack:
            self.value_depth = self.stack[-1][1] + 1
            self.count(position)

    def newline(self, position):
        if not self.stack and not self.header:
            self.expect_key, self.key_parts = True, 0


_TOML_PUNCT = {
    "[": _TomlScan.open_list,
    "{": _TomlScan.open_table,
    "]": _TomlScan.close,
    "}": _TomlScan.close,
    "=": _TomlScan.assign,
    ",": _TomlScan.comma,
}


def _scan_toml(text, limit):
    scan = _TomlScan(limit)
    for match in _TOML_TOKEN.finditer(text):
        kind = match.lastgroup
        if kind == "bare" or kind == "str":
            scan.word(match.group(), kind == "bare", match.start())
        elif kind == "punct":
            _TOML_PUNCT[match.group()](scan, match.start())
        elif kind == "nl":
            scan.newline(match.start())


def _scan_json(text, limit):
    stack, items = [], 0
    for match in _JSON_TOKEN.finditer(text):
        token = match.group()
        if token == "[" or token == "{":
            if len(stack) > limit:
                raise _too_deep(match.start(), "a list or object is nested", len(stack), limit)
            stack.append(token)
        elif token == "]" or token == "}":
            if stack:
                stack.pop()
        elif token == ":" or (token == "," and stack and stack[-1] == "["):
            items += 1
            if items > MAX_TEXT_ITEMS:
                raise _too_many(match.start())
