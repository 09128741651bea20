"""pandas, pint, xarray and numpy conventions at the library's edges."""

import warnings

import numpy as np
import pandas as pd
import pint
import pytest
import xarray as xr

import ionact as ia


def test_solution_from_a_dataframe_keeps_its_index_and_units():
    df = pd.DataFrame({"Na+ [mg/L]": [22.98976928, 45.97953856], "Cl- [mmol/L]": [1.0, 2.0]},
                      index=pd.Index(["well A", "well B"], name="site"))
    s = ia.Solution(df, basis="molar", density="water")
    w = ia.water.density(25.0) / 1000.0
    assert s.molality("Na+") == pytest.approx(np.array([1e-3, 2e-3]) / w, rel=1e-9)
    g = ia.activity_coefficients(s, "davies").to_pandas()
    assert list(g.index) == ["well A", "well B"] and g.index.name == "site"
    assert g.loc["well B", "Na+"] == pytest.approx(float(ia.activity_coefficients(s, "davies")["Na+"][1]))


def test_from_salts_dataframe_with_a_units_mapping():
    df = pd.DataFrame({"NaCl": [10.0, 20.0], "CaCl2": [1.0, 2.0]}, index=[3, 7])
    s = ia.Solution.from_salts(df, units={"NaCl": "mmol/kg", "CaCl2": "mmol/kg"})
    assert s.ionic_strength == pytest.approx([0.013, 0.026])
    assert list(s.index) == [3, 7]


@pytest.mark.parametrize("df,kwargs,needle", [
    (pd.DataFrame({"Na+": ["a", "b"], "Cl-": [1.0, 1.0]}), {}, "not numbers"),
    (pd.DataFrame({"Na+": [1.0], "Cl-": [1.0]}), {"units": {"K+": "mg/L"}}, "K+"),
])
def test_dataframe_bad_input_is_named(df, kwargs, needle):
    with pytest.raises(ia.InputError, match=needle):
        ia.Solution(df, **kwargs)


def test_batch_check_and_quantify_keep_the_index():
    from ionact.method import load_method

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        design = ia.design_adjuster(**load_method("example:nitrate_irrigation"))
    df = pd.DataFrame({"analyte": [1e-4, 2e-4], "ionic_strength": [0.01, 0.02]}, index=["x1", "x2"])
    r = ia.check_samples(df, design).to_pandas()
    assert list(r.index) == ["x1", "x2"] and list(r["sample_id"]) == ["row 1", "row 2"]
    c = np.array([1e-5, 1e-4, 1e-3])
    cal = ia.calibrate("NO3-", c, 200 - 57 * np.log10(c))
    q = ia.quantify(cal, pd.Series([400.0, 420.0], index=["x1", "x2"]))
    frame = q.to_pandas(unit="mg/L as N")
    assert list(frame.index) == ["x1", "x2"] and set(frame["unit"]) == {"mg/L as N"}


def test_pint_quantities_are_honoured_or_refused():
    ureg = pint.UnitRegistry()
    s = ia.Solution({"Na+": 0.1, "Cl-": 0.1}, temperature=ureg.Quantity(77.0, "degF"))
    assert float(s.temperature) == pytest.approx(25.0)
    m = ia.Solution({"Na+": ureg.Quantity(100.0, "mmol/kg"), "Cl-": 0.1})
    assert m.molality("Na+") == pytest.approx(0.1)
    with pytest.raises(ia.InputError, match="Quantity"):
        ia.models.davies(1, ureg.Quantity(0.1, "mol/kg"))


def test_array_functions_over_xarray_keep_coordinates():
    # the documented way: xr.apply_ufunc around the bare-array function
    i = xr.DataArray([0.01, 0.05, 0.1], dims="site", coords={"site": ["a", "b", "c"]})
    t = xr.DataArray([10.0, 25.0], dims="month", coords={"month": ["jan", "jul"]})
    g = xr.apply_ufunc(lambda ii, tt: ia.models.davies(1, ii, tt), i, t)
    assert g.dims == ("site", "month") and list(g.coords["site"].values) == ["a", "b", "c"]
    assert float(g.sel(site="b", month="jul")) == pytest.approx(ia.models.davies(1, 0.05, 25.0))


def test_zero_dimensional_in_float_out_and_masked_arrays_refused():
    assert isinstance(ia.models.davies(1, np.array(0.1)), float)
    with pytest.raises(ia.InputError, match="masked"):
        ia.models.davies(1, np.ma.array([0.1, 0.2], mask=[False, True]))
