"""Writes the invented demo polar files in this folder (run: python3 make_demo.py).

Responses are predicted with the far-field Kirchhoff expression of polaray's
reference sheet (section 7): p(theta) ~ (cos theta + cos psi) * sum over wells of
R_n * integral exp(j k x (sin theta + sin psi)) dx, for a quadratic-residue
profile (N = 7, design 500 Hz, 0.1 m wells, 3 periods, 2.1 m wide) and for the
flat reference of the same footprint (R = 1). Invented data, not measured.
"""
import cmath, math

C = 343.0
N, F0, WELL, PERIODS = 7, 500.0, 0.1, 3
WIDTH = N * WELL * PERIODS
depths = [((n * n) % N) * (C / F0) / (2 * N) for n in range(N)] * PERIODS
ANGLES = [-90 + 5 * i for i in range(37)]


def pressure(f, psi, theta, flat):
    k = 2 * math.pi * f / C
    u = k * (math.sin(math.radians(theta)) + math.sin(math.radians(psi)))
    total = 0j
    for n, d in enumerate(depths):
        x0 = -WIDTH / 2 + n * WELL
        r = 1 if flat else cmath.exp(-2j * k * d)
        if abs(u) < 1e-12:
            integral = WELL
        else:
            integral = (cmath.exp(1j * u * (x0 + WELL)) - cmath.exp(1j * u * x0)) / (1j * u)
        total += r * integral
    return (math.cos(math.radians(theta)) + math.cos(math.radians(psi))) * total


def level(p):
    return 10 * math.log10(max(abs(p) ** 2, 1e-12))


def fmt(values):
    return "[" + ", ".join(f"{v:.4f}" for v in values) + "]"


out = [
    'name = "QRD N=7, 500 Hz design (invented demo)"',
    'origin = "predicted: far-field Kirchhoff, tests/data/polar/make_demo.py"',
    "",
    "[geometry]",
    'arrangement = "plane"',
    f"sample_width_m = {WIDTH:.2f}",
    "source_distance_m = 10.0",
    "receiver_distance_m = 5.0",
]
for f in [500.0, 1000.0, 2000.0]:
    for psi in [0.0, 30.0, -30.0, 60.0, -60.0]:
        p1 = [pressure(f, psi, t, False) for t in ANGLES]
        p0 = [pressure(f, psi, t, True) for t in ANGLES]
        out += [
            "",
            "[[responses]]",
            f"band_hz = {f:.1f}",
            f"incidence_deg = {psi:.1f}",
            f"receiver_deg = {fmt(ANGLES)}",
            f"level_db = {fmt([level(p) for p in p1])}",
            f"pressure_re = {fmt([p.real for p in p1])}",
            f"pressure_im = {fmt([p.imag for p in p1])}",
            f"reference_level_db = {fmt([level(p) for p in p0])}",
            f"reference_re = {fmt([p.real for p in p0])}",
            f"reference_im = {fmt([p.imag for p in p0])}",
        ]
open("demo-qrd.toml", "w").write("\n".join(out) + "\n")

# The same sample at normal incidence as plain CSV, with its flat reference.
for name, flat in [("demo-qrd-normal.csv", False), ("demo-flat-normal.csv", True)]:
    rows = ["# invented demo, see make_demo.py", "angle_deg,500,1000,2000"]
    for t in ANGLES:
        rows.append(f"{t}," + ",".join(f"{level(pressure(f, 0.0, t, flat)):.3f}" for f in [500.0, 1000.0, 2000.0]))
    open(name, "w").write("\n".join(rows) + "\n")
