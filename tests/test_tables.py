"""The parameter tables: every row sourced, every species known, every pair sensible."""

import pytest

import ionact as ia
from ionact.references import REFERENCES
from ionact.tables import (
    acid_table,
    complex_table,
    conductivity_table,
    ion_table,
    ksp_table,
    pitzer_binary_table,
    pitzer_mixing_table,
    salt_table,
    sit_table,
)


def test_every_source_key_resolves():
    keys = set()
    for rec in ion_table().values():
        keys |= set(rec.source)
    for rec in salt_table().values():
        keys |= set(rec.source)
    for _, src in sit_table().values():
        keys |= set(src)
    for rec in pitzer_binary_table().values():
        keys |= set(rec.source)
    for _, src in acid_table().values():
        keys |= set(src)
    for _, src in ksp_table().values():
        keys |= set(src)
    for _, src in conductivity_table().values():
        keys |= set(src)
    for rec in complex_table().values():
        keys |= set(rec.source)
    assert keys, "tables carry sources"
    assert keys <= set(REFERENCES), keys - set(REFERENCES)


def test_values_recalled_from_memory_say_so():
    for key, text in REFERENCES.items():
        if key.endswith("-mem"):
            assert "from memory" in text, key


def test_pitzer_and_sit_pairs_are_opposite_charges():
    for (c, a), rec in pitzer_binary_table().items():
        assert ia.Ion.parse(c).charge > 0 > ia.Ion.parse(a).charge
        # α per charge type: 2:2 salts use α1 = 1.4, α2 = 12 (Pitzer & Mayorga 1974)
        if abs(ia.Ion.parse(c).charge) == 2 and abs(ia.Ion.parse(a).charge) == 2:
            assert (rec.alpha1, rec.alpha2) == (1.4, 12)
        else:
            assert rec.alpha1 == 2 and rec.beta2 == 0
    for pair in sit_table():
        x, y = (ia.Ion.parse(i).charge for i in pair)
        assert x * y < 0
    theta, psi = pitzer_mixing_table()
    for pair in theta:
        x, y = (ia.Ion.parse(i).charge for i in pair)
        assert x * y > 0


@pytest.mark.parametrize("salt", sorted(salt_table()))
def test_salts_parse_and_balance(salt):
    s = ia.Salt.parse(salt)
    assert sum(ia.Ion.parse(i).charge * n for i, n in s.ions) == 0
    temps = [t for t, _ in s.solubility_table]
    assert temps == sorted(temps)


def test_acid_pairs_differ_by_one_proton():
    for acid, base in acid_table():
        assert ia.Ion.parse(acid).charge - ia.Ion.parse(base).charge == 1
    for salt in ksp_table():
        ia.Salt.parse(salt)
