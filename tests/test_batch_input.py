"""Batch files that cannot be misread: units in headers, delimiters, decimal commas, bad cells,
bounded resources, and reports written safely."""

import csv
import io
import json
import math
import os
import tracemalloc

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import ionact as ia
from ionact.errors import InputError
from ionact.samples import INSIDE, INVALID, check_csv, check_samples, read_samples_csv, report_to_text


@pytest.fixture(scope="module")
def design():
    return ia.design_adjuster("NO3-", {"(NH4)2SO4": 2.0}, samples=ia.SamplePopulation(ionic_strength=(0.0, 0.05)),
                              analyte_range=(1e-5, 1e-3), budget=ia.Budget(mv=1.0), solve="none", model="davies")


def _write(tmp_path, text, name="s.csv"):
    p = tmp_path / name
    p.write_text(text, encoding="utf-8")
    return p


@pytest.mark.parametrize("header,value,expected_ionic", [
    ("conductivity [mS/cm]", "0.5", 1.6e-5 * 500),      # was read as µS/cm: a factor of 1000
    ("conductivity [uS/cm]", "500", 1.6e-5 * 500),
    ("conductivity [S/m]", "0.05", 1.6e-5 * 500),       # 0.05 S/m = 500 µS/cm
    ("tds [g/L]", "0.4", 2.5e-5 * 400),                 # was read as mg/L
    ("tds [mg/L]", "400", 2.5e-5 * 400),
    ("ionic_strength [mmol/kg]", "8", 0.008),
])
def test_units_in_headers_are_honoured(design, tmp_path, header, value, expected_ionic):
    # Russell (1976) and Langelier (1936) factors, from memory: I = 1.6e-5 × EC(µS/cm), 2.5e-5 × TDS(mg/L)
    p = _write(tmp_path, f"sample_id,analyte,{header}\na,1e-4,{value}\n")
    r = check_samples(read_samples_csv(p), design)
    assert r.ionic_strength[0] == pytest.approx(expected_ionic, rel=1e-12)


@pytest.mark.parametrize("header,fragment", [
    ("conductivity [banana]", "conductivity [banana]"), ("tds [mol/L]", "tds [mol/L]"),
    ("Na [mg/L]", "Na [mg/L]"), ("Na+", "needs a unit"), ("analyte [m/s]", "analyte [m/s]"),
])
def test_bad_headers_are_errors_naming_the_column(design, tmp_path, header, fragment):
    p = _write(tmp_path, f"sample_id,analyte,conductivity,{header}\na,1e-4,300,1\n")
    with pytest.raises(InputError, match=fragment.replace("[", r"\[").replace("]", r"\]").replace("+", r"\+")):
        check_samples(read_samples_csv(p), design)


def test_semicolon_file_with_decimal_commas(design, tmp_path):
    p = _write(tmp_path, "sample_id;analyte [mg/L as N];conductivity [uS/cm]\nA;4,2;310\nB;1,234;310\nC;0.5;310\n")
    t = read_samples_csv(p)
    assert t.delimiter == ";"
    r = check_samples(t, design)
    assert r.analyte[0] / r.unit_factor == pytest.approx(4.2)
    assert r.status[1] == INVALID and "ambiguous" in r.reason[1]  # 1,234: a decimal comma or thousands?
    assert r.analyte[2] / r.unit_factor == pytest.approx(0.5)
    r2 = check_samples(read_samples_csv(p, decimal_comma=True), design)
    assert r2.analyte[1] / r2.unit_factor == pytest.approx(1.234)


def test_unquoted_decimal_comma_in_a_comma_file_shifts_nothing(design, tmp_path):
    p = _write(tmp_path, "sample_id,analyte,conductivity\nA,4,2,310\nB,0.0001,310\n")
    r = check_samples(read_samples_csv(p), design)
    assert r.sample_id == ("A", "B")
    assert r.status[0] == INVALID and "4 cells for 3 columns" in r.reason[0]
    assert r.status[1] == INSIDE and r.ionic_strength[1] == pytest.approx(1.6e-5 * 310)


def test_a_stray_quote_swallows_no_rows(tmp_path):
    rows = "\n".join(f"S{i},0.0001,310" for i in range(100))
    p = _write(tmp_path, f'sample_id,analyte,conductivity\nA,"4.2,310\n{rows}\n')
    with pytest.raises(InputError, match="line 2"):
        read_samples_csv(p)


