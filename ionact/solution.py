"""Solutions: an immutable, batch-shaped composition in mol/kg plus temperature.

One :class:`Solution` holds a single sample or a batch of any shape (100 000 samples as
arrays is the intended scale): every amount is an array of the batch shape, and every
derived quantity (ionic strength, charge balance, density) comes back in that shape.

Molarity ↔ molality uses a solution-density model: ρ ≈ ρ_w + Σ c_j (M_j − ρ_w V°_j)/1000,
with V°_j the ion's apparent molar volume at infinite dilution (``ions.csv``). Writing
w = ρ − Σ c_j M_j / 1000 for the kilograms of water per litre of solution, this model
gives w = ρ_w (1 − Σ c_j V°_j / 1000), so both directions are closed-form. A caller's own
density (kg/L) replaces the model, and ``density="water"`` takes w = ρ_w (dilute
solutions, ions without a tabulated volume).
"""

from __future__ import annotations

from collections.abc import Mapping
from functools import cached_property
from typing import Any

import numpy as np

from . import water
from ._pandas import frame_amounts, is_frame
from .density import check_density, solution_density, water_per_litre
from .errors import InputError
from .species import Ion, Salt, resolve_ion
from .units import MOLAL, Amount, parse_amount

__all__ = ["Solution"]

DEFAULT_CHARGE_TOLERANCE = 1e-6  # relative: |Σ z m| / (½ Σ |z| m)
# mol/kg: beyond every model's range and any real solubility (saturated LiCl or CaCl2 stay below)
MAX_SOLUTION_IONIC_STRENGTH = 40.0


def _readonly(a: np.ndarray) -> np.ndarray:
    a = np.array(a, dtype=float, copy=True)
    a.setflags(write=False)
    return a


