"""The analyst's batch range check and dilution planner."""

import io
import json
import math
import sys

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import ionact as ia
from ionact.samples import (
    CANNOT,
    DILUTE,
    INSIDE,
    INVALID,
    check_samples,
    read_report_csv,
    read_samples_csv,
    safe_cell,
    write_report_csv,
)


@pytest.fixture(scope="module")
def design():
    # nitrate method: 2 mol/L (NH4)2SO4 at 2 mL per 100 mL, samples proven up to I = 0.05,
    # standards 1e-5 … 1e-3 mol/L, budget 1 mV, Davies (see test_adjuster for the hand calculation)
    return ia.design_adjuster("NO3-", {"(NH4)2SO4": 2.0}, samples=ia.SamplePopulation(ionic_strength=(0.0, 0.05)),
                              analyte_range=(1e-5, 1e-3), volume_ratio=0.02, budget=ia.Budget(mv=1.0), solve="none",
                              model="davies")


def test_hand_worked_cases(design):
    # A: 1e-4 mol/L nitrate at I = 0.01: inside 1e-5–1e-3 and I ≤ 0.05 → inside, no dilution.
    # B: 8e-3 mol/L at I = 0.02: ×2 → 4e-3, ×5 → 1.6e-3 (both above 1e-3), ×10 → 8e-4 inside → dilute ×10.
    # C: 0.5 mol/L at I = 0.02: even ×100 gives 5e-3 > 1e-3 → cannot be brought into range.
    r = check_samples({"sample_id": ["A", "B", "C"], "analyte": [1e-4, 8e-3, 0.5],
                       "ionic_strength": [0.01, 0.02, 0.02]}, design)
    assert r.status == (INSIDE, DILUTE, CANNOT)
    assert r.dilution[0] == 1 and r.dilution[1] == 10 and math.isnan(r.dilution[2])
    # the treated analyte at ×10: 8e-3 / 10 / 1.02
    assert r.treated_analyte[1] == pytest.approx(8e-3 / 10 / 1.02)
    assert "×10" in r.reason[1] and "above the calibrated" in r.reason[1]
    assert "×100" in r.reason[2]
    assert r.error_mv[0] < 1.0


def test_envelope_forces_dilution(design):
    # I = 0.3 is above the design's proven 0.05: ×10 brings it to 0.03
    r = check_samples({"analyte": [5e-4], "ionic_strength": [0.3]}, design, dilutions=(1, 2, 5, 10))
    assert r.status == (DILUTE,) and r.dilution[0] == 10
    assert "above the design's" in r.reason[0]


def test_sources_of_ionic_strength(design):
    r = check_samples({"sample_id": ["ions", "ec", "tds", "stated"],
                       "analyte [mg/L as N]": [5, 5, 5, 5],
                       "Na+ [mg/L]": [230, None, None, None], "Cl- [mg/L]": [354.5, None, None, None],
                       "conductivity [uS/cm]": [None, 1000, None, None], "tds [mg/L]": [None, None, 400, None],
                       "ionic_strength": [None, None, None, 0.02]}, design)
    assert r.ionic_strength_source == ("ions", "conductivity (russell)", "tds (langelier)", "stated")
    assert r.ionic_strength[0] == pytest.approx(0.01 / (ia.water.density(25) / 1000), rel=1e-3)
    assert r.ionic_strength[1] == pytest.approx(0.016)
    assert r.ionic_strength[2] == pytest.approx(0.01)
    assert r.unit == "mg/L as N"


bad_cells = st.sampled_from(["", "abc", "-1", "nan", "inf", None])


@settings(max_examples=40, deadline=None)
@given(st.lists(st.tuples(st.booleans(), st.floats(1e-6, 1e-1), st.floats(0, 0.2), bad_cells,
                          st.sampled_from(["analyte", "ionic_strength"])), min_size=1, max_size=30))
