"""The command line: subcommands, --json, one-line errors."""

import json

import pytest

from ionact.cli import main


def run(capsys, *argv):
    rc = main(list(argv))
    out, err = capsys.readouterr()
    return rc, out, err


@pytest.mark.parametrize("model", ["davies", "pitzer", "extended", "sit", "truesdell-jones", "auto"])
def test_gamma_json_for_models(capsys, model):
    rc, out, _ = run(capsys, "gamma", "NaCl=0.05", "--model", model, "--json")
    assert rc == 0
    data = json.loads(out)
    assert 0.7 < data["gamma"]["Na+"] < 0.9
    assert data["model"] == (model if model != "auto" else "pitzer")


def test_gamma_text_and_compare(capsys):
    rc, out, _ = run(capsys, "gamma", "CaCl2=2 mmol/kg", "NaCl=0.01", "--model", "davies")
    assert rc == 0 and "Ca^2+" in out and "γ =" in out
    rc, out, _ = run(capsys, "gamma", "NaCl=0.05", "--compare")
    assert rc == 0 and "spread mV" in out


def test_strength(capsys):
    rc, out, _ = run(capsys, "strength", "CaCl2=0.01", "--json")
    assert rc == 0 and json.loads(out)["ionic_strength_molal"] == pytest.approx(0.03)
    rc, out, _ = run(capsys, "strength", "--conductivity", "1000", "--json")
    data = json.loads(out)
    assert data["ionic_strength"] == pytest.approx(0.016) and data["rule"] == "russell"


def test_user_errors_are_one_line(capsys):
    rc, out, err = run(capsys, "gamma", "NaQq=0.1")
    assert rc == 2 and out == "" and err.count("\n") == 1 and "NaQq" in err
    rc, _, err = run(capsys, "strength", "Na+=0.1")
    assert rc == 2 and "charge imbalance" in err


def test_debug_shows_traceback():
    from ionact.errors import UnknownSpeciesError

    with pytest.raises(UnknownSpeciesError):
        main(["--debug", "gamma", "NaQq=0.1"])


def test_demo_prints_real_numbers(capsys):
    rc, out, _ = run(capsys, "demo")
    assert rc == 0
    assert "HF-05 saline well" in out and "γ" in out


def test_convert(capsys):
    rc, out, _ = run(capsys, "convert", "F-", "--px", "4", "--matrix", "NaCl=0.1", "--unit", "mg/L", "--json")
    data = json.loads(out)
    assert rc == 0 and data["activity"] == pytest.approx(1e-4) and data["counter_ion"] == "Na+"
    assert data["format"] == "ionact-conversion"
    assert data["concentrations"][0]["unit"] == "mg/L" and data["concentrations"][0]["value"] > 1.9
    rc, out, _ = run(capsys, "convert", "NO3-", "--concentration", "10 mg/L as N", "--model", "davies")
    assert rc == 0 and "γ" in out
    rc, _, err = run(capsys, "convert", "Na+", "--activity", "0.01", "--counter-ion", "K+")
    assert rc == 2 and "opposite charge" in err
    rc, _, err = run(capsys, "convert", "Na+")
    assert rc == 2 and "exactly one" in err


def test_design_examples_and_outputs(capsys, tmp_path):
    rc, out, _ = run(capsys, "design", "--list-examples")
    assert rc == 0 and "nitrate_irrigation" in out and "fluoride_buffered" in out
    plot = tmp_path / "design.png"
    saved = tmp_path / "design.json"
    rc, out, _ = run(capsys, "design", "--example", "nitrate_irrigation", "--plot", str(plot), "--out", str(saved))
    assert rc == 0 and "Stock recipe" in out and "Cautions" in out
    assert plot.stat().st_size > 1000
    data = json.loads(saved.read_text())
    assert data["format"] == "ionact-adjuster-design" and data["analyte"] == "NO3-"
    rc, out, _ = run(capsys, "design", "--example", "fluoride_buffered", "--json")
    assert rc == 0 and json.loads(out)["buffer"]["acid"] == "CH3COOH"


