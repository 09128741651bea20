"""A catalogue of bad inputs across the Python API and the command line.

Each case asserts the exact exception type (or the exit status) and that the message names
the offending value. Then Hypothesis fuzzes every parser: nothing escapes but IonactError.
"""

import json
import warnings

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import ionact as ia
from ionact.cli import main
from ionact.errors import (
    InfeasibleDesignError,
    InputError,
    IonactError,
    MissingParameterError,
    UnitError,
    UnknownSpeciesError,
    ValidityRangeError,
)
from ionact.method import load_method
from ionact.samples import check_samples, read_samples_csv
from ionact.units import parse_amount

JOB = dict(samples=ia.SamplePopulation(ionic_strength=(0, 0.01)), analyte_range=(1e-5, 1e-3),
           budget=ia.Budget(mv=0.5), solve="none", model="davies")


def _design(**kw):
    args = dict(analyte="F-", stock={"NaCl": 1.0}, **JOB)
    args.update(kw)
    return ia.design_adjuster(**args)


@pytest.fixture(scope="module")
def design_dict():
    return _design().to_dict()


def _strict(fn):
    def run():
        with ia.strict():
            return fn()
    return run


API_CASES = [
    # malformed ion and salt formulas
    ("ion-empty", lambda: ia.Ion.parse(""), InputError, "empty"),
    ("ion-not-formula", lambda: ia.Ion.parse("Qq+"), InputError, "Qq"),
    ("ion-charge-too-big", lambda: ia.Ion.parse("Ca+9"), InputError, "+9"),
    ("ion-ambiguous", lambda: ia.Ion.parse("Fe(CN)63-"), InputError, "Fe(CN)63-"),
    ("ion-double-sign", lambda: ia.Ion.parse("Na+-"), InputError, "Na+-"),
    ("ion-not-text", lambda: ia.Ion.parse(3.5), InputError, "3.5"),
    ("salt-unknown", lambda: ia.Salt.parse("NaXy"), UnknownSpeciesError, "NaXy"),
    ("salt-unbalanced-ions", lambda: ia.Salt.parse("odd", ions={"Na+": 2, "Cl-": 1}), InputError, "+1"),
    ("salt-bad-count", lambda: ia.Salt.parse("odd", ions={"Na+": -1, "Cl-": 1}), InputError, "-1"),
    ("salt-hydrate-absurd", lambda: ia.Salt.parse("NaCl·99H2O"), InputError, "99"),
    # unknown species
    ("solution-unknown-ion", lambda: ia.Solution({"Xe+": 0.1, "Cl-": 0.1}), UnknownSpeciesError, "Xe+"),
    ("model-unknown", lambda: ia.activity_coefficients(ia.Solution({}), "nonesuch"), UnknownSpeciesError,
     "nonesuch"),
    # wrong or missing units
    ("unit-unknown", lambda: parse_amount("3 furlongs", "Na+"), UnitError, "furlong"),
    ("unit-wrong-dimension", lambda: parse_amount("3 m/s", "Na+"), UnitError, "m/s"),
    ("unit-missing", lambda: parse_amount("5", "Na+"), UnitError, "no unit"),
    ("unit-mass-without-ion", lambda: parse_amount("35 mg/L"), UnitError, "35 mg/L"),
    ("unit-as-wrong-element", lambda: parse_amount("1 mg/L as N", "Cl-"), UnitError, "no N"),
    ("unit-meq-neutral", lambda: parse_amount("2 meq/L", "NH3"), UnitError, "2 meq/L"),
    # negative, NaN, infinite amounts
    ("amount-negative", lambda: ia.Solution({"Na+": -0.1, "Cl-": -0.1}), InputError, "-0.1"),
    ("amount-nan", lambda: ia.Solution({"Na+": float("nan"), "Cl-": 0.1}), InputError, "nan"),
    ("amount-inf", lambda: ia.Solution({"Na+": float("inf"), "Cl-": 0.1}), InputError, "inf"),
    ("amount-negative-string", lambda: parse_amount("-2 mmol/L", "Na+"), InputError, "-2 mmol/L"),
    # charge imbalance
    ("charge-imbalance", lambda: ia.Solution({"Na+": 0.10, "Cl-": 0.09}), InputError, "+10 meq/kg"),
    ("balance-wrong-sign", lambda: ia.Solution({"Na+": 0.10, "Cl-": 0.09}, balance="K+"), InputError, "K+"),
    ("balance-neutral", lambda: ia.Solution({"Na+": 0.10, "Cl-": 0.09}, balance="NH3"), InputError, "NH3"),
    # temperatures
    ("temperature-below-absolute-zero", lambda: ia.water.density(-300.0), InputError, "-300"),
    ("temperature-strict-margin", _strict(lambda: ia.water.debye_huckel_a(103.0)), ValidityRangeError, "103"),
    ("temperature-too-high", lambda: ia.water.debye_huckel_a(120.0), InputError, "120"),
    ("temperature-kelvin", lambda: ia.water.density(373.15), InputError, "looks like kelvin"),
    ("temperature-kelvin-solution", lambda: ia.Solution({"Na+": 0.1, "Cl-": 0.1}, temperature=298.15), InputError,
     "298.15 K is 25.00 °C"),
    ("temperature-not-a-temperature", lambda: ia.Solution({"Na+": 0.1, "Cl-": 0.1}, temperature="25 mg/L"),
     UnitError, "25 mg/L"),
    ("temperature-nan-solution", lambda: ia.Solution({"Na+": 0.1, "Cl-": 0.1}, temperature=float("nan")),
     InputError, "nan"),
    ("temperature-design", lambda: _design(temperature=130.0), InputError, "130"),
    # ionic strength beyond every model
    ("ionic-strength-beyond-pitzer", _strict(lambda: ia.activity_coefficients(
        ia.Solution.from_salts({"NaCl": 7.0}), "pitzer")), ValidityRangeError, "7"),
    ("ionic-strength-negative", lambda: ia.models.davies(1, -0.1), InputError, "-0.1"),
    # missing model parameters
    ("pitzer-missing-pair", lambda: ia.activity_coefficients(ia.Solution.from_salts({"CsCl": 0.1}), "pitzer"),
     MissingParameterError, "Cs+–Cl-"),
    ("sit-missing-pair", lambda: ia.activity_coefficients(ia.Solution.from_salts({"CsCl": 0.1}), "sit"),
     MissingParameterError, "Cs+–Cl-"),
    ("truesdell-jones-missing", lambda: ia.activity_coefficients(ia.Solution.from_salts({"KNO3": 0.1}),
                                                                 "truesdell-jones"), MissingParameterError, "NO3-"),
    ("density-missing-volume", lambda: ia.Solution.from_salts({"NiCl2": "0.1 mol/L"}), MissingParameterError,
     "Ni^2+"),
    # infeasible designs and saturation
    ("design-infeasible", lambda: _design(samples=ia.SamplePopulation(ionic_strength=(0, 0.5)),
                                          budget=ia.Budget(mv=0.001), solve="stock"), InfeasibleDesignError, "0.001"),
    ("design-above-saturation", lambda: _design(stock={"KNO3": 5.0}), InfeasibleDesignError, "KNO3"),
    ("design-budget-zero", lambda: ia.Budget(mv=0), InputError, "budget mv 0"),
    ("design-ratio-negative", lambda: _design(volume_ratio=-1), InputError, "volume_ratio -1"),
    ("design-ratio-huge", lambda: _design(volume_ratio=1e300), InputError, "volume_ratio 1e+300"),
    ("design-analyte-in-isa", lambda: _design(stock={"NaF": 1.0}), InputError, "F-"),
    ("design-ratio-text", lambda: _design(volume_ratio="lots"), InputError, "lots"),
    ("design-margin-text", lambda: _design(solubility_margin="x"), InputError, "'x'"),
    ("buffer-ph", lambda: ia.Buffer("CH3COOH", "CH3COONa", pH=15), InputError, "15"),
    # conversions
    ("activity-zero", lambda: ia.concentration_from_activity("Na+", 0.0), InputError, "0"),
    ("activity-unreachable", lambda: ia.concentration_from_activity("Na+", 0.5, model="limiting"), InputError,
     "0.5"),
    ("counter-ion-sign", lambda: ia.concentration_from_activity("Na+", 1e-3, counter_ion="K+"), InputError, "K+"),
    ("nernst-zero-charge", lambda: ia.nernst_slope(0), InputError, "charge 0"),
]