def test_bad_rows_keep_their_place(design, rows):
    ids, an, ist, expect_bad = [], [], [], []
    for k, (good, a, i, bad, where) in enumerate(rows):
        ids.append(f"s{k}")
        if good:
            an.append(a)
            ist.append(i)
        else:
            an.append(bad if where == "analyte" else a)
            ist.append(bad if where == "ionic_strength" else i)
        expect_bad.append(not good)
    r = check_samples({"sample_id": ids, "analyte": an, "ionic_strength": ist}, design)
    assert r.sample_id == tuple(ids)
    for k, bad in enumerate(expect_bad):
        assert (r.status[k] == INVALID) == bad, (k, r.status[k], r.reason[k])
        if bad:
            assert r.reason[k]
            assert math.isnan(r.error_mv[k])
        else:
            assert np.isfinite(r.error_mv[k])


def test_nan_policy_isolated(design):
    # a NaN gives an invalid-row status in that position only; neighbours are untouched
    base = {"analyte": [1e-4, 1e-4, 1e-4], "ionic_strength": [0.01, 0.01, 0.01]}
    ref = check_samples(base, design)
    withnan = check_samples({"analyte": [1e-4, float("nan"), 1e-4], "ionic_strength": [0.01, 0.01, 0.01]}, design)
    assert withnan.status == (INSIDE, INVALID, INSIDE)
    # equal to rounding: BLAS may round a column differently by its position in the batch
    assert withnan.error_mv[0] == pytest.approx(ref.error_mv[0], rel=1e-12, abs=1e-15)
    assert withnan.error_mv[2] == pytest.approx(ref.error_mv[2], rel=1e-12, abs=1e-15)


def test_duplicate_ids(design):
    r = check_samples({"sample_id": ["x", "y", "x"], "analyte": [1e-4] * 3, "ionic_strength": [0.01] * 3}, design)
    assert r.status[2] == INVALID and "duplicate sample id 'x'" in r.reason[2]
    assert r.status[0] == INSIDE


def test_design_json_versions(design):
    d = design.to_dict()
    r = check_samples({"analyte": [1e-4], "ionic_strength": [0.01]}, json.loads(json.dumps(d)))
    assert r.status == (INSIDE,)
    old = dict(d, version=0)
    with pytest.raises(ia.InputError, match="version 0"):
        check_samples({"analyte": [1e-4], "ionic_strength": [0.01]}, old)
    with pytest.raises(ia.InputError, match="format"):
        check_samples({"analyte": [1e-4], "ionic_strength": [0.01]}, {"format": "other"})


def test_whole_input_errors(design):
    with pytest.raises(ia.InputError, match="'analyte' column"):
        check_samples({"ionic_strength": [0.01]}, design)
    with pytest.raises(ia.InputError, match="source of ionic strength"):
        check_samples({"analyte": [1e-4]}, design)
    with pytest.raises(ia.InputError, match="≥ 1"):
        check_samples({"analyte": [1e-4], "ionic_strength": [0.01]}, design, dilutions=(0.5,))


def test_csv_round_trip(design, tmp_path):
    r = check_samples({"sample_id": ["=cmd()", "+x", "ok", "-minus"], "analyte": [1e-4, 8e-3, 0.5, "bad"],
                       "ionic_strength": [0.01, 0.02, 0.02, 0.01]}, design)
    out = tmp_path / "report.csv"
    write_report_csv(r, out)
    text = out.read_text()
    assert "'=cmd()" in text and "'+x" in text and "'-minus" in text
    back = read_report_csv(out)
    assert [b["sample_id"] for b in back] == ["=cmd()", "+x", "ok", "-minus"]
    for b, row in zip(back, r.rows(), strict=True):
        for k, v in row.items():
            if isinstance(v, float):
                assert (math.isnan(v) and math.isnan(b[k])) or b[k] == v
            else:
                assert b[k] == v


def test_safe_cells():
    assert safe_cell(-0.5) == "-0.5"  # numbers stay numbers
    assert safe_cell("@SUM(A1)") == "'@SUM(A1)"
    assert safe_cell(float("nan")) == ""


