"""Conversion factors of the trade's units to SI (NIST SP 811), defined once for the package.

The model layer works in SI; a few of its functions and defaults take or state the trade's
units (clinical resistance formulas in mmHg, a typical vein pressure of 10 mmHg), and the
edge (:mod:`rheoline.units`, the scenario tables, the views) converts with the same numbers.

References
----------
Thompson, A., Taylor, B.N., "Guide for the Use of the International System of Units (SI)",
NIST Special Publication 811, 2008 edition, Appendix B.8 and B.9: millimeter of mercury,
conventional, 1.333 224 E+02 Pa; centimeter of water, conventional, 9.806 65 E+01 Pa;
pound-force per square inch, 6.894 757 E+03 Pa.

Examples
--------
>>> round(300 * MMHG)
39997
>>> round(1 / ML_PER_MIN)
60000000
"""

from __future__ import annotations

__all__ = ["MMHG", "CMH2O", "PSI", "ML_PER_MIN", "ML_PER_H"]

#: 1 mmHg [Pa]: the conventional millimetre of mercury, 13 595.1 kg/m^3 times the standard
#: gravity 9.806 65 m/s^2 times 1 mm, which NIST SP 811 (2008) Appendix B.8 lists to seven
#: digits as 1.333 224 E+02 Pa.
MMHG = 133.322387415
#: 1 cmH2O [Pa]: the conventional centimetre of water (1000 kg/m^3, standard gravity).
CMH2O = 98.0665
#: 1 psi [Pa]: one pound-force (0.453 592 37 kg times standard gravity) per square inch.
PSI = 6894.757293168
#: 1 mL/min [m^3/s]
ML_PER_MIN = 1e-6 / 60.0
#: 1 mL/h [m^3/s]
ML_PER_H = 1e-6 / 3600.0
