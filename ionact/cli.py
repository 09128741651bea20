"""The ``ionact`` command: one subcommand per job, ``--json`` everywhere.

Exit statuses: 0 success, 1 a check failed (the report is still printed), 2 bad input
(one line on standard error naming the problem; JSON on standard error with ``--json``),
130 interrupted. ``--debug`` (anywhere on the line) shows tracebacks; ``--strict``
(anywhere) turns range warnings into errors. A closed pipe (``| head``) ends quietly.
"""

from __future__ import annotations

import argparse
import json
import math
import os
import sys
import warnings
from collections.abc import Sequence
from pathlib import Path
from typing import Any

from .errors import IonactError

__all__ = ["main", "build_parser", "EXIT_OK", "EXIT_FAILED", "EXIT_USER", "EXIT_INTERRUPTED", "ERROR_FORMAT"]

EXIT_OK, EXIT_FAILED, EXIT_USER, EXIT_INTERRUPTED = 0, 1, 2, 130
ERROR_FORMAT = "ionact-error"
MAX_DESIGN_BYTES = 50_000_000
_GLOBAL_FLAGS = ("--debug", "--strict")


def _json_text(data: Any) -> str:
    from ._frozen import plain

    return json.dumps(plain(data), indent=2, ensure_ascii=False, allow_nan=False)


def _emit(args: argparse.Namespace, data: dict[str, Any], text: str, fmt: str) -> None:
    if getattr(args, "json", False):
        print(_json_text({"format": fmt, "version": 1, **data}))
    else:
        print(text)


def _quantity(value: str | None, unit: str, what: str) -> float | None:
    from .units import parse_scalar

    return None if value is None else parse_scalar(value, unit, what)


def _solution(args: argparse.Namespace) -> Any:
    from ._composition import solution_from_terms

    return solution_from_terms(args.terms, args.temperature, balance=args.balance,
                               charge_tolerance=args.charge_tolerance, density=_density(args))


def _density(args: argparse.Namespace) -> Any:
    d = getattr(args, "density", None)
    if d is None or d == "water":
        return d
    return _quantity(d, "kg/L", "--density")


def cmd_strength(args: argparse.Namespace) -> int:
    from .estimates import ionic_strength_from_conductivity, ionic_strength_from_tds

    ec = _quantity(args.conductivity, "uS/cm", "--conductivity")
    tds = _quantity(args.tds, "mg/L", "--tds")
    if ec is not None or tds is not None:
        if args.terms:
            raise IonactError("give either a composition or --conductivity/--tds, not both")
        est = (ionic_strength_from_conductivity(ec, rule=args.rule or "russell") if ec is not None
               else ionic_strength_from_tds(tds, rule=args.rule or "langelier"))
        text = f"I ≈ {est.value:.4g} mol/L  (rule of thumb '{est.rule}', ×{est.coefficient:g}; {est.source})"
        _emit(args, {"ionic_strength": est.value, "ionic_strength_unit": "mol/L", "rule": est.rule,
                     "coefficient": est.coefficient, "source": est.source}, text, "ionact-ionic-strength")
        return EXIT_OK
    if not args.terms:
        raise IonactError("give a composition, e.g. 'ionact strength NaCl=0.1 \"CaCl2=2 mmol/kg\"'")
    sol = _solution(args)
    data: dict[str, Any] = {"ionic_strength_molal": sol.ionic_strength, "temperature_c": sol.temperature,
                            "charge_balance_mol_per_kg": sol.charge_balance, "molalities": sol.molalities}
    lines = [f"ionic strength  {sol.ionic_strength:.6g} mol/kg"]
    try:
        data["ionic_strength_molar"] = sol.molar_ionic_strength
        data["density_kg_per_l"] = sol.density
        lines.append(f"                {sol.molar_ionic_strength:.6g} mol/L (density {sol.density:.5f} kg/L)")
    except IonactError as exc:
        lines.append(f"                (molar basis unavailable: {exc})")
    lines.append(f"charge balance  {sol.charge_balance * 1e3:+.3g} meq/kg")
    if sol.balanced_with:
        ion, add = sol.balanced_with
        data["balanced_with"] = {"ion": ion, "added_mol_per_kg": add}
        lines.append(f"balanced with   {ion}: {add * 1e3:+.4g} mmol/kg added")
    lines += [f"  {k:<10} {v:.6g} mol/kg" for k, v in sol.molalities.items()]
    _emit(args, data, "\n".join(lines), "ionact-ionic-strength")
    return EXIT_OK


