#!/usr/bin/env python3
"""Regenerates the Q61 constant tables in src/scalar/fixed_math.rs with mpmath (80 digits).

Usage: python3 tools/gen_cordic_tables.py > /tmp/tables.rs and paste.
"""
import mpmath as mp

mp.mp.dps = 80
ONE = mp.mpf(2) ** 61


def q61(x):
    return int(mp.nint(x * ONE))


print("/// atan(2^-i) in Q61, i = 0..62 (mpmath, 80 digits; tools/gen_cordic_tables.py).")
print("const ATAN_Q61: [i64; 62] = [")
for i in range(62):
    print(f"    {q61(mp.atan(mp.mpf(2) ** -i))},")
print("];")
k = mp.mpf(1)
for i in range(62):
    k /= mp.sqrt(1 + mp.mpf(2) ** (-2 * i))
print(f"/// CORDIC gain 1/prod(sqrt(1+2^-2i)), i = 0..62, in Q61.\nconst CORDIC_GAIN_Q61: i64 = {q61(k)};")
print(f"/// pi/2 in Q61.\nconst HALF_PI_Q61: i64 = {q61(mp.pi/2)};")
print(f"/// pi in Q61.\nconst PI_Q61: i64 = {q61(mp.pi)};")
print(f"/// ln 2 in Q61.\nconst LN2_Q61: i64 = {q61(mp.log(2))};")
print(f"/// sqrt(2) in Q61.\nconst SQRT2_Q61: i64 = {q61(mp.sqrt(2))};")
