"""The source distribution carries what its tests need."""

import subprocess
import sys
import tarfile
from pathlib import Path

ROOT = Path(__file__).parent.parent


def test_sdist_contains_the_tests_and_their_data(tmp_path):
    code = ("import sys, setuptools.build_meta as b; "
            f"print(b.build_sdist({str(tmp_path)!r}))")
    res = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True, timeout=600)
    assert res.returncode == 0, res.stderr[-3000:]
    name = res.stdout.strip().splitlines()[-1]
    with tarfile.open(tmp_path / name) as tar:
        members = {m.split("/", 1)[1] for m in tar.getnames() if "/" in m}
    for needed in ("tests/conftest.py", "tests/test_calibration.py", "tests/reference/densities_crc_20C.csv",
                   "notebooks/measurement_day.ipynb", "ionact/data/complexes.csv", "ionact/schemas/design.schema.json",
                   "ionact/examples/fluoride_standards.csv", "docs/conf.py", "LICENSE", "CITATION.cff"):
        assert needed in members, needed
    assert not any(m.startswith(("docs/_build", ".venv")) for m in members)