def cmd_gamma(args: argparse.Namespace) -> int:
    import numpy as np

    from .activity import activity_coefficients, compare_models

    if not args.terms:
        raise IonactError("give a composition, e.g. 'ionact gamma NaCl=0.1 --model davies'")
    sol = _solution(args)
    if args.compare:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            c = compare_models(sol)
        data = {"ionic_strength": sol.ionic_strength, "models": c.gammas, "in_range": c.in_range,
                "skipped": c.skipped, "spread": c.spread, "spread_mv": c.spread_mv}
        _emit(args, data, f"I = {sol.ionic_strength:.5g} mol/kg, {sol.temperature:g} °C\n" + c.table(),
              "ionact-model-comparison")
        return EXIT_OK
    g = activity_coefficients(sol, model=args.model, missing=args.missing)
    lines = [f"I = {sol.ionic_strength:.5g} mol/kg, {sol.temperature:g} °C, model {g.model} ({g.title})"]
    if args.model == "auto":
        lines.append(f"  chosen because {g.reason}")
    lines += [f"  {ion:<10} γ = {v:.5f}   log10 γ = {np.log10(v):+.5f}" for ion, v in g.items()]
    lines.append(f"convention: {g.convention}")
    lines += [f"note: {n}" for n in g.notes]
    lines += [f"warning: {v}" for v in g.violations]
    _emit(args, g.to_dict(), "\n".join(lines), "ionact-activity-coefficients")
    return EXIT_OK


def cmd_convert(args: argparse.Namespace) -> int:
    import numpy as np

    from .conversion import activity_from_concentration, activity_from_px, concentration_from_activity

    matrix = _solution(args) if args.terms else None
    given = [x is not None for x in (args.activity, args.px, args.concentration)]
    if sum(given) != 1:
        raise IonactError("give exactly one of --activity, --px or --concentration")
    kw: dict[str, Any] = dict(matrix=matrix, counter_ion=args.counter_ion, model=args.model)
    if matrix is None:
        kw["temperature"] = args.temperature
    if args.concentration is not None:
        r = activity_from_concentration(args.ion, args.concentration, **kw)
    else:
        a = _quantity(args.activity, "", "--activity") if args.activity is not None else activity_from_px(
            _quantity(args.px, "", "--px"))
        r = concentration_from_activity(args.ion, a, **kw)
    data = r.to_dict()
    lines = [f"{r.analyte} with counter-ion {r.counter_ion} in "
             f"{'pure water' if matrix is None else 'the given matrix'}, model {r.model}"]
    lines.append(f"  activity        {r.activity:.6g}   (pX = {-np.log10(r.activity):.4f})")
    lines.append(f"  γ               {r.gamma:.6f}")
    lines.append(f"  molality        {r.molality:.6g} mol/kg")
    conc = []
    for unit in args.unit or []:
        v = r.concentration(unit)
        conc.append({"value": v, "unit": unit})
        lines.append(f"  concentration   {v:.6g} {unit}")
    data["concentrations"] = conc
    lines.append(f"  ionic strength  {r.ionic_strength:.6g} mol/kg")
    _emit(args, data, "\n".join(lines), "ionact-conversion")
    return EXIT_OK


def cmd_speciate(args: argparse.Namespace) -> int:
    from .equilibrium import speciate
    from .species import typeset

    if not args.terms:
        raise IonactError("give a composition of totals, e.g. 'ionact speciate NaF=1e-4 AlCl3=2e-5 --ph 5.5'")
    sol = _solution(args)
    ph = _quantity(args.ph, "", "--ph")
    s = speciate(sol, pH=ph, model=args.model, missing=args.missing)
    how = "held at the given value" if ph is not None else "solved from the proton balance"
    lines = [s.table(limit=args.limit), f"pH {how}", "fractions of each component's total:"]
    for comp, parts in s.fractions.items():
        shares = sorted(((float(f), typeset(sp)) for sp, f in parts.items()), reverse=True)
        lines.append(f"  {typeset(comp):<10} " + ", ".join(f"{name} {100 * f:.3g} %" for f, name in shares
                                                          if f >= 1e-4))
    _emit(args, s.to_dict(), "\n".join(lines), "ionact-speciation")
    return EXIT_OK


def _check_figure_path(path: str | None) -> None:
    from .samples import FIGURE_FORMATS

    if path is not None and Path(path).suffix.lower() not in FIGURE_FORMATS:
        raise IonactError(f"--plot {path}: the figure's file must end in {', '.join(FIGURE_FORMATS)}")


