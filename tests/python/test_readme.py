"""The README's Python examples run as written, in order, in one namespace."""

from __future__ import annotations

import re
from pathlib import Path

import matplotlib

matplotlib.use("Agg")

README = Path(__file__).resolve().parents[2] / "README.md"


def test_readme_python_blocks_run() -> None:
    blocks = re.findall(r"```python\n(.*?)```", README.read_text(encoding="utf-8"), flags=re.S)
    assert len(blocks) >= 4
    namespace: dict[str, object] = {}
    for block in blocks:
        exec(compile(block, str(README), "exec"), namespace)  # noqa: S102 - our own README
    import matplotlib.pyplot as plt

    plt.close("all")
