"""Read compositions written on a command line or in a file: "NaCl=0.1", "Ca^2+=2 mmol/kg"."""

from __future__ import annotations

from .errors import InputError, IonactError
from .solution import Solution
from .species import Ion, Salt, resolve_ion


def parse_terms(terms: list[str]) -> tuple[dict[str, str], dict[str, str]]:
    """Split "KEY=AMOUNT" terms into salts and ions (a key with a charge sign is an ion)."""
    salts: dict[str, str] = {}
    ions: dict[str, str] = {}
    for term in terms:
        if "=" not in term:
            raise InputError(f"composition term {term!r} is not KEY=AMOUNT (e.g. NaCl=0.1 or 'Ca^2+=2 mmol/kg')")
        key, _, amount = term.partition("=")
        key, amount = key.strip(), amount.strip()
        if not key or not amount:
            raise InputError(f"composition term {term!r} has an empty key or amount")
        is_ion = key.endswith(("+", "-")) or any(ch in key for ch in "^")
        if not is_ion:
            try:
                is_ion = Ion.parse(key).charge != 0 and key[-1].isdigit() and ("+" in key or "-" in key)
            except Exception:
                is_ion = False
        if not is_ion:  # a neutral solute such as CH3COOH is a species, not a salt
            try:
                Salt.parse(key)
            except IonactError:
                try:
                    is_ion = resolve_ion(key).charge == 0
                except IonactError:
                    is_ion = False
        target = ions if is_ion else salts
        if key in target:
            raise InputError(f"composition key {key!r} is given twice")
        target[key] = amount
    return salts, ions


def solution_from_terms(terms: list[str], temperature: float = 25.0, balance: str | None = None,
                        density=None, charge_tolerance: float = 1e-6) -> Solution:
    """Build a Solution from command-line terms; bare numbers are mol/kg."""
    salts, ions = parse_terms(terms)

    def num(v: str):
        try:
            return float(v)
        except ValueError:
            return v

    return Solution.from_salts({k: num(v) for k, v in salts.items()}, temperature,
                               extra={k: num(v) for k, v in ions.items()}, balance=balance, density=density,
                               charge_tolerance=charge_tolerance)