def test_units_row_and_ragged_csv(tmp_path):
    p = tmp_path / "s.csv"
    p.write_text("sample_id,analyte,conductivity\nunits,mg/L as N,uS/cm\na,5,300\nb,6\nc,7,400,extra\n",
                 encoding="utf-8")
    t = read_samples_csv(p)
    assert t.units == {"analyte": "mg/L as N", "conductivity": "uS/cm"}
    assert t.columns["conductivity"] == ["300", "", "400"]
    # rows with the wrong number of cells are kept, in place, and marked — never padded or cut silently
    assert t.row_errors[0] is None and "2 cells for 3 columns" in t.row_errors[1]
    assert "4 cells for 3 columns" in t.row_errors[2] and t.lines == [3, 4, 5]
    with pytest.raises(ia.InputError, match="UTF-8"):
        q = tmp_path / "latin.csv"
        q.write_bytes("sample_id,analyte\nRío,5\n".encode("latin-1"))
        read_samples_csv(q)
    with pytest.raises(ia.InputError, match="empty"):
        e = tmp_path / "e.csv"
        e.write_text("")
        read_samples_csv(e)


def test_plot(design, tmp_path):
    r = check_samples({"analyte": [1e-4, 8e-3, 0.5, -1], "ionic_strength": [0.01, 0.02, 0.02, 0.01]}, design)
    path = tmp_path / "batch.png"
    r.plot(path)
    assert path.stat().st_size > 1000


def test_progress_is_quiet_when_not_a_terminal(design, capsys):
    check_samples({"analyte": [1e-4] * 5, "ionic_strength": [0.01] * 5}, design, progress=True)
    assert capsys.readouterr().err == ""


class _Terminal(io.StringIO):
    def isatty(self) -> bool:
        return True


def test_progress_shows_on_a_terminal(design, monkeypatch):
    term = _Terminal()
    monkeypatch.setattr(sys, "stderr", term)
    r = check_samples({"analyte": [1e-4] * 5, "ionic_strength": [0.01] * 5}, design, progress=True)
    assert len(r) == 5
    shown = term.getvalue()
    assert "checking samples" in shown and "/5 " in shown  # the bar, against the batch size


def test_streamed_check_counts_rows_on_a_terminal(design, tmp_path, monkeypatch):
    from ionact.samples import check_csv

    src = tmp_path / "b.csv"
    src.write_text("sample_id,analyte,ionic_strength\n" + "".join(f"s{k},1e-4,0.01\n" for k in range(7)))
    term = _Terminal()
    monkeypatch.setattr(sys, "stderr", term)
    summary = check_csv(src, design, chunk_rows=3, progress=True)
    assert sum(summary.counts.values()) == 7
    assert "checking b.csv" in term.getvalue() and "row" in term.getvalue()  # a count: the file length is unknown


def test_design_figure_for_evaluated_design(design, tmp_path):
    assert len(design.scan["x"]) > 10 and design.scan["chosen"] == pytest.approx(2.0)
    design.plot(tmp_path / "d.png")
    assert (tmp_path / "d.png").stat().st_size > 1000


def test_report_text_is_what_the_csv_module_writes(design):
    # the report is built column by column for speed; it must equal csv.writer's output for
    # awkward sample ids (delimiters, quotes, line breaks, formula-leading characters)
    import csv

    from ionact.samples.output import _csv_text, _num_column, _text_column

    ids = ["plain", "a,b", 'say "hi"', "two\nlines", "=cmd", "+1", "", "tab\there", "cr\rhere"]
    r = check_samples({"sample_id": ids, "analyte": [1e-4] * len(ids), "ionic_strength": [0.01] * len(ids)}, design)
    cols = r.columns()
    cells = [_num_column(np.asarray(v, dtype=float)) if isinstance(v, np.ndarray) else _text_column(v)
             for _, v in cols]
    buf = io.StringIO()
    w = csv.writer(buf)
    w.writerow([h for h, _ in cols])
    w.writerows(zip(*cells, strict=True))
    assert _csv_text(r, header=True) == buf.getvalue()


def test_report_numbers_of_a_column_with_few_values_keep_their_exact_form():
    # a column of few distinct values is formatted once per value; NaN stays empty and the two
    # zeros keep their signs (they are one key of a dictionary)
    from ionact.samples.output import _num_column

    values = np.array([1.0, 2.0, 0.0, -0.0, 5.0, 1.0] * 100 + [np.nan] * 3 + [-0.0, 2.0])
    distinct = set(values.tolist())
    assert len(distinct) * 8 < values.size  # the path that formats each value once
    assert _num_column(values) == ["" if v != v else repr(float(v)) for v in values]
