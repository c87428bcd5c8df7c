# Real period of y^2 + xy = x^3 + 29x (minimal model, one real component),
# computed with mpmath 1.3.0 at 40 digits: Omega = 2 * int_{e1}^inf dx / sqrt(f),
# f = 4x^3 + b2 x^2 + 2 b4 x + b6 = 4x^3 + x^2 + 116x, e1 = 0 its only real
# root; x = t^2 removes the endpoint singularity. Used by
# src/analytic/tests/values.rs (printed values inside their printed error).
from mpmath import mp, quad, sqrt, inf

mp.dps = 40
print(2 * quad(lambda t: 2 / sqrt(4 * t**4 + t**2 + 116), [0, 1, 10, inf]))
# output: 1.589561513112141427003747519363278507374