def cmd_design(args: argparse.Namespace) -> int:
    from .adjuster import design_adjuster
    from .method import example_names, keys_help, load_method
    from .samples import atomic_output
    from .samples.output import atomic_binary

    if args.list_examples:
        print("\n".join(example_names()))
        return EXIT_OK
    if args.help_keys:
        print(keys_help())
        return EXIT_OK
    if (args.method is None) == (args.example is None):
        raise IonactError("give a method file, or --example NAME (see --list-examples)")
    _check_figure_path(args.plot)
    kw = load_method(args.method if args.method is not None else f"example:{args.example}")
    if args.solve:
        kw["solve"] = args.solve
    if args.model:
        kw["model"] = args.model
    d = design_adjuster(**kw)
    if args.plot:
        with atomic_binary(args.plot) as tmp:
            d.plot().savefig(tmp, format=Path(args.plot).suffix[1:].lower(), dpi=110)
    if args.out:
        with atomic_output(args.out, inputs=(args.method,) if args.method else ()) as fh:
            fh.write(_json_text(d.to_dict()) + "\n")
    if getattr(args, "json", False):
        print(_json_text(d.to_dict()))
    else:
        print(d.report())
    return d.exit_status


def _read_design(path: str) -> Any:
    try:
        if path == "-":
            raw = sys.stdin.buffer.read(MAX_DESIGN_BYTES + 1)
        else:
            with open(path, "rb") as fh:
                raw = fh.read(MAX_DESIGN_BYTES + 1)
    except OSError as exc:
        raise IonactError(f"cannot read design {path}: {exc.strerror or exc}") from None
    if len(raw) > MAX_DESIGN_BYTES:
        raise IonactError(f"design {path} is larger than {MAX_DESIGN_BYTES} bytes; not a design file")
    try:
        return json.loads(raw.decode("utf-8"), parse_constant=_no_constants)
    except (json.JSONDecodeError, UnicodeDecodeError, RecursionError, ValueError) as exc:
        raise IonactError(f"design {path} is not valid JSON ({str(exc)[:200]})") from None


def _design_arg(args: argparse.Namespace) -> Any:
    """A design from --design DESIGN.json or --method METHOD.toml (or example:NAME), or None."""
    if getattr(args, "design", None) and getattr(args, "method", None):
        raise IonactError("give --design or --method, not both")
    if getattr(args, "design", None):
        from .adjuster import AdjusterDesign

        return AdjusterDesign.from_dict(_read_design(args.design))
    if getattr(args, "method", None):
        from .adjuster import design_adjuster
        from .method import load_method

        with warnings.catch_warnings():
            warnings.simplefilter("ignore")  # the design's own range notes belong to 'ionact design'
            return design_adjuster(**load_method(args.method))
    return None


def _calibration_rules(args: argparse.Namespace) -> dict[str, Any]:
    """The method file's [calibration] table (acceptance rules), when --method names one."""
    if not getattr(args, "method", None):
        return {}
    from .method import load_calibration_settings

    return load_calibration_settings(args.method)


def _read_calibration(path: str) -> Any:
    from .calibration import Calibration

    data = _read_design(path)
    if not isinstance(data, dict) or data.get("format") != "ionact-calibration":
        raise IonactError(f"{path} is not an ionact calibration (write one with 'ionact calibrate --out')")
    return Calibration.from_dict({k: v for k, v in data.items() if k not in ("format", "version")})


def cmd_calibrate(args: argparse.Namespace) -> int:
    from .calibration import calibrate
    from .calibration.files import read_standards_csv
    from .samples import atomic_output
    from .samples.output import atomic_binary
    from .species import resolve_ion

    _check_figure_path(args.plot)
    design = _design_arg(args)
    analyte = resolve_ion(args.analyte) if args.analyte else (resolve_ion(design.analyte) if design else None)
    if analyte is None:
        raise IonactError("give --analyte (or a --design/--method, whose analyte is used)")
    data = read_standards_csv(args.standards, analyte, delimiter=args.delimiter, decimal_comma=args.decimal_comma)
    rules = _calibration_rules(args)
    window: tuple[float, ...] = tuple(rules.get("slope_window", (90.0, 105.0))) if args.slope_window is None else \
        tuple(float(_quantity(x, "", "--slope-window") or 0.0) for x in args.slope_window)
    cal = calibrate(analyte, data["concentrations"], data["potentials_mv"], sd_mv=data["sd_mv"],
                    temperature=args.temperature, design=design, model=args.model,
                    fit=args.fit or rules.get("fit", "auto"), slope_window=window,
                    linearity_mv=args.linearity if args.linearity is not None else rules.get("linearity_mv", 1.0))
    payload = {"format": "ionact-calibration", "version": 1, **cal.to_dict()}
    if args.plot:
        with atomic_binary(args.plot) as tmp:
            cal.plot().savefig(tmp, format=Path(args.plot).suffix[1:].lower(), dpi=110)
    if args.out:
        with atomic_output(args.out, inputs=(args.standards,)) as fh:
            fh.write(_json_text(payload) + "\n")
    if args.json:
        print(_json_text(payload))
    else:
        print(cal.report())
    return EXIT_FAILED if cal.status == "fail" else EXIT_OK


