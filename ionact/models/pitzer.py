"""Pitzer's ion-interaction model for mixtures (Harvie, Møller & Weare 1984 form).

For a cation M (anions swap roles):

    ln γ_M = z_M² F + Σ_a m_a (2 B_Ma + Z C_Ma) + Σ_c m_c (2 Φ_Mc + Σ_a m_a ψ_Mca)
             + Σ_{a<a'} m_a m_a' ψ_aa'M + |z_M| Σ_c Σ_a m_c m_a C_ca

    F = −A_φ [√I/(1 + b√I) + (2/b) ln(1 + b√I)] + Σ_c Σ_a m_c m_a B'_ca
        + Σ_{c<c'} m_c m_c' Φ'_cc' + Σ_{a<a'} m_a m_a' Φ'_aa'

with B = β0 + β1 g(α1√I) + β2 g(α2√I), B' = [β1 g'(α1√I) + β2 g'(α2√I)]/I,
C = Cφ/(2√|z_M z_X|), Z = Σ m|z|, b = 1.2, Φ = θ + Eθ(I) and Φ' = Eθ'(I), where the
unsymmetrical mixing terms Eθ (Pitzer 1975) are evaluated for like-sign ions of
different charge with Pitzer's approximation of the J(x) integral.

Everything is vectorised over the batch: the cost is (cation–anion pairs + like-sign
triplets) × samples, with no Python loop over samples.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from ..constants import PARAMETER_WINDOW
from ..errors import MissingParameterError
from ..tables import pitzer_binary_table, pitzer_mixing_table

__all__ = ["PitzerSet", "pitzer_set", "log_gamma", "osmotic", "binary_log_mean", "j_function",
           "pair_ionic_strength_limits", "PITZER_B", "PITZER_MAX_IONIC_STRENGTH"]

PITZER_B = 1.2
PITZER_MAX_IONIC_STRENGTH = 6.0  # mol/kg: for mixtures whose pairs state no limit of their own
# Pitzer (1975) approximation J(x) = x / (4 + C1 x^-C2 exp(-C3 x^C4)) (from memory)
_JC = (4.581, 0.7237, 0.0120, 0.528)


def j_function(x):
    """Pitzer's (1975) approximation of J(x) and its derivative J'(x).

    Parameters
    ----------
    x : array_like
        x = 6 z_i z_j A_φ √I, dimensionless (≥ 0).

    Returns
    -------
    (J, J') : tuple of ndarray
    """
    x = np.asarray(x, dtype=float)
    c1, c2, c3, c4 = _JC
    xs = np.maximum(x, 1e-30)
    lx = np.log(xs)  # the powers by one log and two exps (a power costs more than an exp)
    p2 = np.exp(-c2 * lx)  # x^-C2
    p4 = np.exp(c4 * lx)  # x^C4
    e = np.exp(-c3 * p4)
    ce = c1 * p2 * e
    d = 4.0 + ce
    dd = ce * (-c2 - c3 * c4 * p4) / xs
    j = xs / d
    jp = (d - xs * dd) / d**2
    return j, jp


def _g(x):
    """g(x), g'(x) and exp(−x), with the series near x = 0."""
    xs = np.maximum(x, 1e-12)
    ex = np.exp(-xs)
    inv2 = 1.0 / (xs * xs)
    g = 2.0 * (1.0 - (1.0 + xs) * ex) * inv2
    gp = -2.0 * (1.0 - (1.0 + xs + 0.5 * xs * xs) * ex) * inv2
    small = x < 1e-4
    if np.any(small):
        g = np.where(small, 1.0 - 2.0 * x / 3.0 + x**2 / 4.0, g)
        gp = np.where(small, -2.0 * x / 3.0 + x**2 / 2.0, gp)
    return g, gp, np.exp(-x)


@dataclass(frozen=True)
class PitzerSet:
    """Pitzer parameters gathered for one set of ions (arrays indexed by position)."""

    cations: tuple[str, ...]
    anions: tuple[str, ...]
    zc: np.ndarray
    za: np.ndarray  # absolute values
    beta0: np.ndarray  # (nc, na)
    beta1: np.ndarray
    beta2: np.ndarray
    cphi: np.ndarray
    alpha1: np.ndarray
    alpha2: np.ndarray
    dbeta0: np.ndarray  # per K; NaN where the table has no derivative
    dbeta1: np.ndarray
    dcphi: np.ndarray
    max_molality: np.ndarray
    t_range: np.ndarray  # (nc, na, 2) °C
    theta_c: np.ndarray  # (nc, nc)
    theta_a: np.ndarray  # (na, na)
    psi_cca: np.ndarray  # (nc, nc, na)
    psi_aac: np.ndarray  # (na, na, nc)
    missing_pairs: tuple[str, ...]
    zero_mixing: tuple[str, ...]


@lru_cache(maxsize=256)
def pitzer_set(cations: tuple[str, ...], anions: tuple[str, ...], cation_charges: tuple[int, ...],
               anion_charges: tuple[int, ...], missing: str = "error") -> PitzerSet:
    """Gather the parameters for these ions; a missing binary pair raises unless ``missing="zero"``.

    Missing θ and ψ mixing terms are taken as zero (the usual convention) and listed in
    ``zero_mixing`` so the caller can report them.
    """
    binary = pitzer_binary_table()
    theta, psi = pitzer_mixing_table()
    nc, na = len(cations), len(anions)
    arrs = {k: np.zeros((nc, na)) for k in ("beta0", "beta1", "beta2", "cphi", "alpha1", "alpha2", "maxm")}
    ders = {k: np.full((nc, na), np.nan) for k in ("dbeta0", "dbeta1", "dcphi")}
    t_range = np.empty((nc, na, 2))
    t_range[...] = PARAMETER_WINDOW
    missing_pairs = []
    for i, c in enumerate(cations):
        for j, a in enumerate(anions):
            rec = binary.get((c, a))
            if rec is None:
                missing_pairs.append(f"{c}–{a}")
                arrs["alpha1"][i, j] = 2.0
                arrs["maxm"][i, j] = np.inf
                continue
            for k in ("beta0", "beta1", "beta2", "cphi", "alpha1", "alpha2"):
                arrs[k][i, j] = getattr(rec, k)
            arrs["maxm"][i, j] = rec.max_molality
            t_range[i, j] = rec.t_range
            for k, attr in (("dbeta0", "dbeta0_dT"), ("dbeta1", "dbeta1_dT"), ("dcphi", "dcphi_dT")):
                v = getattr(rec, attr)
                if v is not None:
                    ders[k][i, j] = v
    if missing_pairs and missing != "zero":
        raise MissingParameterError(
            "Pitzer: no binary parameters (β0, β1, Cφ) for "
            + ", ".join(missing_pairs)
            + "; use another model, or allow missing='zero' to take them as zero"
        )
    zero_mixing = []

    def like(ions, zs):
        n = len(ions)
        th = np.zeros((n, n))
        for p in range(n):
            for q in range(p + 1, n):
                v = theta.get(frozenset((ions[p], ions[q])))
                if v is None:
                    zero_mixing.append(f"θ({ions[p]},{ions[q]})")
                    v = 0.0
                th[p, q] = th[q, p] = v
        return th

    def triple(ions, others):
        n, k = len(ions), len(others)
        ps = np.zeros((n, n, k))
        for p in range(n):
            for q in range(p + 1, n):
                for r in range(k):
                    v = psi.get((frozenset((ions[p], ions[q])), others[r]))
                    if v is None:
                        zero_mixing.append(f"ψ({ions[p]},{ions[q]},{others[r]})")
                        v = 0.0
                    ps[p, q, r] = ps[q, p, r] = v
        return ps

    return PitzerSet(
        cations=cations,
        anions=anions,
        zc=np.array(cation_charges, dtype=float),
        za=np.abs(np.array(anion_charges, dtype=float)),
        beta0=arrs["beta0"],
        beta1=arrs["beta1"],
        beta2=arrs["beta2"],
        cphi=arrs["cphi"],
        alpha1=arrs["alpha1"],
        alpha2=arrs["alpha2"],
        dbeta0=ders["dbeta0"],
        dbeta1=ders["dbeta1"],
        dcphi=ders["dcphi"],
        max_molality=arrs["maxm"],
        t_range=t_range,
        theta_c=like(cations, cation_charges),
        theta_a=like(anions, anion_charges),
        psi_cca=triple(cations, anions),
        psi_aac=triple(anions, cations),
        missing_pairs=tuple(missing_pairs),
        zero_mixing=tuple(zero_mixing),
    )


def pair_ionic_strength_limits(p: PitzerSet) -> np.ndarray:
    """Ionic strength (nc, na) at which each pure salt reaches its fitted molality limit.

    A salt M_νM X_νX at molality m has I = m·½(ν_M z_M² + ν_X z_X²); untabulated pairs
    have no limit (inf).
    """
    zc, za = p.zc[:, None], p.za[None, :]
    g = np.gcd(zc.astype(int), za.astype(int))
    nu_c, nu_a = za / g, zc / g
    w = 0.5 * (nu_c * zc**2 + nu_a * za**2)
    return np.asarray(p.max_molality * w)


class _Like:
    """The like-sign mixing terms Eθ(I), Eθ'(I) of one set of ions (cations or anions), kept
    per distinct pair of charges: J(x) is evaluated once per distinct charge product (the
    cache ``j`` is shared between cations and anions), and the sums over ion pairs are
    (n, n) indicator matrices times the molalities."""

    def __init__(self, z: np.ndarray, aphi: np.ndarray, sq: np.ndarray, i_s: np.ndarray, on: bool,
                 j: dict[float, tuple[np.ndarray, np.ndarray, np.ndarray]]) -> None:
        self.pairs: list[tuple[np.ndarray, np.ndarray, np.ndarray]] = []  # (indicator, Eθ, Eθ')
        charges = sorted({float(v) for v in z})
        if not on or len(charges) < 2:
            return

        def jx(zz: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
            if zz not in j:
                x = 6.0 * zz * aphi * sq
                j[zz] = (x, *j_function(x))
            return j[zz]

        for a in range(len(charges)):
            for b in range(a + 1, len(charges)):
                zp, zq = charges[a], charges[b]
                zz = zp * zq
                (xpq, jpq, jppq), (xpp, jpp, jppp), (xqq, jqq, jpqq) = jx(zz), jx(zp * zp), jx(zq * zq)
                e = zz / (4.0 * i_s) * (jpq - 0.5 * jpp - 0.5 * jqq)
                ep = -e / i_s + zz / (8.0 * i_s**2) * (xpq * jppq - 0.5 * xpp * jppp - 0.5 * xqq * jpqq)
                ind = ((z[:, None] == zp) & (z[None, :] == zq)) | ((z[:, None] == zq) & (z[None, :] == zp))
                self.pairs.append((ind.astype(float), e, ep))

    def row_sums(self, m: np.ndarray) -> np.ndarray:
        """Σ_j Eθ_ij m_j for every ion i, (n, N)."""
        out = np.zeros_like(m)
        for ind, e, _ in self.pairs:
            out += e * (ind @ m)
        return out

    def quadratic(self, m: np.ndarray, which: int) -> np.ndarray:
        """Σ_ij m_i m_j Eθ_ij (which=1) or Eθ'_ij (which=2), (N,)."""
        out = np.zeros(m.shape[1])
        for term in self.pairs:
            out += term[which] * np.einsum("iN,iN->N", m, term[0] @ m)
        return out


class _Pairs:
    """The cation–anion sums of the B and C terms, as matrix products over (nc, na) parameter
    matrices: β1 and β2 are split by their α, so g(α√I) is one (N,) array per distinct α and
    no (nc, na, N) array is formed. Temperature enters through the tabulated first
    derivatives, linearly from 25 °C, as a second matrix times (t − 25)."""

    def __init__(self, p: PitzerSet, mc: np.ndarray, ma: np.ndarray, t: np.ndarray, sq: np.ndarray,
                 i_s: np.ndarray, phi: bool = False) -> None:
        dt = t - 25.0
        n = mc.shape[1]
        bc_sum: np.ndarray | None = None  # Σ_a m_a B_ca, built from the first term (no array of zeros)
        ba_sum: np.ndarray | None = None  # Σ_c m_c B_ca
        self.bp = np.zeros(n)  # Σ_ca m_c m_a B'_ca
        self.bphi = np.zeros(n)  # Σ_ca m_c m_a Bφ_ca
        varies = bool(np.any(dt != 0))
        for base, der, alpha in ((p.beta0, p.dbeta0, None), (p.beta1, p.dbeta1, p.alpha1), (p.beta2, None, p.alpha2)):
            for mat, dmat, a in _by_alpha(base, der if varies else None, alpha):
                if alpha is None:
                    g = gp = ex = None
                else:
                    g, gp, ex = _g(a * sq)
                bc, ba, pair = _sums(mat, dmat, dt, mc, ma, need_pair=phi or gp is not None)
                if not phi:
                    if g is not None:  # bc and ba are this call's own arrays
                        bc *= g
                        ba *= g
                    bc_sum = bc if bc_sum is None else np.add(bc_sum, bc, out=bc_sum)
                    ba_sum = ba if ba_sum is None else np.add(ba_sum, ba, out=ba_sum)
                else:
                    self.bphi += pair if ex is None else ex * pair
                if gp is not None:
                    self.bp += gp / i_s * pair
        self.bc = np.zeros_like(mc) if bc_sum is None else bc_sum
        self.ba = np.zeros_like(ma) if ba_sum is None else ba_sum
        scale = 1.0 / (2.0 * np.sqrt(p.zc[:, None] * p.za[None, :]))
        dc = p.dcphi if varies and np.any(np.isfinite(p.dcphi)) else None
        self.cc, self.ca, self.cs = _sums(p.cphi * scale, None if dc is None else np.where(np.isfinite(dc), dc, 0.0)
                                          * scale, dt, mc, ma)


def _by_alpha(base: np.ndarray, der: np.ndarray | None, alpha: np.ndarray | None
              ) -> list[tuple[np.ndarray, np.ndarray | None, float]]:
    """The parameter matrix split into one matrix per distinct α (zero elsewhere), each with
    its temperature-derivative matrix (None when no pair has one)."""
    d = None if der is None or not np.any(np.isfinite(der)) else np.where(np.isfinite(der), der, 0.0)
    if not np.any(base) and d is None:
        return []
    if alpha is None:
        return [(base, d, 0.0)]
    out = []
    for a in np.unique(alpha[(base != 0) | (d != 0 if d is not None else False)]):
        sel = alpha == a
        out.append((np.where(sel, base, 0.0), None if d is None else np.where(sel, d, 0.0), float(a)))
    return out


def _sums(mat: np.ndarray, dmat: np.ndarray | None, dt: np.ndarray, mc: np.ndarray, ma: np.ndarray,
          need_pair: bool = True) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Σ_a X_ca m_a (nc, N), Σ_c X_ca m_c (na, N) and Σ_ca m_c m_a X_ca (N,) for X = mat + dmat·dt
    (the last as zeros when not ``need_pair``)."""
    bc = mat @ ma
    ba = mat.T @ mc
    if dmat is not None:
        bc += dt * (dmat @ ma)
        ba += dt * (dmat.T @ mc)
    return bc, ba, np.einsum("cN,cN->N", mc, bc) if need_pair else np.zeros(0)


def _psi(psi: np.ndarray, m_like: np.ndarray, m_other: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The ψ sums for ψ (n, n, k) over like-sign ions i, j and opposite ions a:
    Σ_ja ψ_ija m_j m_a (n, N) and Σ_ij ψ_ija m_i m_j (k, N).
    One (n, n) product per opposite ion that has a nonzero ψ."""
    n, k = psi.shape[0], psi.shape[2]
    like = np.zeros((n, m_like.shape[1]))
    other = np.zeros((k, m_like.shape[1]))
    for a in range(k):
        if not np.any(psi[:, :, a]):
            continue
        pm = psi[:, :, a] @ m_like
        like += pm * m_other[a]
        other[a] = np.einsum("iN,iN->N", m_like, pm)
    return like, other


def log_gamma(p: PitzerSet, mc, ma, t, aphi, unsymmetrical=True):
    """Natural-log activity coefficients of the cations (nc, N) and anions (na, N)."""
    ionic = 0.5 * (p.zc**2 @ mc + p.za**2 @ ma)
    sq = np.sqrt(ionic)
    i_s = np.maximum(ionic, 1e-30)
    b = PITZER_B
    k = _Pairs(p, mc, ma, t, sq, i_s)
    j: dict[float, tuple[np.ndarray, np.ndarray, np.ndarray]] = {}
    lc, la = _Like(p.zc, aphi, sq, i_s, unsymmetrical, j), _Like(p.za, aphi, sq, i_s, unsymmetrical, j)
    f = (-aphi * (sq / (1.0 + b * sq) + (2.0 / b) * np.log1p(b * sq)) + k.bp
         + 0.5 * lc.quadratic(mc, 2) + 0.5 * la.quadratic(ma, 2))
    z = p.zc @ mc + p.za @ ma
    psi_c, psi_ac = _psi(p.psi_cca, mc, ma)  # Σ_da ψ_cda m_d m_a; Σ_cd ψ_cda m_c m_d per anion
    psi_a, psi_ca = _psi(p.psi_aac, ma, mc)
    ln_c = (p.zc[:, None] ** 2 * f + 2.0 * k.bc + z * k.cc + 2.0 * (p.theta_c @ mc + lc.row_sums(mc))
            + psi_c + 0.5 * psi_ca + p.zc[:, None] * k.cs)
    ln_a = (p.za[:, None] ** 2 * f + 2.0 * k.ba + z * k.ca + 2.0 * (p.theta_a @ ma + la.row_sums(ma))
            + psi_a + 0.5 * psi_ac + p.za[:, None] * k.cs)
    return ln_c, ln_a


def osmotic(p: PitzerSet, mc, ma, m_neutral_total, t, aphi, unsymmetrical=True):
    """Osmotic coefficient φ (N,) of the mixture."""
    ionic = 0.5 * (p.zc**2 @ mc + p.za**2 @ ma)
    sq = np.sqrt(ionic)
    i_s = np.maximum(ionic, 1e-30)
    k = _Pairs(p, mc, ma, t, sq, i_s, phi=True)
    j: dict[float, tuple[np.ndarray, np.ndarray, np.ndarray]] = {}
    lc, la = _Like(p.zc, aphi, sq, i_s, unsymmetrical, j), _Like(p.za, aphi, sq, i_s, unsymmetrical, j)
    z = p.zc @ mc + p.za @ ma
    total = mc.sum(axis=0) + ma.sum(axis=0) + m_neutral_total
    s = (
        -aphi * ionic * sq / (1.0 + PITZER_B * sq)
        + k.bphi + z * k.cs
        + 0.5 * (np.einsum("cN,cN->N", mc, p.theta_c @ mc) + lc.quadratic(mc, 1) + ionic * lc.quadratic(mc, 2))
        + 0.5 * np.einsum("aN,aN->N", _psi(p.psi_cca, mc, ma)[1], ma)
        + 0.5 * (np.einsum("aN,aN->N", ma, p.theta_a @ ma) + la.quadratic(ma, 1) + ionic * la.quadratic(ma, 2))
        + 0.5 * np.einsum("cN,cN->N", _psi(p.psi_aac, ma, mc)[1], mc)
    )
    with np.errstate(invalid="ignore", divide="ignore"):
        phi = 1.0 + 2.0 * s / total
    return np.where(total > 0, phi, 1.0)


def binary_log_mean(beta0, beta1, beta2, cphi, alpha1, alpha2, z_m, z_x, nu_m, nu_x, m, aphi):
    """ln γ± of a single salt from the binary Pitzer equation (Pitzer 1991, eq. for γ±).

    ln γ± = |z_M z_X| f^γ + m (2 ν_M ν_X / ν) B^γ + m² (2 (ν_M ν_X)^{3/2} / ν) C^γ,
    C^γ = (3/2) C^φ.
    """
    m = np.asarray(m, dtype=float)
    nu = nu_m + nu_x
    ionic = 0.5 * m * (nu_m * z_m**2 + nu_x * z_x**2)
    sq = np.sqrt(ionic)
    fg = -aphi * (sq / (1 + PITZER_B * sq) + (2 / PITZER_B) * np.log1p(PITZER_B * sq))

    def h(alpha):
        if alpha == 0:
            return 0.0
        x = alpha * sq
        return 2.0 / (alpha**2 * ionic) * (1.0 - np.exp(-x) * (1.0 + x - 0.5 * x**2))

    bg = 2 * beta0 + beta1 * h(alpha1) + beta2 * h(alpha2)
    return (
        abs(z_m * z_x) * fg
        + m * (2 * nu_m * nu_x / nu) * bg
        + m**2 * (2 * (nu_m * nu_x) ** 1.5 / nu) * 1.5 * cphi
    )