@pytest.mark.parametrize("fn,err,fragment", [c[1:] for c in API_CASES], ids=[c[0] for c in API_CASES])
def test_api_bad_input(fn, err, fragment):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ia.ValidityRangeWarning)
        with pytest.raises(err) as info:
            fn()
    assert type(info.value) is err
    assert fragment in str(info.value)


def test_catalogue_is_large():
    assert len(API_CASES) + len(CLI_CASES) + len(FILE_CASES) >= 40


# -- files: CSV and TOML and JSON ------------------------------------------------------------
FILE_CASES = [
    ("csv-empty", "samples.csv", b"", "empty"),
    ("csv-header-only", "samples.csv", b"sample_id,analyte\n", "no sample rows"),
    ("csv-latin1", "samples.csv", "sample_id,analyte\nRío,5\n".encode("latin-1"), "UTF-8"),
    ("csv-duplicate-columns", "samples.csv", b"analyte,analyte\n1,2\n", "duplicate column"),
    ("toml-unknown-key", "m.toml", b'analyte = "F-"\nflavour = "mint"\n', "flavour"),
    ("toml-missing-analyte", "m.toml", b"[budget]\nmv = 1\n", "analyte"),
    ("toml-missing-budget", "m.toml", b'analyte = "F-"\n', "budget"),
    ("toml-syntax", "m.toml", b"analyte = \n", "not valid TOML"),
    ("toml-bad-pair", "m.toml",
     b'analyte = "F-"\n[budget]\nmv = 1\n[analyte_range]\nlow = 1e-5\nhigh = 1e-3\n[samples]\nionic_strength = 5\n'
     b'[adjuster.stock]\nNaCl = 1\n', "ionic_strength"),
    ("toml-unknown-nested", "m.toml",
     b'analyte = "F-"\n[budget]\nmv = 1\nsize = 3\n', "size"),
]