def cmd_quantify(args: argparse.Namespace) -> int:
    import csv

    from .calibration import DriftCheck, quantify
    from .calibration.files import check_standard, quantity_rows, read_samples_for_quantity
    from .samples import atomic_output
    from .samples.output import printable, safe_cell
    from .units import MOLAR, convert_amount

    cal = _read_calibration(args.calibration)
    design = _design_arg(args)
    if design is not None and (design.analyte != cal.analyte
                               or abs(1 + design.volume_ratio - cal.measurement.dilution) > 1e-12):
        raise IonactError("the calibration was not made with this design (analyte or mixing ratio differ)")
    ion = cal.measurement.ion
    r = read_samples_for_quantity(args.samples, ion, delimiter=args.delimiter, decimal_comma=args.decimal_comma)
    chk = check_standard(r)
    samples = ~r.is_check
    check = None if chk is None else DriftCheck(chk[0], chk[1], chk[2])
    times = None if r.times is None else r.times[samples]
    rules = _calibration_rules(args)
    q = quantify(cal, r.potentials[samples], times=times if check is not None else None, check=check,
                 correct_drift=args.correct_drift,
                 drift_limit_mv=args.drift_limit if args.drift_limit is not None else rules.get("drift_limit_mv", 2.0),
                 coverage=args.coverage if args.coverage is not None else rules.get("coverage", 0.95))
    unit = args.unit or "mol/L"
    factor = float(convert_amount(1.0, MOLAR, unit, ion))
    header, rows = quantity_rows(q, r, unit, factor)
    if args.out:
        target = sys.stdout if args.out == "-" else None
        if target is not None:
            w = csv.writer(target)
            w.writerow(header)
            w.writerows([[safe_cell(v) for v in row] for row in rows])
        else:
            with atomic_output(args.out, inputs=(args.samples,)) as fh:
                w = csv.writer(fh)
                w.writerow(header)
                w.writerows([[safe_cell(v) for v in row] for row in rows])
    if args.json:
        keys = ("sample_id", "potential_mv", "drift_mv", "corrected_mv", "concentration", "low", "high", "status",
                "reason")  # stable keys: the unit is a field, never part of a key
        print(_json_text({"format": "ionact-quantitation", "version": 1, "unit": unit, "coverage": q.coverage,
                          "rows": [dict(zip(keys, row, strict=True)) for row in rows]}))
    elif args.out != "-":
        counts: dict[str, int] = {}
        for row in rows:
            counts[row[7]] = counts.get(row[7], 0) + 1
        print(f"{len(rows)} rows; " + ", ".join(f"{v} {k}" for k, v in counts.items()))
        for row in rows[: args.limit]:
            conc = "" if math.isnan(row[4]) else f"{row[4]:.4g} ({row[5]:.3g}–{row[6]:.3g}) {unit}"
            mv = f"{row[1]:>9.2f} mV" if math.isfinite(row[1]) else f"{'—':>9}   "
            print(f"  {printable(str(row[0]))[:20]:<20} {mv}  {conc:<36} {row[7]}")
    bad = sum(1 for row in rows if row[7] not in ("ok", "check standard"))
    return EXIT_FAILED if bad else EXIT_OK


def cmd_addition(args: argparse.Namespace) -> int:
    from .calibration import double_addition, known_addition, multiple_addition
    from .calibration.files import read_additions_csv

    cal = _read_calibration(args.calibration) if args.calibration else None
    v, e = read_additions_csv(args.additions, delimiter=args.delimiter, decimal_comma=args.decimal_comma)
    if v.size < 2 or v[0] != 0:
        raise IonactError("an additions file starts with the sample alone (volume 0) and has at least one spike")
    method = args.method or ("known" if v.size == 2 else "multiple")
    common = dict(sample_volume=args.sample_volume, spike_concentration=args.spike_concentration,
                  temperature=args.temperature, model=args.model)
    if method == "known":
        if v.size != 2:
            raise IonactError(f"known addition takes two rows (the sample and one spike), got {v.size}")
        res = known_addition(args.analyte, spike_volume=float(v[1]), delta_mv=float(e[1] - e[0]),
                             slope_mv=args.slope, calibration=cal, **common)
    elif method == "double":
        if v.size != 3 or abs(v[2] - 2 * v[1]) > 1e-9 * v[2]:
            raise IonactError("double known addition takes three rows: the sample, one spike, and a second equal "
                              "spike (volumes 0, V, 2V)")
        res = double_addition(args.analyte, spike_volume=float(v[1]), delta_mv=(e[1] - e[0], e[2] - e[0]), **common)
    else:
        res = multiple_addition(args.analyte, spike_volumes=v, potentials_mv=e, slope_mv=args.slope,
                                calibration=cal, **common)
    if args.json:
        print(_json_text({"format": "ionact-addition", "version": 1, **res.to_dict()}))
    else:
        print(res.report(args.unit or "mol/L"))
    return EXIT_OK


