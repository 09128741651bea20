"""Ions and salts: parsing the notations chemists write, charges, molar masses.

Ion notation is ambiguous in one common style: in ``"Ca2+"`` the digit is the charge,
in ``"NO3-"`` it is a subscript. The unambiguous forms (``"Ca^2+"``, ``"SO4^2-"``, ``"Ca+2"``,
``"SO4^2-"``, ``"Ca++"``) are read directly; "digit then one sign" is resolved through
the ion table, and what stays ambiguous is refused with a message rather than guessed.
"""

from __future__ import annotations

import math
import re
from collections.abc import Mapping
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from .errors import InputError, UnknownSpeciesError
from .tables import IonRecord, SaltRecord, canonical_name, ion_table, salt_table

__all__ = ["Ion", "Salt", "parse_ion", "parse_salt", "resolve_ion", "register_ion", "typeset"]

_SUPER = str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹⁺⁻−–", "0123456789+--" + "-")
_RE_CARET = re.compile(r"^(?P<f>.+?)\^\{?(?:(?P<n1>\d*)(?P<s1>[+-])|(?P<s2>[+-])(?P<n2>\d*))\}?$")
_RE_BRACKET = re.compile(r"^(?P<f>.+?)\[(?:(?P<n1>\d*)(?P<s1>[+-])|(?P<s2>[+-])(?P<n2>\d*))\]$")
_RE_SIGN_DIGITS = re.compile(r"^(?P<f>.*[^+\-\s])(?P<s>[+-])(?P<n>\d+)$")
_RE_SIGNS = re.compile(r"^(?P<f>.*[^+\-\s])(?P<s>\++|-+)$")
_RE_FORMULA = re.compile(r"^[A-Za-z0-9()\[\]]+$")
_MAX_CHARGE = 6


_RE_TOKEN = re.compile(r"([A-Z][a-z]?)(\d*)|(\()|\)(\d*)")


def formula_atoms(formula: str) -> dict[str, int]:
    """Element symbol -> count in a formula of symbols, counts and parenthesised groups
    ("CuSO4", "Ca(NO3)2", "(NH4)2SO4"); ValueError for anything else."""
    stack: list[dict[str, int]] = [{}]
    pos = 0
    while pos < len(formula):
        m = _RE_TOKEN.match(formula, pos)
        if m is None:
            raise ValueError(f"unexpected {formula[pos]!r} at position {pos}")
        if m.group(1):
            n = int(m.group(2) or 1)
            stack[-1][m.group(1)] = stack[-1].get(m.group(1), 0) + n
        elif m.group(3):
            stack.append({})
        else:
            if len(stack) == 1:
                raise ValueError("a closing parenthesis without an opening one")
            group, n = stack.pop(), int(m.group(4) or 1)
            for el, k in group.items():
                stack[-1][el] = stack[-1].get(el, 0) + k * n
        if m.group(2) == "0" or m.group(4) == "0":
            raise ValueError("a count of zero")
        pos = m.end()
    if len(stack) != 1:
        raise ValueError("an opening parenthesis without a closing one")
    return stack[0]


def formula_mass(formula: str) -> float:
    """Molar mass (g/mol) of a chemical formula from periodictable's atomic weights;
    InputError if unparseable.

    The formula is split into elements here (symbols, counts and parenthesised groups), and
    each element's standard atomic weight comes from periodictable; its own formula parser
    is not used because importing it costs a first command about a tenth of a second.
    """
    if not _RE_FORMULA.match(formula) or not formula[0].isalpha() and formula[0] not in "([":
        raise InputError(f"not a chemical formula: {formula!r}")
    try:
        import periodictable

        atoms = formula_atoms(formula)
        mass = sum(n * float(periodictable.elements.symbol(el).mass) for el, n in atoms.items())
    except Exception as exc:  # an unknown element or a malformed formula
        raise InputError(f"not a chemical formula: {formula!r} ({exc})") from None
    if not atoms or not math.isfinite(mass) or mass <= 0:
        raise InputError(f"not a chemical formula: {formula!r}")
    return mass


@lru_cache(maxsize=1)
def _alias_map() -> dict[tuple[str, int], str]:
    out: dict[tuple[str, int], str] = {}
    for rec in ion_table().values():
        for a in rec.aliases:
            out[(a, rec.charge)] = rec.formula
    return out


