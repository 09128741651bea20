"""The published JSON Schemas (ionact/schemas/) hold for what the package writes."""

import json
import warnings
from importlib import resources

import pytest
from jsonschema import Draft202012Validator

import ionact as ia
from ionact.cli import main
from ionact.method import load_method


def _schema(name):
    s = json.loads(resources.files("ionact").joinpath("schemas", f"{name}.schema.json").read_text())
    Draft202012Validator.check_schema(s)
    return Draft202012Validator(s)


def _example(name):
    return str(resources.files("ionact").joinpath("examples", name))


@pytest.mark.parametrize("method", ["nitrate_irrigation", "fluoride_buffered"])
def test_design_files_follow_their_schema(method):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        d = ia.design_adjuster(**load_method(f"example:{method}"))
    data = json.loads(json.dumps(d.to_dict(), allow_nan=False))
    _schema("design").validate(data)


def test_a_damaged_design_fails_the_schema():
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        d = json.loads(json.dumps(ia.design_adjuster(**load_method("example:nitrate_irrigation")).to_dict()))
    d["volume_ratio"] = -1
    assert list(_schema("design").iter_errors(d))


def test_batch_report_and_calibration_follow_their_schemas(capsys, tmp_path):
    design, cal = tmp_path / "d.json", tmp_path / "c.json"
    main(["design", "--example", "fluoride_buffered", "--out", str(design)])
    main(["calibrate", _example("fluoride_standards.csv"), "--method", "example:fluoride_buffered", "--out", str(cal)])
    capsys.readouterr()
    main(["check", _example("fluoride_batch.csv"), "--design", str(design), "--json"])
    report = json.loads(capsys.readouterr().out)
    _schema("batch-report").validate(report)
    _schema("calibration").validate(json.loads(cal.read_text()))


def test_json_keys_do_not_change_with_the_unit(capsys, tmp_path):
    cal = tmp_path / "c.json"
    main(["calibrate", _example("fluoride_standards.csv"), "--method", "example:fluoride_buffered", "--out", str(cal)])
    capsys.readouterr()
    keys = []
    for unit in ("mg/L", "umol/L"):
        main(["quantify", _example("fluoride_samples.csv"), "--calibration", str(cal), "--unit", unit, "--json"])
        data = json.loads(capsys.readouterr().out)
        assert data["unit"] == unit
        keys.append(sorted(data["rows"][1]))
    assert keys[0] == keys[1]
