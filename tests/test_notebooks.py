"""Every notebook in notebooks/ runs top to bottom."""

from pathlib import Path

import nbformat
import pytest
from nbclient import NotebookClient

NOTEBOOKS = sorted((Path(__file__).parent.parent / "notebooks").glob("*.ipynb"))


@pytest.mark.parametrize("path", NOTEBOOKS, ids=[p.stem for p in NOTEBOOKS])
def test_notebook_runs(path):
    nb = nbformat.read(path, as_version=4)
    client = NotebookClient(nb, timeout=300, kernel_name="python3", resources={"metadata": {"path": str(path.parent)}})
    client.execute()
    errors = [o for c in nb.cells if c.cell_type == "code" for o in c.get("outputs", []) if o.output_type == "error"]
    assert not errors
    # a cell that ends with a figure shows it, once
    for c in nb.cells:
        if c.cell_type == "code" and c.source.strip().splitlines()[-1].endswith(".plot()"):
            images = [o for o in c.outputs if "image/png" in o.get("data", {})]
            assert len(images) == 1, c.source


def test_there_are_notebooks():
    assert NOTEBOOKS, "notebooks/ must hold the worked scenarios"