@lru_cache(maxsize=1)
def _complex_ions() -> dict[str, Ion]:
    """Ions for the species of the complexes table that the ion table lacks (name -> Ion)."""
    from .tables import complex_table

    out: dict[str, Ion] = {}
    for name, rec in complex_table().items():
        if name in ion_table():
            continue
        aq = name.endswith("(aq)")
        bare = name[:-4] if aq else name
        m = re.match(r"^(?P<f>.+?)(?:\^\d+)?[+-]$", bare)
        formula = m["f"] if m and rec.charge != 0 else bare
        out[name] = Ion(formula=formula, charge=rec.charge, molar_mass=formula_mass(formula), size=rec.size,
                        tabulated=True, aq=aq)
    return out


def _exact(s: str) -> Ion | None:
    """A tabulated species by its exact canonical name (no reading of the notation needed)."""
    if s in ion_table():
        return _from_record(ion_table()[s])
    complexes = _complex_ions()
    if s in complexes:
        return complexes[s]
    if f"{s}(aq)" in complexes:
        return complexes[f"{s}(aq)"]
    return None


def _from_record(rec: IonRecord) -> Ion:
    return Ion(formula=rec.formula, charge=rec.charge, molar_mass=formula_mass(rec.formula), size=rec.size,
               tj_a=rec.tj_a, tj_b=rec.tj_b, volume=rec.volume, tabulated=True, masson=rec.masson)


def _lookup(formula: str, charge: int) -> IonRecord | None:
    formula = _alias_map().get((formula, charge), formula)
    return ion_table().get(canonical_name(formula, charge))


def _candidates(text: str) -> list[tuple[str, int]]:
    """Possible (formula, charge) readings of a notation; more than one means ambiguous."""
    for rx in (_RE_CARET, _RE_BRACKET):
        m = rx.match(text)
        if m:
            n = m["n1"] if m["s1"] else m["n2"]
            s = m["s1"] or m["s2"]
            z = int(n) if n else 1
            return [(m["f"], z if s == "+" else -z)]
    m = _RE_SIGN_DIGITS.match(text)
    if m:
        z = int(m["n"])
        return [(m["f"], z if m["s"] == "+" else -z)]
    m = _RE_SIGNS.match(text)
    if m:
        f, signs = m["f"], m["s"]
        z = len(signs) if signs[0] == "+" else -len(signs)
        if abs(z) > 1 or not f[-1].isdigit():
            return [(f, z)]
        # "digit then one sign": the digit is either the charge or a subscript
        digit = int(f[-1])
        base = f[:-1]
        out = [(f, z)]
        if digit > 1 and base:
            out.insert(0, (base, z * digit))
        return out
    if "+" in text or "-" in text:
        raise InputError(f"cannot read the charge in {text!r}; write it as e.g. 'Ca^2+' or 'SO4^2-'")
    return [(text, 0)]