@pytest.mark.parametrize("name,content,fragment", [c[1:] for c in FILE_CASES], ids=[c[0] for c in FILE_CASES])
def test_bad_files(tmp_path, name, content, fragment):
    p = tmp_path / name
    p.write_bytes(content)
    with pytest.raises(InputError) as info:
        if name.endswith(".csv"):
            read_samples_csv(p)
        else:
            load_method(p)
    assert fragment in str(info.value)


def test_duplicate_ids_and_ragged_rows_are_kept(tmp_path, design_dict):
    p = tmp_path / "s.csv"
    p.write_text("sample_id,analyte,ionic_strength\nA,1e-4,0.01\nA,1e-4,0.01\nB,1e-4\nC,1e-4,0.01,9\n")
    r = check_samples(read_samples_csv(p), design_dict)
    assert r.sample_id == ("A", "A", "B", "C")
    assert r.status[1] == "invalid input" and "duplicate" in r.reason[1]
    assert r.status[2] == "invalid input" and "2 cells for 3 columns" in r.reason[2]
    assert r.status[3] == "invalid input" and "4 cells for 3 columns" in r.reason[3]


def test_design_json_other_version(design_dict):
    with pytest.raises(InputError, match="version 7"):
        check_samples({"analyte": [1e-4], "ionic_strength": [0.01]}, dict(design_dict, version=7))


