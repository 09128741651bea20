"""Method files: a TOML description of an ISA design job, read into design_adjuster arguments.

The keys are ionact's own (documented in the README); unknown or missing keys are errors
naming the key and the file. Files are read with ``tomllib`` (no code is executed).
"""

from __future__ import annotations

import tomllib
from importlib import resources
from pathlib import Path

from .adjuster import Buffer
from .errors import InputError

__all__ = ["load_method", "example_path", "example_names"]

_TOP = {"name", "analyte", "temperature", "lowest_temperature", "model", "density", "levels",
        "budget", "analyte_range", "samples", "adjuster", "electrode", "matrix_ions"}
_BUDGET = {"mv", "percent"}
_ANALYTE = {"low", "high", "standard_salt", "standards"}
_SAMPLES = {"ionic_strength", "background", "conductivity", "tds", "rule"}
_ADJUSTER = {"solve", "volume_ratio", "max_ratio", "solubility_margin", "stock", "buffer", "sample_acidity",
             "sample_ph"}
_BUFFER = {"acid", "base", "pH", "total", "pka"}
_ELECTRODE = {"linear_range", "selectivity"}


def example_names() -> list[str]:
    """Names of the method files shipped in ``ionact/examples``."""
    return sorted(p.name[:-5] for p in resources.files("ionact").joinpath("examples").iterdir()
                  if p.name.endswith(".toml"))


def example_path(name: str):
    """Path of a shipped example method file by name (without ``.toml``)."""
    if name not in example_names():
        raise InputError(f"no example method {name!r}; available: {', '.join(example_names())}")
    return resources.files("ionact").joinpath("examples", f"{name}.toml")


def _check_keys(table: dict, allowed: set[str], where: str, src: str) -> None:
    unknown = sorted(set(table) - allowed)
    if unknown:
        raise InputError(f"{src}: unknown key(s) {', '.join(repr(k) for k in unknown)} in {where}; "
                         f"allowed: {', '.join(sorted(allowed))}")


def _need(table: dict, key: str, where: str, src: str):
    if key not in table:
        raise InputError(f"{src}: missing key {key!r} in {where}")
    return table[key]


def _table(data: dict, key: str, src: str, required: bool = True) -> dict:
    if key not in data:
        if required:
            raise InputError(f"{src}: missing table [{key}]")
        return {}
    v = data[key]
    if not isinstance(v, dict):
        raise InputError(f"{src}: [{key}] must be a table, got {type(v).__name__}")
    return v


def _pair(value, where: str, src: str) -> tuple:
    if not isinstance(value, list | tuple) or len(value) != 2:
        raise InputError(f"{src}: {where} must be a pair [low, high], got {value!r}")
    return tuple(value)


def load_method(path) -> dict:
    """Read a method file into keyword arguments for :func:`ionact.design_adjuster`.

    Raises
    ------
    InputError
        Unreadable file, TOML syntax errors, unknown or missing keys, wrong types.
    """
    if isinstance(path, str) and path.startswith("example:"):
        path = example_path(path.split(":", 1)[1])
    src = str(path)
    try:
        raw = Path(path).read_bytes() if not hasattr(path, "read_bytes") else path.read_bytes()
    except OSError as exc:
        raise InputError(f"cannot read method file {src}: {exc.strerror or exc}") from None
    try:
        data = tomllib.loads(raw.decode("utf-8"))
    except UnicodeDecodeError:
        raise InputError(f"{src}: not UTF-8 text") from None
    except tomllib.TOMLDecodeError as exc:
        raise InputError(f"{src}: not valid TOML ({exc})") from None
    _check_keys(data, _TOP, "the top level", src)
    kw: dict = {"analyte": _need(data, "analyte", "the top level", src)}
    for key in ("name", "temperature", "lowest_temperature", "model", "density", "levels"):
        if key in data:
            kw[key] = data[key]
    budget = _table(data, "budget", src)
    _check_keys(budget, _BUDGET, "[budget]", src)
    if ("mv" in budget) == ("percent" in budget):
        raise InputError(f"{src}: [budget] needs exactly one of mv or percent")
    if "mv" in budget:
        kw["tolerance_mv"] = budget["mv"]
    else:
        kw["tolerance_percent"] = budget["percent"]
    an = _table(data, "analyte_range", src)
    _check_keys(an, _ANALYTE, "[analyte_range]", src)
    kw["analyte_range"] = (_need(an, "low", "[analyte_range]", src), _need(an, "high", "[analyte_range]", src))
    for key in ("standard_salt", "standards"):
        if key in an:
            kw[key] = an[key]
    samples = _table(data, "samples", src)
    _check_keys(samples, _SAMPLES, "[samples]", src)
    given = [k for k in ("ionic_strength", "conductivity", "tds") if k in samples]
    if len(given) != 1:
        raise InputError(f"{src}: [samples] needs exactly one of ionic_strength, conductivity or tds")
    key = given[0]
    kw["sample_ionic_strength" if key == "ionic_strength" else key] = _pair(samples[key], f"[samples] {key}", src)
    if "background" in samples:
        kw["background"] = samples["background"]
    if "rule" in samples:
        kw["estimate_rule"] = samples["rule"]
    adj = _table(data, "adjuster", src)
    _check_keys(adj, _ADJUSTER, "[adjuster]", src)
    stock = _need(adj, "stock", "[adjuster]", src)
    if not isinstance(stock, dict) or not stock:
        raise InputError(f"{src}: [adjuster.stock] must be a table of salt = mol/L")
    kw["salts"] = dict(stock)
    for key in ("solve", "volume_ratio", "max_ratio", "solubility_margin", "sample_ph"):
        if key in adj:
            kw[key] = adj[key]
    if "sample_acidity" in adj:
        kw["sample_acidity"] = _pair(adj["sample_acidity"], "[adjuster] sample_acidity", src)
    if "buffer" in adj:
        b = adj["buffer"]
        if not isinstance(b, dict):
            raise InputError(f"{src}: [adjuster.buffer] must be a table")
        _check_keys(b, _BUFFER, "[adjuster.buffer]", src)
        kw["buffer"] = Buffer(acid=_need(b, "acid", "[adjuster.buffer]", src),
                              base=_need(b, "base", "[adjuster.buffer]", src),
                              pH=_need(b, "pH", "[adjuster.buffer]", src),
                              total=b.get("total", 1.0), pka=b.get("pka"))
    el = _table(data, "electrode", src, required=False)
    _check_keys(el, _ELECTRODE, "[electrode]", src)
    if "linear_range" in el:
        kw["linear_range"] = _pair(el["linear_range"], "[electrode] linear_range", src)
    if "selectivity" in el:
        if not isinstance(el["selectivity"], dict):
            raise InputError(f"{src}: [electrode.selectivity] must be a table of ion = K")
        kw["selectivity"] = dict(el["selectivity"])
    if "standards" in kw and not isinstance(kw["standards"], list):
        raise InputError(f"{src}: [analyte_range] standards must be a list")
    mi = _table(data, "matrix_ions", src, required=False)
    if mi:
        kw["matrix_ions"] = dict(mi)
    return kw
