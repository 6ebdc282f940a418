"""Physical constants and unit conversion factors, as plain SI floats.

Every factor converts one customary unit into SI: multiply a value in the customary unit by the
factor to get SI (``psi * PSI_PA`` gives pascals).

References
----------
.. [1] NIST Special Publication 811 (2008), *Guide for the Use of the International System of
   Units*, Appendix B (exact definitions of the foot, inch, pound-force, US gallon).
.. [2] CGPM 1901: standard acceleration of free fall g_n = 9.80665 m/s2 (exact).
"""

from __future__ import annotations

#: Standard acceleration of free fall [m/s2], exact by definition [2].
G: float = 9.80665

#: One pound-force per square inch in pascals [Pa/psi] (0.45359237 kg * g_n / 0.0254**2 m2) [1].
PSI_PA: float = 6894.757293168

#: One US gallon per minute in cubic metres per second [(m3/s)/gpm] (231 in3 / 60 s) [1].
GPM_M3_S: float = 6.30901964e-5

#: One international foot in metres [m/ft], exact [1].
FT_M: float = 0.3048

#: One inch in metres [m/in], exact [1].
IN_M: float = 0.0254

#: One standard atmosphere in pascals [Pa], exact by definition [1].
ATM_PA: float = 101325.0

#: Celsius to kelvin offset [K], exact.
ZERO_CELSIUS_K: float = 273.15
