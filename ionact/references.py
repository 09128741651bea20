"""Full citations for the ``source`` keys used in ``ionact/data/*.csv``.

A key ending in ``-mem`` marks a value recalled from memory rather than read off the
publication; such values have been checked only for consistency (see the tests) and
should be verified against the original before being relied upon.
"""

from __future__ import annotations

REFERENCES: dict[str, str] = {
    "kielland1937-mem": (
        "J. Kielland, Individual activity coefficients of ions in aqueous solutions, "
        "J. Am. Chem. Soc. 59 (1937) 1675-1678 (values from memory)"
    ),
    "truesdell-jones1974-mem": (
        "A. H. Truesdell, B. F. Jones, WATEQ, a computer program for calculating chemical "
        "equilibria of natural waters, J. Res. U.S. Geol. Surv. 2 (1974) 233-248 "
        "(values from memory)"
    ),
    "millero1972-mem": (
        "F. J. Millero, The partial molal volumes of electrolytes in aqueous solutions, in "
        "R. A. Horne (ed.), Water and Aqueous Solutions, Wiley (1972) (values from memory)"
    ),
    "nea-sit-mem": (
        "OECD Nuclear Energy Agency thermochemical database reviews, SIT interaction "
        "coefficients at 25 °C (Guillaumont et al. 2003, appendix B; values from memory)"
    ),
    "pitzer-mayorga1973-mem": (
        "K. S. Pitzer, G. Mayorga, Thermodynamics of electrolytes II, J. Phys. Chem. 77 "
        "(1973) 2300-2308 (values from memory)"
    ),
    "pitzer-mayorga1974-mem": (
        "K. S. Pitzer, G. Mayorga, Thermodynamics of electrolytes III, 2-2 electrolytes, "
        "J. Solution Chem. 3 (1974) 539-546 (values from memory)"
    ),
    "hmw1984-mem": (
        "C. E. Harvie, N. Møller, J. H. Weare, The prediction of mineral solubilities in "
        "natural waters, Geochim. Cosmochim. Acta 48 (1984) 723-751 (values from memory)"
    ),
    "pitzer-kim1974-mem": (
        "K. S. Pitzer, J. J. Kim, Thermodynamics of electrolytes IV, activity and osmotic "
        "coefficients for mixed electrolytes, J. Am. Chem. Soc. 96 (1974) 5701-5707 "
        "(values from memory)"
    ),
    "crc-mem": (
        "CRC Handbook of Chemistry and Physics, aqueous solubility and dissociation "
        "constant tables (values from memory)"
    ),
    "common-practice": "common practice in the trade; no single source",
    "nordstrom1990-mem": (
        "D. K. Nordstrom, L. N. Plummer, D. Langmuir, E. Busenberg, H. M. May, B. F. Jones, D. L. Parkhurst, "
        "Revised chemical equilibrium data for major water-mineral reactions and their limitations, in "
        "Chemical Modeling of Aqueous Systems II, ACS Symp. Ser. 416 (1990) 398-413 (values from memory)"
    ),
    "smith-martell-mem": (
        "R. M. Smith, A. E. Martell, Critical Stability Constants, vols. 1-6, Plenum, New York (1974-1989) "
        "(values from memory)"
    ),
    "kw-enthalpy-mem": "enthalpy of the ionisation of water at 25 °C, critical compilations (value from memory)",
    "phosphate-enthalpy-mem": "enthalpy of the H2PO4-/HPO4^2- step at 25 °C, critical compilations (from memory)",
    "carbonate-enthalpy-mem": "enthalpies of the carbonate steps at 25 °C, critical compilations (from memory)",
    "acetic-enthalpy-mem": "enthalpy of the acetic acid step at 25 °C, critical compilations (from memory)",
    "ammonium-enthalpy-mem": "enthalpy of the ammonium step at 25 °C, critical compilations (from memory)",
    "crc-conductivity-mem": (
        "CRC Handbook of Chemistry and Physics, equivalent conductivity of ions at infinite dilution, "
        "25 °C (values from memory; multiplied by |z| to give the molar conductivity of the ion)"
    ),
    "kell1975-mem": (
        "G. S. Kell, Density, thermal expansivity and compressibility of liquid water "
        "from 0 to 150 °C, J. Chem. Eng. Data 20 (1975) 97-105 (coefficients from memory)"
    ),
    "malmberg-maryott1956-mem": (
        "C. G. Malmberg, A. A. Maryott, Dielectric constant of water from 0 to 100 °C, "
        "J. Res. Natl. Bur. Stand. 56 (1956) 1-8 (coefficients from memory)"
    ),
    "russell1976-mem": (
        "L. L. Russell, Chemical aspects of groundwater recharge with wastewaters, "
        "PhD thesis, University of California, Berkeley (1976) (from memory)"
    ),
    "griffin-jurinak1973-mem": (
        "R. A. Griffin, J. J. Jurinak, Estimation of activity coefficients from the "
        "electrical conductivity of natural aquatic systems and soil extracts, "
        "Soil Sci. 116 (1973) 26-30 (from memory)"
    ),
    "langelier1936-mem": (
        "W. F. Langelier, The analytical control of anti-corrosion water treatment, "
        "J. Am. Water Works Assoc. 28 (1936) 1500-1521 (from memory)"
    ),
    "crc-density-mem": (
        "CRC Handbook of Chemistry and Physics, concentrative properties of aqueous solutions: density "
        "against mass percent at 20 °C (values from memory); the ions' Masson coefficients were fitted to "
        "them (tools/fit_apparent_volumes.py)"
    ),
    "silvester-pitzer1977-mem": (
        "L. F. Silvester, K. S. Pitzer, Thermodynamics of electrolytes 8. High-temperature properties, "
        "including enthalpy and heat capacity, with application to sodium chloride, J. Phys. Chem. 81 (1977) "
        "1822-1828 (first temperature derivatives at 25 °C, from memory; linear use stated for 0–50 °C)"
    ),
    "redlich-rosenfeld1931-mem": (
        "O. Redlich, P. Rosenfeld, Das partielle molare Volumen von gelösten Elektrolyten I, Z. Phys. Chem. "
        "A 155 (1931) 65-74 (limiting slope of apparent molar volumes, from memory)"
    ),
    "fuoss1958-mem": (
        "R. M. Fuoss, Ionic association III. The equilibrium between ion pairs and free ions, J. Am. Chem. "
        "Soc. 80 (1958) 5059-5061 (from memory)"
    ),
    "codata2018": "CODATA 2018 recommended values of the fundamental physical constants",
    "helgeson1969-mem": (
        "H. C. Helgeson, Thermodynamics of hydrothermal systems at elevated temperatures "
        "and pressures, Am. J. Sci. 267 (1969) 729-804 (B-dot from memory)"
    ),
    "buck2002": (
        "R. P. Buck et al., Measurement of pH. Definition, standards, and procedures "
        "(IUPAC Recommendations 2002), Pure Appl. Chem. 74 (2002) 2169-2200"
    ),
    "pitzer1975-mem": (
        "K. S. Pitzer, Thermodynamics of electrolytes V, effects of higher-order "
        "electrostatic terms, J. Solution Chem. 4 (1975) 249-265 (J(x) fit from memory)"
    ),
    "robinson-stokes1959-mem": (
        "R. A. Robinson, R. H. Stokes, Electrolyte Solutions, 2nd ed., Butterworths "
        "(1959), appendix 8.10 (values from memory)"
    ),
    "hamer-wu1972-mem": (
        "W. J. Hamer, Y.-C. Wu, Osmotic coefficients and mean activity coefficients of "
        "uni-univalent electrolytes in water at 25 °C, J. Phys. Chem. Ref. Data 1 (1972) "
        "1047-1099 (values from memory)"
    ),
}


def cite(key: str) -> str:
    """Return the full citation for a source key (the key itself if unknown)."""
    return REFERENCES.get(key, key)
