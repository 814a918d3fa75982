"""The example notebook runs from top to bottom (nbclient, kernel python3)."""

from __future__ import annotations

from pathlib import Path

import pytest

NOTEBOOK = Path(__file__).resolve().parents[2] / "python" / "examples" / "plan_a_run.ipynb"


def test_example_notebook_executes(tmp_path: Path) -> None:
    nbformat = pytest.importorskip("nbformat")
    nbclient = pytest.importorskip("nbclient")
    pytest.importorskip("ipykernel")
    pytest.importorskip("matplotlib")
    nb = nbformat.read(NOTEBOOK, as_version=4)
    client = nbclient.NotebookClient(
        nb, timeout=180, kernel_name="python3", resources={"metadata": {"path": tmp_path}}
    )
    client.execute()
    errors = [o for c in nb.cells if c.cell_type == "code" for o in c.outputs if o.output_type == "error"]
    assert not errors
    html = [
        o["data"]["text/html"]
        for c in nb.cells
        if c.cell_type == "code"
        for o in c.outputs
        if "data" in o and "text/html" in o["data"]
    ]
    # The report and the result objects render as HTML with inline figures.
    assert any("Recommended charge state" in h for h in html)
    assert any("data:image/png;base64" in h for h in html)
