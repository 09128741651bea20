"""The ``ionact`` command: one subcommand per job, ``--json`` everywhere.

User mistakes print one line naming the problem and exit with status 2; a traceback is
shown only with ``--debug``.
"""

from __future__ import annotations

import argparse
import json
import sys
import warnings
from typing import Any

import numpy as np

from .errors import IonactError

EXIT_USER = 2


def _jsonable(x):
    if isinstance(x, dict):
        return {str(k): _jsonable(v) for k, v in x.items()}
    if isinstance(x, list | tuple):
        return [_jsonable(v) for v in x]
    if isinstance(x, np.ndarray):
        return x.tolist()
    if isinstance(x, np.generic):
        return x.item()
    return x


def _emit(args, data: dict, text: str) -> None:
    if getattr(args, "json", False):
        print(json.dumps(_jsonable(data), indent=2, ensure_ascii=False))
    else:
        print(text)


def _solution(args):
    from ._composition import solution_from_terms

    return solution_from_terms(args.terms, args.temperature, balance=args.balance,
                               charge_tolerance=args.charge_tolerance)


def cmd_strength(args) -> int:
    from .solution import ionic_strength_from_conductivity, ionic_strength_from_tds

    if args.conductivity is not None or args.tds is not None:
        if args.terms:
            raise IonactError("give either a composition or --conductivity/--tds, not both")
        est = (ionic_strength_from_conductivity(args.conductivity, args.rule or "russell")
               if args.conductivity is not None else ionic_strength_from_tds(args.tds, args.rule or "langelier"))
        text = f"I ≈ {est.value:.4g} mol/L  (rule of thumb '{est.rule}', ×{est.coefficient:g}; {est.source})"
        _emit(args, {"ionic_strength": est.value, "rule": est.rule, "coefficient": est.coefficient,
                     "source": est.source}, text)
        return 0
    if not args.terms:
        raise IonactError("give a composition, e.g. 'ionact strength NaCl=0.1 \"CaCl2=2 mmol/kg\"'")
    sol = _solution(args)
    data: dict[str, Any] = {"ionic_strength_molal": sol.ionic_strength, "temperature": sol.temperature,
                            "charge_balance": sol.charge_balance, "molalities": sol.molalities}
    lines = [f"ionic strength  {sol.ionic_strength:.6g} mol/kg"]
    try:
        data["ionic_strength_molar"] = sol.molar_ionic_strength
        data["density"] = sol.density
        lines.append(f"                {sol.molar_ionic_strength:.6g} mol/L (density {sol.density:.5f} kg/L)")
    except IonactError as exc:
        lines.append(f"                (molar basis unavailable: {exc})")
    lines.append(f"charge balance  {sol.charge_balance * 1e3:+.3g} meq/kg")
    if sol.balanced_with:
        ion, add = sol.balanced_with
        data["balanced_with"] = {"ion": ion, "added_mol_per_kg": add}
        lines.append(f"balanced with   {ion}: {add * 1e3:+.4g} mmol/kg added")
    lines += [f"  {k:<10} {v:.6g} mol/kg" for k, v in sol.molalities.items()]
    _emit(args, data, "\n".join(lines))
    return 0


def cmd_gamma(args) -> int:
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
        _emit(args, data, f"I = {sol.ionic_strength:.5g} mol/kg, {sol.temperature:g} °C\n" + c.table())
        return 0
    g = activity_coefficients(sol, model=args.model, missing=args.missing)
    lines = [f"I = {sol.ionic_strength:.5g} mol/kg, {sol.temperature:g} °C, model {g.model} ({g.title})"]
    if args.model == "auto":
        lines.append(f"  chosen because {g.reason}")
    lines += [f"  {ion:<10} γ = {v:.5f}   log10 γ = {np.log10(v):+.5f}" for ion, v in g.items()]
    lines.append(f"convention: {g.convention}")
    lines += [f"note: {n}" for n in g.notes]
    if not g.in_range:
        lines.append(f"warning: outside the model's range 0–{g.max_ionic_strength:g} mol/kg")
    _emit(args, g.to_dict(), "\n".join(lines))
    return 0