@pytest.mark.parametrize("cells,fragment", [
    ({"ionic_strength": "-0.01", "conductivity": "300"}, "ionic_strength -0.01 is negative"),
    ({"ionic_strength": "abc", "conductivity": "300"}, "ionic_strength 'abc' is not a number"),
    ({"Na+ [mg/L]": "lots", "Cl- [mg/L]": "35"}, "Na+ [mg/L] 'lots' is not a number"),
    ({"Na+ [mg/L]": "", "Cl- [mg/L]": "35"}, "write 0 for an absent ion"),
    ({"conductivity": "1_5"}, "'1_5' is not a number"),
    ({"conductivity": "nan"}, "'nan' is not a number"),
    ({"Na+ [mg/L]": "230", "Cl- [mg/L]": "100"}, "ion balance error"),  # 10 meq/L Na+ against 2.8 meq/L Cl-
])
def test_every_bad_cell_gets_its_own_reason(design, cells, fragment):
    cols = {"sample_id": ["bad", "good"], "analyte": [1e-4, 1e-4], "conductivity": ["", "300"],
            "ionic_strength": ["", ""], "Na+ [mg/L]": ["", ""], "Cl- [mg/L]": ["", ""]}
    for k, v in cells.items():
        cols[k][0] = v
    r = check_samples(cols, design)
    assert r.status == (INVALID, INSIDE), r.reason
    assert fragment in r.reason[0]


def test_a_sample_named_units_is_a_sample(design, tmp_path):
    p = _write(tmp_path, "sample_id,analyte,conductivity\nunits,0.0001,300\nb,0.0001,300\n")
    r = check_samples(read_samples_csv(p), design)
    assert r.sample_id == ("units", "b") and r.status == (INSIDE, INSIDE)


def test_balanced_ion_rows_use_their_ions(design):
    # 230 mg/L Na+ (10.0 mmol/L) with 354.5 mg/L Cl- (10.0 mmol/L): balanced to 0.1 %
    r = check_samples({"analyte": [1e-4], "Na+ [mg/L]": [230], "Cl- [mg/L]": [354.5]}, design)
    assert r.status == (INSIDE,) and r.ionic_strength_source == ("ions",)


@pytest.mark.parametrize("source", ["/dev/zero", "wide", "longline"])
def test_files_beyond_the_limits_are_one_line_errors(tmp_path, source):
    if source == "/dev/zero":
        path = "/dev/zero"
    elif source == "wide":
        path = _write(tmp_path, ",".join(f"c{i}" for i in range(30000)) + "\n" + "1," * 29999 + "1\n")
    else:
        path = _write(tmp_path, "sample_id,analyte\n" + "a," + "9" * 100_000 + "\n")
    with pytest.raises(InputError) as info:
        read_samples_csv(path)
    assert "\n" not in str(info.value)


def test_a_failed_run_leaves_the_previous_report_intact(design, tmp_path):
    samples = _write(tmp_path, "sample_id,analyte,conductivity\na,0.0001,300\n")
    out = tmp_path / "report.csv"
    check_csv(samples, design.to_dict(), out=out)
    good = out.read_text()
    with pytest.raises(InputError):  # the figure cannot be written: nothing is replaced
        check_csv(samples, design.to_dict(), out=out, plot=tmp_path / "missing-folder" / "b.png")
    assert out.read_text() == good
    assert [p.name for p in tmp_path.iterdir() if p.name.endswith(".part")] == []
    with pytest.raises(InputError, match="is the input file"):
        check_csv(samples, design.to_dict(), out=samples)
    with pytest.raises(InputError, match=r"\.xyz"):
        check_csv(samples, design.to_dict(), plot=tmp_path / "b.xyz")


def test_control_characters_are_escaped_in_the_text_report(design):
    r = check_samples({"sample_id": ["\x1b[31mred\x1b[0m"], "analyte": [1e-4], "ionic_strength": [0.01]}, design)
    text = report_to_text(r)
    assert "\x1b" not in text and "\\x1b[31mred" in text


cell = st.one_of(st.floats(1e-6, 1e-2).map(repr), st.sampled_from(["", "abc", "-1", "1,5", "nan", "1_5", "=1+1"]))


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(st.lists(st.tuples(cell, st.sampled_from(["300", "", "x", "2,5"]), st.integers(0, 2)), min_size=1,
                max_size=25))
def test_rows_in_equal_rows_out_in_order(design, tmp_path, rows):
    buf = io.StringIO()
    buf.write("sample_id,analyte,conductivity\n")
    for k, (a, ec, extra) in enumerate(rows):
        buf.write(",".join([f"s{k}", a, ec] + ["x"] * extra) + "\n")
    p = _write(tmp_path, buf.getvalue(), "fuzz.csv")
    r = check_samples(read_samples_csv(p), design)
    assert r.sample_id == tuple(f"s{k}" for k in range(len(rows)))  # no row lost, shifted or swallowed
    for k, (a, ec, extra) in enumerate(rows):
        good = extra == 0 and ec == "300" and a not in ("", "abc", "-1", "1,5", "nan", "1_5", "=1+1")
        assert (r.status[k] != INVALID) == good, (rows[k], r.reason[k])
        if r.status[k] == INVALID:
            assert r.reason[k]