def test_design_method_file_errors(capsys, tmp_path):
    bad = tmp_path / "bad.toml"
    bad.write_text('analyte = "NO3-"\nflavour = "mint"\n')
    rc, _, err = run(capsys, "design", str(bad))
    assert rc == 2 and "flavour" in err
    rc, _, err = run(capsys, "design", str(tmp_path / "missing.toml"))
    assert rc == 2 and "cannot read" in err
    bad.write_text("analyte = \n")
    rc, _, err = run(capsys, "design", str(bad))
    assert rc == 2 and "not valid TOML" in err


def test_check_command(capsys, tmp_path):
    from importlib import resources

    design = tmp_path / "design.json"
    assert main(["design", "--example", "nitrate_irrigation", "--out", str(design)]) == 0
    capsys.readouterr()
    batch = resources.files("ionact").joinpath("examples", "irrigation_batch.csv")
    out = tmp_path / "report.csv"
    rc, text, _ = run(capsys, "check", str(batch), "--design", str(design), "--out", str(out),
                      "--plot", str(tmp_path / "b.png"))
    assert rc == 0 and "needs dilution" in text and out.exists()
    rc, text, _ = run(capsys, "check", str(batch), "--design", str(design), "--json")
    data = json.loads(text)
    assert sum(data["counts"].values()) == 14 and data["counts"]["invalid input"] == 5
    # inputs that cannot be read: non-zero exit, one line
    rc, _, err = run(capsys, "check", str(tmp_path / "nope.csv"), "--design", str(design))
    assert rc == 2 and "cannot read" in err
    bad = tmp_path / "bad.json"
    bad.write_text("{")
    rc, _, err = run(capsys, "check", str(batch), "--design", str(bad))
    assert rc == 2 and "not valid JSON" in err


def test_neutral_species_on_the_command_line(capsys):
    rc, out, _ = run(capsys, "gamma", "NaCl=0.1", "CH3COOH=0.05", "--model", "davies", "--json")
    assert rc == 0 and json.loads(out)["gamma"]["CH3COOH"] == pytest.approx(10 ** (0.1 * 0.1))


def test_design_exit_status_follows_the_checks(capsys, tmp_path):
    # 0: no check failed; 1: a check failed (the report still printed); 2: bad input
    method = tmp_path / "m.toml"
    method.write_text("""analyte = "NO3-"
model = "davies"
[budget]
mv = 0.5
[analyte_range]
low = 1e-5
high = 1e-3
[samples]
ionic_strength = [0, 0.01]
[adjuster]
solve = "none"
[adjuster.stock]
KCl = 2.0
[electrode.selectivity]
"Cl-" = 0.5
""")
    rc, out, _ = run(capsys, "design", str(method))
    assert rc == 1 and "FAILED" in out and "Cautions" in out
    method.write_text(method.read_text().replace('"Cl-" = 0.5', '"Cl-" = 1e-9'))
    rc, out, _ = run(capsys, "design", str(method))
    assert rc == 0
    rc, out, _ = run(capsys, "design", "--help-keys")
    assert rc == 0 and "[species.NAME]" in out and "role" in out


def test_method_file_custom_component(capsys, tmp_path):
    # a complexing agent declared in the method file and kept as given (role "fixed")
    rc, out, _ = run(capsys, "design", "--example", "fluoride_buffered", "--json")
    data = json.loads(out)
    line = next(r for r in data["recipe"] if r["component"] == "Na4CDTA")
    assert rc == 0 and line["role"] == "fixed" and line["mol_per_l"] == pytest.approx(0.01)
    assert "C14H18N2O8^4-" in data["species"]