def cmd_convert(args) -> int:
    from .conversion import activity_from_concentration, activity_from_px, concentration_from_activity

    matrix = None
    if args.terms:
        from ._composition import solution_from_terms

        matrix = solution_from_terms(args.terms, args.temperature, balance=args.balance,
                                     charge_tolerance=args.charge_tolerance)
    given = [x is not None for x in (args.activity, args.px, args.concentration)]
    if sum(given) != 1:
        raise IonactError("give exactly one of --activity, --px or --concentration")
    kw = dict(matrix=matrix, counter_ion=args.counter_ion, model=args.model)
    if matrix is None:
        kw["temperature"] = args.temperature
    if args.concentration is not None:
        conc = args.concentration
        try:
            conc = float(conc)
        except ValueError:
            pass
        r = activity_from_concentration(args.ion, conc, **kw)
    else:
        a = args.activity if args.activity is not None else activity_from_px(args.px)
        r = concentration_from_activity(args.ion, a, **kw)
    data = r.to_dict()
    lines = [f"{r.ion} with counter-ion {r.counter_ion} in "
             f"{'pure water' if matrix is None else 'the given matrix'}, model {r.model}"]
    px = -np.log10(r.activity)
    lines.append(f"  activity        {r.activity:.6g}   (p{r.ion.rstrip('+-0123456789')} = {px:.4f})")
    lines.append(f"  γ               {r.gamma:.6f}")
    lines.append(f"  molality        {r.molality:.6g} mol/kg")
    for unit in args.unit or []:
        v = r.concentration(unit)
        data.setdefault("concentration", {})[unit] = v
        lines.append(f"  concentration   {v:.6g} {unit}")
    lines.append(f"  ionic strength  {r.ionic_strength:.6g} mol/kg")
    _emit(args, data, "\n".join(lines))
    return 0


def cmd_design(args) -> int:
    from .adjuster import design_adjuster
    from .method import example_names, load_method

    if args.list_examples:
        for n in example_names():
            print(n)
        return 0
    if args.help_keys:
        from .method import keys_help

        print(keys_help())
        return 0
    if (args.method is None) == (args.example is None):
        raise IonactError("give a method file, or --example NAME (see --list-examples)")
    kw = load_method(args.method if args.method is not None else f"example:{args.example}")
    if args.solve:
        kw["solve"] = args.solve
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        d = design_adjuster(**kw)
    if args.out:
        with open(args.out, "w", encoding="utf-8") as fh:
            json.dump(_jsonable(d.to_dict()), fh, indent=2, ensure_ascii=False)
    if args.plot:
        try:
            d.plot(args.plot)
        except ImportError:
            raise IonactError("--plot needs matplotlib: pip install 'ionact[plot]'") from None
    _emit(args, d.to_dict(), d.report())
    return d.exit_status


def cmd_check(args) -> int:
    from .samples import check_samples, read_samples_csv, report_to_text, write_report_csv

    try:
        with open(args.design, encoding="utf-8") as fh:
            design = json.load(fh)
    except OSError as exc:
        raise IonactError(f"cannot read design {args.design}: {exc.strerror or exc}") from None
    except (json.JSONDecodeError, UnicodeDecodeError) as exc:
        raise IonactError(f"design {args.design} is not valid JSON ({exc})") from None
    cols, units, notes = read_samples_csv(args.samples)
    dil = tuple(float(x) for x in args.dilutions.split(",")) if args.dilutions else (1, 2, 5, 10, 20, 50, 100)
    cal = tuple(args.calibration) if args.calibration else None
    n = len(next(iter(cols.values())))
    r = check_samples(cols, design, calibration_range=cal, dilutions=dil, units=units,
                      progress=(n >= 10000 and not args.quiet))
    for note in notes:
        print(f"ionact check: note: {note}", file=sys.stderr)
    if args.out:
        write_report_csv(r, args.out)
    if args.plot:
        try:
            r.plot(args.plot)
        except ImportError:
            raise IonactError("--plot needs matplotlib: pip install 'ionact[plot]'") from None
    data = {"model": r.model, "counts": r.counts(), "calibration_range_mol_per_l": list(r.calibration_range),
            "envelope": list(r.envelope), "rows": r.rows()}
    _emit(args, data, report_to_text(r) + (f"report written to {args.out}" if args.out else ""))
    return 0


def cmd_demo(args) -> int:
    from .demo import run

    run()
    return 0


def _composition_args(p, as_option=False):
    helptext = "KEY=AMOUNT terms: NaCl=0.1, 'Ca^2+=2 mmol/kg', 'NO3-=10 mg/L as N'"
    if as_option:
        p.add_argument("--matrix", dest="terms", nargs="+", default=[], metavar="KEY=AMOUNT",
                       help="the background without the analyte; " + helptext)
    else:
        p.add_argument("terms", nargs="*", help=helptext)
    p.add_argument("-t", "--temperature", type=float, default=25.0, help="°C (default 25)")
    p.add_argument("--balance", help="ion that takes up any charge imbalance, e.g. Cl-")
    p.add_argument("--charge-tolerance", type=float, default=1e-6,
                   help="largest relative charge imbalance accepted without --balance (default 1e-6)")
    p.add_argument("--json", action="store_true", help="print JSON")


