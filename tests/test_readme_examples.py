"""README's Python examples print exactly what README shows under them.

Each ```python block in the "From Python" section is run in a fresh namespace and its
printed output compared with the plain ``` block that follows it, so the README stays a
real run's output.
"""

import contextlib
import io
import pathlib
import re

import pytest

README = pathlib.Path(__file__).resolve().parents[1] / "README.md"


def _examples():
    text = README.read_text(encoding="utf-8")
    section = text.split("## From Python", 1)[1].split("\n## ", 1)[0]
    pairs = re.findall(r"```python\n(.*?)```\s*\n```\n(.*?)```", section, flags=re.S)
    return pairs


def test_readme_has_python_examples():
    assert len(_examples()) >= 2


@pytest.mark.parametrize("code, expected", _examples())
def test_readme_example_prints_what_readme_shows(code, expected):
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        exec(compile(code, "README.md", "exec"), {"__name__": "readme_example"})
    assert out.getvalue().strip() == expected.strip()