@dataclass(frozen=True, slots=True)
class Ion:
    """An ion (or neutral solute) with its charge, molar mass and tabulated parameters.

    Attributes
    ----------
    formula : str
        The chemical formula without charge, e.g. ``"SO4"``.
    charge : int
        Signed charge number.
    molar_mass : float
        g/mol from the formula (periodictable); the electron mass is neglected.
    size : float or None
        Kielland ion-size parameter å in Å, where tabulated.
    tj_a, tj_b : float or None
        Truesdell–Jones a (Å) and b (kg/mol), where tabulated.
    volume : float or None
        Apparent molar volume at infinite dilution, cm³/mol (V°(H+) = 0), where tabulated.
    masson : float or None
        S of the concentration dependence V = V° + S √I_c (cm³ L^½ mol^-3/2), where fitted;
        see :mod:`ionact.density`.
    tabulated : bool
        Whether the ion is in ``ionact/data/ions.csv``.

    Examples
    --------
    >>> Ion.parse("SO4^2-").name
    'SO4^2-'
    >>> Ion.parse("Ca2+").charge, Ion.parse("NO3-").charge
    (2, -1)
    >>> round(Ion.parse("NH4+").molar_mass, 3)
    18.039
    """

    formula: str
    charge: int
    molar_mass: float
    size: float | None = None
    tj_a: float | None = None
    tj_b: float | None = None
    volume: float | None = None
    tabulated: bool = False
    masson: float | None = None
    aq: bool = False  # a neutral dissolved complex written "CaSO4(aq)" to tell it from the solid or salt

    def __post_init__(self) -> None:
        if isinstance(self.charge, np.integer):
            object.__setattr__(self, "charge", int(self.charge))
        if isinstance(self.charge, bool) or not isinstance(self.charge, int) or abs(self.charge) > _MAX_CHARGE:
            raise InputError(f"ion charge {self.charge!r} must be an integer in -{_MAX_CHARGE}..+{_MAX_CHARGE}")
        if not isinstance(self.formula, str) or not self.formula:
            raise InputError(f"ion formula {self.formula!r} must be non-empty text")
        for attr in ("molar_mass", "size", "volume", "masson"):
            v = getattr(self, attr)
            if v is None:
                continue
            if isinstance(v, bool) or not isinstance(v, int | float | np.floating | np.integer):
                raise InputError(f"ion {attr} {v!r} must be a number")
            object.__setattr__(self, attr, float(v))
        if self.molar_mass is None or not (self.molar_mass > 0 and math.isfinite(self.molar_mass)):
            raise InputError(f"molar mass {self.molar_mass!r} g/mol must be positive and finite")
        if self.size is not None and not (0 < self.size < 20):
            raise InputError(f"ion size {self.size!r} Å is outside (0, 20) Å")

    @property
    def name(self) -> str:
        """Canonical notation: ``"Ca^2+"``, ``"Na+"``, ``"SO4^2-"``, ``"NH3"``, ``"CaSO4(aq)"``."""
        return canonical_name(self.formula, self.charge) + ("(aq)" if self.aq and self.charge == 0 else "")

    def __str__(self) -> str:
        return self.name

    def to_dict(self) -> dict[str, object]:
        """The species as plain data (what a design file stores for species outside the tables)."""
        return {"formula": self.formula, "charge": self.charge, "molar_mass": self.molar_mass, "size": self.size,
                "volume": self.volume, "masson": self.masson, "aq": self.aq}

    @classmethod
    def from_dict(cls, d: Mapping[str, object]) -> Ion:
        """An ion from :meth:`to_dict` output; a tabulated ion comes back with its table values.

        Raises
        ------
        InputError
            A missing or malformed field.
        """
        if not isinstance(d, Mapping):
            raise InputError(f"an ion must be a mapping, got {type(d).__name__}")
        try:
            formula, charge = d["formula"], d["charge"]
        except KeyError as exc:
            raise InputError(f"an ion record lacks {exc}") from None
        if not isinstance(formula, str) or isinstance(charge, bool) or not isinstance(charge, int):
            raise InputError(f"ion record {dict(d)!r} needs a formula (text) and an integer charge")
        name = canonical_name(formula, charge) + ("(aq)" if d.get("aq") and charge == 0 else "")
        known = _exact(name)
        if known is not None:
            return known

        def opt(key: str) -> float | None:
            v = d.get(key)
            if v is None:
                return None
            if isinstance(v, bool) or not isinstance(v, int | float):
                raise InputError(f"ion {name}: {key} {v!r} is not a number")
            return float(v)

        mass = opt("molar_mass")
        return cls(formula=formula, charge=charge, molar_mass=mass if mass is not None else formula_mass(formula),
                   size=opt("size"), volume=opt("volume"), masson=opt("masson"), aq=bool(d.get("aq", False)))

    @property
    def pretty(self) -> str:
        """The name with typographic sub- and superscripts, for reports and figures: ``"SO₄²⁻"``."""
        return typeset(self.name)

    @staticmethod
    def parse(text: str | Ion) -> Ion:
        """Parse an ion notation.

        Parameters
        ----------
        text : str
            ``"Ca^2+"``, ``"Ca2+"``, ``"Ca++"``, ``"Ca+2"``, ``"Ca²⁺"``, ``"SO4^2-"``, ``"SO4-2"``,
            ``"SO4--"``, ``"H2PO4-"``, ``"CH3COO-"``, ``"NH4+"``, a neutral ``"CH3COOH"``,
            or a tabulated alias (``"OAc-"``).

        Returns
        -------
        Ion

        Raises
        ------
        InputError
            The text is not an ion notation, or "digit then sign" stays ambiguous.
        """
        if isinstance(text, Ion):
            return text
        if not isinstance(text, str):
            raise InputError(f"an ion must be given as text, got {text!r}")
        return _parse_ion_cached(text)


