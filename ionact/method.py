"""Method files: a TOML description of an ISA design job, read into design_adjuster arguments.

Each table maps one to one onto a record of the job (``[budget]`` → :class:`Budget`,
``[samples]`` → :class:`SamplePopulation`, ``[electrode]`` → :class:`Electrode`,
``[adjuster.buffer]`` → :class:`Buffer`, ``[adjuster.stock]`` → stock components,
``[species.NAME]`` → an :class:`~ionact.Ion` the tables lack, ``[complexes.NAME]`` → a
:class:`~ionact.Complex` for the equilibrium). The keys are listed once,
in :data:`METHOD_KEYS`, which both the reader and ``ionact design --help-keys`` use.
Unknown or missing keys are errors naming the key and the file. Files are read with
``tomllib`` (no code is executed).
"""

from __future__ import annotations

import tomllib
from collections.abc import Mapping
from importlib import resources
from pathlib import Path
from typing import Any, cast

from .adjuster import Budget, Buffer, Electrode, SamplePopulation, StockComponent
from .equilibrium import Complex
from .errors import InputError
from .species import Ion, resolve_ion

__all__ = ["load_method", "load_calibration_settings", "example_path", "example_names", "METHOD_KEYS", "keys_help",
           "MAX_METHOD_BYTES"]

MAX_METHOD_BYTES = 1_000_000

# table -> {key: description}; "*" marks a table of free keys
METHOD_KEYS: dict[str, dict[str, str]] = {
    "(top level)": {
        "analyte": "the measured ion, e.g. \"NO3-\" (required)",
        "name": "a name for the report",
        "temperature": "°C of measurement (default 25)",
        "lowest_temperature": "°C the stock is stored at, for solubility (default: temperature)",
        "model": "activity model or \"auto\"",
        "missing": "\"error\", \"zero\" or a fallback model name when a model lacks parameters",
        "density": "\"water\" to take 1 L of solution as ρ_w kg of water (default: the density model)",
        "levels": "analyte levels (and default standards) across the range (default 7)",
        "equilibrium": "true/false: speciate the treated solutions (default: when ions react or a buffer is set)",
    },
    "budget": {"mv": "largest |ΔE| in mV",
               "percent": "largest relative error in % (exactly one of the two)"},
    "analyte_range": {"low": "lowest analyte level (mol/L or unit string; required)",
                      "high": "highest analyte level (required)",
                      "standard_salt": "the analyte's salt in the standards",
                      "standards": "list of standard concentrations"},
    "samples": {"ionic_strength": "[low, high] mol/kg", "conductivity": "[low, high] µS/cm or unit strings",
                "tds": "[low, high] mg/L or unit strings (exactly one of the three)",
                "background": "salt standing for the matrix (default NaCl)", "rule": "conductivity/TDS rule of thumb",
                "acidity": "[low, high] strong acid (+) or base (−) in the samples, mol/L",
                "ph": "pH of the treated solutions when there is no buffer"},
    "samples.matrix_ions": {
        "*": "ion = highest level in the samples (interference and precipitation checks)"},
    "adjuster": {"solve": "\"stock\", \"ratio\" or \"none\"", "volume_ratio": "stock volume per sample volume",
                 "max_ratio": "largest ratio when solving the ratio",
                 "solubility_margin": "fraction kept below saturation"},
    "adjuster.stock": {"*": "component = mol/L, or component = {amount, role, ions}; role is inert (scaled when "
                            "solving), fixed (kept as given) — required for custom components"},
    "adjuster.buffer": {"acid": "acid carrier (required)", "base": "base carrier (required)",
                        "pH": "target pH (required)", "total": "acid + base in the stock, mol/L", "pka": "override"},
    "electrode": {"linear_range": "[low, high] in the treated solution"},
    "electrode.selectivity": {"*": "ion = this electrode's selectivity coefficient K"},
    "species.NAME": {"formula": "chemical formula without charge (required)", "charge": "signed charge (required)",
                     "molar_mass": "g/mol (default: from the formula)", "size": "ion-size parameter å, Å",
                     "volume": "apparent molar volume at infinite dilution, cm³/mol"},
    "calibration": {"fit": "\"auto\", \"nernst\" or \"nikolsky\" (ionact calibrate)",
                    "slope_window": "[low, high] accepted slope, % of Nernstian (default [90, 105])",
                    "linearity_mv": "largest residual in the linear range, mV (default 1)",
                    "drift_limit_mv": "largest check-standard drift, mV (ionact quantify; default 2)",
                    "coverage": "of the reported intervals (default 0.95)"},
    "complexes.NAME": {"formula": "the species' formula, with or without charge notation (required)",
                       "charge": "signed charge when the formula has no charge notation",
                       "components": "{ion = count} it forms from; ions by notation or [species] name (required)",
                       "log_k": "log10 overall formation constant at 25 °C, I = 0 (required)",
                       "delta_h": "reaction enthalpy, kJ/mol (van 't Hoff temperature dependence)",
                       "size": "ion-size parameter å, Å", "kind": "complex, acid, pair or hydrolysis",
                       "source": "where the constant comes from"},
}


