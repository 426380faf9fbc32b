# Generates the invented polar files of tests/data/law (no measured data).
import math
out = "/work/wt/polarlaw/tests/data/law/"

def fmt(vals):
    return "[" + ", ".join(("-inf" if v == float("-inf") else f"{v:.3f}") for v in vals) + "]"

def header(name, arrangement, zone=None, width=1.2):
    s = f'name = "{name}"\norigin = "invented for polaray tests"\n\n[geometry]\narrangement = "{arrangement}"\n'
    s += f"sample_width_m = {width}\nsource_distance_m = 10.0\nreceiver_distance_m = 5.0\n"
    if zone is not None:
        s += f"zone_half_width_deg = {zone}\n"
    return s

def response(band, inc, rx, levels, az=None, inc_az=None):
    s = f"\n[[responses]]\nband_hz = {band}\nincidence_deg = {inc}\n"
    if inc_az is not None:
        s += f"incidence_azimuth_deg = {inc_az}\n"
    s += f"receiver_deg = {fmt(rx)}\n"
    if az is not None:
        s += f"receiver_azimuth_deg = {fmt(az)}\n"
    s += f"level_db = {fmt(levels)}\n"
    return s

rx = [5.0 * i for i in range(-18, 19)]

def scattered(theta, psi, k):
    # smooth, asymmetric invented lobe, different per band index k
    t = math.radians(theta); p = math.radians(psi)
    return 0.15 + (1.0 + 0.5 * math.sin(t + 0.4 * p)) * math.cos(t) ** (0.5 + 0.5 * k) * (1 + 0.3 * math.cos(3 * t + k))

def with_bump(theta, psi, e):
    d = theta + psi
    if abs(d) <= 7.5:
        e += 12.0 * math.exp(-(d / 4.0) ** 2)
    return e

# Plane, octave bands, incidences 0, 30, 60, zone +-7.5 deg.
s = header("invented asymmetric plane diffuser", "plane", zone=7.5)
for k, band in enumerate([125, 250, 500, 1000, 2000, 4000]):
    for psi in [0.0, 30.0, 60.0]:
        lv = [10 * math.log10(with_bump(th, psi, scattered(th, psi, k))) for th in rx]
        s += response(band, psi, rx, lv)
open(out + "plane_octave.toml", "w").write(s)

# Plane, third-octave bands 800, 1000, 1250, incidence 0 and 45, coarse arc.
rx10 = [10.0 * i for i in range(-9, 10)]
s = header("invented third-octave plane diffuser", "plane", zone=5.0)
for j, band in enumerate([800, 1000, 1250]):
    for psi in [0.0, 45.0]:
        lv = [10 * math.log10(with_bump(th, psi, scattered(th, psi, j + 1)) * (1 + 0.5 * j)) for th in rx10]
        s += response(band, psi, rx10, lv)
open(out + "plane_third.toml", "w").write(s)

# Flat plate: energy only in the specular zone.
s = header("invented flat plate", "plane", zone=7.5)
for psi in [0.0, 30.0]:
    lv = [0.0 if abs(th + psi) <= 7.5 else float("-inf") for th in rx]
    s += response(1000, psi, rx, lv)
open(out + "flat_plate.toml", "w").write(s)

# Hemisphere: theta 0..90 step 10, phi step 30, incidences 0 and 40 (azimuth 0).
s = header("invented hemispherical diffuser", "hemisphere", zone=12.0)
s = s.replace("sample_width_m = 1.2\n", "sample_width_m = 1.2\nsample_depth_m = 0.8\n")
for k, band in enumerate([500, 1000]):
    for psi in [0.0, 40.0]:
        th_l, ph_l, lv = [], [], []
        for ti in range(0, 10):
            th = 10.0 * ti
            for pj in ([0] if ti == 0 else range(12)):
                ph = 30.0 * pj
                t, p = math.radians(th), math.radians(ph)
                e = 0.2 + math.cos(t) ** (1 + k) * (1.0 + 0.6 * math.cos(p) * math.sin(t) + 0.3 * math.sin(2 * p))
                # bump near the mirror direction (theta = psi, phi = 180)
                mx, my, mz = -math.sin(math.radians(psi)), 0.0, math.cos(math.radians(psi))
                dx, dy, dz = math.sin(t) * math.cos(p), math.sin(t) * math.sin(p), math.cos(t)
                ang = math.degrees(math.acos(max(-1, min(1, mx * dx + my * dy + mz * dz))))
                if ang <= 12.0:
                    e += 8.0 * math.exp(-(ang / 6.0) ** 2)
                th_l.append(th); ph_l.append(ph); lv.append(10 * math.log10(e))
        s += response(band, psi, th_l, lv, az=ph_l, inc_az=0.0)
open(out + "hemisphere.toml", "w").write(s)
