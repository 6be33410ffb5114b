"""Reference fitter for the speed comparison of `junco fit batch`.

What a skilled scipy user would write: the single-diode model with series
and shunt resistance, I = (a/Rs) W(e^y) + (V - Is Rsh)/(Rs + Rsh),
y = ln(Is Rs Rsh/(a (Rs + Rsh))) + Rsh (V + Is Rs)/(a (Rs + Rsh)), a = n kT/q
(Ortiz-Conde, Garcia Sanchez & Muci, Solid-State Electron. 44, 1861 (2000)),
vectorised over the points with W(e^y) = scipy.special.wrightomega(y); an
analytic Jacobian (implicit differentiation of the model equation); the
residuals ln I_model - ln I with every parameter as its logarithm;
Levenberg-Marquardt (scipy.optimize.least_squares, method='lm', with
xtol = ftol = 1e-10: at the default 1e-8 it stops early on 2 of the 2000
files, far from the minimum); the files
spread over a multiprocessing Pool of 2 processes.

Usage: python3 scipy_pool.py DIR OUT.csv
Reads every DIR/*.csv, *.tsv, *.dat and *.txt written by the benchmark, in
its dialects (comma, semicolon with a decimal comma, tab or blank
separators; units in the column names or a row of units, current in A,
mA or uA; '#' comments with the temperature; quoted fields and extra
columns; CRLF), by numpy.loadtxt after the header is read, writes
file,Is_A,n,Rs_ohm,Rsh_ohm to OUT.csv and the fitting time (pool start to
last result, s) to standard output.
"""
import glob
import math
import os
import re
import sys
import time
from multiprocessing import Pool

import numpy as np
from scipy.optimize import least_squares
from scipy.special import wrightomega

K_B = 1.380649e-23  # J/K, exact (SI 2019)
Q = 1.602176634e-19  # C, exact (SI 2019)


def current(theta, v, vt):
    """Model current at every point and what the Jacobian reuses."""
    i_s, n, rs, rsh = np.exp(theta)
    a = n * vt
    s = rs + rsh
    y = theta[0] + theta[2] + theta[3] - math.log(a * s) + rsh * (v + i_s * rs) / (a * s)
    w = wrightomega(y)
    cur = a / rs * w + (v - i_s * rsh) / s
    return cur, (w, i_s, a, s, rs, rsh)


def dlog_current(v, cur, parts):
    """d ln I / d ln p for p = Is, n, Rs, Rsh (implicit differentiation)."""
    w, i_s, a, s, rs, rsh = parts
    ie = w * a * s / (rs * rsh)  # Is exp(Vd/a)
    vd = v - cur * rs
    gd = ie / a + 1 / rsh
    f = 1 / ((1 + rs * gd) * cur)
    return np.column_stack(((ie - i_s) * f, -ie * vd / a * f, -rs * cur * gd * f, -vd / rsh * f))


# Units a column may carry (in its name or a row of units), as factors to SI.
UNITS = {"V": 1.0, "mV": 1e-3, "A": 1.0, "mA": 1e-3, "uA": 1e-6, "nA": 1e-9}
TEMP = re.compile(r"#\s*(?:temperature|temp|t|tchuck)\s*[:=]?\s*([-+0-9.eE]+)\s*(K|C)?\b", re.I)


def name_unit(cell):
    """Column name and unit of a header cell: 'Voltage (V)', 'I [uA]', 'bias_V'."""
    c = cell.strip().strip('"')
    m = re.match(r"(.*?)\s*[\(\[]\s*(\w+)\s*[\)\]]$", c) or re.match(r"(.*?)_(\w+)$", c)
    if m and m.group(2) in UNITS:
        return m.group(1).lower(), m.group(2)
    return c.lower(), None


def read_iv(path):
    """Temperature (K), V (V) and I (A) of a file in any of the dialects."""
    temp = 300.0
    with open(path, newline="") as f:
        lines = f.read().splitlines()
    rows = []
    for ln in lines:
        t = ln.strip()
        if not t:
            continue
        if t.startswith("#"):
            m = TEMP.match(t)
            if m:
                temp = float(m.group(1)) + (273.15 if (m.group(2) or "K").upper() == "C" else 0.0)
            continue
        rows.append(t)
    head = rows[0]
    sep = "\t" if "\t" in head else ";" if ";" in head else "," if "," in head else None
    cells = head.split(sep)
    names, units = zip(*(name_unit(c) for c in cells))
    body = rows[1:]
    first = [c.strip().strip('"') for c in body[0].split(sep)]
    if all(c in UNITS for c in first):  # a row of units
        units, body = first, body[1:]
    vcol = next(k for k, n in enumerate(names) if n in ("v", "voltage", "bias"))
    icol = next(k for k, n in enumerate(names) if n in ("i", "current"))
    if sep != ",":  # a decimal comma
        body = [b.replace(",", ".") for b in body]
    body = [b.replace('"', "") for b in body]
    data = np.loadtxt(body, delimiter=sep, usecols=(vcol, icol), ndmin=2)
    data[:, 0] *= UNITS[units[vcol] or "V"]
    data[:, 1] *= UNITS[units[icol] or "A"]
    return temp, data


def fit_file(path):
    temp, data = read_iv(path)
    v, i = data[:, 0], data[:, 1]
    keep = (v > 0) & (i > 0)
    v, i = v[keep], i[keep]
    vt = K_B * temp / Q
    li = np.log(i)
    # start values: ln I against V over the middle third (n, Is), Rs from
    # the voltage left over at the top point, Rsh from the lowest point
    m = v.size
    sl = slice(m // 3, 2 * m // 3)
    slope, icpt = np.polyfit(v[sl], li[sl], 1)
    n0 = 1 / (slope * vt)
    is0 = math.exp(icpt)
    rs0 = max((v[-1] - n0 * vt * math.log(i[-1] / is0)) / i[-1], 1e-3)
    rsh0 = 10 * v[0] / i[0]
    theta0 = np.log([is0, n0, rs0, rsh0])

    last = {}

    def res(th):
        with np.errstate(all="ignore"):
            cur, parts = current(th, v, vt)
            r = np.log(cur) - li
        last["th"], last["cur"], last["parts"] = th.copy(), cur, parts
        # a step to non-physical values gets a large cost, so LM shrinks it
        return np.where(np.isfinite(r), r, 1e10)

    def jac(th):
        with np.errstate(all="ignore"):
            if "th" in last and np.array_equal(th, last["th"]):
                cur, parts = last["cur"], last["parts"]
            else:
                cur, parts = current(th, v, vt)
            j = dlog_current(v, cur, parts)
        return np.where(np.isfinite(j), j, 0.0)

    r = least_squares(res, theta0, jac=jac, method="lm", xtol=1e-10, ftol=1e-10)
    return (os.path.basename(path),) + tuple(np.exp(r.x))


def main():
    files = sorted(f for e in ("csv", "tsv", "dat", "txt") for f in glob.glob(os.path.join(sys.argv[1], "*." + e)))
    t0 = time.perf_counter()
    with Pool(2) as pool:
        out = pool.map(fit_file, files, chunksize=16)
    dt = time.perf_counter() - t0
    with open(sys.argv[2], "w") as f:
        f.write("file,Is_A,n,Rs_ohm,Rsh_ohm\n")
        for rec in out:
            f.write("%s,%.9g,%.9g,%.9g,%.9g\n" % rec)
    print("%.6f" % dt)


if __name__ == "__main__":
    main()