def keys_help() -> str:
    """The method-file keys as text (what ``ionact design --help-keys`` prints)."""
    lines = []
    for table, keys in METHOD_KEYS.items():
        lines.append(table if table == "(top level)" else f"[{table}]")
        for k, v in keys.items():
            lines.append(f"  {'<key>' if k == '*' else k:<20} {v}")
    return "\n".join(lines)


def example_names() -> list[str]:
    """Names of the method files shipped in ``ionact/examples``."""
    return sorted(p.name[:-5] for p in resources.files("ionact").joinpath("examples").iterdir()
                  if p.name.endswith(".toml"))


def example_path(name: str) -> Any:
    """Path of a shipped example method file by name (without ``.toml``)."""
    if name not in example_names():
        raise InputError(f"no example method {name!r}; available: {', '.join(example_names())}")
    return resources.files("ionact").joinpath("examples", f"{name}.toml")


def _check_keys(table: Mapping[str, Any], section: str, src: str) -> None:
    allowed = set(METHOD_KEYS[section])
    unknown = sorted(set(table) - allowed)
    if unknown:
        where = "the top level" if section == "(top level)" else f"[{section}]"
        raise InputError(f"{src}: unknown key(s) {', '.join(repr(k) for k in unknown)} in {where}; "
                         f"allowed: {', '.join(sorted(allowed))}")


def _need(table: Mapping[str, Any], key: str, where: str, src: str) -> Any:
    if key not in table:
        raise InputError(f"{src}: missing key {key!r} in {where}")
    return table[key]


def _table(data: Mapping[str, Any], key: str, src: str, required: bool = True) -> dict[str, Any]:
    if key not in data:
        if required:
            raise InputError(f"{src}: missing table [{key}]")
        return {}
    v = data[key]
    if not isinstance(v, dict):
        raise InputError(f"{src}: [{key}] must be a table, got {type(v).__name__}")
    return v


def _read(path: Any) -> tuple[dict[str, Any], str]:
    if isinstance(path, str) and path.startswith("example:"):
        path = example_path(path.split(":", 1)[1])
    src = str(path)
    opener = path.open if hasattr(path, "open") and not isinstance(path, str | Path) else None
    try:
        with (opener("rb") if opener else open(path, "rb")) as fh:
            raw = fh.read(MAX_METHOD_BYTES + 1)
    except OSError as exc:
        raise InputError(f"cannot read method file {src}: {exc.strerror or exc}") from None
    if len(raw) > MAX_METHOD_BYTES:
        raise InputError(f"{src}: larger than {MAX_METHOD_BYTES} bytes; a method file is a short text")
    try:
        return tomllib.loads(raw.decode("utf-8")), src
    except UnicodeDecodeError:
        raise InputError(f"{src}: not UTF-8 text") from None
    except tomllib.TOMLDecodeError as exc:
        raise InputError(f"{src}: not valid TOML ({exc})") from None