def _no_constants(name: str) -> None:
    raise ValueError(f"{name} is not allowed in strict JSON")


def _dilutions(text: str | None) -> tuple[float, ...]:
    from .samples import DEFAULT_DILUTIONS
    from .units import parse_scalar

    if text is None:
        return tuple(float(x) for x in DEFAULT_DILUTIONS)
    parts = [p.strip() for p in text.split(",")]
    if not parts or any(not p for p in parts):
        raise IonactError(f"--dilutions {text!r}: give factors ≥ 1 separated by commas, e.g. 1,2,5,10")
    return tuple(parse_scalar(p, "", f"--dilutions factor {p!r}") for p in parts)


def cmd_check(args: argparse.Namespace) -> int:
    from .samples import check_csv

    _check_figure_path(args.plot)
    dil = _dilutions(args.dilutions)  # options first: a typo is reported before any file is read
    design = _read_design(args.design)
    if args.calibration and args.calibration_file:
        raise IonactError("give --calibration LOW HIGH or --calibration-file CAL.json, not both")
    cal: Any = tuple(args.calibration) if args.calibration else None
    if args.calibration_file:
        cal = _read_calibration(args.calibration_file)
    to_stdout = args.out == "-"
    summary = check_csv(args.samples, design, out=None if to_stdout else args.out, plot=args.plot,
                        calibration_range=cal, dilutions=dil, delimiter=args.delimiter,
                        decimal_comma=args.decimal_comma, charge_tolerance_percent=args.charge_balance,
                        keep_rows=bool(args.json) or to_stdout, progress=True)
    if to_stdout:
        _write_rows_to_stdout(summary)
        print(summary.text(), file=sys.stderr)
        return EXIT_OK
    data = {"model": summary.model, "analyte_unit": summary.unit, "counts": summary.counts,
            "calibration_range_mol_per_l": list(summary.calibration_range), "envelope": list(summary.envelope),
            "rows": summary.rows_json}
    _emit(args, data, summary.text() + (f"report written to {args.out}" if args.out else ""), "ionact-batch-report")
    return EXIT_OK


def _write_rows_to_stdout(summary: Any) -> None:
    import csv

    from .samples import safe_cell

    w = csv.writer(sys.stdout)
    rows = summary.rows_json
    if rows:
        w.writerow(list(rows[0]))
        for r in rows:
            w.writerow([safe_cell(v) if not isinstance(v, float) or v == v else "" for v in r.values()])


def cmd_demo(args: argparse.Namespace) -> int:
    from .demo import run

    run()
    return EXIT_OK


def _composition_args(p: argparse.ArgumentParser, as_option: bool = False) -> None:
    helptext = "KEY=AMOUNT terms: NaCl=0.1, 'Ca^2+=2 mmol/kg', 'NO3-=10 mg/L as N'"
    if as_option:
        p.add_argument("--matrix", dest="terms", nargs="+", default=[], metavar="KEY=AMOUNT",
                       help="the background without the analyte; " + helptext)
    else:
        p.add_argument("terms", nargs="*", help=helptext)
    p.add_argument("-t", "--temperature", default="25", help="°C, or a unit string such as '77 degF' (default 25)")
    p.add_argument("--balance", help="ion that takes up any charge imbalance, e.g. Cl-")
    p.add_argument("--charge-tolerance", type=float, default=1e-6,
                   help="largest relative charge imbalance accepted without --balance (default 1e-6)")
    p.add_argument("--density", help="'water', or the solution's density (kg/L or a unit string); "
                   "default: the apparent-molar-volume model")
    p.add_argument("--json", action="store_true", help="print strict JSON")


def _model_arg(p: argparse.ArgumentParser, default: str | None = "auto") -> None:
    from .models.registry import model_names

    p.add_argument("-m", "--model", default=default, choices=model_names(),
                   help="activity model" + (f" (default {default})" if default else " (default: the method's)"))


_EPILOG = "exit status: 0 success, 1 a check failed (the report is still printed), 2 bad input; --debug and " \
          "--strict may appear anywhere on the line"