# -- the command line: one line, non-zero exit, no traceback ----------------------------------
CLI_CASES = [
    ("cli-unknown-salt", ["gamma", "NaQq=0.1"], "NaQq"),
    ("cli-bad-term", ["strength", "NaCl"], "NaCl"),
    ("cli-bad-unit", ["strength", "NaCl=3 furlongs"], "furlong"),
    ("cli-imbalance", ["strength", "Na+=0.1"], "charge imbalance"),
    ("cli-negative-activity", ["convert", "F-", "--activity", "-1"], "-1"),
    ("cli-missing-method", ["design", "/nonexistent/method.toml"], "/nonexistent/method.toml"),
    ("cli-unknown-example", ["design", "--example", "nonesuch"], "nonesuch"),
    ("cli-missing-samples", ["check", "/nonexistent.csv", "--design", "/nonexistent.json"], "/nonexistent.json"),
]


@pytest.mark.parametrize("argv,fragment", [c[1:] for c in CLI_CASES], ids=[c[0] for c in CLI_CASES])
def test_cli_user_errors(capsys, argv, fragment):
    rc = main(argv)
    out, err = capsys.readouterr()
    assert rc == 2
    assert err.count("\n") == 1 and "Traceback" not in err
    assert fragment in err


def test_cli_debug_raises():
    with pytest.raises(UnknownSpeciesError):
        main(["--debug", "gamma", "NaQq=0.1"])


def test_cli_check_design_version(capsys, tmp_path, design_dict):
    d = tmp_path / "d.json"
    d.write_text(json.dumps(dict(design_dict, version=99)))
    s = tmp_path / "s.csv"
    s.write_text("analyte,ionic_strength\n1e-4,0.01\n")
    rc = main(["check", str(s), "--design", str(d)])
    _, err = capsys.readouterr()
    assert rc == 2 and "version 99" in err


# -- NaN policy in arrays ----------------------------------------------------------------------
def test_nan_in_array_functions_stays_in_place():
    i = np.array([0.01, np.nan, 0.1])
    g = ia.models.davies(1, i)
    assert np.isnan(g[1]) and np.isfinite(g[[0, 2]]).all()
    assert g[0] == ia.models.davies(1, 0.01)
    t = np.array([25.0, np.nan])
    assert np.isnan(ia.water.density(t)[1]) and np.isfinite(ia.water.density(t)[0])


# -- strict mode -------------------------------------------------------------------------------
def test_strict_mode_and_warning_mode():
    sol = ia.Solution.from_salts({"NaCl": 1.0})
    with pytest.warns(ia.ValidityRangeWarning, match="davies"):
        ia.activity_coefficients(sol, "davies")
    with ia.strict(), pytest.raises(ValidityRangeError, match="0–0.5"):
        ia.activity_coefficients(sol, "davies")
    ia.activity_coefficients(sol, "pitzer")  # in range: no warning, no error


# -- fuzzing: nothing but IonactError escapes ----------------------------------------------------
@given(st.text(max_size=40))
def test_fuzz_amount_strings(text):
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            parse_amount(text, "Na+")
    except IonactError:
        pass


@given(st.text(alphabet="0123456789.eE+- mgLuolkM/asNCO()", max_size=24))
def test_fuzz_unit_like_strings(text):
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            parse_amount(text, "NO3-")
    except IonactError:
        pass


@given(st.text(max_size=30))
def test_fuzz_salt_strings(text):
    try:
        ia.Salt.parse(text)
    except IonactError:
        pass


cell = st.one_of(st.text(max_size=8), st.floats(allow_nan=True, allow_infinity=True).map(repr),
                 st.sampled_from(["", "-1", "1e400", "0", "5", "=1+1"]))


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(st.lists(st.tuples(cell, cell, cell), min_size=1, max_size=12))
def test_fuzz_csv_rows(tmp_path, design_dict, rows):
    import csv
    import io

    buf = io.StringIO()
    w = csv.writer(buf)
    w.writerow(["sample_id", "analyte", "conductivity [uS/cm]"])
    w.writerows(rows)
    p = tmp_path / "fuzz.csv"
    p.write_text(buf.getvalue(), encoding="utf-8")
    try:
        table = read_samples_csv(p)
    except IonactError as exc:  # only a whole-file problem, named with its line (a cell spanning lines)
        assert "line" in str(exc) or "empty" in str(exc) or "no sample rows" in str(exc), str(exc)
        n_out = None
    else:
        n_out = len(check_samples(table, design_dict))
    assert n_out is None or n_out == len(table)


