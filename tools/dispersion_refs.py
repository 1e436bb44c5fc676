"""Reference values for tests/world_dispersion.rs (run: python3 tools/dispersion_refs.py).

iapws 1.5.5: iapws._iapws._Refractive(rho, T, lambda_um) (IAPWS R9-97) with
rho = iapws.IAPWS95(T=T, P=0.101325).rho (IAPWS-95 density at 101.325 kPa).
mpmath 1.3.0 at 30 digits for everything else.
"""
import iapws
from iapws import IAPWS95
from iapws._iapws import _Refractive
from mpmath import mp, mpf, sqrt, asin, sin, radians, degrees

mp.dps = 30

def n_air(l, t=20, p=101325):
    # Ciddor (1996) standard air, Birch & Downs (1993) density scaling, dry.
    l = mpf(l); t = mpf(t); p = mpf(p)
    s2 = 1 / l**2
    rs = (mpf(5792105) / (mpf('238.0185') - s2) + mpf(167917) / (mpf('57.362') - s2)) * mpf('1e-8')
    return 1 + rs * p * (1 + mpf('1e-8') * p * (mpf('0.601') - mpf('0.00972') * t)) / (mpf('96095.43') * (1 + mpf('0.003661') * t))

print("# iapws", iapws.__version__)
print("# IAPWS vacuum (T_C, lambda_um, rho_kg_m3, n)")
for T in [0.0, 10.0, 20.0, 25.0, 30.0, 40.0, 50.0, 80.0]:
    rho = IAPWS95(T=273.15 + T, P=0.101325).rho
    for l in [0.2265, 0.4047, 0.5893, 0.6328, 0.85, 1.0]:
        print(f"({T}, {l}, {rho!r}, {_Refractive(rho, 273.15 + T, l)!r}),")
print("# water nD air-relative (T, n)")
for T in [10.0, 20.0, 30.0]:
    rho = IAPWS95(T=273.15 + T, P=0.101325).rho
    nv = mpf(_Refractive(rho, 273.15 + T, 0.5893))
    print(T, mp.nstr(nv / n_air(0.5893, T), 12))

def sellmeier(B, C, l):
    l2 = mpf(l)**2
    return sqrt(1 + sum(mpf(b) * l2 / (l2 - mpf(c)) for b, c in zip(B, C)))

silica = (["0.6961663", "0.4079426", "0.8974794"], [mpf("0.0684043")**2, mpf("0.1162414")**2, mpf("9.896161")**2])
g517642 = (["1.03961212", "0.231792344", "1.01046945"], ["0.00600069867", "0.0200179144", "103.560653"])
g620364 = (["1.34533359", "0.209073176", "0.937357162"], ["0.00997743871", "0.0470450767", "111.886764"])
d, F, C, g = mpf("0.5875618"), mpf("0.4861327"), mpf("0.6562725"), mpf("0.4358343")
for name, gl in [("silica", silica), ("g517642", g517642), ("620364", g620364)]:
    nd, nf, nc, ng = (sellmeier(*gl, x) for x in (d, F, C, g))
    print(name, "nd", mp.nstr(nd, 12), "nF", mp.nstr(nf, 12), "nC", mp.nstr(nc, 12), "Vd", mp.nstr((nd - 1) / (nf - nc), 12), "PgF", mp.nstr((ng - nf) / (nf - nc), 12))

# Achromat, f = 100 at d, 517642 + 620364, F and C at one focus.
r1, r2 = sellmeier(*g517642, d) - 1, sellmeier(*g620364, d) - 1
d1 = sellmeier(*g517642, F) - sellmeier(*g517642, C)
d2 = sellmeier(*g620364, F) - sellmeier(*g620364, C)
k1 = 1 / (100 * (r1 - r2 * d1 / d2)); k2 = -k1 * d1 / d2
fl = lambda l: 1 / (k1 * (sellmeier(*g517642, l) - 1) + k2 * (sellmeier(*g620364, l) - 1))
print("achromat f1", mp.nstr(1 / (k1 * r1), 15), "f2", mp.nstr(1 / (k2 * r2), 15))
print("achromat f(g)-f(F)", mp.nstr(fl(g) - fl(F), 15), "f(d)-f(F)", mp.nstr(fl(d) - fl(F), 15), "f(0.7)-f(F)", mp.nstr(fl(mpf('0.7')) - fl(F), 15))
# Singlet 517642 f = 100 at d: f(C) - f(F)
fs = lambda l: 100 * r1 / (sellmeier(*g517642, l) - 1)
print("517642 singlet f(C)-f(F)", mp.nstr(fs(C) - fs(F), 15))

