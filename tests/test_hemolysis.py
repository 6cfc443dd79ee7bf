"""Giersiepen 1990 hemolysis power law."""

import numpy as np
import pytest

from rheoline.errors import InputRangeError, RangeWarning
from rheoline.model.hemolysis import giersiepen_1990_hemolysis_index


def test_worked_example():
    # Giersiepen et al., Int. J. Artif. Organs 13 (1990) 300, HI = 3.62e-5 t^0.785 tau^2.416
    # by hand: tau = 100 Pa, t = 0.1 s: 100^2.416 = 10^4.832 = 67920; 0.1^0.785 = 0.16406
    # 3.62e-5 * 0.16406 * 67920 = 0.4034 %
    assert giersiepen_1990_hemolysis_index(100.0, 0.1) == pytest.approx(0.4034, rel=1e-3)


def test_exponents():
    base = giersiepen_1990_hemolysis_index(50.0, 0.05)
    assert giersiepen_1990_hemolysis_index(100.0, 0.05) / base == pytest.approx(2**2.416)
    assert giersiepen_1990_hemolysis_index(50.0, 0.1) / base == pytest.approx(2**0.785)


def test_range_warning_and_errors():
    with pytest.warns(RangeWarning, match="shear_stress .* outside the validated range"):
        giersiepen_1990_hemolysis_index(400.0, 0.1)
    with pytest.warns(RangeWarning, match="exposure_time"):
        giersiepen_1990_hemolysis_index(10.0, 2.0)
    assert np.isfinite(giersiepen_1990_hemolysis_index(400.0, 2.0, warn=False))
    with pytest.raises(InputRangeError, match="shear_stress must be 0 Pa or more"):
        giersiepen_1990_hemolysis_index(-1.0, 0.1)