def build_parser() -> argparse.ArgumentParser:
    from . import __version__

    p = argparse.ArgumentParser(prog="ionact", description="Ionic strength, activity coefficients, chemical "
                                "equilibrium, ionic strength adjuster design, batch checks, calibration and "
                                "quantitation for ion-selective electrode methods.",
                                epilog=_EPILOG)
    p.add_argument("--version", action="version", version=f"ionact {__version__}")
    p.add_argument("--debug", action="store_true", help="show tracebacks")
    p.add_argument("--strict", action="store_true", help="turn range warnings into errors")
    sub = p.add_subparsers(dest="command", required=True, metavar="JOB")

    def job(name: str, help_: str, example: str) -> argparse.ArgumentParser:
        return sub.add_parser(name, help=help_, description=help_ + ".", epilog=f"example: {example}\n{_EPILOG}",
                              formatter_class=argparse.RawDescriptionHelpFormatter)

    _job_strength(job)
    _job_gamma(job)
    _job_convert(job)
    _job_speciate(job)
    _job_design(job)
    _job_check(job)
    _job_calibrate(job)
    _job_quantify(job)
    _job_addition(job)
    _job_demo(job)
    return p


def _job_strength(job: Any) -> None:
    """The 'strength' subcommand and its options."""
    s = job("strength", "ionic strength of a composition, or estimated from conductivity or dissolved solids",
            "ionact strength NaCl=0.1 'CaCl2=2 mmol/kg'   |   ionact strength --conductivity '0.85 mS/cm'")
    _composition_args(s)
    s.add_argument("--conductivity", help="electrical conductivity at 25 °C: µS/cm, or a unit string ('0.85 mS/cm')")
    s.add_argument("--tds", help="total dissolved solids: mg/L, or a unit string ('1.2 g/L')")
    s.add_argument("--rule", help="rule of thumb: russell, griffin-jurinak (conductivity) or langelier (TDS)")
    s.set_defaults(func=cmd_strength)


def _job_gamma(job: Any) -> None:
    """The 'gamma' subcommand and its options."""
    g = job("gamma", "activity coefficients of a composition by a model",
            "ionact gamma NaCl=0.5 --model pitzer --json")
    _composition_args(g)
    _model_arg(g)
    g.add_argument("--missing", default="error", help="missing parameters: error, zero, or a fallback model")
    g.add_argument("--compare", action="store_true", help="every model side by side with their spread")
    g.set_defaults(func=cmd_gamma)


def _job_convert(job: Any) -> None:
    """The 'convert' subcommand and its options."""
    c = job("convert", "activity <-> concentration of an analyte in a matrix",
            "ionact convert F- --px 4 --matrix NaCl=0.1 --unit mg/L")
    c.add_argument("ion", help="the analyte, e.g. F- or Ca^2+")
    _composition_args(c, as_option=True)
    c.add_argument("--activity", help="molal-scale activity to convert to a concentration")
    c.add_argument("--px", help="pX = -log10 a to convert to a concentration")
    c.add_argument("--concentration", help="concentration to convert to an activity, e.g. '19 mg/L'")
    c.add_argument("--counter-ion", help="ion accompanying the analyte (default Cl- or Na+)")
    _model_arg(c)
    c.add_argument("--unit", action="append", help="also report the concentration in this unit (repeatable)")
    c.set_defaults(func=cmd_convert)


def _job_speciate(job: Any) -> None:
    """The 'speciate' subcommand and its options."""
    sp = job("speciate", "chemical equilibrium of a composition of totals: species, fractions, pH, saturation",
             "ionact speciate NaF=1e-4 AlCl3=2e-5 --ph 5.5 --json")
    _composition_args(sp)
    sp.add_argument("--ph", help="hold the pH at this value (activity scale); default: solved from the proton "
                    "balance")
    _model_arg(sp)
    sp.add_argument("--missing", default="error", help="missing parameters: error, zero, or a fallback model")
    sp.add_argument("--limit", type=int, default=40, help="largest number of species listed (default 40)")
    sp.set_defaults(func=cmd_speciate)


def _job_design(job: Any) -> None:
    """The 'design' subcommand and its options."""
    de = job("design", "design or evaluate an ionic strength adjuster from a method file",
             "ionact design --example nitrate_irrigation --out design.json --plot design.png")
    de.add_argument("method", nargs="?", help="METHOD.toml (keys: ionact design --help-keys)")
    de.add_argument("--example", help="use a method file shipped with ionact (see --list-examples)")
    de.add_argument("--list-examples", action="store_true", help="list the shipped method files")
    de.add_argument("--help-keys", action="store_true", help="list the method-file tables and keys")
    de.add_argument("--solve", choices=["stock", "ratio", "none"], help="override the file's solve mode")
    _model_arg(de, default=None)
    de.add_argument("--json", action="store_true", help="print the design as strict JSON")
    de.add_argument("--out", help="also write the design file (JSON) here (input for 'ionact check')")
    de.add_argument("--plot", help="write the design figure here (.png, .pdf or .svg)")
    de.set_defaults(func=cmd_design)