def test_streamed_check_memory_does_not_grow_with_the_file(design, tmp_path):
    def peak(n):
        p = tmp_path / f"big{n}.csv"
        rng = np.random.default_rng(1)
        with open(p, "w", encoding="utf-8") as fh:
            fh.write("sample_id,analyte [mg/L as N],conductivity [uS/cm]\n")
            for i, (a, ec) in enumerate(zip(rng.lognormal(1.5, 1, n), rng.uniform(50, 3000, n), strict=True)):
                fh.write(f"S{i},{a:.4g},{ec:.4g}\n")
        tracemalloc.start()
        s = check_csv(p, design, out=tmp_path / f"r{n}.csv", chunk_rows=1000)
        _, top = tracemalloc.get_traced_memory()
        tracemalloc.stop()
        assert s.total == n
        return top

    peak(500)  # warm the caches (unit registry, model tables) so both runs start alike
    small, large = peak(3_000), peak(12_000)
    # the working set is one chunk; what stays per row is its id (duplicate check) and its point for the
    # figure: documented as under 250 bytes a row (README), so 10⁶ rows stay far below 400 MB
    assert (large - small) / 9_000 < 250, (small, large)


def test_report_rows_match_the_input_after_a_streamed_check(design, tmp_path):
    p = _write(tmp_path, "sample_id,analyte,conductivity\n" + "".join(f"S{i},0.0001,{100 + i}\n" for i in range(23)))
    out = tmp_path / "r.csv"
    s = check_csv(p, design, out=out, chunk_rows=5)
    with open(out, encoding="utf-8", newline="") as fh:
        ids = [row["sample_id"] for row in csv.DictReader(fh)]
    assert ids == [f"S{i}" for i in range(23)] and s.total == 23


DESIGN_FIELDS = [
    ("budget_mv", float("nan"), "budget_mv"),
    ("standards_mol_per_l", [-1e-4, 1e-3], "standards_mol_per_l"),
    ("standards_mol_per_l", [], "standards_mol_per_l"),
    ("volume_ratio", -1, "volume_ratio"),
    ("volume_ratio", float("nan"), "volume_ratio"),
    ("temperature_c", 1000, "temperature_c"),
    ("counter_ion", "Cl-", "counter_ion"),
    ("envelope", [0.05, 0.0], "envelope"),
    ("envelope", [0.05], "envelope"),
    ("stock_ions_mol_per_l", [1, 2], "stock_ions_mol_per_l"),
    ("volume_ratio", 10**400, "volume_ratio"),
    ("model", {"name": "davies", "options": {"sizes": [[[[]]]]}}, "size"),
    ("checks", "none", "checks"),
]


@pytest.mark.parametrize("key,value,fragment", DESIGN_FIELDS, ids=[f"{k}-{i}" for i, (k, _, _) in
                                                                   enumerate(DESIGN_FIELDS)])
def test_design_files_are_validated_field_by_field(design, key, value, fragment):
    d = json.loads(json.dumps(design.to_dict()))
    d[key] = value
    with pytest.raises(InputError, match=fragment):
        ia.AdjusterDesign.from_dict(d)


def test_deeply_nested_design_is_an_error(design):
    nested: object = 1
    for _ in range(5000):
        nested = [nested]
    d = json.loads(json.dumps(design.to_dict()))
    d["notes"] = nested
    with pytest.raises(InputError):
        ia.AdjusterDesign.from_dict(d)


def test_design_file_round_trip_then_check(design, tmp_path):
    d = ia.AdjusterDesign.from_dict(json.loads(json.dumps(design.to_dict())))
    r = check_samples({"analyte": [1e-4], "ionic_strength": [0.01]}, d)
    r0 = check_samples({"analyte": [1e-4], "ionic_strength": [0.01]}, design)
    assert r.error_mv[0] == r0.error_mv[0] and not math.isnan(r.error_mv[0])
    assert os.path.exists(tmp_path)


