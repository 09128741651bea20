"""The API reference builds from the docstrings with warnings as errors (what `make docs` runs)."""

import shutil
import subprocess
import sys
from pathlib import Path

DOCS = Path(__file__).parent.parent / "docs"


def test_api_reference_builds_without_warnings(tmp_path):
    src = tmp_path / "docs"
    shutil.copytree(DOCS, src, ignore=shutil.ignore_patterns("_build", "generated"))
    res = subprocess.run([sys.executable, "-m", "sphinx", "-q", "-W", "--keep-going", "-b", "html", str(src),
                          str(tmp_path / "html")], capture_output=True, text=True, timeout=600)
    assert res.returncode == 0, res.stderr[-4000:]
    assert (tmp_path / "html" / "generated" / "ionact.calibrate.html").exists()
