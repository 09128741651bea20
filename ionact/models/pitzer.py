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
           "pair_shares", "pair_ionic_strength_limits", "PITZER_B", "PITZER_MAX_IONIC_STRENGTH"]

PITZER_B = 1.2
PITZER_MAX_IONIC_STRENGTH = 6.0  # mol/kg: for mixtures whose pairs state no limit of their own
# Pitzer (1975) approximation J(x) = x / (4 + C1 x^-C2 exp(-C3 x^C4)) (from memory)
_JC = (4.581, 0.7237, 0.0120, 0.528)


def j_function(x):
    """Pitzer's (1975) approximation of J(x) and its derivative J'(x).

    Returns
    -------
    (J, J') : tuple of ndarray
    """
    x = np.asarray(x, dtype=float)
    c1, c2, c3, c4 = _JC
    xs = np.maximum(x, 1e-30)
    e = np.exp(-c3 * xs**c4)
    d = 4.0 + c1 * xs ** (-c2) * e
    dd = c1 * e * xs ** (-c2) * (-c2 / xs - c3 * c4 * xs ** (c4 - 1.0))
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


def _g_pairs(alpha: np.ndarray, sq: np.ndarray):
    """g, g', exp(−α√I) for an (nc, na) matrix of α, evaluated once per distinct α."""
    ua, inv = np.unique(alpha, return_inverse=True)
    g, gp, ex = _g(ua[:, None] * sq[None, :])
    inv = inv.reshape(alpha.shape)
    return g[inv], gp[inv], ex[inv]


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


def _at_temperature(p: PitzerSet, t: np.ndarray) -> list[np.ndarray]:
    """β0, β1, Cφ at temperature t (N,), shapes (nc, na, N) or (nc, na, 1).

    Pairs with tabulated first derivatives are extrapolated linearly from 25 °C; the others
    keep their 25 °C values. Where that is valid is the business of the range check
    (:func:`ionact.models.registry` reports it), not of this kernel.
    """
    dt = t - 25.0
    out = []
    for base, der in ((p.beta0, p.dbeta0), (p.beta1, p.dbeta1), (p.cphi, p.dcphi)):
        has = np.isfinite(der)
        if np.any(has) and np.any(dt != 0):
            out.append(base[..., None] + np.where(has, der, 0.0)[..., None] * dt[None, None, :])
        else:
            out.append(base[..., None])
    return out


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


def pair_shares(p: PitzerSet, mc: np.ndarray, ma: np.ndarray) -> np.ndarray:
    """Equivalent-fraction share y_c·x_a (nc, na, N) of each cation–anion pair in each sample."""
    ec = p.zc[:, None] * mc
    ea = p.za[:, None] * ma
    with np.errstate(invalid="ignore", divide="ignore"):
        y = np.where(ec.sum(axis=0) > 0, ec / ec.sum(axis=0), 0.0)
        x = np.where(ea.sum(axis=0) > 0, ea / ea.sum(axis=0), 0.0)
    return np.asarray(y[:, None, :] * x[None, :, :])


def _etheta(z: np.ndarray, aphi: np.ndarray, ionic: np.ndarray):
    """Eθ and Eθ' for every like-sign pair: arrays (n, n, N); zero for equal charges."""
    n = len(z)
    N = ionic.shape[0]
    et = np.zeros((n, n, N))
    etp = np.zeros((n, n, N))
    if n < 2 or np.all(z == z[0]):
        return et, etp
    i_s = np.maximum(ionic, 1e-30)
    sq = np.sqrt(i_s)
    for p in range(n):
        for q in range(p + 1, n):
            if z[p] == z[q]:
                continue
            zz = z[p] * z[q]
            xpq = 6.0 * zz * aphi * sq
            xpp = 6.0 * z[p] ** 2 * aphi * sq
            xqq = 6.0 * z[q] ** 2 * aphi * sq
            (jpq, jppq), (jpp, jppp), (jqq, jpqq) = j_function(xpq), j_function(xpp), j_function(xqq)
            e = zz / (4.0 * i_s) * (jpq - 0.5 * jpp - 0.5 * jqq)
            ep = -e / i_s + zz / (8.0 * i_s**2) * (xpq * jppq - 0.5 * xpp * jppp - 0.5 * xqq * jpqq)
            et[p, q] = et[q, p] = e
            etp[p, q] = etp[q, p] = ep
    return et, etp