def build_parser() -> argparse.ArgumentParser:
    from .models.registry import model_names

    p = argparse.ArgumentParser(prog="ionact", description="Ionic strength, activity coefficients and "
                                "ionic strength adjuster design.",
                                epilog="exit status: 0 success, 1 a check failed (the report is still printed), "
                                "2 bad input (one line on standard error; --debug shows the traceback)")
    p.add_argument("--debug", action="store_true", help="show tracebacks")
    sub = p.add_subparsers(dest="command", required=True)

    s = sub.add_parser("strength", help="ionic strength of a composition, or estimated from EC/TDS")
    _composition_args(s)
    s.add_argument("--conductivity", type=float, help="electrical conductivity, µS/cm at 25 °C")
    s.add_argument("--tds", type=float, help="total dissolved solids, mg/L")
    s.add_argument("--rule", help="rule of thumb: russell, griffin-jurinak (EC) or langelier (TDS)")
    s.set_defaults(func=cmd_strength)

    g = sub.add_parser("gamma", help="activity coefficients of a composition by a model")
    _composition_args(g)
    g.add_argument("-m", "--model", default="auto", choices=model_names(), help="activity model (default auto)")
    g.add_argument("--missing", default="error", help="missing parameters: error, zero, or a fallback model")
    g.add_argument("--compare", action="store_true", help="every model side by side with their spread")
    g.set_defaults(func=cmd_gamma)

    c = sub.add_parser("convert", help="activity <-> concentration of an analyte in a matrix")
    c.add_argument("ion", help="the analyte, e.g. F- or Ca^2+")
    _composition_args(c, as_option=True)
    c.add_argument("--activity", type=float, help="molal-scale activity to convert to a concentration")
    c.add_argument("--px", type=float, help="pX = -log10 a to convert to a concentration")
    c.add_argument("--concentration", help="concentration to convert to an activity, e.g. '19 mg/L'")
    c.add_argument("--counter-ion", help="ion accompanying the analyte (default Cl- or Na+)")
    c.add_argument("-m", "--model", default="auto", choices=model_names(), help="activity model (default auto)")
    c.add_argument("--unit", action="append", help="also report the concentration in this unit (repeatable)")
    c.set_defaults(func=cmd_convert)

    de = sub.add_parser("design", help="design or evaluate an ionic strength adjuster from a method file",
                        description="Design or evaluate an ionic strength adjuster from a method file. Exit status: "
                        "0 every check ok or warning, 1 a check failed (the report is still printed), 2 bad input.",
                        epilog="example: ionact design --example nitrate_irrigation --out design.json")
    de.add_argument("method", nargs="?", help="METHOD.toml (keys documented in the README)")
    de.add_argument("--example", help="use a method file shipped with ionact (see --list-examples)")
    de.add_argument("--list-examples", action="store_true", help="list the shipped method files")
    de.add_argument("--solve", choices=["stock", "ratio", "none"], help="override the file's solve mode")
    de.add_argument("--json", action="store_true", help="print the design as JSON")
    de.add_argument("--out", help="also write the design JSON to this file (input for 'ionact check')")
    de.add_argument("--plot", help="write a figure of the design to this PNG file")
    de.add_argument("--help-keys", action="store_true", help="list the method-file tables and keys")
    de.set_defaults(func=cmd_design)

    ch = sub.add_parser("check", help="check a batch of samples against an adjuster design before measuring")
    ch.add_argument("samples", help="SAMPLES.csv (columns documented in the README)")
    ch.add_argument("--design", required=True, help="DESIGN.json written by 'ionact design --out'")
    ch.add_argument("--out", help="write the per-sample report to this CSV")
    ch.add_argument("--plot", help="write a figure of the batch to this PNG file")
    ch.add_argument("--calibration", nargs=2, metavar=("LOW", "HIGH"), help="calibrated range, e.g. "
                    "'0.5 mg/L as N' '30 mg/L as N' (default: the design's standards)")
    ch.add_argument("--dilutions", help="allowed dilution factors, comma-separated (default 1,2,5,10,20,50,100)")
    ch.add_argument("--json", action="store_true", help="print the results as JSON")
    ch.add_argument("--quiet", action="store_true", help="no progress bar")
    ch.set_defaults(func=cmd_check)

    d = sub.add_parser("demo", help="run the built-in invented scenario")
    d.set_defaults(func=cmd_demo)
    return p


def _one_line_warnings(message, category, filename, lineno, file=None, line=None):
    print(f"ionact: {category.__name__}: {message}", file=sys.stderr if file is None else file)


def main(argv: list[str] | None = None) -> int:
    argv = sys.argv[1:] if argv is None else argv
    parser = build_parser()
    args = parser.parse_args(argv)
    previous = warnings.showwarning
    if not args.debug:
        warnings.showwarning = _one_line_warnings
    try:
        return int(args.func(args) or 0)
    except (IonactError, OSError) as exc:
        if args.debug:
            raise
        msg = str(exc).strip().splitlines()[0] if str(exc).strip() else type(exc).__name__
        print(f"ionact {args.command}: error: {msg}", file=sys.stderr)
        return EXIT_USER
    finally:
        warnings.showwarning = previous


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