def _species(data: Mapping[str, Any], src: str) -> dict[str, Ion]:
    out = {}
    for key, spec in _table(data, "species", src, required=False).items():
        if not isinstance(spec, dict):
            raise InputError(f"{src}: [species.{key}] must be a table")
        _check_keys(spec, "species.NAME", src)
        ion = Ion.from_dict({"formula": _need(spec, "formula", f"[species.{key}]", src),
                             "charge": _need(spec, "charge", f"[species.{key}]", src),
                             "molar_mass": spec.get("molar_mass"), "size": spec.get("size"),
                             "volume": spec.get("volume")})
        out[key] = ion
        out[ion.name] = ion
    return out


def _stock(adj: Mapping[str, Any], species: Mapping[str, Ion], src: str) -> list[StockComponent]:
    stock = _need(adj, "stock", "[adjuster]", src)
    if not isinstance(stock, dict) or not stock:
        raise InputError(f"{src}: [adjuster.stock] must be a table of component = mol/L")
    comps = []
    for name, value in stock.items():
        if isinstance(value, dict):
            extra = set(value) - {"amount", "role", "ions"}
            if extra:
                raise InputError(f"{src}: [adjuster.stock] {name}: unknown key(s) {sorted(extra)}; allowed amount, "
                                 "role, ions")
            ions = value.get("ions")
            if ions is not None:
                if not isinstance(ions, dict):
                    raise InputError(f"{src}: [adjuster.stock] {name}: ions must be a table of ion = count")
                ions = {species[k] if k in species else resolve_ion(k): n for k, n in ions.items()}
            comps.append(StockComponent.of(name, _need(value, "amount", f"[adjuster.stock] {name}", src),
                                           value.get("role"), ions))
        else:
            comps.append(StockComponent.of(name, value))
    return comps


def _samples(data: Mapping[str, Any], src: str) -> SamplePopulation:
    samples = dict(_table(data, "samples", src))
    mi = samples.pop("matrix_ions", {})
    _check_keys(samples, "samples", src)
    if not isinstance(mi, dict):
        raise InputError(f"{src}: [samples.matrix_ions] must be a table of ion = highest level")
    return SamplePopulation(ionic_strength=samples.get("ionic_strength"), conductivity=samples.get("conductivity"),
                            tds=samples.get("tds"), background=samples.get("background", "NaCl"),
                            rule=samples.get("rule"), matrix_ions=mi, acidity=samples.get("acidity"),
                            ph=samples.get("ph"))


def _electrode(data: Mapping[str, Any], src: str) -> Electrode:
    el = dict(_table(data, "electrode", src, required=False))
    sel = el.pop("selectivity", {})
    _check_keys(el, "electrode", src)
    if not isinstance(sel, dict):
        raise InputError(f"{src}: [electrode.selectivity] must be a table of ion = K")
    return Electrode(linear_range=el.get("linear_range"), selectivity=sel)


def _complexes(data: Mapping[str, Any], species: Mapping[str, Ion], src: str) -> list[Complex]:
    out = []
    for key, spec in _table(data, "complexes", src, required=False).items():
        where = f"[complexes.{key}]"
        if not isinstance(spec, dict):
            raise InputError(f"{src}: {where} must be a table")
        _check_keys(spec, "complexes.NAME", src)
        comps = _need(spec, "components", where, src)
        if not isinstance(comps, dict) or not comps:
            raise InputError(f"{src}: {where} components must be a table of ion = count")
        out.append(Complex(formula=_need(spec, "formula", where, src),
                           components=cast(Mapping[str, int], {species.get(k, k): n for k, n in comps.items()}),
                           log_k=_need(spec, "log_k", where, src), delta_h=spec.get("delta_h"),
                           charge=spec.get("charge"), size=spec.get("size"), kind=spec.get("kind", "complex"),
                           source=str(spec.get("source", f"method file {src}"))))
    return out