toml_value = st.one_of(st.integers(-5, 5), st.floats(-1, 10, allow_nan=False), st.text(max_size=6),
                       st.lists(st.floats(0, 1), max_size=3), st.booleans())


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(st.dictionaries(st.sampled_from(["analyte", "temperature", "model", "levels", "lowest_temperature", "x"]),
                       toml_value, max_size=4),
       st.dictionaries(st.sampled_from(["ionic_strength", "background", "conductivity"]), toml_value, max_size=2),
       st.dictionaries(st.sampled_from(["volume_ratio", "solve", "max_ratio"]), toml_value, max_size=2))
def test_fuzz_method_files(tmp_path, top, samples, adjuster):
    def fmt(v):
        return json.dumps(v)

    lines = [f"{k} = {fmt(v)}" for k, v in top.items()]
    lines += ["[budget]", "mv = 0.5", "[analyte_range]", "low = 1e-5", "high = 1e-3", "[samples]"]
    lines += [f"{k} = {fmt(v)}" for k, v in samples.items()]
    lines += ["[adjuster]"] + [f"{k} = {fmt(v)}" for k, v in adjuster.items()]
    lines += ["[adjuster.stock]", "NaCl = 1.0"]
    p = tmp_path / "fuzz.toml"
    p.write_text("\n".join(lines) + "\n", encoding="utf-8")
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            ia.design_adjuster(**load_method(p))
    except IonactError:
        pass


def test_warnings_point_at_the_callers_code():
    with warnings.catch_warnings(record=True) as rec:
        warnings.simplefilter("always")
        ia.activity_coefficients(ia.Solution.from_salts({"NaCl": 1.0}, temperature=50.0), "sit")
        ia.concentration_from_activity("Na+", 0.5, model="davies")
        parse_amount("35 ppm", "Cl-")
    assert rec and all(r.filename == __file__ for r in rec), [(r.filename, str(r.message)) for r in rec]


# -- inputs that used to end in a traceback, a hang or a silently changed value ------------------
def _d():
    return ia.design_adjuster("F-", {"NaCl": 1.0}, samples=ia.SamplePopulation(ionic_strength=(0, 0.01)),
                              analyte_range=(1e-5, 1e-3), budget=ia.Budget(mv=1.0), solve="none", model="davies")


MORE_CASES = [
    ("davies-text", lambda: ia.models.davies(1, "abc"), InputError, "'abc'"),
    ("davies-shapes", lambda: ia.models.davies([1, 2, 3], [0.1, 0.2]), InputError, "do not broadcast"),
    ("design-unknown-keyword", lambda: _design(flavour=1), InputError, "flavour"),
    ("interferent-not-a-pair", lambda: ia.nikolsky_eisenman("NO3-", 1e-4, {"Cl-": 5}), InputError, "Cl-"),
    ("interferents-a-list", lambda: ia.nikolsky_eisenman("NO3-", 1e-4, [("Cl-", 1)]), InputError, "mapping"),
    ("convert-text", lambda: ia.units.convert_amount("abc", "molar", "mg/L", "Cl-"), InputError, "'abc'"),
    ("nacl-150-molal", lambda: ia.Solution.from_salts({"NaCl": 150}), InputError, "beyond any real solution"),
    ("solution-density-word", lambda: ia.Solution({"Na+": 0.1, "Cl-": 0.1}, density="Water"), InputError, "Water"),
    ("ion-mass-text", lambda: ia.Ion(formula="X", charge=1, molar_mass="10"), InputError, "'10'"),
    ("electrode-selectivity-list", lambda: ia.Electrode(selectivity=[("Cl-", 1)]), InputError, "mapping"),
    ("samples-range-huge", lambda: ia.SamplePopulation(ionic_strength=(0, 1e6)), InputError, "20"),
    ("check-scalar-column", lambda: ia.check_samples({"analyte": 1e-4, "ionic_strength": 0.01}, _d()), InputError,
     "'analyte'"),
    ("check-empty", lambda: ia.check_samples({"analyte": [], "ionic_strength": []}, _d()), InputError, "empty"),
    ("check-dilutions-text", lambda: ia.check_samples({"analyte": [1e-4], "ionic_strength": [0.01]}, _d(),
                                                      dilutions="1,2"), InputError, "'1,2'"),
    ("amount-decimal-comma", lambda: parse_amount("0,1 mol/kg"), InputError, "'0.1 mol/kg'"),
    ("amount-power", lambda: parse_amount("9**9**9"), InputError, "9**9**9"),
    ("amount-bool", lambda: parse_amount(True), InputError, "boolean"),
    ("amount-percent", lambda: parse_amount("1 %", "Na+"), UnitError, "%"),
    ("amount-megamolar", lambda: parse_amount("1 MM", "Na+"), UnitError, "MM"),
]