@lru_cache(maxsize=4096)
def _parse_ion_cached(text: str) -> Ion:
    s = text.strip().translate(_SUPER).replace(" ", "")
    exact = _exact(s)
    if exact is not None:
        return exact
    s = re.sub(r"\(aq\)$", "", s)
    if not s:
        raise InputError("an ion notation is empty")
    if len(s) > 64:
        raise InputError(f"ion notation too long ({len(s)} characters): {text[:40]!r}…")
    cands = _candidates(s)
    found = [(f, z, _lookup(f, z)) for f, z in cands]
    known = [c for c in found if c[2] is not None]
    if len(cands) > 1:
        if len(known) == 1:
            f, z, rec = known[0]
        elif len(known) > 1:
            opts = " or ".join(repr(canonical_name(f, z)) for f, z in cands)
            raise InputError(f"ion notation {text!r} is ambiguous: {opts}; write the charge as e.g. 'X^2+'")
        else:
            f, z = cands[0]
            if re.fullmatch(r"[A-Z][a-z]?", f):  # monatomic: "Ce3+" means Ce, charge 3
                rec = None
            else:
                opts = " or ".join(repr(canonical_name(f2, z2)) for f2, z2 in cands)
                raise InputError(
                    f"ion notation {text!r} is ambiguous ({opts}) and neither is tabulated; "
                    "write the charge after a sign, e.g. 'X^2-' or 'X-2'"
                )
    else:
        f, z = cands[0]
        rec = found[0][2]
    if abs(z) > _MAX_CHARGE:
        raise InputError(f"charge {z:+d} in {text!r} is outside -{_MAX_CHARGE}..+{_MAX_CHARGE}")
    if rec is not None:
        f = rec.formula
    mass = formula_mass(f)
    if rec is None:
        return Ion(formula=f, charge=z, molar_mass=mass)
    return Ion(
        formula=f,
        charge=z,
        molar_mass=mass,
        size=rec.size,
        tj_a=rec.tj_a,
        tj_b=rec.tj_b,
        volume=rec.volume,
        tabulated=True,
        masson=rec.masson,
    )


_SUB = str.maketrans("0123456789", "₀₁₂₃₄₅₆₇₈₉")
_SUP = str.maketrans("0123456789+-", "⁰¹²³⁴⁵⁶⁷⁸⁹⁺⁻")
_RE_CANONICAL = re.compile(r"^(?P<f>.*?)(?:\^(?P<n>\d+))?(?P<s>[+-])$")


def typeset(name: str) -> str:
    """Typographic form of a canonical species name: ``"SO4^2-"`` → ``"SO₄²⁻"``, ``"Na+"`` → ``"Na⁺"``.

    Digits in the formula become subscripts (a leading stoichiometric count in brackets
    stays as written); the charge becomes a superscript. Neutral names only get subscripts.

    Examples
    --------
    >>> typeset("SO4^2-"), typeset("NH4+"), typeset("CaSO4(aq)")
    ('SO₄²⁻', 'NH₄⁺', 'CaSO₄(aq)')
    """
    m = _RE_CANONICAL.match(name)
    if m is None or not m["f"]:
        return name.translate(_SUB)
    charge = (m["n"] or "") + m["s"]
    return m["f"].translate(_SUB) + charge.translate(_SUP)


def parse_ion(text: str | Ion) -> Ion:
    """Functional alias of :meth:`Ion.parse`."""
    return Ion.parse(text)


_REGISTERED: dict[str, Ion] = {}


def register_ion(ion: Ion) -> Ion:
    """Make a species outside the ion table known by its notation for this session.

    Use it for complexing agents and other components the table lacks, so that salts of
    them (``Salt.parse(..., ions=...)``) and solutions can name them. Models that need
    ion-specific parameters will report them missing unless the :class:`Ion` carries them.

    Parameters
    ----------
    ion : Ion
        The species, with its formula, charge and molar mass (g/mol).

    Returns
    -------
    Ion
        The registered ion (the same object).

    Raises
    ------
    InputError
        Not an Ion, or a notation that the ion table already defines.

    Examples
    --------
    >>> cdta = register_ion(Ion(formula="C14H18N2O8", charge=-4, molar_mass=342.30))
    >>> resolve_ion("C14H18N2O8^4-").charge
    -4
    """
    if not isinstance(ion, Ion):
        raise InputError(f"register_ion needs an ionact Ion, got {type(ion).__name__}")
    if ion.name in ion_table():
        raise InputError(f"{ion.name} is already in the ion table; it cannot be redefined")
    _REGISTERED[ion.name] = ion
    return ion