def _job_check(job: Any) -> None:
    """The 'check' subcommand and its options."""
    ch = job("check", "check a batch of samples against an adjuster design before measuring",
             "ionact check SAMPLES.csv --design design.json --out REPORT.csv --plot batch.png")
    ch.add_argument("samples", help="SAMPLES.csv ('-' for standard input; columns documented in the README)")
    ch.add_argument("--design", required=True, help="DESIGN.json written by 'ionact design --out' ('-': stdin)")
    ch.add_argument("--out", help="write the per-sample report CSV here ('-' for standard output)")
    ch.add_argument("--plot", help="write the batch figure here (.png, .pdf or .svg)")
    ch.add_argument("--calibration", nargs=2, metavar=("LOW", "HIGH"), help="calibrated range, e.g. "
                    "'0.5 mg/L as N' '30 mg/L as N' (default: the design's standards)")
    ch.add_argument("--calibration-file", metavar="CAL.json",
                    help="take the calibrated range (lowest to highest standard) from a calibration written by "
                    "'ionact calibrate --out'")
    ch.add_argument("--dilutions", help="allowed dilution factors, comma-separated (default 1,2,5,10,20,50,100)")
    ch.add_argument("--delimiter", choices=[",", ";", "\t"], help="the file's delimiter (default: from the header)")
    ch.add_argument("--decimal-comma", action="store_true", default=None,
                    help="read decimal commas (semicolon- or tab-separated files)")
    ch.add_argument("--charge-balance", type=float, default=5.0,
                    help="largest ion-balance error in %% of total equivalents for rows with ion columns (default 5)")
    ch.add_argument("--json", action="store_true", help="print the results as strict JSON")
    ch.set_defaults(func=cmd_check)


def _job_calibrate(job: Any) -> None:
    """The 'calibrate' subcommand and its options."""
    cal = job("calibrate", "fit an electrode calibration from a standards file",
              "ionact calibrate standards.csv --analyte F- --method example:fluoride_buffered --out cal.json "
              "--plot cal.png")
    cal.add_argument("standards", help="STANDARDS.csv: 'concentration [unit]', 'potential [mV]', optional 'sd [mV]'")
    cal.add_argument("--analyte", help="the measured ion (default: the design's)")
    cal.add_argument("-t", "--temperature", default="25", help="°C of the measurement (default 25)")
    cal.add_argument("--design", help="DESIGN.json: the standards were mixed with this adjuster")
    cal.add_argument("--method", help="METHOD.toml or example:NAME: the same, designed from a method file")
    cal.add_argument("-m", "--model", help="activity model (default: the design's, else auto)")
    cal.add_argument("--fit", choices=["auto", "nernst", "nikolsky"],
                     help="calibration function (default: the method file's, else auto)")
    cal.add_argument("--slope-window", nargs=2, metavar=("LOW", "HIGH"),
                     help="accepted slope, %% of Nernstian (default: the method file's, else 90 105, common practice)")
    cal.add_argument("--linearity", type=float,
                     help="largest residual in the linear range, mV (default: the method file's, else 1)")
    cal.add_argument("--delimiter", choices=[",", ";", "\t"], help="the file's delimiter (default: from the header)")
    cal.add_argument("--decimal-comma", action="store_true", default=None, help="read decimal commas")
    cal.add_argument("--out", help="write the calibration (JSON) here, for 'ionact quantify'")
    cal.add_argument("--plot", help="write the calibration figure here (.png, .pdf or .svg)")
    cal.add_argument("--json", action="store_true", help="print the calibration as strict JSON")
    cal.set_defaults(func=cmd_calibrate)


def _job_quantify(job: Any) -> None:
    """The 'quantify' subcommand and its options."""
    qu = job("quantify", "sample potentials to concentrations with their intervals, every row kept",
             "ionact quantify samples.csv --calibration cal.json --unit mg/L --out report.csv")
    qu.add_argument("samples", help="SAMPLES.csv: 'sample_id', 'potential [mV]', optional 'time [min]', 'check [unit]'")
    qu.add_argument("--calibration", required=True, help="CAL.json written by 'ionact calibrate --out'")
    qu.add_argument("--design", help="DESIGN.json: check that the calibration was made with it")
    qu.add_argument("--method", help="METHOD.toml or example:NAME: the same check against a method file")
    qu.add_argument("--unit", help="report concentrations in this unit (default mol/L)")
    qu.add_argument("--coverage", type=float, help="of the intervals (default: the method file's, else 0.95)")
    qu.add_argument("--correct-drift", action="store_true", help="subtract the check standard's interpolated drift")
    qu.add_argument("--drift-limit", type=float,
                    help="largest acceptable drift, mV (default: the method file's, else 2)")
    qu.add_argument("--delimiter", choices=[",", ";", "\t"], help="the file's delimiter (default: from the header)")
    qu.add_argument("--decimal-comma", action="store_true", default=None, help="read decimal commas")
    qu.add_argument("--out", help="write the report CSV here ('-' for standard output)")
    qu.add_argument("--limit", type=int, default=50, help="rows shown on the screen (default 50)")
    qu.add_argument("--json", action="store_true", help="print the rows as strict JSON")
    qu.set_defaults(func=cmd_quantify)


