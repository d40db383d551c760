"""Unit conversion constants for the tests (SI per unit): the one place.

Exact definitions from NIST SP 811 (2008), Appendix B: the inch is 0.0254 m,
the pound (avoirdupois) 0.45359237 kg, the pound-force the pound times
standard gravity 9.80665 m/s^2; psi is one pound-force per square inch; the
US gallon is 231 cubic inches.  Test modules import these (``from _units
import ft, psi``); ``tests/conftest.py`` puts this folder on the path.
"""

inch = 0.0254                      # m
ft = 0.3048                        # m
mm = 0.001                         # m
lb = 0.45359237                    # kg
g_n = 9.80665                      # m/s^2, standard gravity
lbf = lb * g_n                     # N (4.4482216152605)
psi = lbf / inch**2                # Pa (6894.757293168361)
ksi = 1000.0 * psi                 # Pa
gal = 231.0 * inch**3              # m^3, US gallon (3.785411784e-3)
ppg = lb / gal                     # kg/m^3 per lb/US gal (119.826...)
lb_per_ft = lb / ft                # kg/m (mass per length)
lb_per_in3 = lb / inch**3          # kg/m^3
psi_per_ft = psi / ft              # Pa/m