def _terms(p: PitzerSet, mc, ma, t, aphi, unsymmetrical=True):
    """Shared intermediate terms; mc (nc, N), ma (na, N), t (N,), aphi (N,)."""
    ionic = 0.5 * (p.zc**2 @ mc + p.za**2 @ ma)
    sq = np.sqrt(ionic)
    i_s = np.maximum(ionic, 1e-30)
    b0, b1, cphi = _at_temperature(p, t)
    g1, g1p, e1 = _g_pairs(p.alpha1, sq)
    B = b0 + b1 * g1
    Bp = b1 * g1p / i_s
    Bphi = b0 + b1 * e1
    if np.any(p.beta2):
        g2, g2p, e2 = _g_pairs(p.alpha2, sq)
        beta2 = p.beta2[..., None]
        B = B + beta2 * g2
        Bp = Bp + beta2 * g2p / i_s
        Bphi = Bphi + beta2 * e2
    C = cphi / (2.0 * np.sqrt(p.zc[:, None] * p.za[None, :]))[..., None]
    Z = p.zc @ mc + p.za @ ma
    if unsymmetrical:
        etc, etpc = _etheta(p.zc, aphi, ionic)
        eta, etpa = _etheta(p.za, aphi, ionic)
    else:
        etc = etpc = np.zeros((len(p.zc), len(p.zc), ionic.size))
        eta = etpa = np.zeros((len(p.za), len(p.za), ionic.size))
    Phic = p.theta_c[..., None] + etc
    Phia = p.theta_a[..., None] + eta
    return dict(I=ionic, sq=sq, B=B, Bp=Bp, Bphi=Bphi, C=C, Z=Z, Phic=Phic, Phia=Phia,
                Phipc=etpc, Phipa=etpa, Phiphic=Phic + ionic * etpc, Phiphia=Phia + ionic * etpa)


def log_gamma(p: PitzerSet, mc, ma, t, aphi, unsymmetrical=True):
    """Natural-log activity coefficients of the cations (nc, N) and anions (na, N)."""
    k = _terms(p, mc, ma, t, aphi, unsymmetrical)
    sq = k["sq"]
    b = PITZER_B
    F = (
        -aphi * (sq / (1.0 + b * sq) + (2.0 / b) * np.log1p(b * sq))
        + np.einsum("caN,cN,aN->N", k["Bp"], mc, ma)
        + 0.5 * np.einsum("cdN,cN,dN->N", k["Phipc"], mc, mc)
        + 0.5 * np.einsum("abN,aN,bN->N", k["Phipa"], ma, ma)
    )
    Z, B, C = k["Z"], k["B"], k["C"]
    cs = np.einsum("caN,cN,aN->N", C, mc, ma)
    two_bzc = 2.0 * B + Z * C
    ln_c = (
        p.zc[:, None] ** 2 * F
        + np.einsum("caN,aN->cN", two_bzc, ma)
        + np.einsum("cdN,dN->cN", 2.0 * k["Phic"], mc)
        + np.einsum("cda,dN,aN->cN", p.psi_cca, mc, ma)
        + 0.5 * np.einsum("abc,aN,bN->cN", p.psi_aac, ma, ma)
        + p.zc[:, None] * cs
    )
    ln_a = (
        p.za[:, None] ** 2 * F
        + np.einsum("caN,cN->aN", two_bzc, mc)
        + np.einsum("abN,bN->aN", 2.0 * k["Phia"], ma)
        + np.einsum("abc,bN,cN->aN", p.psi_aac, ma, mc)
        + 0.5 * np.einsum("cda,cN,dN->aN", p.psi_cca, mc, mc)
        + p.za[:, None] * cs
    )
    return ln_c, ln_a


def osmotic(p: PitzerSet, mc, ma, m_neutral_total, t, aphi, unsymmetrical=True):
    """Osmotic coefficient φ (N,) of the mixture."""
    k = _terms(p, mc, ma, t, aphi, unsymmetrical)
    ionic, sq = k["I"], k["sq"]
    total = mc.sum(axis=0) + ma.sum(axis=0) + m_neutral_total
    s = (
        -aphi * ionic * sq / (1.0 + PITZER_B * sq)
        + np.einsum("caN,cN,aN->N", k["Bphi"] + k["Z"] * k["C"], mc, ma)
        + 0.5 * np.einsum("cdN,cN,dN->N", k["Phiphic"], mc, mc)
        + 0.5 * np.einsum("cda,cN,dN,aN->N", p.psi_cca, mc, mc, ma)
        + 0.5 * np.einsum("abN,aN,bN->N", k["Phiphia"], ma, ma)
        + 0.5 * np.einsum("abc,aN,bN,cN->N", p.psi_aac, ma, ma, mc)
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