def test_speciate_text_and_json_agree(capsys):
    # the printed free fraction and the JSON field come from one Speciation
    rc, out, _ = run(capsys, "speciate", "NaF=1e-4", "AlCl3=2e-5", "--ph", "5.5", "--model", "davies")
    assert rc == 0 and "AlF₂⁺" in out and "pH held" in out and "fractions" in out
    rc, js, _ = run(capsys, "speciate", "NaF=1e-4", "AlCl3=2e-5", "--ph", "5.5", "--model", "davies", "--json")
    data = json.loads(js)
    assert data["format"] == "ionact-speciation" and data["pH"] == pytest.approx(5.5)
    free_f = data["fractions"]["F-"]["F-"]
    assert 0.3 < free_f < 0.8
    assert f"F⁻ {100 * free_f:.3g} %" in out


def test_speciate_solves_ph_and_screens_solids(capsys):
    rc, out, _ = run(capsys, "speciate", "CaSO4=0.01", "NaHCO3=2 mmol/kg", "--json")
    assert rc == 0
    data = json.loads(out)
    assert 7.0 < data["pH"] < 9.0 and "CaSO4" in data["saturation_index"]
    assert not any("treats every ion as free" in n for n in data["notes"])  # pairs are solved, not warned about


@pytest.mark.parametrize("argv,needle", [
    (["speciate", "NaF=1e-4", "--ph", "15"], "outside 0–14"),
    (["speciate", "NaF=1e-4", "--ph", "5,5"], "5.5"),
    (["speciate", "Xx=1"], "Xx"),
    (["speciate"], "composition"),
])
def test_speciate_bad_input(capsys, argv, needle):
    rc, _, err = run(capsys, *argv)
    assert rc == 2 and needle in err and len(err.strip().splitlines()) == 1


def _example(name):
    from importlib import resources

    return str(resources.files("ionact").joinpath("examples", name))


def test_calibrate_quantify_addition_commands(capsys, tmp_path):
    cal = tmp_path / "cal.json"
    fig = tmp_path / "cal.png"
    rc, out, _ = run(capsys, "calibrate", _example("fluoride_standards.csv"), "--method", "example:fluoride_buffered",
                     "--out", str(cal), "--plot", str(fig))
    assert rc == 0 and "% of Nernstian" in out and "detection limit (IUPAC)" in out
    assert cal.exists() and fig.stat().st_size > 1000
    data = json.loads(cal.read_text())
    assert data["format"] == "ionact-calibration" and data["fit"] == "nikolsky"
    assert f"{data['slope_mv']:.2f} mV/decade" in out  # the printed slope is the stored one
    report = tmp_path / "report.csv"
    rc, out, _ = run(capsys, "quantify", _example("fluoride_samples.csv"), "--calibration", str(cal), "--unit",
                     "mg/L", "--out", str(report))
    assert rc == 1  # some rows are not reportable; every row is still there
    import csv

    rows = list(csv.DictReader(report.open()))
    assert [r["sample_id"] for r in rows][:3] == ["check A", "spring 01", "spring 02"] and len(rows) == 12
    by = {r["sample_id"]: r for r in rows}
    assert by["well 08"]["status"] == "invalid input" and by["well 06"]["status"] == "outside the calibrated range"
    assert by["check B"]["status"] == "check standard"
    assert 1.2 < float(by["spring 02"]["concentration [mg/L]"]) < 1.5
    rc, out, _ = run(capsys, "addition", _example("fluoride_additions.csv"), "--analyte", "F-", "--sample-volume",
                     "25", "--spike-concentration", "10 mg/L", "--unit", "mg/L", "--json")
    res = json.loads(out)
    assert rc == 0 and res["method"] == "multiple addition (Gran)"
    assert 0.28 / 18998.4 < res["concentration"] < 0.33 / 18998.4  # the invented sample held 0.3 mg/L


def test_quantify_refuses_a_calibration_of_another_design(capsys, tmp_path):
    cal = tmp_path / "cal.json"
    run(capsys, "calibrate", _example("fluoride_standards.csv"), "--analyte", "F-", "--out", str(cal))
    rc, _, err = run(capsys, "quantify", _example("fluoride_samples.csv"), "--calibration", str(cal), "--method",
                     "example:fluoride_buffered")
    assert rc == 2 and "not made with this design" in err