def qf(S, T, l):
    S, T, l = mpf(S), mpf(T), mpf(l)
    return (mpf('1.31405') + (mpf('1.779e-4') - mpf('1.05e-6') * T + mpf('1.6e-8') * T**2) * S - mpf('2.02e-6') * T**2
            + (mpf('15.868') + mpf('0.01155') * S - mpf('0.00423') * T) / l - mpf('4382') / l**2 + mpf('1.1455e6') / l**3)
print("# Quan & Fry")
for S, T, l in [(0, 20, 589.3), (35, 20, 589.3), (35, 0, 400), (35, 30, 700), (20, 15, 500), (10, 25, 650)]:
    print((S, T, l), mp.nstr(qf(S, T, l), 12))

print("# air")
for l, t, p in [(0.633, 20, 101325), (0.5893, 20, 101325), (0.4, 15, 101325), (0.633, 15, 101325)]:
    print((l, t, p), mp.nstr(n_air(l, t, p) - 1, 12))
def edlen(l):
    s2 = 1 / mpf(l)**2
    return (mpf('8342.13') + mpf('2406030') / (130 - s2) + mpf('15997') / (mpf('38.9') - s2)) * mpf('1e-8')
for l in [0.4, 0.5, 0.633, 0.8, 1.0]:
    print("edlen std", l, mp.nstr(edlen(l), 12))

print("# prism")
A = radians(60)
for n, i in [("1.5", 50), ("1.7", 45), ("1.5168", 30)]:
    n = mpf(n); i = radians(i)
    r1 = asin(sin(i) / n); s = n * sin(A - r1)
    print(n, "dev", mp.nstr(i + asin(s) - A, 15) if abs(s) <= 1 else "TIR")
print("mindev 1.5168", mp.nstr(2 * asin(mpf('1.5168') * sin(A / 2)) - A, 15))

print("# full Ciddor (1996) for dry air, 450 ppm CO2, against the crate's model")
def ciddor_dry(l, t, p):
    # Ciddor 1996 eqs. (1), (12), (4) with xw = 0; R and Ma cancel in rho_a/rho_axs.
    l, t, p = mpf(l), mpf(t), mpf(p)
    s2 = 1 / l**2
    ras = (mpf(5792105) / (mpf('238.0185') - s2) + mpf(167917) / (mpf('57.362') - s2)) * mpf('1e-8')
    T = t + mpf('273.15')
    Z = 1 - (p / T) * (mpf('1.58123e-6') - mpf('2.9331e-8') * t + mpf('1.1043e-10') * t**2) + (p / T)**2 * mpf('1.83e-11')
    Za = mpf('0.9995922115')
    return ras * (p / mpf(101325)) * (mpf('288.15') / T) * (Za / Z)
worst = 0
for l in [0.3, 0.4, 0.5893, 0.633, 1.0, 1.69]:
    for t in [-20, 0, 10, 20, 30, 50]:
        for p in [80000, 90000, 101325, 110000, 120000]:
            worst = max(worst, abs(ciddor_dry(l, t, p) - (n_air(l, t, p) - 1)))
print("worst |model - full Ciddor| (80-120 kPa, -20..50 C, 0.3-1.69 um):", mp.nstr(worst, 3))
for l, t, p in [(0.633, 20, 101325), (0.5893, 20, 101325), (0.5893, 30, 90000), (0.4, -10, 110000)]:
    print("ciddor", (l, t, p), mp.nstr(ciddor_dry(l, t, p), 12))
