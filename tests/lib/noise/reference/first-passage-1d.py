"""Reference mean first-passage times of dX = (X - X^3) dt + sigma dW from x0 = -1 to b (reflecting at
L = -5), by nested adaptive quadrature with SciPy (scipy.integrate.quad, QUADPACK):
    T = (2 / sigma^2) int_{x0}^{b} dy int_{L}^{y} exp(2 (V(y) - V(z)) / sigma^2) dz,  V = x^4/4 - x^2/2.
Independent of src/lib/noise/first-passage-1d.ts (different quadrature, exact V).
Run: python3 tests/lib/noise/reference/first-passage-1d.py > tests/lib/noise/reference/first-passage-1d.json
"""
import json
import math
from scipy.integrate import quad

V = lambda x: x**4 / 4 - x**2 / 2
L, X0 = -5.0, -1.0

def mfpt(sigma, b):
    k = 2 / sigma**2
    inner = lambda y: quad(lambda z: math.exp(k * (V(y) - V(z))), L, y, points=[X0] if L < X0 < y else None,
                           epsabs=0, epsrel=1e-13, limit=400)[0]
    outer = quad(inner, X0, b, points=[0.0] if X0 < 0.0 < b else None, epsabs=0, epsrel=1e-12, limit=400)[0]
    return k * outer

cases = [{"sigma": s, "b": b, "T": mfpt(s, b)} for s in (0.2, 0.3) for b in (0.5, 1.0)]
print(json.dumps({"source": "scipy.integrate.quad (SciPy), nested adaptive quadrature", "left": L, "x0": X0, "cases": cases}, indent=2))