@pytest.mark.parametrize("content,needle", [
    ("concentration [mg/L],potential [mV]\n0.1,150\n", "at least two standards"),
    ("concentration [mg/L],potential [mV]\n0.1,150\n0.2,abc\n", "line 3"),
    ("concentration [mg/kg],potential [mV]\n0.1,150\n0.2,140\n", "per-litre"),
    ("conc,potential [mV]\n0.1,150\n0.2,140\n", "concentration"),
])
def test_calibrate_bad_files_are_named(capsys, tmp_path, content, needle):
    f = tmp_path / "s.csv"
    f.write_text(content)
    rc, _, err = run(capsys, "calibrate", str(f), "--analyte", "F-")
    assert rc == 2 and needle in err


def test_check_takes_its_range_from_a_calibration_file(capsys, tmp_path):
    cal, design = tmp_path / "cal.json", tmp_path / "design.json"
    run(capsys, "calibrate", _example("fluoride_standards.csv"), "--method", "example:fluoride_buffered",
        "--out", str(cal))
    run(capsys, "design", "--example", "fluoride_buffered", "--out", str(design))
    batch = tmp_path / "b.csv"
    batch.write_text("sample_id,analyte [mg/L],conductivity [uS/cm]\nA,0.4,300\nB,0.01,500\n")
    rc, out, _ = run(capsys, "check", str(batch), "--design", str(design), "--calibration-file", str(cal), "--json")
    data = json.loads(out)
    assert data["calibration_range_mol_per_l"] == pytest.approx([0.05 / 18998.4032, 5 / 18998.4032], rel=1e-6)


def test_method_file_calibration_rules_apply(capsys, tmp_path):
    # the example method accepts 92–103 % of Nernstian; a command-line window overrides it
    rc, out, _ = run(capsys, "calibrate", _example("fluoride_standards.csv"), "--method", "example:fluoride_buffered")
    assert rc == 0 and "(limit 92–103)" in out
    rc, out, _ = run(capsys, "calibrate", _example("fluoride_standards.csv"), "--method", "example:fluoride_buffered",
                     "--slope-window", "99.5", "105")
    assert rc == 1 and "(limit 99.5–105)" in out
    bad = tmp_path / "m.toml"
    from ionact.method import example_path

    bad.write_text(example_path("nitrate_irrigation").read_text() + "\n[calibration]\nslope_window = [105, 90]\n")
    rc, _, err = run(capsys, "calibrate", _example("fluoride_standards.csv"), "--analyte", "F-", "--method",
                     str(bad))
    assert rc == 2 and "slope_window" in err


def test_checking_the_example_batch_needs_no_unit_registry(tmp_path):
    # the common units of a batch file (mg/L as N, µS/cm) convert without pint's registry, and
    # molar masses without periodictable's formula parser: a first command stays light
    import subprocess
    import sys
    from pathlib import Path

    import ionact as ia
    from ionact.method import load_method

    design = tmp_path / "design.json"
    design.write_text(json.dumps(ia.design_adjuster(**load_method("example:nitrate_irrigation")).to_dict()))
    batch = Path(ia.__file__).parent / "examples" / "irrigation_batch.csv"
    code = ("import sys, io; from ionact.cli import main; sys.stdout = io.StringIO(); "
            f"rc = main(['check', {str(batch)!r}, '--design', {str(design)!r}, '--out', "
            f"{str(tmp_path / 'r.csv')!r}]); sys.stdout = sys.__stdout__; "
            "print(rc, 'pint' in sys.modules, 'pyparsing' in sys.modules)")
    res = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120)
    rc, pint_loaded, parser_loaded = res.stdout.split()
    assert rc in {"0", "1"} and (pint_loaded, parser_loaded) == ("False", "False"), res.stderr[-2000:]
    assert (tmp_path / "r.csv").stat().st_size > 100