json_values = st.recursive(st.one_of(st.none(), st.booleans(), st.integers(-10**30, 10**30),
                                     st.floats(allow_nan=True, allow_infinity=True), st.text(max_size=8)),
                           lambda inner: st.lists(inner, max_size=3) | st.dictionaries(st.text(max_size=5), inner,
                                                                                       max_size=3), max_leaves=8)


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(st.sampled_from(["analyte", "counter_ion", "recipe", "volume_ratio", "temperature_c", "budget", "budget_mv",
                        "worst_error_mv", "final_ionic_strength", "envelope", "analyte_range_mol_per_l",
                        "standards_mol_per_l", "linear_range_mol_per_l", "selectivity", "model", "checks",
                        "stock_ions_mol_per_l", "species", "background", "density", "buffer"]), json_values)
def test_any_damaged_design_field_loads_or_is_named(design, key, value):
    d = json.loads(json.dumps(design.to_dict()))
    d[key] = value
    try:
        back = ia.AdjusterDesign.from_dict(d)
    except InputError as exc:
        assert str(exc)  # a named error, never another exception
    else:
        assert isinstance(back, ia.AdjusterDesign)


@pytest.mark.parametrize("chunk", [1, 2, 3, 7, 1000])
def test_chunked_read_equals_the_whole_file(tmp_path, chunk):
    # a units row, blank lines, rows of the wrong width and a quoted cell, across chunk boundaries:
    # every chunk size gives the same columns, line numbers and row errors as one read
    from ionact.samples import iter_samples_csv, read_samples_csv

    text = ("sample_id,analyte,conductivity\nunits,mg/L as N,uS/cm\nA,1,100\n\nB,2\n"
            '"C, quoted",3,300\nD,4,400,extra\n,,\nE,5,500\n')
    p = _write(tmp_path, text)
    whole = read_samples_csv(p)
    parts = list(iter_samples_csv(p, chunk_rows=chunk))
    assert [len(t) for t in parts[:-1]] == [chunk] * (len(parts) - 1)
    assert [t.first_row for t in parts] == list(range(0, len(whole), chunk))
    for h, col in whole.columns.items():
        assert sum((t.columns[h] for t in parts), []) == col
    assert sum((t.row_errors for t in parts), []) == whole.row_errors
    assert sum((t.lines for t in parts), []) == whole.lines == [3, 5, 6, 7, 9]
    assert whole.units == {"analyte": "mg/L as N", "conductivity": "uS/cm"}
    assert whole.columns["sample_id"] == ["A", "B", "C, quoted", "D", "E"]
    assert whole.row_errors[0] is None and "2 cells for 3 columns" in whole.row_errors[1]
    assert "4 cells for 3 columns" in whole.row_errors[3] and "not re-aligned" in whole.row_errors[3]


def test_report_rows_limit(design):
    r = check_samples({"sample_id": ["a", "b", "c"], "analyte": [1e-4] * 3, "ionic_strength": [0.01] * 3}, design)
    assert r.rows(2) == r.rows()[:2] and r.rows(0) == [] and r.rows(10) == r.rows()


@settings(max_examples=400, deadline=None)
@given(st.lists(st.text(alphabet="0123456789.eE+- \t", max_size=7), min_size=1, max_size=6))
def test_fast_number_column_accepts_exactly_the_grammar(cells):
    # the fast path converts a column of digits, signs, points, exponents and blanks with numpy;
    # it must accept exactly the cells the number grammar accepts, with the same values
    from ionact.samples.columns import _RE_ALL_NUMBERS, _all_plain_numbers

    fast = _all_plain_numbers(cells)
    if _RE_ALL_NUMBERS.fullmatch("\n".join(cells)):
        assert fast is not None and fast.tolist() == [float(c) for c in cells]
    else:
        assert fast is None


@pytest.mark.parametrize("chunk", [2, 1000])
def test_reader_names_the_line_with_nul_or_endless_text(tmp_path, chunk):
    # a NUL byte (not a text file) or a line beyond the reader's limit stops the read with an
    # error naming that line, wherever it falls in the block of lines read at once
    from ionact.samples import iter_samples_csv
    from ionact.samples.table import MAX_LINE_BYTES

    head = "sample_id,analyte,conductivity\n" + "".join(f"S{i},1e-4,100\n" for i in range(4))
    nul = _write(tmp_path, head + "S9,1e-4\x00,100\nS10,1e-4,100\n")
    with pytest.raises(InputError, match="line 6 contains NUL"):
        list(iter_samples_csv(nul, chunk_rows=chunk))
    endless = tmp_path / "endless.csv"
    endless.write_text(head + "S9," + "1" * (3 * MAX_LINE_BYTES), encoding="utf-8")
    with pytest.raises(InputError, match=f"line 6 is longer than {MAX_LINE_BYTES}"):
        list(iter_samples_csv(endless, chunk_rows=chunk))