class Solution:
    """An aqueous solution (or a batch of them): molalities of ions plus temperature.

    Parameters
    ----------
    amounts : mapping of str (or Ion) to amount, or a pandas DataFrame
        Ion notation -> amount; notations must name tabulated ions, other species are
        passed as explicit :class:`~ionact.species.Ion` objects. Bare numbers (or arrays) are mol/kg unless
        ``basis="molar"``; strings and pint quantities mean what they say
        ("0.1 mol/L", "35 mg/L", "10 mg/L as N"). Arrays give a batch. A DataFrame gives a
        batch of its rows: columns named by ion, the unit in brackets ("Ca^2+ [mg/L]") or in
        ``units=``; its index is kept (:attr:`index`).
    temperature : float or array_like
        °C (0–100), broadcast against the amounts.
    balance : str, optional
        An ion whose amount is adjusted to make the solution electroneutral. Without it,
        an imbalance beyond ``charge_tolerance`` is an error.
    charge_tolerance : float
        Largest allowed relative imbalance ``|Σ z m| / (½ Σ |z| m)``; default 1e-6.
    density : None, "water", float or array_like
        How molar amounts become molal: None uses the apparent-molar-volume model,
        "water" takes 1 L of solution to hold ρ_w kg of water, a number is the
        solution's density in kg/L.
    basis : {"molal", "molar"}
        The unit of bare numbers.
    units : mapping, optional
        With a DataFrame: column -> unit, for columns without "[unit]".

    Raises
    ------
    InputError
        Negative, NaN or infinite amounts, duplicate ions, a charge imbalance, an
        impossible balancing request.
    UnknownSpeciesError, UnitError
        From the ion and unit parsers.

    Examples
    --------
    >>> s = Solution({"Na+": 0.1, "Cl-": 0.1})
    >>> s.ionic_strength
    0.1
    >>> Solution.from_salts({"CaCl2": "2 mmol/kg"}).ionic_strength
    0.006
    """

    __slots__ = ("_names", "_z", "_m", "_t", "_density", "_balanced", "__dict__")

    def __init__(
        self,
        amounts: Mapping[str, object] | None = None,
        temperature=25.0,
        *,
        balance: str | None = None,
        charge_tolerance: float = DEFAULT_CHARGE_TOLERANCE,
        density=None,
        basis: str = MOLAL,
        units: Mapping[str, str] | None = None,
    ) -> None:
        if amounts is None:
            amounts = {}
        index = None
        if is_frame(amounts):  # columns named by ion, units in brackets or in units=
            amounts, index = frame_amounts(
                amounts, units, lambda n, u: parse_amount(f"1 {u}", resolve_ion(n), default_basis=basis),
                lambda n, v: Amount(v, basis))
        elif units is not None:
            raise InputError("units= goes with a DataFrame; give unit strings for a mapping of amounts")
        if not isinstance(amounts, Mapping):
            raise InputError(f"amounts must be a mapping of ion -> amount, got {type(amounts).__name__}")
        parts: list[tuple[Ion, Amount]] = []
        for key, value in amounts.items():
            ion = resolve_ion(key)
            amt = value if isinstance(value, Amount) else parse_amount(value, ion, default_basis=basis)
            parts.append((ion, amt))
        self._build(parts, temperature, balance, charge_tolerance, density, check_duplicates=True)
        self._index = index

    @property
    def index(self) -> Any:
        """The DataFrame index the solution was built from (None otherwise); results'
        ``to_pandas()`` put their rows on it."""
        return getattr(self, "_index", None)

    # -- construction ---------------------------------------------------------------
    def _build(self, parts, temperature, balance, charge_tolerance, density, check_duplicates):
        if check_duplicates:
            seen: dict[str, int] = {}
            for ion, _ in parts:
                if ion.name in seen:
                    raise InputError(f"ion {ion.name} is given twice (as different notations)")
                seen[ion.name] = 1
        if not (isinstance(charge_tolerance, int | float) and 0 <= charge_tolerance < 1):
            raise InputError(f"charge_tolerance {charge_tolerance!r} must be in [0, 1)")
        t = _solution_temperature(temperature)
        shapes = [np.shape(a.value) for _, a in parts] + [t.shape]
        dens = check_density(density)
        if dens is not None and not isinstance(dens, str):
            dens = np.asarray(dens, dtype=float)
            shapes.append(dens.shape)
        try:
            shape = np.broadcast_shapes(*shapes)
        except ValueError:
            raise InputError(f"amounts and temperature have shapes {shapes} that do not broadcast") from None

        names: list[str] = []
        ions: dict[str, Ion] = {}
        for ion, _ in parts:
            if ion.name not in ions:
                ions[ion.name] = ion
                names.append(ion.name)
        idx = {n: i for i, n in enumerate(names)}
        molal = np.zeros((len(names), *shape))
        molar = np.zeros((len(names), *shape))
        for ion, amt in parts:
            target = molal if amt.basis == MOLAL else molar
            target[idx[ion.name]] += np.broadcast_to(amt.value, shape)
        z = np.array([ions[n].charge for n in names], dtype=float)
        masses = np.array([ions[n].molar_mass for n in names])

        if np.any(molar):
            w = self._water_per_litre_mixed(names, ions, molal, molar, t, dens)
            m = molal + molar / w
        else:
            m = molal
        self._names = tuple(names)
        self._ions = ions
        self._z = z
        self._masses = masses
        self._t = _readonly(np.broadcast_to(t, shape))
        self._density = dens if dens is None or isinstance(dens, str) else _readonly(np.broadcast_to(dens, shape))
        self._balanced = None
        self._m = m
        if balance is not None:
            self._apply_balance(balance)
        else:
            self._check_balance(charge_tolerance)
        self._m = _readonly(self._m)
        self._check_real()

    @staticmethod
    def _water_per_litre_mixed(names, ions, molal, molar, t, dens) -> np.ndarray:
        return water_per_litre([ions[n] for n in names], t, molal=molal, molar=molar, density=dens)

    def _check_real(self) -> None:
        """An ionic strength beyond any real solution is an input error (bare numbers are mol/kg)."""
        if not self._names:
            return
        ionic = 0.5 * np.tensordot(self._z**2, self._m, axes=(0, 0))
        if np.any(ionic > MAX_SOLUTION_IONIC_STRENGTH):
            bad = float(np.max(ionic))
            raise InputError(f"ionic strength {bad:.4g} mol/kg is beyond any real solution (above "
                             f"{MAX_SOLUTION_IONIC_STRENGTH:g}); bare numbers are mol/kg — for mg/L write e.g. "
                             "'150 mg/L'")

    def _imbalance(self) -> tuple[np.ndarray, np.ndarray]:
        cb = np.tensordot(self._z, self._m, axes=(0, 0)) if self._names else np.zeros(self.shape)
        eq = 0.5 * np.tensordot(np.abs(self._z), self._m, axes=(0, 0)) if self._names else np.zeros(self.shape)
        return np.asarray(cb), np.asarray(eq)

    def _check_balance(self, tol: float) -> None:
        cb, eq = self._imbalance()
        rel = np.abs(cb) / np.where(eq > 0, eq, 1.0)
        bad = (rel > tol) & (np.abs(cb) > 1e-15)
        if np.any(bad):
            pos = tuple(int(i) for i in np.argwhere(bad)[0]) if bad.ndim else ()
            where = f" at row {pos if len(pos) != 1 else pos[0]}" if pos else ""
            c = float(cb[pos]) if pos else float(cb)
            r = float(rel[pos]) if pos else float(rel)
            raise InputError(
                f"charge imbalance{where}: Σ z·m = {c * 1e3:+.4g} meq/kg ({r * 100:.3g} % of the "
                f"ionic equivalents), above the tolerance {tol * 100:.3g} %; fix the input, raise "
                "charge_tolerance, or name a balancing ion with balance='Cl-'"
            )

    def _apply_balance(self, balance: str) -> None:
        ion = Ion.parse(balance)
        if ion.charge == 0:
            raise InputError(f"balancing ion {ion.name} is neutral; name a charged ion")
        if ion.name not in self._names:
            self._names = (*self._names, ion.name)
            self._ions[ion.name] = ion
            self._z = np.append(self._z, ion.charge)
            self._masses = np.append(self._masses, ion.molar_mass)
            self._m = np.concatenate([self._m, np.zeros((1, *self.shape))])
        k = self._names.index(ion.name)
        cb, _ = self._imbalance()
        add = -cb / ion.charge
        new = self._m[k] + add
        if np.any(new < -1e-15):
            where = ""
            if np.ndim(new):
                where = f" at row {tuple(int(x) for x in np.argwhere(new < -1e-15)[0])}"
            raise InputError(
                f"balancing with {ion.name} would need a negative amount{where}: the excess charge has "
                f"the sign of {ion.name}; name an ion of the opposite charge"
            )
        m = np.array(self._m)
        m[k] = np.maximum(new, 0.0)
        self._m = m
        self._balanced = (ion.name, _readonly(add))

    @classmethod
    def from_arrays(cls, ions, molalities, temperature=25.0, *, density=None) -> Solution:
        """A solution (or batch) from species and a molality array, without unit parsing.

        Parameters
        ----------
        ions : sequence of str or Ion
            The species, in the order of the first axis of ``molalities``.
        molalities : array_like
            mol/kg, shape ``(n_ions, *batch_shape)``; finite and ≥ 0.
        temperature : float or array_like
            °C, broadcast to the batch shape.
        density : None, "water" or float
            As for :class:`Solution`.

        Raises
        ------
        InputError
            Shapes that do not match, negative or non-finite molalities, duplicate species.

        Examples
        --------
        >>> Solution.from_arrays(["Na+", "Cl-"], [[0.1, 0.2], [0.1, 0.2]]).ionic_strength
        array([0.1, 0.2])
        """
        objs = [resolve_ion(i) for i in ions]
        names = [o.name for o in objs]
        if len(set(names)) != len(names):
            raise InputError(f"species {names} are not all different")
        m = np.asarray(molalities, dtype=float)
        if m.ndim == 0 or m.shape[0] != len(objs):
            raise InputError(f"molalities of shape {m.shape} do not match {len(objs)} species")
        if not np.all(np.isfinite(m)) or np.any(m < 0):
            raise InputError("molalities must be finite and ≥ 0 mol/kg")
        t = _solution_temperature(temperature)
        try:
            shape = np.broadcast_shapes(m.shape[1:], t.shape)
        except ValueError:
            raise InputError(f"molalities {m.shape} and temperature {t.shape} do not broadcast") from None
        dens = check_density(density)
        if dens is not None and not isinstance(dens, str):
            dens = _readonly(np.broadcast_to(dens, shape))
        obj = cls._from_arrays(names, {o.name: o for o in objs}, np.broadcast_to(m, (len(objs), *shape)),
                               np.broadcast_to(t, shape), dens)
        obj._check_real()
        return obj

    @classmethod
    def from_parts(cls, parts, temperature=25.0, *, balance: str | None = None,
                   charge_tolerance: float = DEFAULT_CHARGE_TOLERANCE, density=None) -> Solution:
        """A solution from (Ion, Amount) parts, mixing molal and molar amounts through the density model.

        The same ion may appear in several parts; its amounts add.
        """
        obj = cls.__new__(cls)
        obj._build(list(parts), temperature, balance, charge_tolerance, density, check_duplicates=False)
        return obj

    @classmethod
    def _from_arrays(cls, names, ions, m, t, density) -> Solution:
        obj = cls.__new__(cls)
        obj._names = tuple(names)
        obj._ions = dict(ions)
        obj._z = np.array([ions[n].charge for n in names], dtype=float)
        obj._masses = np.array([ions[n].molar_mass for n in names])
        obj._m = _readonly(m)
        obj._t = _readonly(t)
        obj._density = density
        obj._balanced = None
        return obj

    @classmethod
    def from_salts(
        cls,
        salts: Mapping[str, object],
        temperature=25.0,
        *,
        extra: Mapping[str, object] | None = None,
        basis: str = MOLAL,
        density=None,
        balance: str | None = None,
        charge_tolerance: float = DEFAULT_CHARGE_TOLERANCE,
        units: Mapping[str, str] | None = None,
    ) -> Solution:
        """Build a solution from salt amounts (each salt dissociated into its ions).

        Parameters
        ----------
        salts : mapping of str to amount
            Salt formula -> amount of salt (mol/kg for bare numbers unless
            ``basis="molar"``; unit strings as in :func:`ionact.units.parse_amount`, mass
            units using the salt's molar mass including hydrate water).
        extra : mapping, optional
            Further ions (or neutral solutes) by ion notation.
        units : mapping, optional
            With a DataFrame of salts: column -> unit, for columns without "[unit]".

        Examples
        --------
        >>> s = Solution.from_salts({"NaCl": 0.1, "CaCl2": "2 mmol/kg"})
        >>> round(s.ionic_strength, 6)
        0.106
        """
        index = None
        if is_frame(salts):  # columns named by salt, units in brackets or in units=
            salts, index = frame_amounts(salts, units, lambda n, u: _salt_amount(Salt.parse(n), f"1 {u}", basis),
                                         lambda n, v: Amount(v, basis))
        elif units is not None:
            raise InputError("units= goes with a DataFrame; give unit strings for a mapping of amounts")
        if not isinstance(salts, Mapping):
            raise InputError(f"salts must be a mapping of salt -> amount, got {type(salts).__name__}")
        parts: list[tuple[Ion, Amount]] = []
        for key, value in salts.items():
            salt = Salt.parse(key)
            amt = _salt_amount(salt, value, basis)
            for ion_name, nu in salt.ions:
                parts.append((Ion.parse(ion_name), Amount(np.asarray(amt.value) * nu, amt.basis)))
        for key, value in (extra or {}).items():
            ion = resolve_ion(key)
            parts.append((ion, parse_amount(value, ion, default_basis=basis)))
        out = cls.from_parts(parts, temperature, balance=balance, charge_tolerance=charge_tolerance, density=density)
        out._index = index
        return out

    @classmethod
    def from_ionic_strength(cls, ionic_strength, salt: str = "NaCl", temperature=25.0) -> Solution:
        """A solution of one background salt with the given molal ionic strength.

        Examples
        --------
        >>> Solution.from_ionic_strength(0.03, "CaCl2").molalities["Ca^2+"]
        0.01
        """
        s = Salt.parse(salt)
        i = np.asarray(ionic_strength, dtype=float)
        if not np.all(np.isfinite(i)) or np.any(i < 0):
            raise InputError(f"ionic strength {ionic_strength!r} must be finite and ≥ 0 mol/kg")
        return cls.from_salts({s.text: i / s.ionic_strength_factor}, temperature)

    # -- basic views ------------------------------------------------------------------
    @property
    def ions(self) -> tuple[str, ...]:
        """Canonical names of the species present, in order."""
        return self._names

    def ion(self, name: str) -> Ion:
        """The :class:`Ion` record of a species in this solution (its exact name, or any notation of it)."""
        if isinstance(name, str) and name in self._ions:
            return self._ions[name]
        key = Ion.parse(name).name
        if key not in self._ions:
            raise InputError(f"{key} is not in this solution (has {', '.join(self._names) or 'nothing'})")
        return self._ions[key]

    @property
    def charges(self) -> np.ndarray:
        """Charge numbers of :attr:`ions`, as a float array."""
        return self._z

    @property
    def shape(self) -> tuple[int, ...]:
        """The batch shape (``()`` for a single solution)."""
        return self._t.shape

    @property
    def size(self) -> int:
        return int(np.prod(self.shape))

    def __len__(self) -> int:
        if not self.shape:
            raise TypeError("a single Solution has no len(); it is not a batch")
        return self.shape[0]

    @property
    def temperature(self):
        """°C, float for a single solution, array for a batch."""
        return _out(self._t)

    @property
    def molality_array(self) -> np.ndarray:
        """Molalities as one read-only array of shape ``(n_ions, *batch_shape)``, mol/kg."""
        return self._m

    @property
    def molalities(self) -> dict[str, float | np.ndarray]:
        """Ion -> molality (mol/kg)."""
        return {n: _out(self._m[i]) for i, n in enumerate(self._names)}

    def molality(self, name: str):
        """Molality of one species (0 if absent), mol/kg."""
        key = name if isinstance(name, str) and name in self._ions else Ion.parse(name).name
        if key not in self._names:
            return _out(np.zeros(self.shape))
        return _out(self._m[self._names.index(key)])

    @property
    def balanced_with(self) -> tuple[str, float | np.ndarray] | None:
        """(ion, mol/kg added) when the solution was balanced with a named ion, else None."""
        if self._balanced is None:
            return None
        return self._balanced[0], _out(self._balanced[1])

    # -- derived quantities -----------------------------------------------------------
    @cached_property
    def _ionic_strength(self) -> np.ndarray:
        if not self._names:
            return np.zeros(self.shape)
        return 0.5 * np.tensordot(self._z**2, self._m, axes=(0, 0))

    @property
    def ionic_strength(self):
        """Molal ionic strength I = ½ Σ m_i z_i², mol/kg."""
        return _out(self._ionic_strength)

    @property
    def molar_ionic_strength(self):
        """Molar ionic strength ½ Σ c_i z_i², mol/L (uses the density model)."""
        return _out(self._ionic_strength * self._water_per_litre)

    @property
    def charge_balance(self):
        """Σ z_i m_i in mol/kg (0 for an electroneutral solution)."""
        return _out(self._imbalance()[0])

    @cached_property
    def _water_per_litre(self) -> np.ndarray:
        ions = [self._ions[n] for n in self._names]
        return water_per_litre(ions, self._t, molal=self._m, density=self._density)

    @property
    def water_per_litre(self):
        """Kilograms of water per litre of solution."""
        return _out(self._water_per_litre)

    @property
    def density(self):
        """Solution density in kg/L (from the model, the given density, or water)."""
        return _out(solution_density([self._ions[n] for n in self._names], self._t, self._m,
                                     self._water_per_litre))

    @property
    def molarities(self) -> dict[str, float | np.ndarray]:
        """Ion -> molarity (mol/L), through the density model."""
        w = self._water_per_litre
        return {n: _out(self._m[i] * w) for i, n in enumerate(self._names)}

    # -- batch handling ---------------------------------------------------------------
    def __getitem__(self, index) -> Solution:
        if not self.shape:
            raise TypeError("a single Solution cannot be indexed; it is not a batch")
        dens = self._density
        if dens is not None and not isinstance(dens, str):
            dens = _readonly(dens[index])
        return Solution._from_arrays(self._names, self._ions, self._m[(slice(None), *np.index_exp[index])],
                                     self._t[index], dens)

    def __iter__(self):
        for i in range(len(self)):
            yield self[i]

    def to_dict(self) -> dict:
        """Plain data: the species (as Ion records), molalities (mol/kg), temperature (°C) and density choice."""
        from ._frozen import plain

        dens = self._density
        return plain({"species": [self._ions[n].to_dict() for n in self._names],
                      "molalities": np.asarray(self._m).tolist(), "temperature": np.asarray(self._t).tolist(),
                      "density": dens if dens is None or isinstance(dens, str) else np.asarray(dens).tolist()})

    @classmethod
    def from_dict(cls, d: Mapping) -> Solution:
        """A solution from :meth:`to_dict` output.

        Raises
        ------
        InputError
            A missing or malformed field.
        """
        if not isinstance(d, Mapping) or not {"species", "molalities", "temperature"} <= set(d):
            raise InputError("a solution must be read from a mapping with species, molalities and temperature")
        species = d["species"]
        if not isinstance(species, list):
            raise InputError("solution species must be a list of ion records")
        ions = [Ion.from_dict(x) for x in species]
        m = np.asarray(d["molalities"], dtype=float) if ions else np.zeros((0, *np.shape(d["temperature"])))
        return cls.from_arrays(ions, m, d["temperature"], density=d.get("density"))

    def __repr__(self) -> str:
        if self.shape:
            return f"Solution(batch of shape {self.shape}, ions={list(self._names)})"
        body = ", ".join(f"{n!r}: {v:.6g}" for n, v in self.molalities.items())
        return f"Solution({{{body}}}, temperature={float(self._t):g})"

    def with_temperature(self, temperature) -> Solution:
        """The same composition at another temperature (°C, or a unit string / Quantity)."""
        t = _solution_temperature(temperature)
        shape = np.broadcast_shapes(self.shape, t.shape)
        m = np.broadcast_to(self._m, (len(self._names), *shape))
        dens = self._density
        if dens is not None and not isinstance(dens, str):
            dens = _readonly(np.broadcast_to(dens, shape))
        return Solution._from_arrays(self._names, self._ions, m, np.broadcast_to(t, shape), dens)

    def added(self, ion: str, molality) -> Solution:
        """A copy with ``molality`` (mol/kg) of ``ion`` added (no balance check)."""
        obj = Ion.parse(ion)
        add = np.asarray(molality, dtype=float)
        if not np.all(np.isfinite(add)) or np.any(add < 0):
            raise InputError(f"amount {molality!r} of {obj.name} must be finite and ≥ 0 mol/kg")
        names = list(self._names)
        ions = dict(self._ions)
        shape = np.broadcast_shapes(self.shape, add.shape)
        m = np.array(np.broadcast_to(self._m, (len(names), *shape)))
        if obj.name not in names:
            names.append(obj.name)
            ions[obj.name] = obj
            m = np.concatenate([m, np.zeros((1, *shape))])
        m[names.index(obj.name)] += add
        dens = self._density
        if dens is not None and not isinstance(dens, str):
            dens = None  # the given density no longer describes the new composition
        return Solution._from_arrays(names, ions, m, np.broadcast_to(self._t, shape), dens)

    # -- mixing -----------------------------------------------------------------------
    def mix(self, other: Solution, volume_ratio) -> Solution:
        """Mix ``volume_ratio`` volumes of ``other`` into one volume of this solution.

        Volumes are taken as additive (the usual approximation for dilute and moderately
        concentrated electrolytes): molarities and densities are volume-weighted means,
        which conserves moles and mass exactly; the result is converted back to molality
        with its own density. The temperature is the volume-weighted mean.

        Parameters
        ----------
        other : Solution
        volume_ratio : float or array_like
            Volume of ``other`` per volume of this solution (≥ 0), e.g. 0.02 for 2 mL of
            adjuster per 100 mL of sample.

        Examples
        --------
        >>> a = Solution({"Na+": 0.1, "Cl-": 0.1})
        >>> b = Solution({"K+": 1.0, "NO3-": 1.0})
        >>> m = a.mix(b, 1.0)
        >>> round(m.molarities["K+"] * 2, 4) == round(b.molarities["K+"], 4)
        True
        """
        if not isinstance(other, Solution):
            raise InputError(f"can only mix with a Solution, got {type(other).__name__}")
        r = np.asarray(volume_ratio, dtype=float)
        if not np.all(np.isfinite(r)) or np.any(r < 0):
            raise InputError(f"volume_ratio {volume_ratio!r} must be finite and ≥ 0")
        names = list(self._names) + [n for n in other._names if n not in self._names]
        ions = {**other._ions, **self._ions}
        shape = np.broadcast_shapes(self.shape, other.shape, r.shape)

        def molar(sol: Solution) -> np.ndarray:
            c = np.zeros((len(names), *shape))
            w = sol._water_per_litre
            for i, n in enumerate(sol._names):
                c[names.index(n)] = sol._m[i] * w
            return c

        ca, cb = molar(self), molar(other)
        rho_a, rho_b = np.asarray(self.density), np.asarray(other.density)
        c = (ca + r * cb) / (1.0 + r)
        rho = (rho_a + r * rho_b) / (1.0 + r)
        t = (self._t + r * other._t) / (1.0 + r)
        masses = np.array([ions[n].molar_mass for n in names])
        w = rho - np.tensordot(masses, c, axes=(0, 0)) / 1000.0
        m = c / w
        return Solution._from_arrays(names, ions, m, np.broadcast_to(t, shape), _readonly(np.broadcast_to(rho, shape)))

    def dilute(self, factor) -> Solution:
        """Dilute with pure water by a volume factor (≥ 1): 2 means one volume made up to two.

        Examples
        --------
        >>> s = Solution({"Na+": 0.1, "Cl-": 0.1}).dilute(10)
        >>> round(s.ionic_strength, 4)
        0.01
        """
        f = np.asarray(factor, dtype=float)
        if not np.all(np.isfinite(f)) or np.any(f < 1):
            raise InputError(f"dilution factor {factor!r} must be finite and ≥ 1")
        pure = Solution({}, temperature=self._t)
        return self.mix(pure, f - 1.0)


def _solution_temperature(temperature: object) -> np.ndarray:
    """°C (numbers, arrays, "25 degC", a pint Quantity), finite and within liquid water's range."""
    t = water.checked_temperature(temperature, "solution temperature")
    if not np.all(np.isfinite(t)):
        raise InputError(f"temperature {temperature!r} is NaN or infinite; allowed: 0–100 °C")
    return t


def _salt_amount(salt: Salt, value: object, basis: str) -> Amount:
    """An amount of a salt: mass units use the salt's molar mass (hydrate water included)."""
    if isinstance(value, Amount):
        return value
    return parse_amount(value, None, default_basis=basis, molar_mass=salt.molar_mass, what=salt.text)


def _out(x):
    x = np.asarray(x)
    return float(x) if x.ndim == 0 else x