@pytest.mark.parametrize("fn,err,fragment", [c[1:] for c in MORE_CASES], ids=[c[0] for c in MORE_CASES])
def test_more_bad_inputs(fn, err, fragment):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ia.ValidityRangeWarning)
        with pytest.raises(err) as info:
            fn()
    assert isinstance(info.value, err) and fragment in str(info.value)


def test_ion_names_ending_in_a_digit_and_a_sign_work_through_the_models():
    mesylate = ia.Ion(formula="CH3SO3", charge=-1, molar_mass=95.1)
    g = ia.activity_coefficients(ia.Solution({mesylate: 0.01, "Na+": 0.01}), "davies")
    assert g["CH3SO3-"] == pytest.approx(ia.models.davies(-1, 0.01))
    n3 = ia.Ion.parse("N^3-")
    assert ia.Ion.parse(n3.name) == n3 and n3.charge == -3


def test_nan_in_a_size_array_is_nan_in_that_position():
    out = ia.models.extended_debye_huckel(1, 0.01, [4.0, float("nan")])
    assert np.isfinite(out[0]) and np.isnan(out[1])


@pytest.mark.parametrize("argv,fragment", [
    (["check", "x.csv", "--design", "d.json", "--dilutions", "1,2,x"], "x"),
    (["check", "x.csv", "--design", "d.json", "--dilutions", ","], "--dilutions"),
    (["check", "x.csv", "--design", "d.json", "--plot", "p.xyz"], "p.xyz"),
    (["design", "/dev/zero"], "/dev/zero"),
    (["strength", "NaCl=1,5"], "decimal comma"),
    (["strength", "NaCl=2 3"], "'2 3'"),
    (["strength", "NaCl=0.1=2"], "0.1=2"),
    (["strength", "--conductivity", "0,85 mS/cm"], "decimal comma"),
])
def test_cli_inputs_end_in_one_line(capsys, argv, fragment):
    rc = main(argv)
    _, err = capsys.readouterr()
    assert rc == 2 and err.count("\n") == 1 and fragment in err


def test_cli_errors_are_json_with_json(capsys):
    rc = main(["strength", "NaCl=1,5", "--json"])
    _, err = capsys.readouterr()
    data = json.loads(err)
    assert rc == 2 and data["format"] == "ionact-error" and "decimal comma" in data["message"]


def test_closed_pipe_ends_quietly():
    import subprocess
    import sys

    p = subprocess.run(f"{sys.executable} -m ionact demo | head -1", shell=True, capture_output=True, text=True,
                       timeout=120)
    assert p.stdout.count("\n") == 1 and "Traceback" not in p.stderr and "BrokenPipe" not in p.stderr


@pytest.mark.parametrize("fn,value,allowed", [
    (lambda: ia.Budget(mv=-1), -1, "(0, 100]"),
    (lambda: parse_amount("0,1 mol/kg"), "0,1 mol/kg", "a point as the decimal mark"),
    (lambda: parse_amount(-2.0), -2.0, "≥ 0"),
    (lambda: ia.water.density(150.0), 150.0, "0–100 °C"),
])
def test_errors_carry_the_value_and_the_allowed_range_as_fields(fn, value, allowed):
    with pytest.raises(InputError) as info:
        fn()
    assert info.value.value == value and info.value.allowed == allowed