def resolve_ion(key: str | Ion) -> Ion:
    """An :class:`Ion` for a solution key: tabulated notation, or an explicit ``Ion`` object.

    Raises
    ------
    UnknownSpeciesError
        A string that parses but names no tabulated ion (e.g. a typo such as "Na++");
        define such species explicitly with ``Ion(formula=..., charge=..., molar_mass=...)``.
    """
    if isinstance(key, Ion):
        return key
    if isinstance(key, str) and key.strip() in _REGISTERED:
        return _REGISTERED[key.strip()]
    ion = Ion.parse(key)
    if ion.name in _REGISTERED:
        return _REGISTERED[ion.name]
    if not ion.tabulated:
        raise UnknownSpeciesError(
            f"unknown ion {key!r} (read as {ion.name}): not in the ion table; "
            f"pass ionact.Ion(formula={ion.formula!r}, charge={ion.charge}, molar_mass=...) or register it "
            "with ionact.register_ion"
        )
    return ion


_WATER_MASS = 18.01528
_RE_HYDRATE = re.compile(r"^(?P<base>.+?)\s*[·•.*]\s*(?P<n>\d+(?:\.\d+)?)?\s*H2O$")


def _part(formula: str, n: int) -> str:
    if n == 1:
        return formula
    poly = not re.fullmatch(r"[A-Z][a-z]?", formula)
    return f"({formula}){n}" if poly else f"{formula}{n}"


@lru_cache(maxsize=1)
def _salt_map() -> dict[str, tuple[tuple[str, int], ...] | None]:
    """Every cation–anion pair of the ion table written as a neutral formula."""
    table = ion_table()
    cations = [r for r in table.values() if r.charge > 0 and r.formula != "H"]
    anions = [r for r in table.values() if r.charge < 0]
    out: dict[str, tuple[tuple[str, int], ...] | None] = {}

    def add(key: str, ions: tuple[tuple[str, int], ...]) -> None:
        if key in out and out[key] != ions:
            out[key] = None  # two readings: refuse rather than guess
        else:
            out[key] = ions

    for c in cations:
        for a in anions:
            g = math.gcd(c.charge, -a.charge)
            nc, na = -a.charge // g, c.charge // g
            ions = ((c.name, nc), (a.name, na))
            for af in (a.formula, *a.aliases):
                add(_part(c.formula, nc) + _part(af, na), ions)
                if nc == 1:  # organic-anion-first style: CH3COONa, HCOOK
                    add(_part(af, na) + c.formula, ions)
    for rec in salt_table().values():
        out[rec.formula] = rec.ions
    return out


@lru_cache(maxsize=1)
def _record_by_ions() -> dict[tuple[tuple[str, int], ...], SaltRecord]:
    return {tuple(sorted(r.ions)): r for r in salt_table().values()}


@dataclass(frozen=True, slots=True)
class Salt:
    """A salt: its ions per formula unit, hydrate water and molar mass.

    Attributes
    ----------
    formula : str
        The anhydrous formula as parsed, e.g. ``"CH3COONa"``.
    ions : tuple of (str, int)
        Canonical ion names and their counts per formula unit.
    water : float
        Molecules of hydrate water per formula unit (counted in the mass, not in the ions).
    molar_mass : float
        g/mol including hydrate water.
    anhydrous_molar_mass : float
        g/mol without hydrate water.

    Examples
    --------
    >>> s = Salt.parse("CH3COONa·3H2O")
    >>> s.ions, s.water, round(s.molar_mass, 2)
    ((('Na+', 1), ('CH3COO-', 1)), 3.0, 136.08)
    >>> Salt.parse("CaCl2").ionic_strength_factor
    3.0
    """

    formula: str
    ions: tuple[tuple[str, int], ...]
    water: float
    molar_mass: float
    anhydrous_molar_mass: float
    hazards: tuple[str, ...] = ()
    solubility_table: tuple[tuple[float, float], ...] = ()
    source: tuple[str, ...] = ()

    @property
    def text(self) -> str:
        """The formula with its hydrate water, e.g. ``"CH3COONa·3H2O"``."""
        if not self.water:
            return self.formula
        n = int(self.water) if float(self.water).is_integer() else self.water
        return f"{self.formula}·{n if n != 1 else ''}H2O"

    def __str__(self) -> str:
        return self.text

    @property
    def ionic_strength_factor(self) -> float:
        """Ionic strength per mole of salt: ½ Σ ν_i z_i² (1 for 1:1, 3 for 2:1, 4 for 2:2)."""
        return 0.5 * sum(n * resolve_ion(i).charge ** 2 for i, n in self.ions)

    def solubility(self, temperature: float = 25.0) -> float | None:
        """Solubility in g of anhydrous salt per 100 g water, interpolated in temperature.

        Returns None when the salt has no tabulated solubility. Outside the tabulated
        temperatures the nearest tabulated value is used and a ValidityRangeWarning is
        issued.
        """
        if not self.solubility_table:
            return None
        ts, ss = zip(*self.solubility_table, strict=True)
        if temperature < ts[0] or temperature > ts[-1]:
            from .errors import warn_range

            warn_range(
                f"solubility of {self.formula}: temperature {temperature:g} °C is outside the "
                f"tabulated {ts[0]:g}–{ts[-1]:g} °C; nearest value used",
            )
        import numpy as np

        return float(np.interp(temperature, ts, ss))

    def saturation_molality(self, temperature: float = 25.0) -> float | None:
        """Saturation molality (mol/kg water) from :meth:`solubility`, or None."""
        s = self.solubility(temperature)
        return None if s is None else s * 10.0 / self.anhydrous_molar_mass

    @staticmethod
    def parse(text: str | Salt, ions: dict[str, float] | None = None) -> Salt:
        """Parse a salt formula, optionally with an explicit ion mapping.

        Parameters
        ----------
        text : str
            ``"NaCl"``, ``"(NH4)2SO4"``, ``"CH3COONa·3H2O"`` (also ``"."`` or ``"*"`` before
            the water), or any name when ``ions`` is given.
        ions : dict, optional
            Ion notation -> count per formula unit, e.g. ``{"Na+": 3, "C6H5O7^3-": 1}``.

        Raises
        ------
        UnknownSpeciesError
            The formula is not a known cation–anion combination.
        InputError
            The explicit ions do not balance, or counts are not positive.
        """
        if isinstance(text, Salt):
            return text
        if not isinstance(text, str):
            raise InputError(f"a salt must be given as text, got {text!r}")
        key = tuple(sorted(ions.items())) if ions else None
        return _parse_salt_cached(text, key)


