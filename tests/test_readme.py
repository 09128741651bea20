"""The README's Python examples run as written."""

import re
import warnings
from pathlib import Path

README = Path(__file__).parent.parent / "README.md"


def test_readme_python_blocks_run():
    blocks = re.findall(r"```python\n(.*?)```", README.read_text(encoding="utf-8"), re.S)
    assert blocks
    env: dict = {}
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        for block in blocks:
            exec(compile(block, str(README), "exec"), env)  # noqa: S102 - our own documentation
    assert env["d"].worst_error_mv <= 0.5 + 1e-9


def test_readme_starts_with_the_job_then_the_commands():
    text = README.read_text(encoding="utf-8")
    first = text.split("\n\n")[1]
    assert "activity" in first and "ionic strength" in first
    assert text.index("make demo") < text.index("## A short tour")
    assert text.index("make test") < text.index("## A short tour")