def _job_addition(job: Any) -> None:
    """The 'addition' subcommand and its options."""
    ad = job("addition", "standard addition: known, double known, or multiple (Gran)",
             "ionact addition additions.csv --analyte F- --sample-volume 50 --spike-concentration '100 mg/L'")
    ad.add_argument("additions", help="ADDITIONS.csv: 'volume [mL]' (cumulative, first row 0), 'potential [mV]'")
    ad.add_argument("--analyte", required=True, help="the measured ion")
    ad.add_argument("--sample-volume", required=True, help="mL, or a unit string")
    ad.add_argument("--spike-concentration", required=True, help="mol/L, or a unit string ('100 mg/L')")
    ad.add_argument("--method", choices=["known", "double", "multiple"],
                    help="default: known for two rows, multiple for more")
    ad.add_argument("--slope", help="electrode slope, mV/decade (default: the calibration's, else Nernstian)")
    ad.add_argument("--calibration", help="CAL.json: take the slope and its uncertainty from it")
    ad.add_argument("-t", "--temperature", default="25", help="°C (default 25)")
    ad.add_argument("-m", "--model", help="activity model (default auto)")
    ad.add_argument("--unit", help="report the concentration in this unit (default mol/L)")
    ad.add_argument("--delimiter", choices=[",", ";", "\t"], help="the file's delimiter (default: from the header)")
    ad.add_argument("--decimal-comma", action="store_true", default=None, help="read decimal commas")
    ad.add_argument("--json", action="store_true", help="print the result as strict JSON")
    ad.set_defaults(func=cmd_addition)


def _job_demo(job: Any) -> None:
    """The 'demo' subcommand and its options."""
    d = job("demo", "run the built-in invented scenario", "ionact demo")
    d.set_defaults(func=cmd_demo)


_SHOWN: set[str] = set()


def _one_line_warnings(message: Warning | str, category: type[Warning], filename: str, lineno: int,
                       file: Any = None, line: str | None = None) -> None:
    text = f"ionact: {category.__name__}: {message}"
    if not category.__module__.startswith("ionact"):  # other packages' chatter (deprecations) is not the user's
        return
    if text in _SHOWN:  # one job may meet the same range problem in several steps: say it once
        return
    _SHOWN.add(text)
    print(text, file=sys.stderr if file is None else file)


def _error(argv: Sequence[str], command: str, exc: BaseException) -> None:
    msg = str(exc).strip().splitlines()[0] if str(exc).strip() else type(exc).__name__
    if "--json" in argv:
        print(json.dumps({"format": ERROR_FORMAT, "version": 1, "command": command, "error": type(exc).__name__,
                          "message": msg, "exit_status": EXIT_USER}, ensure_ascii=False), file=sys.stderr)
    else:
        print(f"ionact {command}: error: {msg}", file=sys.stderr)


def main(argv: Sequence[str] | None = None) -> int:
    argv = list(sys.argv[1:] if argv is None else argv)
    flags = {f for f in _GLOBAL_FLAGS if f in argv}
    rest = [a for a in argv if a not in _GLOBAL_FLAGS]
    args = build_parser().parse_args(rest)
    args.debug, args.strict_mode = "--debug" in flags, "--strict" in flags
    previous = warnings.showwarning
    if not args.debug:
        warnings.showwarning = _one_line_warnings
    try:
        from .errors import strict

        with strict(args.strict_mode):
            return int(args.func(args) or 0)
    except BrokenPipeError:
        _quiet_stdout()
        return EXIT_OK
    except KeyboardInterrupt:
        if args.debug:
            raise
        print("ionact: interrupted", file=sys.stderr)
        return EXIT_INTERRUPTED
    except (IonactError, OSError) as exc:
        if args.debug:
            raise
        _error(argv, args.command, exc)
        return EXIT_USER
    finally:
        warnings.showwarning = previous


def _quiet_stdout() -> None:
    """After a closed pipe: point stdout at /dev/null so the interpreter's final flush is quiet."""
    try:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
    except (OSError, ValueError):
        pass


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