def load_calibration_settings(path: Any) -> dict[str, Any]:
    """The ``[calibration]`` table of a method file (empty when absent), checked: the
    acceptance rules the laboratory measures the method with."""
    data, src = _read(path)
    cal = _table(data, "calibration", src, required=False)
    _check_keys(cal, "calibration", src)
    out: dict[str, Any] = {}
    if "fit" in cal:
        if cal["fit"] not in ("auto", "nernst", "nikolsky"):
            raise InputError(f"{src}: [calibration] fit {cal['fit']!r} must be auto, nernst or nikolsky")
        out["fit"] = cal["fit"]
    if "slope_window" in cal:
        w = cal["slope_window"]
        if not (isinstance(w, list) and len(w) == 2 and all(_number(x) for x in w) and 0 < w[0] < w[1]):
            raise InputError(f"{src}: [calibration] slope_window {w!r} must be [low, high] with 0 < low < high")
        out["slope_window"] = (float(w[0]), float(w[1]))
    for key in ("linearity_mv", "drift_limit_mv"):
        if key in cal:
            if not (_number(cal[key]) and cal[key] > 0):
                raise InputError(f"{src}: [calibration] {key} {cal[key]!r} must be a positive number of mV")
            out[key] = float(cal[key])
    if "coverage" in cal:
        if not (_number(cal["coverage"]) and 0 < cal["coverage"] < 1):
            raise InputError(f"{src}: [calibration] coverage {cal['coverage']!r} must lie between 0 and 1")
        out["coverage"] = float(cal["coverage"])
    return out


def _number(x: Any) -> bool:
    return isinstance(x, int | float) and not isinstance(x, bool) and x == x and abs(x) != float("inf")


def load_method(path: Any) -> dict[str, Any]:
    """Read a method file into keyword arguments for :func:`ionact.design_adjuster`.

    Raises
    ------
    InputError
        Unreadable or oversized file, TOML syntax errors, unknown or missing keys, values
        of the wrong type or range (each named with the file).
    """
    data, src = _read(path)
    top = {k: v for k, v in data.items() if not isinstance(v, dict)}
    tables = set(data) - set(top)
    _check_keys(top, "(top level)", src)
    unknown = sorted(tables - {"budget", "analyte_range", "samples", "adjuster", "electrode", "species",
                               "complexes", "calibration"})
    if unknown:
        raise InputError(f"{src}: unknown table(s) {', '.join(unknown)}")
    try:
        return _job(data, top, src)
    except InputError as exc:
        msg = str(exc)
        raise InputError(msg if msg.startswith(src) else f"{src}: {msg}") from None


def _job(data: Mapping[str, Any], top: Mapping[str, Any], src: str) -> dict[str, Any]:
    species = _species(data, src)
    analyte = _need(top, "analyte", "the top level", src)
    if not isinstance(analyte, str):
        raise InputError(f"{src}: analyte {analyte!r} must be an ion notation such as \"F-\"")
    kw: dict[str, Any] = {"analyte": species.get(analyte) or analyte}
    for key in ("name", "temperature", "lowest_temperature", "model", "missing", "density", "levels", "equilibrium"):
        if key in top:
            kw[key] = top[key]
    budget = _table(data, "budget", src)
    _check_keys(budget, "budget", src)
    kw["budget"] = Budget(mv=budget.get("mv"), percent=budget.get("percent"))
    an = _table(data, "analyte_range", src)
    _check_keys(an, "analyte_range", src)
    kw["analyte_range"] = (_need(an, "low", "[analyte_range]", src), _need(an, "high", "[analyte_range]", src))
    for key in ("standard_salt", "standards"):
        if key in an:
            kw[key] = an[key]
    kw["samples"] = _samples(data, src)
    adj = dict(_table(data, "adjuster", src))
    buf = adj.pop("buffer", None)
    kw["stock"] = _stock(adj, species, src)
    adj.pop("stock")
    _check_keys(adj, "adjuster", src)
    kw.update(adj)
    if buf is not None:
        if not isinstance(buf, dict):
            raise InputError(f"{src}: [adjuster.buffer] must be a table")
        _check_keys(buf, "adjuster.buffer", src)
        kw["buffer"] = Buffer(acid=_need(buf, "acid", "[adjuster.buffer]", src),
                              base=_need(buf, "base", "[adjuster.buffer]", src),
                              pH=_need(buf, "pH", "[adjuster.buffer]", src), total=buf.get("total", 1.0),
                              pka=buf.get("pka"))
    kw["electrode"] = _electrode(data, src)
    complexes = _complexes(data, species, src)
    if complexes:
        kw["complexes"] = complexes
    return kw