@lru_cache(maxsize=2048)
def _parse_salt_cached(text: str, ions_key: tuple | None) -> Salt:
    s = text.strip().replace(" ", "")
    if not s:
        raise InputError("a salt formula is empty")
    if len(s) > 80:
        raise InputError(f"salt formula too long ({len(s)} characters): {text[:40]!r}…")
    water = 0.0
    m = _RE_HYDRATE.match(s)
    if m:
        s = m["base"]
        water = float(m["n"]) if m["n"] else 1.0
        if water <= 0 or water > 24:
            raise InputError(f"hydrate water {water:g} in {text!r} is outside 1–24")
    if ions_key is not None:
        parsed: list[tuple[str, int]] = []
        for name, n in ions_key:
            try:
                count = float(n)
            except (TypeError, ValueError):
                raise InputError(f"count of {name!r} in salt {text!r} is not a number: {n!r}") from None
            if not (count > 0 and math.isfinite(count) and float(count).is_integer()):
                raise InputError(f"count of {name!r} in salt {text!r} must be a positive integer, got {n!r}")
            parsed.append((resolve_ion(name).name, int(count)))
        comp = tuple(parsed)
    else:
        found = _salt_map().get(s)
        if found is None:
            if s in _salt_map():
                raise InputError(f"salt formula {text!r} has more than one reading; pass ions=")
            raise UnknownSpeciesError(
                f"unknown salt {text!r}: not a combination of tabulated ions; "
                "pass ions={'Na+': 1, 'X-': 1} to define it"
            )
        comp = found
    charge = sum(resolve_ion(i).charge * n for i, n in comp)
    if charge != 0:
        raise InputError(f"salt {text!r} is not electroneutral: its ions carry net charge {charge:+d}")
    if any(resolve_ion(i).charge == 0 for i, _ in comp):
        raise InputError(f"salt {text!r}: a neutral species cannot be one of a salt's ions")
    anhydrous = sum(resolve_ion(i).molar_mass * n for i, n in comp)
    rec = _record_by_ions().get(tuple(sorted(comp))) if ions_key is None else None
    return Salt(
        formula=s,
        ions=comp,
        water=water,
        molar_mass=anhydrous + water * _WATER_MASS,
        anhydrous_molar_mass=anhydrous,
        hazards=rec.hazards if rec else (),
        solubility_table=rec.solubility if rec else (),
        source=rec.source if rec else (),
    )


def parse_salt(text: str | Salt, ions: dict[str, float] | None = None) -> Salt:
    """Functional alias of :meth:`Salt.parse`."""
    return Salt.parse(text, ions=ions)
